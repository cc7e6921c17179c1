/**
 * Geometry of the local grid: a square of columns centred on the site and stretched vertical
 * layers, thinnest at the ground. Conventions (index order, cell centres) are stated once in
 * `types.ts`; this module only builds grids and answers "which cell is this point in".
 */
import type { Domain } from '../../scenarios/format/types.ts';
import type { LocalGrid, LocalProjection } from './types.ts';

/**
 * Target thickness of the ground layer [m]: twice the default receptor height (1.5 m), so the
 * ground layer's centre sits at the height of the default receptors and of the ground-level
 * footprint field, and a low release (an area source at about 1 m) falls inside the ground layer.
 * The grid solver diffuses vertically implicitly, so a thin ground layer costs no time step.
 */
export const GROUND_LAYER_TARGET_m = 3;

/**
 * Largest ratio of one layer's thickness to the one below it [-]. Keeping neighbouring cells
 * within 20 % of each other keeps a finite-volume scheme's truncation error close to its
 * uniform-grid order (a stretching ratio below about 1.2 is common practice in CFD meshing).
 */
export const MAX_LAYER_GROWTH_RATIO = 1.2;

/**
 * Layer faces of a column of stretched layers [m], from 0 (ground) to `height_m` (the lid).
 *
 * The rule: layer thicknesses grow geometrically upward, dz_k = dz_0 r^k.
 * - dz_0 = GROUND_LAYER_TARGET_m (3 m) and r is solved so the layers fill `height_m` exactly;
 * - if that needs r > MAX_LAYER_GROWTH_RATIO (1.2), r = 1.2 and dz_0 follows from the height
 *   (thicker ground layer rather than coarse layers aloft);
 * - if height_m / layers <= 3 m the layers are uniform (r = 1): no need to stretch.
 * For 1000 m and 30 layers this gives dz_0 = 3 m and r = 1.137 (top layer 123 m); for 1000 m and
 * 24 layers dz_0 = 3 m and r = 1.189 (top layer 162 m); for 3000 m and 24 layers r = 1.2, dz_0 = 7.6 m.
 *
 * @param height_m top of the grid [m], finite and > 0
 * @param layers number of layers, an integer >= 1
 * @returns Float64Array of length layers + 1, faces[0] = 0, faces[layers] = height_m exactly
 * @example stretchedLayerFaces(1000, 30)[1] // 3
 */
export function stretchedLayerFaces(height_m: number, layers: number): Float64Array {
  checkPositiveFinite('height_m', height_m);
  checkLayerCount('layers', layers);
  const faces = new Float64Array(layers + 1);
  const ratio = layerGrowthRatio(height_m, layers);
  if (ratio === 1) {
    for (let k = 0; k <= layers; k++) faces[k] = (height_m * k) / layers;
  } else {
    // Faces as partial sums of r^k, scaled so the top face is the height exactly.
    const totalWeight = (Math.pow(ratio, layers) - 1) / (ratio - 1);
    let partialWeight = 0;
    let weight = 1;
    for (let k = 1; k < layers; k++) {
      partialWeight += weight;
      weight *= ratio;
      faces[k] = (height_m * partialWeight) / totalWeight;
    }
  }
  faces[0] = 0;
  faces[layers] = height_m;
  return faces;
}

/**
 * The growth ratio r of stretchedLayerFaces' rule [-]: 1 for uniform layers.
 * Solved by bisection on sum_{k<n} r^k = height / dz_0, which increases with r.
 */
export function layerGrowthRatio(height_m: number, layers: number): number {
  checkPositiveFinite('height_m', height_m);
  checkLayerCount('layers', layers);
  const uniformThickness_m = height_m / layers;
  if (layers === 1 || uniformThickness_m <= GROUND_LAYER_TARGET_m) return 1;
  const targetWeight = height_m / GROUND_LAYER_TARGET_m;
  const weightOf = (ratio: number): number => (Math.pow(ratio, layers) - 1) / (ratio - 1);
  if (weightOf(MAX_LAYER_GROWTH_RATIO) <= targetWeight) return MAX_LAYER_GROWTH_RATIO;
  let low = 1;
  let high = MAX_LAYER_GROWTH_RATIO;
  // 60 halvings of an interval of 0.2 reach below 1e-18, past double precision.
  for (let iteration = 0; iteration < 60; iteration++) {
    const middle = 0.5 * (low + high);
    if (middle === low || middle === high) break;
    if (weightOf(middle) < targetWeight) low = middle;
    else high = middle;
  }
  const ratio = 0.5 * (low + high);
  // A ratio within 1e-6 of 1 is uniform for every purpose, and treating it so avoids the
  // cancellation in (r^n - 1) / (r - 1).
  return ratio - 1 < 1e-6 ? 1 : ratio;
}

/**
 * Check a domain's fields; throws RangeError naming `domain.<field>`, the value and what is
 * allowed. Shared by buildLocalGrid and the memory check so both refuse the same inputs.
 */
