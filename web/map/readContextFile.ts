/**
 * Reading the user's context files into GeoJSON, without Leaflet (so it runs in the tests as well as in
 * the page): GeoJSON as it is, KML through @tmcw/togeojson (which needs the browser's DOMParser, or one
 * passed in), zipped shapefiles through shpjs.
 */
/// <reference path="../types/shpjs.d.ts" />
import { kml } from '@tmcw/togeojson';
import shp from 'shpjs';
import type { FeatureCollection } from 'geojson';

/** An XML parser as the browser's DOMParser is one (typed by shape, so the module compiles without the DOM library). */
export interface XmlParser {
  parseFromString(text: string, type: 'text/xml'): unknown;
}

function browserXmlParser(): XmlParser | null {
  const Parser = (globalThis as { DOMParser?: new () => XmlParser }).DOMParser;
  return Parser === undefined ? null : new Parser();
}

/** What reading a file needs: its name, its bytes and its text (a browser File has all three). */
export interface ContextFileLike {
  name: string;
  arrayBuffer(): Promise<ArrayBuffer>;
  text(): Promise<string>;
}

/**
 * Read a file into a GeoJSON FeatureCollection.
 *
 * @throws Error naming the file and what was wrong with it
 */
export async function readContextFile(file: ContextFileLike, xmlParser: XmlParser | null = browserXmlParser()): Promise<FeatureCollection> {
  const name = file.name.toLowerCase();
  if (name.endsWith('.zip')) {
    let result: Awaited<ReturnType<typeof shp>>;
    try {
      result = await shp(await file.arrayBuffer());
    } catch (error) {
      throw new Error(`${file.name}: not readable as a zipped shapefile (${error instanceof Error ? error.message : String(error)}); give a .zip holding .shp, .shx, .dbf and .prj`);
    }
    const collections = Array.isArray(result) ? result : [result];
    return { type: 'FeatureCollection', features: collections.flatMap((c) => c.features) };
  }
  const text = await file.text();
  if (name.endsWith('.kml')) {
    if (xmlParser === null) throw new Error(`${file.name}: KML needs an XML parser, which this environment lacks`);
    const documentXml = xmlParser.parseFromString(text, 'text/xml') as Parameters<typeof kml>[0];
    if ((documentXml as unknown as { querySelector(selector: string): unknown }).querySelector('parsererror')) throw new Error(`${file.name}: not readable as KML (XML parse error)`);
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

