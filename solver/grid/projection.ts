/**
 * The local projection: a transverse Mercator centred on the site, so that the solver works in
 * plain metres (x east, y north) with the site at the origin and negligible scale error over a
 * screening domain (the scale factor of a transverse Mercator grows as about 1 + x^2 / (2 R^2) off
 * the central meridian: 1.2e-6 at 10 km, common practice of map projection).
 *
 * proj4 carries out the conversion. Its `tmerc` is the Poder/Engsager series (proj4's `etmerc`),
 * the same algorithm PROJ uses by default, and the tests compare it with PROJ's own `cs2cs`.
 */
import proj4 from 'proj4';
import type { LocalProjection } from './types.ts';

/** WGS 84 longitude/latitude in degrees, as the scenario gives positions. */
const WGS84_LONLAT_DEFINITION = '+proj=longlat +ellps=WGS84 +no_defs';

/**
 * The proj4 definition of the transverse Mercator centred on a site, numbers printed exactly as
 * JavaScript prints them (shortest text that reads back to the same number).
 *
 * @example localProjectionDefinition({ lat: 52, lon: 5 })
 *   // '+proj=tmerc +lat_0=52 +lon_0=5 +k=1 +x_0=0 +y_0=0 +ellps=WGS84 +units=m +no_defs'
 */
export function localProjectionDefinition(site: { lat: number; lon: number }): string {
  checkSite(site);
  return (
    `+proj=tmerc +lat_0=${String(site.lat)} +lon_0=${String(site.lon)} ` +
    '+k=1 +x_0=0 +y_0=0 +ellps=WGS84 +units=m +no_defs'
  );
}

/**
 * Create the local projection about a site: WGS 84 degrees <-> local metres, the site at (0, 0).
 *
 * @param site the origin of the local grid [deg]; lat in [-89, 89], lon in [-180, 180]
 * @returns the projection, with its proj4 `definition` for summary.json
 * @throws RangeError naming `site.lat` or `site.lon` when a coordinate is not allowed
 * @example
 *   const projection = createLocalProjection({ lat: 52.1375, lon: 5.2875 });
 *   projection.toLocal(5.2875, 52.1375); // [0, 0]
 */
export function createLocalProjection(site: { lat: number; lon: number }): LocalProjection {
  const definition = localProjectionDefinition(site);
  const converter = proj4(WGS84_LONLAT_DEFINITION, definition);
  return {
    definition,
    toLocal(lon: number, lat: number): [number, number] {
      const [x_m, y_m] = converter.forward([lon, lat]);
      return [x_m, y_m];
    },
    toLonLat(x_m: number, y_m: number): [number, number] {
      const [lon, lat] = converter.inverse([x_m, y_m]);
      return [lon, lat];
    },
  };
}

function checkSite(site: { lat: number; lon: number }): void {
  if (site === null || typeof site !== 'object') {
    throw new RangeError(`site: got ${String(site)}; allowed: an object { lat, lon } in degrees`);
  }
  // The poles are refused: the screening domain is a square in local metres, and within a few
  // degrees of a pole a square of kilometres no longer maps onto sensible longitude/latitude.
  if (!Number.isFinite(site.lat) || site.lat < -89 || site.lat > 89) {
    throw new RangeError(
      `site.lat: got ${String(site.lat)}; allowed: a finite latitude from -89 to 89 degrees`,
    );
  }
  if (!Number.isFinite(site.lon) || site.lon < -180 || site.lon > 180) {
    throw new RangeError(
      `site.lon: got ${String(site.lon)}; allowed: a finite longitude from -180 to 180 degrees`,
    );
  }
}