export function checkDomain(domain: Domain): void {
  if (domain === null || typeof domain !== 'object') {
    throw new RangeError(
      `domain: got ${String(domain)}; allowed: an object { halfWidth_m, spacing_m, height_m, layers }`,
    );
  }
  checkPositiveFinite('domain.halfWidth_m', domain.halfWidth_m);
  checkPositiveFinite('domain.spacing_m', domain.spacing_m);
  checkPositiveFinite('domain.height_m', domain.height_m);
  checkLayerCount('domain.layers', domain.layers);
  if (domain.spacing_m > 2 * domain.halfWidth_m) {
    throw new RangeError(
      `domain.spacing_m: got ${domain.spacing_m} m; allowed: at most the domain width ` +
        `2 * halfWidth_m = ${2 * domain.halfWidth_m} m`,
    );
  }
}

/**
 * Number of columns along one side of the square domain: round(2 * halfWidth_m / spacing_m).
 * When the half-width is not a multiple of half the spacing, the grid takes the nearest whole
 * number of cells and stays centred on the site, so its half-width (nx * spacing_m / 2) differs
 * from the one asked for by at most a quarter of a cell.
 */
export function columnsPerSide(domain: Domain): number {
  checkDomain(domain);
  return Math.max(1, Math.round((2 * domain.halfWidth_m) / domain.spacing_m));
}

/**
 * Build the local grid of a domain: nx = ny = columnsPerSide(domain) columns centred on the site
 * (x = y = 0), layers stretched by stretchedLayerFaces.
 *
 * @param domain the domain, fields checked (RangeError naming `domain.<field>`)
 * @param projection the local projection the grid's metres belong to
 * @example buildLocalGrid({ halfWidth_m: 5000, spacing_m: 50, height_m: 1000, layers: 30 }, p).nx // 200
 */
export function buildLocalGrid(domain: Domain, projection: LocalProjection): LocalGrid {
  const columns = columnsPerSide(domain);
  const zFaces_m = stretchedLayerFaces(domain.height_m, domain.layers);
  const nz = domain.layers;
  const zCentres_m = new Float64Array(nz);
  const dz_m = new Float64Array(nz);
  for (let k = 0; k < nz; k++) {
    zCentres_m[k] = 0.5 * (zFaces_m[k] + zFaces_m[k + 1]);
    dz_m[k] = zFaces_m[k + 1] - zFaces_m[k];
  }
  const halfExtent_m = (columns * domain.spacing_m) / 2;
  return {
    nx: columns,
    ny: columns,
    nz,
    spacing_m: domain.spacing_m,
    xWest_m: -halfExtent_m,
    ySouth_m: -halfExtent_m,
    zFaces_m,
    zCentres_m,
    dz_m,
    projection,
  };
}

/** Local x of the centre of column index i [m]. */
export function cellCentreX_m(grid: LocalGrid, i: number): number {
  return grid.xWest_m + (i + 0.5) * grid.spacing_m;
}

/** Local y of the centre of row index j [m]. */
export function cellCentreY_m(grid: LocalGrid, j: number): number {
  return grid.ySouth_m + (j + 0.5) * grid.spacing_m;
}

/** Local x of the grid's east edge [m]. */
export function gridEast_m(grid: LocalGrid): number {
  return grid.xWest_m + grid.nx * grid.spacing_m;
}

/** Local y of the grid's north edge [m]. */
export function gridNorth_m(grid: LocalGrid): number {
  return grid.ySouth_m + grid.ny * grid.spacing_m;
}

/** True when (x_m, y_m) [m] lies in the grid's closed horizontal extent. */
export function isInsideGrid(grid: LocalGrid, x_m: number, y_m: number): boolean {
  return (
    x_m >= grid.xWest_m && x_m <= gridEast_m(grid) && y_m >= grid.ySouth_m && y_m <= gridNorth_m(grid)
  );
}

/**
 * Ground index i + nx * j of the column holding (x_m, y_m) [m], or -1 outside the grid.
 * A point on a face between two cells belongs to the cell east (north) of it; a point on the
 * grid's east (north) edge belongs to the last cell, so the closed extent is covered.
 */
export function columnAt(grid: LocalGrid, x_m: number, y_m: number): number {
  if (!isInsideGrid(grid, x_m, y_m)) return -1;
  const i = Math.min(grid.nx - 1, Math.floor((x_m - grid.xWest_m) / grid.spacing_m));
  const j = Math.min(grid.ny - 1, Math.floor((y_m - grid.ySouth_m) / grid.spacing_m));
  return i + grid.nx * j;
}

/**
 * Layer index k with zFaces_m[k] <= z_m < zFaces_m[k + 1], the lid itself in the top layer;
 * -1 below the ground or above the lid (z_m in metres above ground).
 */
export function layerAt(grid: LocalGrid, z_m: number): number {
  const faces = grid.zFaces_m;
  if (!(z_m >= 0 && z_m <= faces[grid.nz])) return -1;
  let low = 0;
  let high = grid.nz;
  // Invariant: faces[low] <= z_m and (high === nz or z_m < faces[high]).
  while (high - low > 1) {
    const middle = (low + high) >> 1;
    if (faces[middle] <= z_m) low = middle;
    else high = middle;
  }
  return low;
}

function checkPositiveFinite(field: string, value: number): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new RangeError(`${field}: got ${String(value)}; allowed: a finite number > 0`);
  }
}

function checkLayerCount(field: string, value: number): void {
  if (!Number.isInteger(value) || value < 1 || value > 10_000) {
    throw new RangeError(`${field}: got ${String(value)}; allowed: a whole number from 1 to 10000`);
  }
}
