/**
 * The siting map as the page holds it, from a site job's two map files (server/writers/siting.ts):
 *
 * - the bands are drawn from `siting.geojson` (the map's isopleth bands over the whole grid, exactly the
 *   polygons of the file a user downloads, crisp at every zoom), each band in the page's own colour ramp
 *   at its lower level;
 * - the value under the pointer is read from `siting-map.tif` decoded here with geotiff.js (float32, the
 *   site's UTM zone, nodata off the site): the pointer's lon/lat goes to the raster's CRS with proj4 (the
 *   export's own converter, server/writers/crs.ts) and the pixel holding it gives the value, as GDAL's
 *   `gdallocationinfo -wgs84` reads the same file (the unit test compares the two).
 *
 * Pure: no DOM, no Leaflet.
 */
import { fromArrayBuffer } from 'geotiff';
import { lonLatConverter, resolveCrs } from '../../server/writers/crs.ts';
import { ColourScale, rampColour, rgbToHex, type ScaleKind } from '../colour/colourScale.ts';
import { formatConcentration } from '../colour/legendLevels.ts';

/** One band of the map: values from `lower` (included) to `upper` (excluded; null at the top). */
export interface SitingBand {
  lower_ug_m3: number;
  upper_ug_m3: number | null;
  /** GeoJSON Polygon or MultiPolygon in lon/lat */
  geometry: { type: 'Polygon' | 'MultiPolygon'; coordinates: unknown };
}

export interface SitingPoint {
  lon: number;
  lat: number;
}

export interface SitingCandidateMark extends SitingPoint {
  rank: number;
  id: string;
  combined_ug_m3: number;
  verdict: string | null;
}

/** What siting.geojson holds, sorted for drawing. */
export interface SitingMapContent {
  meaning: string;
  levels_ug_m3: number[];
  /** lowest band first */
  bands: SitingBand[];
  best: (SitingPoint & { combined_ug_m3: number }) | null;
  /** best rank first */
  candidates: SitingCandidateMark[];
  receptors: (SitingPoint & { id: string; name: string })[];
  /** the site polygon's outer ring [lon, lat], or null */
  siteRing: [number, number][] | null;
  caution: string;
}

type Json = Record<string, unknown>;

function pointOf(feature: Json, at: string): SitingPoint {
  const coordinates = (feature.geometry as { coordinates?: unknown } | undefined)?.coordinates;
  if (!Array.isArray(coordinates) || typeof coordinates[0] !== 'number' || typeof coordinates[1] !== 'number') {
    throw new RangeError(`siting.geojson ${at}.geometry.coordinates: ${JSON.stringify(coordinates)}; allowed: [lon, lat]`);
  }
  return { lon: coordinates[0], lat: coordinates[1] };
}

/**
 * Read siting.geojson (format of server/writers/siting.ts `sitingGeoJson`).
 *
 * @throws RangeError naming the feature and field that cannot be read
 */
export function readSitingGeoJson(json: unknown): SitingMapContent {
  const collection = json as { type?: unknown; properties?: Json; features?: unknown };
  if (collection === null || typeof collection !== 'object' || collection.type !== 'FeatureCollection' || !Array.isArray(collection.features)) {
    throw new RangeError('siting.geojson: not a GeoJSON FeatureCollection with features');
  }
  const properties = collection.properties ?? {};
  const content: SitingMapContent = {
    meaning: String(properties.meaning ?? ''),
    levels_ug_m3: Array.isArray(properties.levels_ug_m3) ? (properties.levels_ug_m3 as unknown[]).filter((v): v is number => typeof v === 'number') : [],
    bands: [],
    best: null,
    candidates: [],
    receptors: [],
    siteRing: null,
    caution: String(properties.caution ?? ''),
  };
  (collection.features as Json[]).forEach((feature, n) => {
    const at = `features[${n}]`;
    const p = (feature.properties ?? {}) as Json;
    const geometry = feature.geometry as { type?: string; coordinates?: unknown } | null;
    switch (p.kind) {
      case 'map band':
        if (typeof p.lower_ug_m3 !== 'number' || (geometry?.type !== 'Polygon' && geometry?.type !== 'MultiPolygon')) {
          throw new RangeError(`siting.geojson ${at}: a map band needs lower_ug_m3 and a Polygon or MultiPolygon`);
        }
        content.bands.push({ lower_ug_m3: p.lower_ug_m3, upper_ug_m3: typeof p.upper_ug_m3 === 'number' ? p.upper_ug_m3 : null, geometry: geometry as SitingBand['geometry'] });
        break;
      case 'best position':
        content.best = { ...pointOf(feature, at), combined_ug_m3: Number(p.combined_ug_m3) };
        break;
      case 'candidate':
        content.candidates.push({ ...pointOf(feature, at), rank: Number(p.rank), id: String(p.id ?? ''), combined_ug_m3: Number(p.combined_ug_m3), verdict: typeof p.verdict === 'string' ? p.verdict : null });
        break;
      case 'receptor':
        content.receptors.push({ ...pointOf(feature, at), id: String(p.id ?? ''), name: String(p.name ?? p.id ?? '') });
        break;
      case 'site polygon': {
        const ring = (geometry?.coordinates as [number, number][][] | undefined)?.[0];
        if (Array.isArray(ring)) content.siteRing = ring;
        break;
      }
      default:
        break;
    }
  });
  content.bands.sort((a, b) => a.lower_ug_m3 - b.lower_ug_m3);
  content.candidates.sort((a, b) => a.rank - b.rank);
  if (content.levels_ug_m3.length === 0) content.levels_ug_m3 = content.bands.map((band) => band.lower_ug_m3);
  return content;
}

