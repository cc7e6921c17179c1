/**
 * The user's context layers for the map figure (site boundary, buildings, roads), read from one GeoJSON
 * file (RFC 7946: WGS 84 longitude, latitude). A feature's `properties.layer` names the layer it belongs
 * to ("buildings", "roads"); features without one form a layer named by the collection's `name`, else by
 * the file's name. Layers keep the order in which they first appear.
 *
 * Bad input gets an error naming the file, the feature and the value, and saying what is allowed.
 */
import type { Feature, FeatureCollection, Geometry, Position } from 'geojson';
import type { ContextLayer } from './map/mapSvg.ts';

/** At most this many features: the figure draws each, and a town's full map is not a context layer. */
export const MAX_CONTEXT_FEATURES = 20_000;

const GEOMETRY_TYPES = ['Point', 'MultiPoint', 'LineString', 'MultiLineString', 'Polygon', 'MultiPolygon'] as const;

/**
 * Read context layers from GeoJSON text.
 *
 * @param text the file's content
 * @param fileName the file, named in messages and the default layer name
 * @returns the layers, each with its features
 * @throws RangeError naming the file, the feature and the value when the text is not usable GeoJSON
 * @example parseContextLayers('{"type":"FeatureCollection","features":[]}', 'site.geojson') // []
 */
export function parseContextLayers(text: string, fileName: string): ContextLayer[] {
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (error) {
    throw new RangeError(`context layers ${fileName}: not JSON (${(error as Error).message}); give a GeoJSON FeatureCollection (RFC 7946, WGS 84 lon/lat)`);
  }
  const object = parsed as { type?: unknown; features?: unknown; name?: unknown } | null;
  let features: unknown[];
  if (object !== null && typeof object === 'object' && object.type === 'FeatureCollection' && Array.isArray(object.features)) features = object.features;
  else if (object !== null && typeof object === 'object' && object.type === 'Feature') features = [object];
  else {
    const type = object !== null && typeof object === 'object' ? JSON.stringify(object.type) : JSON.stringify(parsed)?.slice(0, 40);
    throw new RangeError(`context layers ${fileName}: type ${type} is not allowed; give a GeoJSON FeatureCollection or Feature`);
  }
  if (features.length > MAX_CONTEXT_FEATURES) {
    throw new RangeError(`context layers ${fileName}: ${features.length} features; at most ${MAX_CONTEXT_FEATURES} are allowed`);
  }
  const fallbackName =
    typeof object.name === 'string' && object.name.trim() !== '' ? object.name.trim() : fileName.replace(/^.*[\\/]/, '').replace(/\.(geo)?json$/i, '');
  const layers = new Map<string, Feature[]>();
  features.forEach((candidate, index) => {
    const where = `context layers ${fileName}: features[${index}]`;
    const feature = candidate as { type?: unknown; geometry?: unknown; properties?: unknown } | null;
    if (feature === null || typeof feature !== 'object' || feature.type !== 'Feature') {
      throw new RangeError(`${where}: is not a GeoJSON Feature (type ${JSON.stringify(feature?.type)}); each entry needs "type": "Feature"`);
    }
    const properties = (feature.properties ?? {}) as Record<string, unknown>;
    if (typeof properties !== 'object' || Array.isArray(properties)) throw new RangeError(`${where}.properties: must be an object or null`);
    const layerName = typeof properties.layer === 'string' && properties.layer.trim() !== '' ? properties.layer.trim() : fallbackName;
    const geometry = feature.geometry as Geometry | null;
    if (geometry !== null) checkGeometry(geometry, `${where}.geometry`);
    const list = layers.get(layerName) ?? [];
    list.push({ type: 'Feature', properties: { ...properties }, geometry } as Feature);
    layers.set(layerName, list);
  });
  return [...layers].map(([name, list]): ContextLayer => ({ name, features: { type: 'FeatureCollection', features: list } as FeatureCollection }));
}

function checkGeometry(geometry: Geometry, where: string): void {
  if (geometry === null || typeof geometry !== 'object' || !(GEOMETRY_TYPES as readonly string[]).includes(String(geometry.type))) {
    throw new RangeError(`${where}.type: ${JSON.stringify((geometry as { type?: unknown } | null)?.type)} is not allowed; use one of ${GEOMETRY_TYPES.join(', ')}`);
  }
  const depth = { Point: 0, MultiPoint: 1, LineString: 1, MultiLineString: 2, Polygon: 2, MultiPolygon: 3 }[geometry.type as (typeof GEOMETRY_TYPES)[number]];
  checkCoordinates((geometry as { coordinates?: unknown }).coordinates, depth, `${where}.coordinates`);
}

function checkCoordinates(value: unknown, depth: number, where: string): void {
  if (depth === 0) {
    checkPosition(value, where);
    return;
  }
  if (!Array.isArray(value)) throw new RangeError(`${where}: ${JSON.stringify(value)?.slice(0, 40)} is not allowed; give an array of positions`);
  value.forEach((item, index) => checkCoordinates(item, depth - 1, `${where}[${index}]`));
}

function checkPosition(value: unknown, where: string): asserts value is Position {
  if (!Array.isArray(value) || value.length < 2 || !value.every((number) => typeof number === 'number' && Number.isFinite(number))) {
    throw new RangeError(`${where}: ${JSON.stringify(value)?.slice(0, 40)} is not allowed; give [longitude, latitude] in degrees (WGS 84)`);
  }
  const [lon, lat] = value as number[];
  if (lon < -180 || lon > 180 || lat < -90 || lat > 90) {
    throw new RangeError(`${where}: [${lon}, ${lat}] is not allowed; longitude -180..180 and latitude -90..90 degrees, in that order (RFC 7946)`);
  }
}
