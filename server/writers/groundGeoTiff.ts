/**
 * ground.tif: the ground-level field as a single-band float32 GeoTIFF a GIS officer can load beside the
 * council's layers, self-describing on its own: CRS (EPSG code in the GeoKeys), georeferencing (pixel
 * scale and tie point), nodata, and a description carrying what the values are, how they were resampled
 * and the screening caution.
 *
 * Resampling, stated once: the solver's field lives on the local transverse Mercator grid about the site;
 * the export is in another CRS (the site's UTM zone by default), whose axes are rotated and scaled a
 * little against the local ones. Each pixel centre of the export is taken back to local metres with
 * proj4 and given, by default, the value of the local cell it falls in (nearest cell centre): every value
 * in the file is then one the model computed, and a sharp peak by a source keeps its height (bilinear
 * interpolation, the other choice, smooths it: the demo's 16.8 ug/m3 peak came out at 11.5). The price is
 * a position error of at most half a cell diagonal plus the pixel's own half diagonal. Pixels whose centre
 * falls outside the local grid are nodata.
 *
 * The writer is geotiff.js's `writeArrayBuffer`, which puts all tags in the first 1000 bytes of the file;
 * the description is kept short enough to fit, and the file is read back before it is returned so that a
 * tag cut short could never leave here unnoticed.
 */
import { fromArrayBuffer, writeArrayBuffer } from 'geotiff';
import type { Scenario } from '../../scenarios/format/types.ts';
import type { ScenarioRunResult } from '../../solver/drivers/types.ts';
import type { LocalGrid } from '../../solver/grid/types.ts';
import { SCREENING_CAUTION } from './caution.ts';
import { lonLatConverter, resolveCrs, siteUtmCrs, type CrsRequest, type ExportCrs } from './crs.ts';

/** Value of pixels outside the local grid (exactly representable in float32). */
export const GEOTIFF_NODATA = -9999;

/** Points sampled along each edge of the local grid to find the export's extent (edges map to gentle curves). */
const EDGE_SAMPLES = 16;

/** Metres in one degree of latitude, for choosing a pixel size in a geographic CRS (common practice). */
const METRES_PER_DEGREE = 111_320;

/** 'nearest': the value of the local cell a pixel centre falls in; 'bilinear': interpolated between the four nearest cell centres. */
export type Resampling = 'nearest' | 'bilinear';

export interface GroundGeoTiffOptions {
  /** CRS of the export; default: the site's WGS 84 UTM zone */
  crs?: CrsRequest;
  /** pixel size in the export's units; default: the local grid's spacing (metres, or its equivalent in degrees) */
  pixelSize?: number;
  /** scenario name, written into the description when there is room */
  scenarioName?: string;
  /** pollutant name for the description, e.g. "NOx" */
  pollutant?: string;
  /** height of the ground-level field [m] */
  height_m?: number;
  /** how pixel values are taken from the local grid; default 'nearest' (see the header) */
  resampling?: Resampling;
  /** plumeplan version for the Software tag, e.g. "0.1.0" */
  version?: string;
  /** when the run was made (the DateTime tag) */
  runDate?: Date;
  /**
   * what the values are, replacing "Ground-level <pollutant> <statistic> [ug/m3] at <height> m" at the
   * head of the description, for other fields on the grid (the siting map); keep it short (the tags share
   * the writer's 1000-byte header)
   */
  subject?: string;
}

export interface ResampledGround {
  crs: ExportCrs;
  width: number;
  height: number;
  /** west edge and north edge of the raster in the export CRS (upper-left corner) */
  west: number;
  north: number;
  /** pixel size in the export's units, the same in x and y for projected systems */
  pixelSizeX: number;
  pixelSizeY: number;
  /** row-major from the north-west pixel, GEOTIFF_NODATA outside the local grid [ug/m3] */
  values: Float32Array;
}

