/**
 * The siting folder (server/writers/siting.ts, localGeoTiff.ts) read back by outside tools: GDAL's
 * gdalinfo and gdallocationinfo for the GeoTIFF (its CRS, its geotransform, values at points given in
 * WGS 84 and the nodata outside the site), ogrinfo for the GeoJSON; and the CSV's RFC 4180 form.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
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
  const ring = [lonLat(-200, -200), lonLat(200, -200), lonLat(200, 200), lonLat(-200, 200), lonLat(-200, -200)];
  result = await runSiting(outcome.scenario, { sitePolygon: ring, spacing_m: 100, candidates: [{ id: 'gate, west', lon: lonLat(-150, 0)[0], lat: lonLat(-150, 0)[1] }] });
  files = await writeSitingFolder(scratch, result, { site });
});

describe('siting-map.tif read by GDAL', () => {
  it('has the grid size, one band per map, the local transverse Mercator and the grid corner', () => {
    const info = JSON.parse(execFileSync('gdalinfo', ['-json', path.join(scratch, 'siting-map.tif')], { encoding: 'utf8' }));
    expect(info.size).toEqual([result.grid.nx, result.grid.ny]);
    expect(info.bands).toHaveLength(1 + result.receptors.length);
    expect(info.bands[0].type).toBe('Float32');
    const wkt: string = info.coordinateSystem.wkt;
    expect(wkt).toMatch(/Transverse Mercator/);
    expect(wkt).toMatch(new RegExp(`"Latitude of natural origin",${site.lat}`));
    expect(wkt).toMatch(new RegExp(`"Longitude of natural origin",${site.lon}`));
    expect(info.geoTransform).toEqual([result.grid.xWest_m, result.grid.spacing_m, 0, result.grid.ySouth_m + result.grid.ny * result.grid.spacing_m, 0, -result.grid.spacing_m]);
    expect(info.metadata[''].TIFFTAG_IMAGEDESCRIPTION).toContain(SCREENING_CAUTION);
  });

  it('gives the map values at WGS 84 points (gdallocationinfo), nodata outside the site', () => {
    const valuesAt = (lon: number, lat: number): string[] =>
      execFileSync('gdallocationinfo', ['-valonly', '-wgs84', path.join(scratch, 'siting-map.tif'), String(lon), String(lat)], { encoding: 'utf8' }).trim().split('\n');
    // the column centred at (125, -75) m lies inside the site
    const i = Math.round((125 - result.grid.xWest_m) / result.grid.spacing_m - 0.5);
    const j = Math.round((-75 - result.grid.ySouth_m) / result.grid.spacing_m - 0.5);
    const column = i + result.grid.nx * j;
    const [lon, lat] = lonLat(125, -75);
    const values = valuesAt(lon, lat).map(Number);
    expect(values[0]).toBeCloseTo(result.map.combined_ug_m3[column], 6);
    expect(Math.abs(values[1] / result.map.perReceptor_ug_m3[0][column] - 1)).toBeLessThan(1e-6);
    expect(values[0]).toBeGreaterThan(0);
    const outside = valuesAt(...lonLat(700, 700));
    expect(outside[0]).toMatch(/nan/i);
  });
});

describe('siting.geojson, candidates.csv, siting.json', () => {
  it('writes the four files', () => {
    expect(files.slice(0, 4)).toEqual(['siting.json', 'candidates.csv', 'siting-map.tif', 'siting.geojson']);
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
    expect(json.map.bands).toEqual(['1: highest of 2 receptors', '2: PC at houses', '3: PC at nursery']);
  });
});
