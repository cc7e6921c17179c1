/**
 * Putting placed sources into grid cells: the emission part of the grid model.
 *
 * - A point source at its effective height is shared among the (up to) eight cells whose centres surround
 *   the release point, with trilinear weights. The weights sum to 1 (mass is exact) and move smoothly as the
 *   stack moves, so the answer does not jump with where inside a cell the stack stands (its first moment is
 *   kept wherever the point lies between cell centres). Below the lowest layer centre the release goes into
 *   the lowest layer, above the highest centre into the top layer; beyond the outermost column centres it
 *   goes into the edge columns.
 * - An area source puts emission_g_s * overlap_m2 / area_m2 into each column it overlaps (the exact
 *   polygon/cell overlaps from the foundation), in the layer that holds releaseHeight_m.
 */
import type { PlacedSource } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';

export interface GridEmission {
  readonly name: string;
  /** cell index i + nx * (j + ny * k), ascending, no repeats */
  readonly cells: Int32Array;
  /** mass emitted into each cell [g/s] */
  readonly rates_g_s: Float64Array;
}

/** A model part that emits nothing. */
export function NoEmission(): GridEmission {
  return { name: 'NoEmission', cells: new Int32Array(0), rates_g_s: new Float64Array(0) };
}

/** Total emission rate [g/s]. */
export function totalEmission_g_s(emission: GridEmission): number {
  let total = 0;
  for (let n = 0; n < emission.rates_g_s.length; n++) total += emission.rates_g_s[n];
  return total;
}

/** Interpolation position between neighbouring centres: lower index and weight of the upper one. */
function bracket(fractionalIndex: number, count: number): [number, number] {
  if (count === 1 || fractionalIndex <= 0) return [0, 0];
  if (fractionalIndex >= count - 1) return [count - 1, 0];
  const lower = Math.floor(fractionalIndex);
  return [lower, fractionalIndex - lower];
}

/** Layer index and upper weight for a height [m] between layer centres. */
function layerBracket(grid: LocalGrid, height_m: number): [number, number] {
  const centres = grid.zCentres_m;
  if (height_m <= centres[0]) return [0, 0];
  if (height_m >= centres[grid.nz - 1]) return [grid.nz - 1, 0];
  let k = 0;
  while (centres[k + 1] <= height_m) k++;
  return [k, (height_m - centres[k]) / (centres[k + 1] - centres[k])];
}

/** Index of the layer holding a height [m] (faces belong to the layer above; the top face to the top layer). */
export function layerHolding(grid: LocalGrid, height_m: number): number {
  if (!(height_m >= 0)) throw new RangeError(`release height is ${height_m}; allowed: a height >= 0 m`);
  for (let k = 0; k < grid.nz; k++) if (height_m < grid.zFaces_m[k + 1]) return k;
  return grid.nz - 1;
}

/**
 * Trilinear weights of a point release: up to 8 [cell index, weight] pairs, weights summing to 1.
 */
export function pointReleaseWeights(grid: LocalGrid, x_m: number, y_m: number, height_m: number): [number, number][] {
  const { nx, ny, spacing_m } = grid;
  const east = grid.xWest_m + nx * spacing_m;
  const north = grid.ySouth_m + ny * spacing_m;
  if (!(x_m >= grid.xWest_m && x_m <= east && y_m >= grid.ySouth_m && y_m <= north)) {
    throw new RangeError(`source position (${x_m}, ${y_m}) m is outside the grid [${grid.xWest_m}, ${east}] x [${grid.ySouth_m}, ${north}] m`);
  }
  if (!(height_m >= 0) || !Number.isFinite(height_m)) {
    throw new RangeError(`release height is ${height_m}; allowed: a finite height >= 0 m`);
  }
  const [i0, wx] = bracket((x_m - grid.xWest_m) / spacing_m - 0.5, nx);
  const [j0, wy] = bracket((y_m - grid.ySouth_m) / spacing_m - 0.5, ny);
  const [k0, wz] = layerBracket(grid, height_m);
  const weights: [number, number][] = [];
  for (let dk = 0; dk < 2; dk++) {
    const weightZ = dk === 0 ? 1 - wz : wz;
    if (weightZ === 0) continue;
    for (let dj = 0; dj < 2; dj++) {
      const weightY = dj === 0 ? 1 - wy : wy;
      if (weightY === 0) continue;
      for (let di = 0; di < 2; di++) {
        const weightX = di === 0 ? 1 - wx : wx;
        if (weightX === 0) continue;
        weights.push([i0 + di + nx * (j0 + dj + ny * (k0 + dk)), weightX * weightY * weightZ]);
      }
    }
  }
  return weights;
}

/**
 * The grid emission of placed sources.
 *
 * @param grid the local grid
 * @param sources placed point and area sources
 * @param releaseHeights_m release height of each source, in the same order [m]: the effective height
 *   (after plume rise) for point sources, releaseHeight_m for area sources
 * @example gridEmissionFromSources(grid, [stack], [125])
 */
export function gridEmissionFromSources(grid: LocalGrid, sources: readonly PlacedSource[], releaseHeights_m: readonly number[]): GridEmission {
  if (releaseHeights_m.length !== sources.length) {
    throw new RangeError(`releaseHeights_m has ${releaseHeights_m.length} entries; there are ${sources.length} sources`);
  }
  const perCell = new Map<number, number>();
  const add = (cell: number, rate: number): void => {
    perCell.set(cell, (perCell.get(cell) ?? 0) + rate);
  };
  sources.forEach((source, n) => {
    if (!Number.isFinite(source.emission_g_s) || source.emission_g_s < 0) {
      throw new RangeError(`sources[${n}] (${source.id}).emission_g_s is ${source.emission_g_s}; allowed: a finite rate >= 0 g/s`);
    }
    if (source.kind === 'point') {
      for (const [cell, weight] of pointReleaseWeights(grid, source.x_m, source.y_m, releaseHeights_m[n])) {
        add(cell, source.emission_g_s * weight);
      }
    } else {
      if (!(source.area_m2 > 0)) {
        throw new RangeError(`sources[${n}] (${source.id}).area_m2 is ${source.area_m2}; allowed: an area > 0 m2`);
      }
      const k = layerHolding(grid, releaseHeights_m[n]);
      for (const share of source.shares) {
        if (!(share.column >= 0 && share.column < grid.nx * grid.ny)) {
          throw new RangeError(`sources[${n}] (${source.id}) share column ${share.column} is outside the grid's ${grid.nx * grid.ny} columns`);
        }
        add(share.column + grid.nx * grid.ny * k, (source.emission_g_s * share.overlap_m2) / source.area_m2);
      }
    }
  });
  const cells = Int32Array.from([...perCell.keys()].sort((a, b) => a - b));
  const rates = Float64Array.from(cells, (cell) => perCell.get(cell) ?? 0);
  return { name: `GridEmission(${sources.length} sources)`, cells, rates_g_s: rates };
}