export interface GroundGeoTiff extends ResampledGround {
  resampling: Resampling;
  /** the file's bytes */
  bytes: Uint8Array;
  /** the TIFF ImageDescription written (what the values are, the resampling, the caution) */
  description: string;
}

/**
 * Resample the ground-level field from the local grid onto a north-up raster in another CRS.
 *
 * @param field_ug_m3 ground-level field, index i + nx * j, row j = 0 at the south edge [ug/m3]
 * @param grid the local grid the field lives on
 * @param crs the export CRS
 * @param pixelSize pixel size in the CRS's units; default the grid spacing (or its size in degrees)
 * @returns the raster, north-west pixel first
 */
export function resampleGround(
  field_ug_m3: ArrayLike<number>,
  grid: Pick<LocalGrid, 'nx' | 'ny' | 'spacing_m' | 'xWest_m' | 'ySouth_m' | 'projection'>,
  crs: ExportCrs,
  pixelSize?: number,
  resampling: Resampling = 'nearest',
): ResampledGround {
  const { nx, ny, spacing_m, xWest_m, ySouth_m, projection } = grid;
  if (field_ug_m3.length !== nx * ny) {
    throw new RangeError(`ground field: length ${field_ug_m3.length} does not match the grid's ${nx} x ${ny} = ${nx * ny} columns`);
  }
  const converter = lonLatConverter(crs);
  const xEast_m = xWest_m + nx * spacing_m;
  const yNorth_m = ySouth_m + ny * spacing_m;

  // Extent of the local grid in the export CRS.
  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (let s = 0; s <= EDGE_SAMPLES; s += 1) {
    const t = s / EDGE_SAMPLES;
    const edgePoints: [number, number][] = [
      [xWest_m + t * (xEast_m - xWest_m), ySouth_m],
      [xWest_m + t * (xEast_m - xWest_m), yNorth_m],
      [xWest_m, ySouth_m + t * (yNorth_m - ySouth_m)],
      [xEast_m, ySouth_m + t * (yNorth_m - ySouth_m)],
    ];
    for (const [x_m, y_m] of edgePoints) {
      const [X, Y] = converter.forward(projection.toLonLat(x_m, y_m));
      minX = Math.min(minX, X);
      maxX = Math.max(maxX, X);
      minY = Math.min(minY, Y);
      maxY = Math.max(maxY, Y);
    }
  }

  // Pixel size: the grid spacing; in degrees, the spacing's length along each axis at the site.
  let pixelSizeX: number;
  let pixelSizeY: number;
  if (pixelSize !== undefined) {
    if (!Number.isFinite(pixelSize) || pixelSize <= 0) {
      throw new RangeError(`pixelSize: ${pixelSize} is not allowed; give a positive size in the export CRS's units`);
    }
    pixelSizeX = pixelSize;
    pixelSizeY = pixelSize;
  } else if (crs.geographic) {
    const [, siteLat] = projection.toLonLat(0, 0);
    pixelSizeY = spacing_m / METRES_PER_DEGREE;
    pixelSizeX = spacing_m / (METRES_PER_DEGREE * Math.cos((siteLat * Math.PI) / 180));
  } else {
    pixelSizeX = spacing_m;
    pixelSizeY = spacing_m;
  }

  // Snap the raster's edges to whole multiples of the pixel size, so exports of neighbouring runs align.
  const west = Math.floor(minX / pixelSizeX) * pixelSizeX;
  const north = Math.ceil(maxY / pixelSizeY) * pixelSizeY;
  const width = Math.ceil((maxX - west) / pixelSizeX);
  const height = Math.ceil((north - minY) / pixelSizeY);
  if (width > 65_535 || height > 65_535) {
    throw new RangeError(`pixelSize: ${pixelSizeX} gives a ${width} x ${height} raster; a GeoTIFF here holds at most 65535 pixels a side`);
  }

  const sample = resampling === 'nearest' ? nearestAt : bilinearAt;
  const values = new Float32Array(width * height);
  for (let row = 0; row < height; row += 1) {
    const Y = north - (row + 0.5) * pixelSizeY;
    for (let column = 0; column < width; column += 1) {
      const X = west + (column + 0.5) * pixelSizeX;
      const [lon, lat] = converter.inverse([X, Y]);
      const [x_m, y_m] = projection.toLocal(lon, lat);
      values[column + width * row] = sample(field_ug_m3, grid, x_m, y_m);
    }
  }
  return { crs, width, height, west, north, pixelSizeX, pixelSizeY, values };
}

