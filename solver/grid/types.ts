/**
 * The local projected grid. The solver works in metres on this grid; only the edges (footprints,
 * exports, the map) convert to longitude/latitude.
 *
 * Conventions, stated once for the whole solver:
 * - local x points east, y north, z up; the site is at x = y = 0 (projection origin);
 * - cell (i, j, k) has its centre at x = xWest_m + (i + 0.5) * spacing_m,
 *   y = ySouth_m + (j + 0.5) * spacing_m, z = zCentres_m[k];
 * - 3-D arrays are row-major with index i + nx * (j + ny * k); 2-D ground arrays use i + nx * j;
 * - vertical layers are stretched, thinnest at the ground: zFaces_m[0] = 0, zFaces_m[nz] = top.
 */

/** A transverse Mercator projection centred on the site (proj4), local metres <-> WGS 84. */
export interface LocalProjection {
  /** proj4 definition string, reported in summary.json */
  readonly definition: string;
  /** WGS 84 degrees -> local metres [x_m, y_m] */
  toLocal(lon: number, lat: number): [number, number];
  /** local metres -> WGS 84 degrees [lon, lat] */
  toLonLat(x_m: number, y_m: number): [number, number];
}

export interface LocalGrid {
  readonly nx: number;
  readonly ny: number;
  readonly nz: number;
  /** horizontal cell size, the same in x and y [m] */
  readonly spacing_m: number;
  /** local x of the grid's west edge [m] */
  readonly xWest_m: number;
  /** local y of the grid's south edge [m] */
  readonly ySouth_m: number;
  /** layer faces, length nz + 1, from 0 (ground) to the lid [m] */
  readonly zFaces_m: Float64Array;
  /** layer centres, length nz [m] */
  readonly zCentres_m: Float64Array;
  /** layer thicknesses, length nz [m] */
  readonly dz_m: Float64Array;
  readonly projection: LocalProjection;
}
