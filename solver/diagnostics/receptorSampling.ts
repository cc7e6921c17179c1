/**
 * Reading the grid field at points: receptors at their height and the ground-level field that feeds the
 * footprint.
 *
 * Horizontally the value is interpolated bilinearly between the four surrounding column centres (the edge
 * columns' values beyond the outermost centres). Vertically it is interpolated linearly between the two
 * layer centres around the height; below the lowest layer centre the lowest layer's value is used (the
 * cell mean of the layer touching the ground: plumeplan's choice, since the field has no resolved profile
 * below it), above the highest centre the top layer's.
 */
import { paddedIndex, type PaddedLayout } from '../fields/paddedLayout.ts';
import type { LocalGrid } from '../grid/types.ts';

/** Layer index below a height and the weight of the layer above (0 when clamped). */
export function layerInterpolation(grid: LocalGrid, height_m: number): { layer: number; upperWeight: number } {
  if (!(height_m >= 0) || !Number.isFinite(height_m)) {
    throw new RangeError(`height is ${height_m}; allowed: a finite height >= 0 m`);
  }
  const centres = grid.zCentres_m;
  if (grid.nz === 1 || height_m <= centres[0]) return { layer: 0, upperWeight: 0 };
  if (height_m >= centres[grid.nz - 1]) return { layer: grid.nz - 1, upperWeight: 0 };
  let k = 0;
  while (centres[k + 1] <= height_m) k++;
  return { layer: k, upperWeight: (height_m - centres[k]) / (centres[k + 1] - centres[k]) };
}

/** Lower column (or row) index and the upper one's weight for a fractional centre index; clamped at the edges. */
export function horizontalBracket(fractional: number, count: number): [number, number] {
  if (count === 1 || fractional <= 0) return [0, 0];
  if (fractional >= count - 1) return [count - 1, 0];
  const lower = Math.floor(fractional);
  return [lower, fractional - lower];
}

/**
 * The field at a point [same unit as the field].
 *
 * @param grid the local grid
 * @param layout padded layout of `field`
 * @param field padded field
 * @param x_m, y_m local position [m] (inside the grid)
 * @param height_m height above ground [m]
 */
export function sampleField(grid: LocalGrid, layout: PaddedLayout, field: Float64Array, x_m: number, y_m: number, height_m: number): number {
  const east = grid.xWest_m + grid.nx * grid.spacing_m;
  const north = grid.ySouth_m + grid.ny * grid.spacing_m;
  if (!(x_m >= grid.xWest_m && x_m <= east && y_m >= grid.ySouth_m && y_m <= north)) {
    throw new RangeError(`receptor position (${x_m}, ${y_m}) m is outside the grid [${grid.xWest_m}, ${east}] x [${grid.ySouth_m}, ${north}] m`);
  }
  const [i0, wx] = horizontalBracket((x_m - grid.xWest_m) / grid.spacing_m - 0.5, grid.nx);
  const [j0, wy] = horizontalBracket((y_m - grid.ySouth_m) / grid.spacing_m - 0.5, grid.ny);
  const { layer, upperWeight } = layerInterpolation(grid, height_m);
  const i1 = Math.min(i0 + 1, grid.nx - 1);
  const j1 = Math.min(j0 + 1, grid.ny - 1);
  const atLayer = (k: number): number =>
    (1 - wy) * ((1 - wx) * field[paddedIndex(layout, i0, j0, k)] + wx * field[paddedIndex(layout, i1, j0, k)]) +
    wy * ((1 - wx) * field[paddedIndex(layout, i0, j1, k)] + wx * field[paddedIndex(layout, i1, j1, k)]);
  const lower = atLayer(layer);
  return upperWeight === 0 ? lower : (1 - upperWeight) * lower + upperWeight * atLayer(layer + 1);
}

/**
 * The field at one height in every column, index i + nx * j, times a unit factor.
 *
 * @param scale factor applied to every value (1e6 for g/m3 -> ug/m3)
 * @param out where to write (length nx * ny), default a new array
 */
export function fieldAtHeight(grid: LocalGrid, layout: PaddedLayout, field: Float64Array, height_m: number, scale = 1, out = new Float64Array(grid.nx * grid.ny)): Float64Array {
  const { layer, upperWeight } = layerInterpolation(grid, height_m);
  if (out.length !== grid.nx * grid.ny) throw new RangeError(`out has ${out.length} values; the grid has nx * ny = ${grid.nx * grid.ny} columns`);
  for (let j = 0; j < grid.ny; j++) {
    const lower = paddedIndex(layout, 0, j, layer);
    const upper = upperWeight === 0 ? lower : paddedIndex(layout, 0, j, layer + 1);
    for (let i = 0; i < grid.nx; i++) {
      const value = (1 - upperWeight) * field[lower + i] + upperWeight * field[upper + i];
      out[i + grid.nx * j] = (value > 0 ? value : 0) * scale;
    }
  }
  return out;
}