/** The field at a point in local metres: the value of the cell holding it, GEOTIFF_NODATA outside the grid. */
export function nearestAt(
  field: ArrayLike<number>,
  grid: Pick<LocalGrid, 'nx' | 'ny' | 'spacing_m' | 'xWest_m' | 'ySouth_m'>,
  x_m: number,
  y_m: number,
): number {
  const u = (x_m - grid.xWest_m) / grid.spacing_m;
  const v = (y_m - grid.ySouth_m) / grid.spacing_m;
  if (!(u >= 0 && u <= grid.nx && v >= 0 && v <= grid.ny)) return GEOTIFF_NODATA;
  const i = Math.min(Math.floor(u), grid.nx - 1);
  const j = Math.min(Math.floor(v), grid.ny - 1);
  return field[i + grid.nx * j];
}

/**
 * The field at a point in local metres: bilinear between the four surrounding cell centres, held
 * constant within half a cell of the grid's edge, GEOTIFF_NODATA outside the grid.
 */
export function bilinearAt(
  field: ArrayLike<number>,
  grid: Pick<LocalGrid, 'nx' | 'ny' | 'spacing_m' | 'xWest_m' | 'ySouth_m'>,
  x_m: number,
  y_m: number,
): number {
  const { nx, ny, spacing_m } = grid;
  const u = (x_m - grid.xWest_m) / spacing_m;
  const v = (y_m - grid.ySouth_m) / spacing_m;
  if (!(u >= 0 && u <= nx && v >= 0 && v <= ny)) return GEOTIFF_NODATA;
  // Cell-centre coordinates, clamped to the outermost centres.
  const uc = Math.min(Math.max(u - 0.5, 0), nx - 1);
  const vc = Math.min(Math.max(v - 0.5, 0), ny - 1);
  const i0 = Math.min(Math.floor(uc), Math.max(nx - 2, 0));
  const j0 = Math.min(Math.floor(vc), Math.max(ny - 2, 0));
  const i1 = Math.min(i0 + 1, nx - 1);
  const j1 = Math.min(j0 + 1, ny - 1);
  const fu = uc - i0;
  const fv = vc - j0;
  const south = field[i0 + nx * j0] * (1 - fu) + field[i1 + nx * j0] * fu;
  const north = field[i0 + nx * j1] * (1 - fu) + field[i1 + nx * j1] * fu;
  return south * (1 - fv) + north * fv;
}

/**
 * Write the ground-level field of a run as a GeoTIFF.
 *
 * @param result the run (its ground field, grid and statistic)
 * @param options CRS (default the site's UTM zone), pixel size, names for the description
 * @returns the file's bytes with the raster and the description written
 * @throws RangeError for a CRS or pixel size that is not allowed
 * @example
 *   const tif = await writeGroundGeoTiff(result, { crs: 'EPSG:27700', pollutant: 'NOx' });
 *   await writeFile('ground.tif', tif.bytes);
 */
