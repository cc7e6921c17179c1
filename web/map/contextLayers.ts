/**
 * Context layers: the user's own site boundary, buildings or roads, imported from a file and drawn
 * quietly under the sources. GeoJSON is read as it is, KML through @tmcw/togeojson, zipped shapefiles
 * through shpjs. Layers live in the page only (they are context, not part of the scenario).
 */
import L from 'leaflet';
import type { FeatureCollection } from 'geojson';

export { readContextFile } from './readContextFile.ts';

export interface ContextLayer {
  name: string;
  features: number;
  layer: L.GeoJSON;
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
