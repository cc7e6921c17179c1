/**
 * Coordinate reference systems for the GIS exports: the site's UTM zone by default, or one the user names
 * by EPSG code from a short table of national and European grids (each definition taken from PROJ's own
 * database with `projinfo EPSG:n -o PROJ`, and checked against PROJ's `cs2cs` in
 * tests/server/writers/crs.test.ts), or any CRS the caller defines with a proj4 string and its EPSG code.
 *
 * Why not every EPSG code: proj4 (JavaScript) has no EPSG database; the table holds the systems a
 * consultation in our region is likely to ask for, and the custom form covers the rest.
 */
import proj4 from 'proj4';

/** A target CRS for an export: its EPSG code, a proj4 definition and a name a person reads. */
export interface ExportCrs {
  /** EPSG code written into the GeoTIFF's GeoKeys, e.g. 32630 */
  epsg: number;
  /** proj4 definition used to transform positions */
  proj4: string;
  /** e.g. "WGS 84 / UTM zone 30N" */
  name: string;
  /** true for a geographic CRS (degrees), false for a projected one (metres) */
  geographic: boolean;
}

/** A CRS as a caller names it: "EPSG:27700" (or just 27700), or a full definition. */
export type CrsRequest = string | number | ExportCrs;

const WGS84_LONLAT = '+proj=longlat +datum=WGS84 +no_defs';

/**
 * Named systems beyond the UTM families (definitions from PROJ's database, `projinfo EPSG:n -o PROJ`).
 * OSGB36 has no single datum shift in PROJ (it uses the OSTN15 grid where installed); the Helmert
 * parameters here are EPSG's transformation 1314, as `projinfo -s EPSG:4326 -t EPSG:27700` lists them,
 * good to a few metres, far finer than any screening grid.
 */
const NAMED_CRS: Record<number, Omit<ExportCrs, 'epsg'>> = {
  4326: { name: 'WGS 84 (longitude, latitude)', proj4: WGS84_LONLAT, geographic: true },
  3857: {
    name: 'WGS 84 / Pseudo-Mercator',
    proj4: '+proj=merc +a=6378137 +b=6378137 +lat_ts=0 +lon_0=0 +x_0=0 +y_0=0 +k=1 +units=m +nadgrids=@null +wktext +no_defs',
    geographic: false,
  },
  27700: {
    name: 'OSGB36 / British National Grid',
    proj4:
      '+proj=tmerc +lat_0=49 +lon_0=-2 +k=0.9996012717 +x_0=400000 +y_0=-100000 +ellps=airy ' +
      '+towgs84=446.448,-125.157,542.06,0.15,0.247,0.842,-20.489 +units=m +no_defs',
    geographic: false,
  },
  2157: {
    name: 'IRENET95 / Irish Transverse Mercator',
    proj4: '+proj=tmerc +lat_0=53.5 +lon_0=-8 +k=0.99982 +x_0=600000 +y_0=750000 +ellps=GRS80 +towgs84=0,0,0,0,0,0,0 +units=m +no_defs',
    geographic: false,
  },
  3035: {
    name: 'ETRS89-extended / LAEA Europe',
    proj4: '+proj=laea +lat_0=52 +lon_0=10 +x_0=4321000 +y_0=3210000 +ellps=GRS80 +units=m +no_defs',
    geographic: false,
  },
  2154: {
    name: 'RGF93 v1 / Lambert-93',
    proj4:
      '+proj=lcc +lat_0=46.5 +lon_0=3 +lat_1=49 +lat_2=44 +x_0=700000 +y_0=6600000 +ellps=GRS80 +towgs84=0,0,0,0,0,0,0 +units=m +no_defs',
    geographic: false,
  },
};

/**
 * The UTM zone number of a position, with the two exceptions of the standard zone grid: zone 32 widened
 * over south-west Norway (56-64 N, 3-12 E) and the zones 31, 33, 35 and 37 of Svalbard (72-84 N)
 * (the UTM grid's definition, common practice of mapping).
 *
 * @param lon longitude [deg]
 * @param lat latitude [deg]
 * @returns 1..60, e.g. utmZone(-2.28, 54.06) === 30
 */
export function utmZone(lon: number, lat: number): number {
  if (lat >= 56 && lat < 64 && lon >= 3 && lon < 12) return 32;
  if (lat >= 72 && lat < 84) {
    if (lon >= 0 && lon < 9) return 31;
    if (lon >= 9 && lon < 21) return 33;
    if (lon >= 21 && lon < 33) return 35;
    if (lon >= 33 && lon < 42) return 37;
  }
  const zone = Math.floor((lon + 180) / 6) + 1;
  return Math.min(Math.max(zone, 1), 60);
}

