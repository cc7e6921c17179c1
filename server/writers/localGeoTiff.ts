/**
 * A GeoTIFF of fields on the local grid, written with the `geotiff` package: float32 bands, one pixel per
 * grid column, in the grid's own transverse Mercator about the site (a user-defined projected CRS on
 * WGS 84: GeoTIFF 1.0 keys for CT_TransverseMercator with the site as natural origin, scale 1, no false
 * origin), so no resampling touches the values. GDAL reads it as it is (tests/server/writers/ check it
 * with gdalinfo and gdallocationinfo). Columns outside a mask are NaN, declared as the nodata value.
 *
 * Minimal on purpose: the `pack` helper's GeoTIFF writer was not on main when this was written; the
 * siting map should move to it when it lands. Band names cannot be stored (the package has no GDAL
 * metadata tag), so the band order goes into the TIFF image description, with the caution.
 */
import { writeArrayBuffer } from 'geotiff';
import type { LocalGrid } from '../../solver/grid/types.ts';

/** The part of the grid a raster needs; the site is the projection's natural origin. */
export type RasterGrid = Pick<LocalGrid, 'nx' | 'ny' | 'spacing_m' | 'xWest_m' | 'ySouth_m'>;

export interface RasterOptions {
  /** site latitude and longitude, the natural origin of the local transverse Mercator [deg] */
  site: { lat: number; lon: number };
  /** 1 where a column is kept, 0 where it is written as nodata; null or absent keeps every column */
  mask?: Uint8Array | null;
  /** free text for the TIFF image description: the caution, the band order, the units */
  description: string;
}

// GeoTIFF 1.0 key ids and codes (OGC GeoTIFF standard 1.1, section 7, and the GeoTIFF 1.0 spec).
const GT_MODEL_TYPE = 1024;
const GT_RASTER_TYPE = 1025;
const GT_CITATION = 1026;
const GEOGRAPHIC_TYPE = 2048;
const PROJECTED_CS_TYPE = 3072;
const PROJECTION = 3074;
const PROJ_COORD_TRANS = 3075;
const PROJ_LINEAR_UNITS = 3076;
const PROJ_NAT_ORIGIN_LONG = 3080;
const PROJ_NAT_ORIGIN_LAT = 3081;
const PROJ_FALSE_EASTING = 3082;
const PROJ_FALSE_NORTHING = 3083;
const PROJ_SCALE_AT_NAT_ORIGIN = 3092;
const GEO_DOUBLE_PARAMS_TAG = 34736;
const GEO_ASCII_PARAMS_TAG = 34737;
const MODEL_TYPE_PROJECTED = 1;
const RASTER_PIXEL_IS_AREA = 1;
const GCS_WGS_84 = 4326;
const USER_DEFINED = 32767;
const CT_TRANSVERSE_MERCATOR = 1;
const LINEAR_METER = 9001;

/**
 * Longest image description and most bands: the `geotiff` package (3.0.5) lays out every tag's values in
 * a fixed block of 1000 bytes (its `numBytesInIfd`), and what overflows is written over. Measured with
 * gdalinfo: with 1 band a description of 460 characters is already damaged, with 4 bands 440, with 11
 * bands 400 (about 6 characters less per band); these limits keep clear of it.
 */
export const MAX_DESCRIPTION_CHARACTERS = 400;
export const MAX_BANDS = 6;

/** The CRS's name as stored in the file. */
export const LOCAL_CRS_CITATION = 'plumeplan local transverse Mercator about the site';

/**
 * Float32 GeoTIFF bytes of one or more fields on the local grid.
 *
 * @param grid the grid the fields live on
 * @param bands fields indexed i + nx * j (row j = 0 at the south edge), one per band, same length
 * @param options the site (projection origin), an optional mask, the image description
 * @returns the file's bytes
 * @example const bytes = localGridGeoTiff(grid, [map.combined_ug_m3], { site, description: 'band 1: PC [ug/m3]' });
 */