export async function writeGroundGeoTiff(
  result: Pick<ScenarioRunResult, 'grid' | 'footprint_ug_m3' | 'footprintStatistic' | 'weatherKind'>,
  options: GroundGeoTiffOptions = {},
): Promise<GroundGeoTiff> {
  const { grid } = result;
  const [siteLon, siteLat] = grid.projection.toLonLat(0, 0);
  const crs = options.crs === undefined ? siteUtmCrs({ lat: siteLat, lon: siteLon }) : resolveCrs(options.crs);
  const resampling = options.resampling ?? 'nearest';
  const raster = resampleGround(result.footprint_ug_m3, grid, crs, options.pixelSize, resampling);

  const statistic = result.footprintStatistic === 'mean' ? 'period mean' : 'steady-weather concentration';
  const what =
    (options.subject ?? `Ground-level ${options.pollutant ?? ''} ${statistic} [ug/m3] at ${options.height_m ?? 1.5} m`) + ', ' +
    `screened by plumeplan; nodata ${GEOTIFF_NODATA} outside the modelled grid. ` +
    `Resampled (${resampling === 'nearest' ? 'nearest cell' : 'bilinear'}, proj4) from the ${grid.spacing_m} m local ` +
    `transverse Mercator grid about the site to EPSG:${crs.epsg}. `;
  const named = options.scenarioName ? `Scenario: ${options.scenarioName}. ` : '';
  const attempts = [what.replace('  ', ' ') + named + SCREENING_CAUTION, what.replace('  ', ' ') + SCREENING_CAUTION];
  for (const description of attempts) {
    const bytes = encode(raster, crs, description, options);
    if (await readsBack(bytes, description, raster)) return { ...raster, resampling, bytes, description };
  }
  throw new Error('ground.tif: the GeoTIFF tags do not fit the writer\'s header; the description could not be written whole');
}

function encode(raster: ResampledGround, crs: ExportCrs, description: string, options: GroundGeoTiffOptions): Uint8Array {
  const geoKeys = crs.geographic
    ? { GTModelTypeGeoKey: 2, GTRasterTypeGeoKey: 1, GeographicTypeGeoKey: crs.epsg }
    : { GTModelTypeGeoKey: 1, GTRasterTypeGeoKey: 1, ProjectedCSTypeGeoKey: crs.epsg };
  const metadata = {
    width: raster.width,
    height: raster.height,
    ModelPixelScale: [raster.pixelSizeX, raster.pixelSizeY, 0],
    ModelTiepoint: [0, 0, 0, raster.west, raster.north, 0],
    ...geoKeys,
    GDAL_NODATA: String(GEOTIFF_NODATA),
    ImageDescription: description,
    Software: `plumeplan ${options.version ?? ''}`.trim(),
    ...(options.runDate ? { DateTime: tiffDateTime(options.runDate) } : {}),
  };
  // geotiff.js types its metadata loosely; the keys above are TIFF and GeoTIFF tag names it knows.
  return new Uint8Array(writeArrayBuffer(raster.values, metadata as unknown as Parameters<typeof writeArrayBuffer>[1]));
}

/** Read the file back with geotiff.js: size, nodata and description must be what was meant. */
async function readsBack(bytes: Uint8Array, description: string, raster: ResampledGround): Promise<boolean> {
  try {
    const buffer = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
    const image = await (await fromArrayBuffer(buffer)).getImage();
    const fileDirectory = image.fileDirectory as unknown as { getValue?(name: string): unknown; ImageDescription?: string };
    const written = typeof fileDirectory.getValue === 'function' ? fileDirectory.getValue('ImageDescription') : fileDirectory.ImageDescription;
    return (
      image.getWidth() === raster.width &&
      image.getHeight() === raster.height &&
      image.getGDALNoData() === GEOTIFF_NODATA &&
      String(written).replace(/\0+$/, '') === description
    );
  } catch {
    return false;
  }
}

/** TIFF DateTime: "YYYY:MM:DD HH:MM:SS" (TIFF 6.0, tag 306), in UTC. */
function tiffDateTime(date: Date): string {
  const iso = date.toISOString();
  return `${iso.slice(0, 4)}:${iso.slice(5, 7)}:${iso.slice(8, 10)} ${iso.slice(11, 19)}`;
}

/** The default export CRS of a scenario: its site's UTM zone. */
export function defaultExportCrs(scenario: Pick<Scenario, 'site'>): ExportCrs {
  return siteUtmCrs(scenario.site);
}
