/**
 * ground.tif read by GDAL (Debian gdal-bin), the outside reader: size, CRS, nodata and georeferencing
 * from `gdalinfo`, and the value at each receptor's lon/lat from `gdallocationinfo -wgs84`.
 *
 * Resampling tolerance, stated: with nearest-cell resampling and pixels the size of the grid's cells, the
 * pixel gdallocationinfo picks has its centre within half a pixel diagonal (0.71 spacing) of the receptor,
 * and that centre lies in a local cell whose centre is within another 0.71 spacing. So the value read
 * must be EXACTLY (to float32) the value of one local cell whose centre is within 1.42 spacings of the
 * receptor, and it may differ from the receptor's own figure by at most the spread (max - min) of the
 * cells within that radius. Both are asserted. With bilinear resampling (on request) the value is a convex
 * combination of the four cell centres around the pixel centre, each within 1.42 spacings of it: the value
 * lies within the range of the cells within 2.13 spacings of the receptor.
 *
 * The plume here is narrow (sigma_y about 50 m at 700 m, 30 m cells), so neighbouring cells differ by up
 * to a factor of three across it: a raster misplaced by even two cells fails these checks.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { writeGroundGeoTiff, type GroundGeoTiff } from '../../../server/writers/groundGeoTiff.ts';
import type { ScenarioRunResult } from '../../../solver/drivers/types.ts';
import { makePackScenario, packRunResult } from './packFixture.ts';

const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-geotiff-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

const scenario = makePackScenario();
let result: ScenarioRunResult;
let tif: GroundGeoTiff;
const file = path.join(scratch, 'ground.tif');

interface GdalInfo {
  size: [number, number];
  geoTransform: number[];
  coordinateSystem: { wkt: string };
  metadata: Record<string, Record<string, string>>;
  bands: { type: string; noDataValue: number; metadata: Record<string, Record<string, string>> }[];
}

function gdalinfo(target: string, ...extra: string[]): GdalInfo {
  return JSON.parse(execFileSync('gdalinfo', ['-json', ...extra, target], { encoding: 'utf8' })) as GdalInfo;
}

beforeAll(async () => {
  result = await packRunResult();
  tif = await writeGroundGeoTiff(result, { scenarioName: scenario.name, pollutant: 'NOx', version: '0.1.0', runDate: new Date('2026-12-02T03:00:00Z') });
  writeFileSync(file, tif.bytes);
});

/** Values of the local cells whose centres lie within `spacings` cell spacings of a lon/lat. */
function cellsNear(lon: number, lat: number, spacings: number): number[] {
  const { grid } = result;
  const [x_m, y_m] = grid.projection.toLocal(lon, lat);
  const nearby: number[] = [];
  for (let j = 0; j < grid.ny; j += 1) {
    for (let i = 0; i < grid.nx; i += 1) {
      const cx = grid.xWest_m + (i + 0.5) * grid.spacing_m;
      const cy = grid.ySouth_m + (j + 0.5) * grid.spacing_m;
      if (Math.hypot(cx - x_m, cy - y_m) <= spacings * grid.spacing_m) nearby.push(result.footprint_ug_m3[i + grid.nx * j]);
    }
  }
  return nearby;
}