export function localGridGeoTiff(grid: RasterGrid, bands: readonly Float64Array[], options: RasterOptions): Uint8Array {
  const { nx, ny } = grid;
  if (bands.length === 0 || bands.length > MAX_BANDS) throw new RangeError(`GeoTIFF: ${bands.length} bands; allowed: 1 to ${MAX_BANDS}`);
  if (options.description.length > MAX_DESCRIPTION_CHARACTERS) {
    throw new RangeError(`GeoTIFF description: ${options.description.length} characters; allowed: at most ${MAX_DESCRIPTION_CHARACTERS}`);
  }
  bands.forEach((band, b) => {
    if (band.length !== nx * ny) throw new RangeError(`GeoTIFF band ${b + 1}: ${band.length} values for a ${nx} x ${ny} grid`);
  });
  const mask = options.mask ?? null;
  if (mask !== null && mask.length !== nx * ny) throw new RangeError(`GeoTIFF mask: ${mask.length} values for a ${nx} x ${ny} grid`);
  const count = bands.length;
  // Pixel-interleaved, rows from the north edge down (TIFF row 0 is the top).
  const pixels = new Float32Array(nx * ny * count);
  for (let row = 0; row < ny; row++) {
    const j = ny - 1 - row;
    for (let i = 0; i < nx; i++) {
      const column = i + nx * j;
      const kept = mask === null || mask[column] === 1;
      for (let b = 0; b < count; b++) pixels[(row * nx + i) * count + b] = kept ? bands[b][column] : Number.NaN;
    }
  }
  const ascii = `${LOCAL_CRS_CITATION}|`;
  const doubles = [options.site.lon, options.site.lat, 0, 0, 1];
  const keys = [
    [GT_MODEL_TYPE, 0, 1, MODEL_TYPE_PROJECTED],
    [GT_RASTER_TYPE, 0, 1, RASTER_PIXEL_IS_AREA],
    [GT_CITATION, GEO_ASCII_PARAMS_TAG, ascii.length, 0],
    [GEOGRAPHIC_TYPE, 0, 1, GCS_WGS_84],
    [PROJECTED_CS_TYPE, 0, 1, USER_DEFINED],
    [PROJECTION, 0, 1, USER_DEFINED],
    [PROJ_COORD_TRANS, 0, 1, CT_TRANSVERSE_MERCATOR],
    [PROJ_LINEAR_UNITS, 0, 1, LINEAR_METER],
    [PROJ_NAT_ORIGIN_LONG, GEO_DOUBLE_PARAMS_TAG, 1, 0],
    [PROJ_NAT_ORIGIN_LAT, GEO_DOUBLE_PARAMS_TAG, 1, 1],
    [PROJ_FALSE_EASTING, GEO_DOUBLE_PARAMS_TAG, 1, 2],
    [PROJ_FALSE_NORTHING, GEO_DOUBLE_PARAMS_TAG, 1, 3],
    [PROJ_SCALE_AT_NAT_ORIGIN, GEO_DOUBLE_PARAMS_TAG, 1, 4],
  ];
  const metadata: Record<string, unknown> = {
    width: nx,
    height: ny,
    BitsPerSample: Array(count).fill(32),
    SampleFormat: Array(count).fill(3), // IEEE floating point
    SamplesPerPixel: count,
    PhotometricInterpretation: 1, // grey, 0 = black
    ModelPixelScale: [grid.spacing_m, grid.spacing_m, 0],
    ModelTiepoint: [0, 0, 0, grid.xWest_m, grid.ySouth_m + ny * grid.spacing_m, 0],
    GeoKeyDirectory: [1, 1, 0, keys.length, ...keys.flat()],
    GeoDoubleParams: doubles,
    GeoAsciiParams: ascii,
    // keeps the package from adding its whole-globe WGS 84 default (the directory above is what is written)
    ProjectedCSTypeGeoKey: USER_DEFINED,
    ImageDescription: options.description,
    GDAL_NODATA: 'nan',
  };
  // Bands after the first are extra samples of unspecified meaning; a single band has none.
  if (count > 1) metadata.ExtraSamples = Array(count - 1).fill(0);
  else metadata.ExtraSamples = [];
  return new Uint8Array(writeArrayBuffer(pixels, metadata as Parameters<typeof writeArrayBuffer>[1]));
}