/** A band's look and words for the map and the legend. */
export interface BandStyle {
  lower_ug_m3: number;
  upper_ug_m3: number | null;
  colour: string;
  label: string;
}

/**
 * The bands' colours: the page's ramp (colour/colourScale.ts) on a scale from the lowest level to the
 * highest, each band coloured at its lower level, so the lowest band is the ramp's dark end and the top
 * band (the highest level and above) its light end, as the concentration overlay reads.
 *
 * @param levels_ug_m3 increasing levels (the bands' lower bounds)
 * @param kind "log" (default) or "linear", as the view's colour scale
 * @returns one style per level, lowest first; [] for no level
 */
export function sitingBandStyles(levels_ug_m3: readonly number[], kind: ScaleKind = 'log'): BandStyle[] {
  const levels = levels_ug_m3.filter((level) => Number.isFinite(level) && level > 0);
  if (levels.length === 0) return [];
  const top = levels[levels.length - 1];
  const bottom = levels[0];
  const scale = levels.length === 1 ? null : new ColourScale(kind === 'log' ? bottom : 0, top, { kind });
  return levels.map((lower, k) => {
    const upper = k + 1 < levels.length ? levels[k + 1] : null;
    // On a linear scale from 0 the lowest level sits a little above the dark end; pin the ends so the
    // bands always span the whole ramp.
    const t = scale === null ? 1 : k === 0 ? 0 : scale.position(lower);
    return {
      lower_ug_m3: lower,
      upper_ug_m3: upper,
      colour: rgbToHex(rampColour(t)),
      label: upper === null ? `${formatConcentration(lower)} and above` : `${formatConcentration(lower)} to ${formatConcentration(upper)}`,
    };
  });
}

/** The band a value falls in (lower included, upper excluded), or null below the lowest level. */
export function bandOf(styles: readonly BandStyle[], value_ug_m3: number): BandStyle | null {
  let found: BandStyle | null = null;
  for (const style of styles) if (value_ug_m3 >= style.lower_ug_m3) found = style;
  return found;
}

/** siting-map.tif as the page holds it. */
export interface SitingRaster {
  epsg: number;
  width: number;
  height: number;
  /** upper-left corner in the raster's CRS */
  west: number;
  north: number;
  pixelSizeX: number;
  pixelSizeY: number;
  nodata: number | null;
  /** row-major from the north-west pixel */
  values: Float32Array;
  /** WGS 84 lon/lat -> the raster's CRS */
  toRaster(lon: number, lat: number): [number, number];
}

/**
 * Decode siting-map.tif (a north-up float32 GeoTIFF with ModelPixelScale, ModelTiepoint, a projected
 * EPSG code in the GeoKeys and GDAL_NODATA), band 1.
 *
 * @throws RangeError naming what the file lacks (a rotated raster, an unknown CRS, no georeferencing)
 */
