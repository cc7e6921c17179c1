/**
 * The siting map's pure parts on the page: reading siting.geojson, the bands' colours and labels, the
 * band holding a position, decoding siting-map.tif and the value at a lon/lat, and the read-out's words.
 *
 * Outside references: the raster's size, corner, pixel size, EPSG code and nodata are compared with
 * GDAL's `gdalinfo -json`, and the value at each of 40 lon/lat positions with GDAL's
 * `gdallocationinfo -wgs84 -valonly` on the same file (GDAL transforms with PROJ; the page with proj4).
 * The band colours' ends are viridis's published ends, #440154 and #fde725, and its midpoint #21918c
 * (the five-stop list of viridis commonly published with matplotlib's colour maps; from memory, as in
 * tests/web/colour/colourScale.test.ts).
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GEOTIFF_NODATA, writeGroundGeoTiff } from '../../../server/writers/groundGeoTiff.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import { hexToRgb } from '../../../web/colour/colourScale.ts';
import {
  bandAt,
  bandOf,
  decodeSitingRaster,
  readSitingGeoJson,
  sitingBandStyles,
  sitingReadout,
  sitingValueAt,
  type SitingRaster,
} from '../../../web/siting/sitingMap.ts';

const SITE = { lat: 54.0612, lon: -2.2841 };

function closeColour(actual: string, expected: string, units: number): void {
  const a = hexToRgb(actual);
  const e = hexToRgb(expected);
  for (let c = 0; c < 3; c++) expect(Math.abs(a[c] - e[c]), `${actual} against ${expected}`).toBeLessThanOrEqual(units);
}

describe('siting.geojson as the page reads it', () => {
  const square = (x0: number, y0: number, size: number) => [[x0, y0], [x0 + size, y0], [x0 + size, y0 + size], [x0, y0 + size], [x0, y0]];
  const collection = {
    type: 'FeatureCollection',
    properties: { meaning: 'highest of 2 receptors PC', levels_ug_m3: [1, 2], caution: 'c' },
    features: [
      { type: 'Feature', properties: { kind: 'candidate', rank: 2, id: 'b', combined_ug_m3: 3, verdict: null }, geometry: { type: 'Point', coordinates: [0.5, 0.5] } },
      { type: 'Feature', properties: { kind: 'map band', lower_ug_m3: 2, upper_ug_m3: null }, geometry: { type: 'Polygon', coordinates: [square(2, 2, 2)] } },
      // the lower band: a 10 x 10 square with the upper band's square as its hole
      { type: 'Feature', properties: { kind: 'map band', lower_ug_m3: 1, upper_ug_m3: 2 }, geometry: { type: 'Polygon', coordinates: [square(0, 0, 10), square(2, 2, 2)] } },
      { type: 'Feature', properties: { kind: 'candidate', rank: 1, id: 'a', combined_ug_m3: 1.5, verdict: 'insignificant' }, geometry: { type: 'Point', coordinates: [1, 1] } },
      { type: 'Feature', properties: { kind: 'best position', combined_ug_m3: 1.5 }, geometry: { type: 'Point', coordinates: [1, 1] } },
      { type: 'Feature', properties: { kind: 'receptor', id: 'r1', name: 'School' }, geometry: { type: 'Point', coordinates: [5, 5] } },
      { type: 'Feature', properties: { kind: 'site polygon' }, geometry: { type: 'Polygon', coordinates: [square(0, 0, 3)] } },
    ],
  };

  it('sorts the bands lowest first and the candidates by rank, and keeps the best position, receptors and site', () => {
    const content = readSitingGeoJson(collection);
    expect(content.bands.map((b) => [b.lower_ug_m3, b.upper_ug_m3])).toEqual([[1, 2], [2, null]]);
    expect(content.candidates.map((c) => c.id)).toEqual(['a', 'b']);
    expect(content.best).toEqual({ lon: 1, lat: 1, combined_ug_m3: 1.5 });
    expect(content.receptors).toEqual([{ lon: 5, lat: 5, id: 'r1', name: 'School' }]);
    expect(content.siteRing).toHaveLength(5);
    expect(content.levels_ug_m3).toEqual([1, 2]);
  });

  it('finds the band under a position, holes excluded', () => {
    const { bands } = readSitingGeoJson(collection);
    expect(bandAt(bands, 1, 1)?.lower_ug_m3).toBe(1);
    expect(bandAt(bands, 3, 3)?.lower_ug_m3).toBe(2);
    expect(bandAt(bands, 11, 1)).toBeNull();
  });

  it('names what it cannot read', () => {
    expect(() => readSitingGeoJson({ type: 'Feature' })).toThrow(/not a GeoJSON FeatureCollection/);
    expect(() => readSitingGeoJson({ type: 'FeatureCollection', features: [{ properties: { kind: 'map band' }, geometry: { type: 'Point', coordinates: [0, 0] } }] })).toThrow(/features\[0\].*lower_ug_m3/);
    expect(() => readSitingGeoJson({ type: 'FeatureCollection', features: [{ properties: { kind: 'candidate', rank: 1 }, geometry: { type: 'Point', coordinates: ['x'] } }] })).toThrow(/features\[0\]\.geometry\.coordinates/);
  });
});

describe('the bands\' colours', () => {
  const levels = [0.05, 0.1, 0.2, 0.5, 1, 2, 5];

  it('run the page\'s ramp from its dark end (lowest band) to its light end (top band)', () => {
    const styles = sitingBandStyles(levels);
    expect(styles).toHaveLength(7);
    closeColour(styles[0].colour, '#440154', 0);
    closeColour(styles[6].colour, '#fde725', 0);
    // 0.5 is half-way between 0.05 and 5 on a log scale: viridis's midpoint, within the ramp's
    // linear interpolation between control points (a few units in 255)
    closeColour(styles[3].colour, '#21918c', 4);
  });

  it('label each band with its range, the top one open', () => {
    const styles = sitingBandStyles(levels);
    expect(styles[0].label).toBe('0.05 to 0.1');
    expect(styles[6].label).toBe('5 and above');
    expect(bandOf(styles, 0.7)?.label).toBe('0.5 to 1');
    expect(bandOf(styles, 5)?.label).toBe('5 and above');
    expect(bandOf(styles, 0.01)).toBeNull();
  });

  it('keep the ends on a linear scale too, and give one level the top colour', () => {
    const linear = sitingBandStyles([1, 2, 3], 'linear');
    closeColour(linear[0].colour, '#440154', 0);
    closeColour(linear[2].colour, '#fde725', 0);
    expect(sitingBandStyles([4])[0].colour).toBe('#fde725');
    expect(sitingBandStyles([])).toEqual([]);
  });

  it('word the read-out where the raster has a value, where only a band covers the position, and outside the bands', () => {
    const styles = sitingBandStyles(levels);
    expect(sitingReadout(1.08, styles, null)).toBe('Siting map: 1.08 µg/m³ if the stack stood here (band 1 to 2)');
    expect(sitingReadout(null, styles, styles[2])).toBe('Siting map: band 0.2 to 0.5 µg/m³ here');
    expect(sitingReadout(null, styles, null)).toBe('Siting map: below 0.05 µg/m³ or off the grid');
  });
});

describe('siting-map.tif decoded in the page, against GDAL', () => {
  let folder: string;
  let file: string;
  let raster: SitingRaster;
  // a 30 x 24 grid of 50 m cells about the demo's site; values vary along both axes, and a block in
  // the south-west corner is nodata as off a site
  const grid = { nx: 30, ny: 24, spacing_m: 50, xWest_m: -750, ySouth_m: -600, projection: createLocalProjection(SITE) };
  const field = new Float64Array(grid.nx * grid.ny);
  for (let j = 0; j < grid.ny; j++) for (let i = 0; i < grid.nx; i++) field[i + grid.nx * j] = i < 6 && j < 5 ? GEOTIFF_NODATA : 0.25 + i + 100 * j;

  beforeAll(async () => {
    folder = mkdtempSync(path.join(tmpdir(), 'plumeplan-siting-raster-'));
    file = path.join(folder, 'siting-map.tif');
    const tif = await writeGroundGeoTiff(
      { grid: { ...grid, nz: 1, zFaces_m: new Float64Array([0, 10]), zCentres_m: new Float64Array([5]), dz_m: new Float64Array([10]) }, footprint_ug_m3: field, footprintStatistic: 'concentration', weatherKind: 'steady' },
      { subject: 'Siting map test' },
    );
    writeFileSync(file, tif.bytes);
    const bytes = tif.bytes.buffer.slice(tif.bytes.byteOffset, tif.bytes.byteOffset + tif.bytes.byteLength) as ArrayBuffer;
    raster = await decodeSitingRaster(bytes);
  });

  afterAll(() => rmSync(folder, { recursive: true, force: true }));

  it('reads the size, corner, pixel size, EPSG code and nodata gdalinfo reports', () => {
    const info = JSON.parse(execFileSync('gdalinfo', ['-json', file], { encoding: 'utf8' })) as {
      size: [number, number];
      geoTransform: number[];
      bands: { noDataValue: number }[];
      stac?: { 'proj:epsg'?: number };
      coordinateSystem: { wkt: string };
    };
    expect([raster.width, raster.height]).toEqual(info.size);
    expect(raster.west).toBe(info.geoTransform[0]);
    expect(raster.pixelSizeX).toBe(info.geoTransform[1]);
    expect(raster.north).toBe(info.geoTransform[3]);
    expect(-raster.pixelSizeY).toBe(info.geoTransform[5]);
    expect(raster.nodata).toBe(info.bands[0].noDataValue);
    // the demo's site lies in UTM zone 30 N (EPSG:32630)
    expect(raster.epsg).toBe(32630);
    expect(info.coordinateSystem.wkt).toContain('UTM zone 30N');
  });

  it('gives at 40 lon/lat positions the value gdallocationinfo -wgs84 reads, and null where it reads nodata or nothing', () => {
    let checked = 0;
    let nodata = 0;
    for (let n = 0; n < 40; n++) {
      // a spread of positions over the grid and a little beyond it (a fixed, uneven pattern)
      const x_m = -800 + ((n * 37) % 40) * 40 + 7.3;
      const y_m = -650 + ((n * 23) % 40) * 32 + 3.1;
      const [lon, lat] = grid.projection.toLonLat(x_m, y_m);
      const output = execFileSync('gdallocationinfo', ['-wgs84', '-valonly', file, String(lon), String(lat)], { encoding: 'utf8' }).trim();
      const page = sitingValueAt(raster, lon, lat);
      if (output === '' || Number(output) === GEOTIFF_NODATA) {
        expect(page, `at ${lon}, ${lat} GDAL reads ${output || 'nothing'}`).toBeNull();
        nodata++;
      } else {
        expect(page, `at ${lon}, ${lat}`).toBe(Number(output));
        checked++;
      }
    }
    // both kinds of place were met
    expect(checked).toBeGreaterThan(20);
    expect(nodata).toBeGreaterThan(0);
  });
});
