/**
 * The page's instant preview against (1) the textbook Gaussian plume with ground reflection
 * (REFERENCES.md, standard result) with sigma^2 = 2 K x / u (Stockie 2011), computed here by hand, and
 * (2) the command line's Gaussian mode on the demo, which it must reproduce exactly for steady weather
 * (same grid, same receptors), since the page calls the same solver code.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { runScenario } from '../../../solver/drivers/runScenario.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import { computePreview } from '../../../web/preview/previewField.ts';

function parsed(raw: unknown): Scenario {
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  return outcome.scenario;
}

const demo = parsed(JSON.parse(readFileSync(new URL('../../../scenarios/merrowdene-heat-plant/scenario.json', import.meta.url), 'utf8')));

describe('computePreview', () => {
  it('matches the textbook ground-reflected Gaussian plume at receptors downwind (constant K, no rise, uniform wind)', () => {
    const site = { lat: 52, lon: 5, landUse: 'rural' as const };
    const projection = createLocalProjection(site);
    const Q = 2; // g/s
    const u = 4; // m/s, uniform profile
    const H = 25; // m, no plume rise
    const K = 5; // m2/s, both directions
    const z = 1.5; // receptor height [m]
    // Wind FROM the west (270 deg) blows toward +x: receptors due east at 300, 800 and 1500 m, one 40 m off-axis.
    const spots: [number, number][] = [[300, 0], [800, 0], [1500, 0], [800, 40]];
    const receptors = spots.map(([x, y], n) => {
      const [lon, lat] = projection.toLonLat(x, y);
      return { id: `r${n}`, lat, lon, height_m: z };
    });
    const scenario = parsed({
      format: 'plumeplan.scenario/1',
      name: 'textbook plume',
      site,
      domain: { halfWidth_m: 2000, spacing_m: 100, height_m: 1000, layers: 10 },
      pollutant: { name: 'tracer' },
      weather: { kind: 'steady', windSpeed_m_s: u, windFrom_deg: 270, stability: 'D', mixingHeight_m: 100000 },
      dispersion: { kind: 'constant', horizontal_m2_s: K, vertical_m2_s: K },
      windProfile: 'uniform',
      sources: [{ kind: 'point', id: 's', lat: 52, lon: 5, height_m: H, diameter_m: 1, exitVelocity_m_s: 0, exitTemperature_K: 288, emission_g_s: Q, plumeRise: false }],
      receptors,
    });
    const preview = computePreview(scenario);
    spots.forEach(([x, y], n) => {
      const sigma = Math.sqrt((2 * K * x) / u);
      const expected_g_m3 =
        (Q / (2 * Math.PI * u * sigma * sigma)) *
        Math.exp(-(y * y) / (2 * sigma * sigma)) *
        (Math.exp(-((z - H) ** 2) / (2 * sigma * sigma)) + Math.exp(-((z + H) ** 2) / (2 * sigma * sigma)));
      expect(preview.receptors_ug_m3[n] / (expected_g_m3 * 1e6), `receptor at x ${x} m, y ${y} m`).toBeCloseTo(1, 3);
    });
    // The ground field's peak lies downwind (east) of the stack.
    expect(preview.peak.x_m).toBeGreaterThan(0);
    expect(Math.abs(preview.peak.y_m)).toBeLessThanOrEqual(50);
  });

  it('reproduces the command line Gaussian run of the demo: same field, same receptor values', async () => {
    const preview = computePreview(demo);
    const run = await runScenario(demo, { mode: 'gaussian' });
    expect(preview.coarsened).toBe(false);
    expect(preview.grid.nx).toBe(run.grid.nx);
    expect(preview.grid.xWest_m).toBe(run.grid.xWest_m);
    expect(preview.field_ug_m3.length).toBe(run.footprint_ug_m3.length);
    let worst = 0;
    for (let n = 0; n < run.footprint_ug_m3.length; n++) {
      const a = run.footprint_ug_m3[n];
      worst = Math.max(worst, Math.abs(preview.field_ug_m3[n] - a) / Math.max(a, 1e-12));
    }
    // float32 storage of the field: relative error up to 2^-24 (6e-8).
    expect(worst).toBeLessThan(1e-7);
    const runReceptors = run.receptorColumns[0].values;
    preview.receptors_ug_m3.forEach((value, n) => expect(value).toBe(runReceptors[n]));
    expect(preview.weatherLabel).toMatch(/wind from 250° at 5 m\/s, class D/);
  });

  it('coarsens a grid with more columns than allowed, keeping the domain', () => {
    const preview = computePreview(demo, { maximumColumns: 10_000 });
    expect(preview.coarsened).toBe(true);
    expect(preview.grid.spacing_m).toBe(100);
    expect(preview.grid.nx * preview.grid.spacing_m).toBe(10_000);
  });

  it('previews one chosen hour of an hourly series and the most frequent cell of a wind rose', () => {
    const hourly = parsed({
      ...demo,
      weather: {
        kind: 'hourly',
        hours: [
          { time: '2026-01-01T00:00Z', windSpeed_m_s: 5, windFrom_deg: 250, stability: 'D' },
          { time: '2026-01-01T01:00Z', windSpeed_m_s: 3, windFrom_deg: 90, stability: 'E' },
        ],
      },
    });
    const second = computePreview(hourly, { hourIndex: 1, maximumColumns: 2500 });
    expect(second.weatherLabel).toMatch(/^hour 2 of 2/);
    // Wind from the east: the plume goes west, so the peak is west of the site.
    expect(second.peak.x_m).toBeLessThan(0);
    const rose = parsed({
      ...demo,
      weather: {
        kind: 'windRose',
        sectorWidth_deg: 90,
        cells: [
          { windFrom_deg: 0, windSpeed_m_s: 4, stability: 'D', frequency: 0.3 },
          { windFrom_deg: 180, windSpeed_m_s: 4, stability: 'D', frequency: 0.7 },
        ],
      },
    });
    const roseView = computePreview(rose, { maximumColumns: 2500 });
    expect(roseView.weatherLabel).toMatch(/most frequent cell \(70 %/);
    expect(roseView.peak.y_m).toBeGreaterThan(0);
  });

  it('previews one named state of the screening weather set (wind from the west: the peak lies east)', () => {
    const set = parsed({ ...demo, weather: { kind: 'screeningSet', sectors: 36, rain_mm_h: 0, airTemperature_K: 288.15, anemometerHeight_m: 10 } });
    const view = computePreview(set, { maximumColumns: 2500 });
    expect(view.weatherLabel).toMatch(/^one state of the screening weather set .*wind from 270° at 5 m\/s, class D/);
    expect(view.peak.x_m).toBeGreaterThan(0);
  });

  it('names the field when the scenario cannot be previewed', () => {
    const outside = parsed({ ...demo, receptors: [{ id: 'far', lat: 55, lon: -2.28 }] });
    expect(() => computePreview(outside)).toThrow(/receptors\[0\]/);
  });
});
