/**
 * summary.json: the keys and units `../shared/spec/scenario-format.md` lists for the result folder,
 * the rounding of figures, the peak's position, and the merging of a driver's extra entries.
 */
import { describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { buildSummary } from '../../../server/writers/summary.ts';
import { makeTestGrid, makeTestRunResult, makeTestScenario } from './helpers.ts';
import { siteColumns } from '../../../solver/grid/siteBoundary.ts';

const scenario = makeTestScenario();
const grid = makeTestGrid({ site: scenario.site, nx: 10, ny: 10, spacing_m: 100, xWest_m: -500, ySouth_m: -500 });

describe('summary.json', () => {
  it('has every key the spec lists, with the spec names', () => {
    const budget = {
      basis: 'steady state, one hour of operation',
      emitted: 5400,
      inDomain: 1200.123456789,
      decayed: 0,
      washedOut: 0,
      dryDeposited: 0,
      outflow: 4199.876543211,
      relativeImbalance: 1.23456e-12,
    };
    const summary = buildSummary(scenario, makeTestRunResult(grid, { massBudget_g: budget, mode: 'grid' }));
    // Spec table: format, name, mode, grid, run, massBudget_g, sources, peak, receptors, caution.
    for (const key of ['format', 'name', 'mode', 'grid', 'run', 'massBudget_g', 'sources', 'peak', 'receptors', 'caution']) {
      expect(summary, key).toHaveProperty(key);
    }
    expect(summary.format).toBe('plumeplan.result/1');
    expect(summary.name).toBe(scenario.name);
    expect(summary.mode).toBe('grid');
    expect(summary.grid).toMatchObject({ nx: 10, ny: 10, nz: 4, spacing_m: 100 });
    expect(summary.grid.projection).toBe(grid.projection.definition);
    expect(summary.grid.projection).toMatch(/^\+proj=tmerc /);
    expect(summary.run).toEqual({ steps: 1, wallSeconds: 0.012 });
    expect(Object.keys(summary.massBudget_g!).sort()).toEqual(
      ['basis', 'decayed', 'dryDeposited', 'emitted', 'inDomain', 'outflow', 'relativeImbalance', 'washedOut'],
    );
    expect(summary.massBudget_g!.inDomain).toBe(1200.12);
    expect(summary.sources).toEqual([{ id: 'stack-1', x_m: 0, y_m: 0, effectiveHeight_m: 61.2 }]);
    expect(Object.keys(summary.peak)).toEqual(expect.arrayContaining(['concentration_ug_m3', 'lat', 'lon']));
    for (const receptor of summary.receptors) {
      expect(Object.keys(receptor)).toEqual(expect.arrayContaining(['id', 'lat', 'lon', 'x_m', 'y_m', 'concentration_ug_m3']));
    }
    expect(summary.caution).toBe(SCREENING_CAUTION);
    expect(summary.notes).toEqual(['dry deposition not applied (depositionVelocity_m_s is 0)']);
    // JSON-ready: survives a round trip unchanged.
    expect(JSON.parse(JSON.stringify(summary))).toEqual(summary);
  });

  it('the peak is the ground-level maximum at the centre of its cell, 3 significant figures', () => {
    const summary = buildSummary(scenario, makeTestRunResult(grid));
    // Cell (7, 4): centre x = -500 + 7.5 * 100 = 250 m, y = -500 + 4.5 * 100 = -50 m.
    const [lon, lat] = grid.projection.toLonLat(250, -50);
    expect(summary.peak).toEqual({
      concentration_ug_m3: 12.3,
      lat: Math.round(lat * 1e7) / 1e7,
      lon: Math.round(lon * 1e7) / 1e7,
      x_m: 250,
      y_m: -50,
      statistic: 'concentration',
      where: 'anywhere on the grid: no site boundary was given, so this peak may be on the site itself',
    });
  });

  it('with a site boundary the peak is the largest off the site; the on-site maximum is kept and labelled', () => {
    const result = makeTestRunResult(grid);
    // Put the maximum's cell (7, 4) on the site: a square ring about its centre (250, -50).
    const ring_m: [number, number][] = [[200, -100], [300, -100], [300, 0], [200, 0], [200, -100]];
    const summary = buildSummary(scenario, { ...result, site: siteColumns(grid, ring_m) });
    let offSite = 0;
    result.footprint_ug_m3.forEach((value, column) => {
      if (column !== 7 + grid.nx * 4) offSite = Math.max(offSite, value);
    });
    expect(summary.peak.concentration_ug_m3).toBe(Number(offSite.toPrecision(3)));
    expect(summary.peak.where).toBe('off the site (outside site.boundary)');
    expect(summary.peak.onSite).toMatchObject({ concentration_ug_m3: 12.3, x_m: 250, y_m: -50 });
    expect(summary.peak.onSite?.label).toMatch(/^on the site/);
  });

  it('receptors carry their position in local metres and their figures rounded to 3 significant figures', () => {
    const summary = buildSummary(scenario, makeTestRunResult(grid));
    const [x_m, y_m] = grid.projection.toLocal(scenario.receptors[0].lon, scenario.receptors[0].lat);
    expect(summary.receptors[0]).toEqual({
      id: 'school',
      name: 'Primary school',
      lat: 54.1241,
      lon: -2.4531,
      x_m: Math.round(x_m * 10) / 10,
      y_m: Math.round(y_m * 10) / 10,
      height_m: 1.5,
      concentration_ug_m3: 3.14,
    });
    expect(summary.receptors[1].concentration_ug_m3).toBe(0.000123);
  });

  it('rounds only concentrations: a count keeps every digit', () => {
    const result = makeTestRunResult(grid, {
      receptorColumns: [
        { key: 'mean_ug_m3', values: Float64Array.of(1.23456, 2) },
        { key: 'hours_above_200_ug_m3_count', values: Float64Array.of(1234, 0) },
      ],
    });
    const summary = buildSummary(scenario, result);
    expect(summary.receptors[0].mean_ug_m3).toBe(1.23);
    expect(summary.receptors[0].hours_above_200_ug_m3_count).toBe(1234);
  });

  it('reports effective heights for steady weather only, as the spec says', () => {
    const summary = buildSummary(scenario, makeTestRunResult(grid, { weatherKind: 'hourly', footprintStatistic: 'mean' }));
    expect(summary.sources[0]).toEqual({ id: 'stack-1', x_m: 0, y_m: 0 });
    expect(summary.peak.statistic).toBe('mean');
  });

  it('merges extra entries, and refuses one that would overwrite a key of its own', () => {
    const withExtra = buildSummary(scenario, makeTestRunResult(grid, { extraSummary: { stabilityFrequencies: { D: 1 } } }));
    expect(withExtra.stabilityFrequencies).toEqual({ D: 1 });
    expect(() => buildSummary(scenario, makeTestRunResult(grid, { extraSummary: { peak: 1 } }))).toThrow(/extraSummary.peak/);
  });

  it('refuses receptor columns that do not match the scenario receptors', () => {
    const result = makeTestRunResult(grid, { receptorColumns: [{ key: 'concentration_ug_m3', values: Float64Array.of(1) }] });
    expect(() => buildSummary(scenario, result)).toThrow(/1 values for 2 receptors/);
  });
});