describe('ground.tif', () => {
  it('gdalinfo reads the stated size, the site UTM zone, float32, nodata and the caution', () => {
    const info = gdalinfo(file);
    expect(info.size).toEqual([tif.width, tif.height]);
    // The 3000 m grid, a little rotated against UTM (convergence about 0.6 deg here), snapped outward to 30 m pixels.
    expect(tif.width).toBeGreaterThanOrEqual(100);
    expect(tif.width).toBeLessThanOrEqual(104);
    expect(info.coordinateSystem.wkt).toMatch(/ID\["EPSG",32630\]\]$/);
    expect(info.coordinateSystem.wkt).toContain('WGS 84 / UTM zone 30N');
    expect(info.geoTransform[1]).toBe(30);
    expect(info.geoTransform[5]).toBe(-30);
    expect(info.geoTransform[0] % 30).toBe(0);
    expect(info.bands[0].type).toBe('Float32');
    expect(info.bands[0].noDataValue).toBe(-9999);
    const description = info.metadata['']['TIFFTAG_IMAGEDESCRIPTION'];
    expect(description).toContain(SCREENING_CAUTION);
    expect(description).toContain('nearest cell');
    expect(description).toContain('EPSG:32630');
    expect(info.metadata['']['TIFFTAG_SOFTWARE']).toBe('plumeplan 0.1.0');
    expect(info.metadata['']['TIFFTAG_DATETIME']).toBe('2026:12:02 03:00:00');
  });

  it('marks the pixels outside the modelled grid as nodata and nothing negative inside', () => {
    const info = gdalinfo(file, '-stats');
    rmSync(`${file}.aux.xml`, { force: true });
    const statistics = info.bands[0].metadata[''];
    expect(Number(statistics.STATISTICS_MINIMUM)).toBeGreaterThanOrEqual(0);
    const validPercent = Number(statistics.STATISTICS_VALID_PERCENT);
    expect(validPercent).toBeLessThan(100);
    expect(validPercent).toBeGreaterThan(90);
    // Nearest-cell resampling keeps the model's own values: the raster's maximum is a cell of the field.
    const maximum = Number(statistics.STATISTICS_MAXIMUM);
    expect(result.footprint_ug_m3.some((value) => Math.abs(Math.fround(value) - maximum) <= 1e-6 * maximum)).toBe(true);
  });

  it('gdallocationinfo -wgs84 at each receptor returns its figure within the stated resampling tolerance', () => {
    const { grid } = result;
    const figures = result.receptorColumns.find((column) => column.key === 'concentration_ug_m3')!.values;
    scenario.receptors.forEach((receptor, index) => {
      const output = execFileSync('gdallocationinfo', ['-wgs84', '-valonly', file, String(receptor.lon), String(receptor.lat)], { encoding: 'utf8' });
      const value = Number(output.trim());
      const nearby = cellsNear(receptor.lon, receptor.lat, 1.42);
      expect(nearby.some((cell) => Math.fround(cell) === Math.fround(value)), `${receptor.id}: ${value} is no nearby cell's value`).toBe(true);
      const spread = Math.max(...nearby) - Math.min(...nearby);
      expect(Math.abs(value - figures[index]), `${receptor.id}: ${value} against ${figures[index]}`).toBeLessThanOrEqual(spread + 1e-6);
      expect(figures[index]).toBeGreaterThan(0.5); // a real check: each receptor sits in the plume
    });
  });

  it('writes a CRS the user names (British National Grid) and bilinear resampling on request', async () => {
    const named = await writeGroundGeoTiff(result, { crs: 'EPSG:27700', resampling: 'bilinear' });
    const namedFile = path.join(scratch, 'ground-27700.tif');
    writeFileSync(namedFile, named.bytes);
    const info = gdalinfo(namedFile);
    expect(info.coordinateSystem.wkt).toContain('OSGB36 / British National Grid');
    expect(info.coordinateSystem.wkt).toMatch(/ID\["EPSG",27700\]\]$/);
    expect(info.metadata['']['TIFFTAG_IMAGEDESCRIPTION']).toContain('bilinear');
    scenario.receptors.forEach((receptor, index) => {
      const value = Number(execFileSync('gdallocationinfo', ['-wgs84', '-valonly', namedFile, String(receptor.lon), String(receptor.lat)], { encoding: 'utf8' }).trim());
      const nearby = cellsNear(receptor.lon, receptor.lat, 2.13);
      expect(value).toBeGreaterThanOrEqual(Math.fround(Math.min(...nearby)) * (1 - 1e-6));
      expect(value).toBeLessThanOrEqual(Math.fround(Math.max(...nearby)) * (1 + 1e-6));
      expect(Math.abs(value - result.receptorColumns[0].values[index])).toBeLessThanOrEqual(Math.max(...nearby) - Math.min(...nearby));
    });
  });

  it('refuses a pixel size that is not positive, naming it', async () => {
    await expect(writeGroundGeoTiff(result, { pixelSize: -5 })).rejects.toThrow(/pixelSize: -5 is not allowed/);
  });
});