export async function decodeSitingRaster(bytes: ArrayBuffer): Promise<SitingRaster> {
  const tiff = await fromArrayBuffer(bytes);
  const image = await tiff.getImage(0);
  const keys = (image.getGeoKeys() ?? {}) as Record<string, unknown>;
  const epsg = Number(keys.ProjectedCSTypeGeoKey ?? keys.GeographicTypeGeoKey);
  if (!Number.isInteger(epsg)) throw new RangeError('siting-map.tif: no EPSG code in the GeoKeys; allowed: a ProjectedCSTypeGeoKey');
  const crs = resolveCrs(epsg, 'siting-map.tif EPSG');
  const [west, north] = image.getOrigin();
  const [resolutionX, resolutionY] = image.getResolution();
  if (!(resolutionX > 0) || !(resolutionY < 0)) throw new RangeError(`siting-map.tif pixel size: ${resolutionX}, ${resolutionY}; allowed: a north-up raster`);
  const rasters = await image.readRasters({ samples: [0] });
  const band = (rasters as unknown as ArrayLike<number>[])[0];
  const values = band instanceof Float32Array ? band : Float32Array.from(band);
  const converter = lonLatConverter(crs);
  return {
    epsg,
    width: image.getWidth(),
    height: image.getHeight(),
    west,
    north,
    pixelSizeX: resolutionX,
    pixelSizeY: -resolutionY,
    nodata: image.getGDALNoData(),
    values,
    toRaster: (lon, lat) => converter.forward([lon, lat]),
  };
}

/**
 * The map's value at a WGS 84 position: the value of the pixel holding it; null outside the raster or
 * where it holds nodata (off the site).
 */
export function sitingValueAt(raster: SitingRaster, lon: number, lat: number): number | null {
  const [X, Y] = raster.toRaster(lon, lat);
  const column = Math.floor((X - raster.west) / raster.pixelSizeX);
  const row = Math.floor((raster.north - Y) / raster.pixelSizeY);
  if (!(column >= 0 && column < raster.width && row >= 0 && row < raster.height)) return null;
  const value = raster.values[column + raster.width * row];
  if (!Number.isFinite(value) || (raster.nodata !== null && value === raster.nodata)) return null;
  return value;
}

/**
 * The read-out's line for the siting map under the pointer: the raster's value where it has one (the
 * site's pixels), else the band the pointer is in (the bands cover the whole grid; the raster holds
 * nodata off the site, and at the site's edge a pixel can be off it while the position is on it).
 *
 * @param value the raster's value (null where it holds nodata)
 * @param styles the bands, for the band's range off the site
 * @param bandUnderPointer the band whose polygon holds the pointer (for positions off the site), or null
 */
export function sitingReadout(value: number | null, styles: readonly BandStyle[], bandUnderPointer: BandStyle | null): string {
  if (value !== null) {
    const band = bandOf(styles, value);
    return `Siting map: ${formatConcentration(value)} µg/m³ if the stack stood here${band ? ` (band ${band.label})` : ''}`;
  }
  if (bandUnderPointer !== null) return `Siting map: band ${bandUnderPointer.label} µg/m³ here`;
  return styles.length > 0 ? `Siting map: below ${formatConcentration(styles[0].lower_ug_m3)} µg/m³ or off the grid` : '';
}

/** Even-odd ray casting: is [lon, lat] inside the ring (the GeoJSON ring, closed or not)? */
function insideRing(ring: readonly (readonly number[])[], lon: number, lat: number): boolean {
  let inside = false;
  for (let a = 0, b = ring.length - 1; a < ring.length; b = a++) {
    const [xa, ya] = ring[a];
    const [xb, yb] = ring[b];
    if (ya > lat !== yb > lat && lon < ((xb - xa) * (lat - ya)) / (yb - ya) + xa) inside = !inside;
  }
  return inside;
}

/** The band whose polygons hold a position (outer ring in, holes out), or null. */
export function bandAt(bands: readonly SitingBand[], lon: number, lat: number): SitingBand | null {
  for (const band of bands) {
    const polygons = (band.geometry.type === 'Polygon' ? [band.geometry.coordinates] : band.geometry.coordinates) as number[][][][];
    for (const rings of polygons) {
      if (rings.length === 0 || !insideRing(rings[0], lon, lat)) continue;
      if (rings.slice(1).some((hole) => insideRing(hole, lon, lat))) continue;
      return band;
    }
  }
  return null;
}
