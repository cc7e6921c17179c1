/**
 * The siting folder (server/writers/siting.ts, its rasters by the pack's writer groundGeoTiff.ts) read
 * back by outside tools: GDAL's gdalinfo and gdallocationinfo for the GeoTIFFs (the site's UTM zone,
 * nodata, the caution, values at points given in WGS 84 and nodata off the site), ogrinfo for the
 * GeoJSON; and the CSV's RFC 4180 form.
 *
 * Resampling tolerance, stated (as in groundGeoTiff.test.ts): nearest-cell resampling onto UTM pixels the
 * size of the grid's cells, so the pixel gdallocationinfo picks has its centre within half a pixel
 * diagonal (0.71 spacing) of the point, and that centre lies in a grid column whose centre is within
 * another 0.71 spacing: the value read must be EXACTLY (to float32) the map value of a column within
 * 1.42 spacings of the point.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import { runSiting, type SitingResult } from '../../../solver/siting/runSiting.ts';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { writeSitingFolder } from '../../../server/writers/siting.ts';

const site = { lat: 53.91, lon: -1.72, landUse: 'rural' as const };
const projection = createLocalProjection(site);
const lonLat = (x: number, y: number): [number, number] => projection.toLonLat(x, y);
const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-siting-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

let result: SitingResult;
let files: string[];
let scenario: Scenario;

beforeAll(async () => {
  const outcome = parseScenario({
    format: 'plumeplan.scenario/1',
    name: 'Siting writer test (invented)',
    site,
    domain: { halfWidth_m: 1000, spacing_m: 50, height_m: 500, layers: 10 },
    pollutant: { name: 'NOx', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 },
    weather: { kind: 'steady', windSpeed_m_s: 4, windFrom_deg: 240, stability: 'C', mixingHeight_m: 800, rain_mm_h: 0, airTemperature_K: 285, anemometerHeight_m: 10 },
    dispersion: { kind: 'stability', curves: 'briggs' },
    solver: { mode: 'gaussian' },
    windProfile: 'powerLaw',
    sources: [{ kind: 'point', id: 'stack', name: 'Stack', lat: site.lat, lon: site.lon, height_m: 15, diameter_m: 0.5, exitVelocity_m_s: 8, exitTemperature_K: 380, emission_g_s: 0.5, plumeRise: true }],
    receptors: [
      { id: 'houses', name: 'Houses, east row', lon: lonLat(600, 300)[0], lat: lonLat(600, 300)[1], height_m: 1.5 },
      { id: 'nursery', name: 'Nursery', lon: lonLat(500, 600)[0], lat: lonLat(500, 600)[1], height_m: 1.5 },
    ],
    assessment: { background_ug_m3: 10, standards: [{ name: 'NO2 1-hour mean', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 18 }] },
  });
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  scenario = outcome.scenario;
  const ring = [lonLat(-200, -200), lonLat(200, -200), lonLat(200, 200), lonLat(-200, 200), lonLat(-200, -200)];
  result = await runSiting(outcome.scenario, { sitePolygon: ring, spacing_m: 100, candidates: [{ id: 'gate, west', lon: lonLat(-150, 0)[0], lat: lonLat(-150, 0)[1] }] });
  files = await writeSitingFolder(scratch, result, { site, scenario });
});

/** Map values of the columns whose centres lie within `spacings` cell spacings of local (x, y). */
function columnsNear(map: Float64Array, x_m: number, y_m: number, spacings: number): number[] {
  const { grid } = result;
  const nearby: number[] = [];
  for (let j = 0; j < grid.ny; j++) {
    for (let i = 0; i < grid.nx; i++) {
      const cx = grid.xWest_m + (i + 0.5) * grid.spacing_m;
      const cy = grid.ySouth_m + (j + 0.5) * grid.spacing_m;
      if (Math.hypot(cx - x_m, cy - y_m) <= spacings * grid.spacing_m) nearby.push(map[i + grid.nx * j]);
    }
  }
  return nearby;
}

const valuesAt = (file: string, x_m: number, y_m: number): string =>
  execFileSync('gdallocationinfo', ['-valonly', '-wgs84', path.join(scratch, file), ...lonLat(x_m, y_m).map(String)], { encoding: 'utf8' }).trim();

