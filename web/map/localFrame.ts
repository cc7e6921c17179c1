/**
 * The page's view of the local frame: metres east and north of the site in the same transverse Mercator
 * the solver uses (solver/grid/projection.ts, proj4), so that a position read on the map and a position
 * in the results agree to the millimetre.
 */
import L from 'leaflet';
import { createLocalProjection } from '../../solver/grid/projection.ts';
import type { LocalProjection } from '../../solver/grid/types.ts';

export class LocalFrame {
  readonly projection: LocalProjection;

  constructor(readonly site: { lat: number; lon: number }) {
    this.projection = createLocalProjection(site);
  }

  /** Local metres -> Leaflet LatLng. */
  toLatLng(x_m: number, y_m: number): L.LatLng {
    const [lon, lat] = this.projection.toLonLat(x_m, y_m);
    return L.latLng(lat, lon);
  }

  /** Leaflet LatLng -> local metres [x east, y north]. */
  toLocal(latlng: L.LatLng): [number, number] {
    return this.projection.toLocal(latlng.lng, latlng.lat);
  }

  /** Lat/lon bounds of a rectangle given in local metres (its four corners). */
  boundsOf(xWest_m: number, ySouth_m: number, xEast_m: number, yNorth_m: number): L.LatLngBounds {
    return L.latLngBounds([
      this.toLatLng(xWest_m, ySouth_m),
      this.toLatLng(xEast_m, ySouth_m),
      this.toLatLng(xWest_m, yNorth_m),
      this.toLatLng(xEast_m, yNorth_m),
    ]);
  }
}

/** Round to 0.1 m for display (the project's rounding of local positions). */
export function formatMetres(value_m: number): string {
  return (Math.round(value_m * 10) / 10).toFixed(1);
}

/** Longitude or latitude to 7 decimals (about 1 cm; the project's rounding of positions). */
export function formatDegrees(value_deg: number): string {
  return value_deg.toFixed(7);
}