/**
 * The WGS 84 UTM system of a site: EPSG 32601-32660 north of the equator, 32701-32760 south of it.
 *
 * @example siteUtmCrs({ lat: 54.06, lon: -2.28 }).epsg === 32630
 */
export function siteUtmCrs(site: { lat: number; lon: number }): ExportCrs {
  const zone = utmZone(site.lon, site.lat);
  const south = site.lat < 0;
  return {
    epsg: (south ? 32700 : 32600) + zone,
    proj4: `+proj=utm +zone=${zone}${south ? ' +south' : ''} +datum=WGS84 +units=m +no_defs`,
    name: `WGS 84 / UTM zone ${zone}${south ? 'S' : 'N'}`,
    geographic: false,
  };
}

/**
 * Resolve a CRS a caller names: an EPSG code of the table above, of a WGS 84 UTM zone (32601-32660,
 * 32701-32760) or of an ETRS89 UTM zone (25828-25838), as a number or "EPSG:n"; or a full ExportCrs.
 *
 * @throws RangeError naming the value and what is allowed
 * @example resolveCrs('EPSG:27700').name === 'OSGB36 / British National Grid'
 */
export function resolveCrs(request: CrsRequest, field = 'crs'): ExportCrs {
  if (typeof request === 'object' && request !== null) return checkCustomCrs(request, field);
  const text = String(request).trim();
  const match = /^(?:EPSG:)?(\d{4,5})$/i.exec(text);
  if (match === null) {
    throw new RangeError(`${field}: "${text}" is not allowed; give an EPSG code such as EPSG:27700 (${allowedCrsText()})`);
  }
  const epsg = Number(match[1]);
  const named = NAMED_CRS[epsg];
  if (named !== undefined) return { epsg, ...named };
  const wgs84Zone = epsg >= 32601 && epsg <= 32660 ? epsg - 32600 : epsg >= 32701 && epsg <= 32760 ? epsg - 32700 : null;
  if (wgs84Zone !== null) {
    const south = epsg > 32700;
    return {
      epsg,
      proj4: `+proj=utm +zone=${wgs84Zone}${south ? ' +south' : ''} +datum=WGS84 +units=m +no_defs`,
      name: `WGS 84 / UTM zone ${wgs84Zone}${south ? 'S' : 'N'}`,
      geographic: false,
    };
  }
  if (epsg >= 25828 && epsg <= 25838) {
    const zone = epsg - 25800;
    return {
      epsg,
      proj4: `+proj=utm +zone=${zone} +ellps=GRS80 +towgs84=0,0,0,0,0,0,0 +units=m +no_defs`,
      name: `ETRS89 / UTM zone ${zone}N`,
      geographic: false,
    };
  }
  throw new RangeError(`${field}: EPSG:${epsg} is not one plumeplan knows; allowed: ${allowedCrsText()}`);
}

/** The allowed codes, for messages and help. */
export function allowedCrsText(): string {
  const named = Object.keys(NAMED_CRS).map((code) => `EPSG:${code}`);
  return `${named.join(', ')}, WGS 84 UTM EPSG:32601-32660 and 32701-32760, ETRS89 UTM EPSG:25828-25838`;
}

function checkCustomCrs(crs: ExportCrs, field: string): ExportCrs {
  if (!Number.isInteger(crs.epsg) || crs.epsg <= 0) {
    throw new RangeError(`${field}.epsg: ${String(crs.epsg)} is not allowed; give the positive whole EPSG code of the system`);
  }
  try {
    proj4(WGS84_LONLAT, crs.proj4);
  } catch (error) {
    throw new RangeError(`${field}.proj4: "${crs.proj4}" is not a definition proj4 can use (${(error as Error).message})`);
  }
  return { ...crs, name: crs.name || `EPSG:${crs.epsg}`, geographic: Boolean(crs.geographic) };
}

/** A converter between WGS 84 lon/lat and a CRS. */
export function lonLatConverter(crs: ExportCrs): { forward(lonLat: [number, number]): [number, number]; inverse(xy: [number, number]): [number, number] } {
  const converter = proj4(WGS84_LONLAT, crs.proj4);
  return {
    forward: (lonLat) => converter.forward(lonLat) as [number, number],
    inverse: (xy) => converter.inverse(xy) as [number, number],
  };
}
