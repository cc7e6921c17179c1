/** shpjs ships no type declarations; this is the part the page uses. */
declare module 'shpjs' {
  import type { FeatureCollection } from 'geojson';
  type Named = FeatureCollection & { fileName?: string };
  export default function shp(input: ArrayBuffer | string): Promise<Named | Named[]>;
}
