/**
 * Context layers: the user's own site boundary, buildings or roads, imported from a file and drawn
 * quietly under the sources. GeoJSON is read as it is, KML through @tmcw/togeojson, zipped shapefiles
 * through shpjs. Layers live in the page only (they are context, not part of the scenario).
 */
import L from 'leaflet';
import { kml } from '@tmcw/togeojson';
import shp from 'shpjs';
import type { FeatureCollection } from 'geojson';

export interface ContextLayer {
  name: string;
  features: number;
  layer: L.GeoJSON;
}

/**
 * Read a file into a GeoJSON FeatureCollection.
 *
 * @throws Error naming the file and what was wrong with it
 */
export async function readContextFile(file: File): Promise<FeatureCollection> {
  const name = file.name.toLowerCase();
  if (name.endsWith('.zip')) {
    const result = await shp(await file.arrayBuffer());
    const collections = Array.isArray(result) ? result : [result];
    return { type: 'FeatureCollection', features: collections.flatMap((c) => c.features) };
  }
  const text = await file.text();
  if (name.endsWith('.kml')) {
    const documentXml = new DOMParser().parseFromString(text, 'text/xml');
    if (documentXml.querySelector('parsererror')) throw new Error(`${file.name}: not readable as KML (XML parse error)`);
    return kml(documentXml) as FeatureCollection;
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    throw new Error(`${file.name}: not JSON; give GeoJSON (.geojson or .json), KML (.kml) or a zipped shapefile (.zip)`);
  }
  const value = json as { type?: string; features?: unknown };
  if (value.type === 'FeatureCollection' && Array.isArray(value.features)) return value as FeatureCollection;
  if (value.type === 'Feature') return { type: 'FeatureCollection', features: [value as never] };
  if (typeof value.type === 'string') return { type: 'FeatureCollection', features: [{ type: 'Feature', properties: {}, geometry: value as never }] };
  throw new Error(`${file.name}: JSON but not GeoJSON (no "type" of FeatureCollection, Feature or a geometry)`);
}

/** Draw a collection as a quiet context layer. */
export function contextLayerOf(collection: FeatureCollection): L.GeoJSON {
  return L.geoJSON(collection, {
    pane: 'contextPane',
    style: { color: '#55606e', weight: 1.5, opacity: 0.9, fillColor: '#9aa3ad', fillOpacity: 0.18, dashArray: undefined },
    pointToLayer: (_feature, latlng) => L.circleMarker(latlng, { radius: 3, color: '#55606e', weight: 1, fillOpacity: 0.6, pane: 'contextPane' }),
    interactive: false,
  });
}
