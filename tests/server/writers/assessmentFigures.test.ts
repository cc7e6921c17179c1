/**
 * The assessment in the result folder: verdicts and level areas in summary.json (rounded: concentrations
 * to 3, decision figures to 2 significant figures), each standard's ground map as GeoJSON that GDAL's
 * ogrinfo reads (RFC 7946 FeatureCollection; Debian gdal-bin), and the verdict table.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { roundVerdicts, verdictTable } from '../../../server/writers/assessmentFigures.ts';
import { writeResultFolder } from '../../../server/writers/writeResultFolder.ts';
import { runScenario } from '../../../solver/drivers/runScenario.ts';
import { sitePeak } from '../../../solver/grid/siteBoundary.ts';

const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-assessment-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

const DEMO = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');

function demoWithLibrary() {
  const raw = JSON.parse(readFileSync(DEMO, 'utf8'));
  raw.domain = { halfWidth_m: 3000, spacing_m: 150, height_m: 1000, layers: 10 };
  raw.solver = { mode: 'gaussian' };
  raw.assessment = { background_ug_m3: 14, libraryPollutant: 'NOx', standardSets: ['eu-2008-50-ec'] };
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  return outcome.scenario;
}

describe('assessment figures in the result folder', () => {
  it('writes verdicts, level areas and a ground map of each standard that ogrinfo reads', async () => {
    const scenario = demoWithLibrary();
    const result = await runScenario(scenario, {});
    const directory = path.join(scratch, 'library');
    const written = await writeResultFolder(directory, scenario, result, { levels_ug_m3: [0.4, 4, 20] });
    const summary = JSON.parse(readFileSync(path.join(directory, 'summary.json'), 'utf8'));
    // steady weather: the hourly standard gets this hour's PC (0.35 x NOx), the annual one the reason instead
    const [hourly, annual] = summary.verdicts.standards;
    expect(hourly.basis).toBe('oneWeatherHour');
    expect(hourly.maximum.outcome).toBe('indicative');
    // the demo gives a site boundary: the point of maximum impact is the highest ground value off the site
    const peakNox = sitePeak(result.grid, result.footprint_ug_m3, result.site ?? null).value_ug_m3;
    expect(result.site).toBeTruthy();
    expect(hourly.maximum.searched).toMatch(/off the site/);
    expect(hourly.maximum.pc_ug_m3).toBe(Number((0.35 * peakNox).toPrecision(3)));
    expect(String(hourly.maximum.pcPercentOfStandard).replace(/^0\.0*|\./g, '').length).toBeLessThanOrEqual(2);
    expect(annual.basis).toBeNull();
    expect(annual.reason).toMatch(/cannot tell an annual mean/);
    // areas: nested levels shrink, in m2 and ha, two significant figures
    const areas = summary.footprint.areas;
    expect(areas.map((a: { level_ug_m3: number }) => a.level_ug_m3)).toEqual([0.4, 4, 20]);
    expect(areas[0].area_m2).toBeGreaterThan(areas[1].area_m2);
    for (const entry of areas) {
      expect(entry.area_ha).toBe(Number((entry.area_m2 / 10_000).toPrecision(2)));
      expect(String(entry.area_m2).replace(/0+$/, '').length).toBeLessThanOrEqual(2);
    }
    // steady weather: no standard maps (the hourly PC is the footprint itself)
    expect(written.files.filter((name) => name.startsWith('standard-'))).toEqual([]);
  });

  it('maps each standard on the ground for the screening weather set, in GeoJSON that ogrinfo reads', async () => {
    const raw = demoWithLibrary();
    const scenario = { ...raw, domain: { ...raw.domain!, spacing_m: 300 }, weather: { kind: 'screeningSet' as const, sectors: 4, rain_mm_h: 0, airTemperature_K: 283.15, anemometerHeight_m: 10 } };
    const result = await runScenario(scenario, {});
    const directory = path.join(scratch, 'screening');
    const written = await writeResultFolder(directory, scenario, result);
    const mapFile = 'standard-no2-1-hour-mean-eu-2008-50-ec.geojson';
    expect(written.files).toContain(mapFile);
    expect(written.files).toContain('standard-no2-annual-mean-eu-2008-50-ec.geojson');
    const map = JSON.parse(readFileSync(path.join(directory, mapFile), 'utf8'));
    expect(map.properties.standard).toMatchObject({ basis: 'upperBound', limit_ug_m3: 200, levelsPercentOfLimit: [1, 10, 50, 100] });
    expect(map.type).toBe('FeatureCollection');
    expect(map.properties.caution).toBe(SCREENING_CAUTION);
    expect(map.properties.levels_ug_m3).toEqual([2, 20, 100, 200]);
    const ogr = execFileSync('ogrinfo', ['-ro', '-al', '-so', path.join(directory, mapFile)], { encoding: 'utf8' });
    expect(ogr).toMatch(/Geometry: (Multi )?Polygon/);
    expect(ogr).toMatch(/Feature Count: [1-4]\b/);
  });

  it('prints one row per standard, saying which has no figure, with the thresholds labelled as common practice', async () => {
    const scenario = demoWithLibrary();
    const result = await runScenario(scenario, {});
    const lines = verdictTable(roundVerdicts(result.verdicts!));
    expect(lines[0]).toMatch(/common practice in permit guidance, not a legal decision/);
    expect(lines[0]).toMatch(/NO2 = 0.7 \(long-term\) \/ 0.35 \(short-term\) x NOx/);
    expect(lines).toHaveLength(4);
    expect(lines[3]).toMatch(/NO2 annual mean .* no figure/);
  });
});