describe('siting-map.tif (and one per receptor) read by GDAL', () => {
  it('is a float32 raster in the site UTM zone (EPSG:32630 at 1.72 W) with nodata -9999 and the caution', () => {
    for (const file of ['siting-map.tif', 'siting-map-houses.tif', 'siting-map-nursery.tif']) {
      const info = JSON.parse(execFileSync('gdalinfo', ['-json', path.join(scratch, file)], { encoding: 'utf8' }));
      expect(info.bands, file).toHaveLength(1);
      expect(info.bands[0].type).toBe('Float32');
      expect(info.bands[0].noDataValue).toBe(-9999);
      expect(info.coordinateSystem.wkt).toMatch(/ID\["EPSG",32630\]\]$/);
      expect(info.geoTransform[1]).toBe(result.grid.spacing_m);
      const description: string = info.metadata[''].TIFFTAG_IMAGEDESCRIPTION;
      expect(description).toContain(SCREENING_CAUTION);
      expect(description).toMatch(/Siting map: steady-weather/);
      expect(description).toContain(file === 'siting-map.tif' ? 'highest PC at the receptors' : `PC at ${file.slice(11, -4)}`);
    }
  });

  it('gives the map values at WGS 84 points inside the site (gdallocationinfo), nodata off it', () => {
    const maps: [string, Float64Array][] = [
      ['siting-map.tif', result.map.combined_ug_m3],
      ['siting-map-houses.tif', result.map.perReceptor_ug_m3[0]],
      ['siting-map-nursery.tif', result.map.perReceptor_ug_m3[1]],
    ];
    for (const [file, map] of maps) {
      for (const [x, y] of [[125, -75], [-100, 100], [0, 0]]) {
        const value = Number(valuesAt(file, x, y));
        const nearby = columnsNear(map, x, y, 1.42);
        expect(nearby.some((cell) => Math.fround(cell) === Math.fround(value)), `${file} at (${x}, ${y}): ${value} is no nearby column's value`).toBe(true);
        expect(value).toBeGreaterThan(0);
      }
      // 700 m from the site's 200 m square: off the site, inside the grid
      expect(Number(valuesAt(file, 700, 700)), file).toBe(-9999);
    }
  });
});

describe('siting.geojson, candidates.csv, siting.json', () => {
  it('writes the four files, a raster per receptor, the siting figure and report', () => {
    expect(files).toEqual([
      'siting.json', 'candidates.csv', 'siting-map.tif', 'siting.geojson', 'siting-map-houses.tif', 'siting-map-nursery.tif',
      'siting-map.svg', 'siting-map.png', 'siting-report.html', 'siting-report.pdf',
    ]);
  });

  it('siting.geojson is read by ogrinfo and carries the caution, the best position and the bands', () => {
    const text = execFileSync('ogrinfo', ['-ro', '-al', '-so', path.join(scratch, 'siting.geojson')], { encoding: 'utf8' });
    expect(text).toMatch(/Feature Count: \d+/);
    const collection = JSON.parse(readFileSync(path.join(scratch, 'siting.geojson'), 'utf8'));
    expect(collection.properties.caution).toBe(SCREENING_CAUTION);
    expect(collection.properties.limits.join(' ')).toMatch(/flat terrain/);
    const kinds = new Set(collection.features.map((feature: { properties: { kind: string } }) => feature.properties.kind));
    for (const kind of ['map band', 'best position', 'candidate', 'receptor', 'site polygon']) expect(kinds.has(kind), kind).toBe(true);
  });

  it('candidates.csv is RFC 4180 (CRLF, quoted comma), one row per candidate, best first', () => {
    const text = readFileSync(path.join(scratch, 'candidates.csv'), 'utf8');
    const lines = text.split('\r\n');
    expect(lines.at(-1)).toBe('');
    expect(lines[0]).toBe('rank,id,origin,lon,lat,x_m,y_m,combined_ug_m3,highest_pc_ug_m3,highest_receptor,pc_houses_ug_m3,pc_nursery_ug_m3,percent_of_standard,verdict,ground_peak_ug_m3,area_above_level_m2');
    expect(lines).toHaveLength(result.candidates.length + 2);
    expect(text).toContain('"gate, west"');
    expect(lines[1].startsWith('1,')).toBe(true);
  });

  it('siting.json carries the format, caution, limits, best position and the ranked candidates', () => {
    const json = JSON.parse(readFileSync(path.join(scratch, 'siting.json'), 'utf8'));
    expect(json.format).toBe('plumeplan.siting/1');
    expect(json.caution).toBe(SCREENING_CAUTION);
    expect(json.limits).toHaveLength(4);
    expect(json.candidates.map((candidate: { rank: number }) => candidate.rank)).toEqual(result.candidates.map((_, n) => n + 1));
    expect(json.best.within).toBe('site polygon');
    expect(json.map.rasters.combined).toBe('siting-map.tif');
    expect(json.map.rasters.perReceptor).toEqual({ houses: 'siting-map-houses.tif', nursery: 'siting-map-nursery.tif' });
  });
});
