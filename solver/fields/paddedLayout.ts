/**
 * Storage of a scalar field (concentration [g/m3]) inside the grid solver.
 *
 * The public contract (`solver/grid/types.ts`) orders 3-D arrays as i + nx * (j + ny * k). Inside the
 * solver the field carries two ghost cells on each horizontal side, so the transport kernel reads its
 * stencil (two cells upwind, one downwind) with no boundary branches in the inner loop:
 *
 *   padded index = (i + GHOST) + rowStride * ((j + GHOST) + columnRows * k),
 *   rowStride = nx + 2 GHOST, columnRows = ny + 2 GHOST, planeStride = rowStride * columnRows.
 *
 * x east (i), y north (j), z up (k); there are no ghost layers in z (the ground and the lid are
 * no-flux faces handled by the vertical solve). Ghost values are written by the lateral boundary
 * condition before each step (background inflow, zero-gradient outflow, or periodic copies).
 */
import type { LocalGrid } from '../grid/types.ts';

/** ghost cells on each horizontal side: the limited scheme's stencil reaches two cells upwind */
export const GHOST = 2;

export interface PaddedLayout {
  readonly nx: number;
  readonly ny: number;
  readonly nz: number;
  /** distance between rows j and j + 1 in the padded array [cells] */
  readonly rowStride: number;
  /** rows per plane including ghost rows */
  readonly columnRows: number;
  /** distance between layers k and k + 1 [cells] */
  readonly planeStride: number;
  /** length of the padded array */
  readonly size: number;
}

/** The padded layout for a grid (or any nx, ny, nz). */
export function paddedLayout(shape: { nx: number; ny: number; nz: number }): PaddedLayout {
  const { nx, ny, nz } = shape;
  for (const [name, value] of [['nx', nx], ['ny', ny], ['nz', nz]] as const) {
    if (!Number.isInteger(value) || value < 1) {
      throw new RangeError(`grid.${name} is ${value}; it must be a positive integer`);
    }
  }
  const rowStride = nx + 2 * GHOST;
  const columnRows = ny + 2 * GHOST;
  const planeStride = rowStride * columnRows;
  return { nx, ny, nz, rowStride, columnRows, planeStride, size: planeStride * nz };
}

/** Padded index of interior cell (i, j, k). */
export function paddedIndex(layout: PaddedLayout, i: number, j: number, k: number): number {
  return i + GHOST + layout.rowStride * (j + GHOST + layout.columnRows * k);
}

/** A zeroed padded field [g/m3], optionally on shared memory so worker threads can step it. */
export function createPaddedField(layout: PaddedLayout, shared = false): Float64Array {
  if (!shared) return new Float64Array(layout.size);
  return new Float64Array(new SharedArrayBuffer(layout.size * Float64Array.BYTES_PER_ELEMENT));
}

/** Copy a padded field's interior into the public order i + nx * (j + ny * k). */
export function paddedToGridOrder(layout: PaddedLayout, padded: Float64Array, out = new Float64Array(layout.nx * layout.ny * layout.nz)): Float64Array {
  const { nx, ny, nz } = layout;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const from = paddedIndex(layout, 0, j, k);
      out.set(padded.subarray(from, from + nx), nx * (j + ny * k));
    }
  }
  return out;
}

/** Copy a field in the public order into a padded field's interior (ghosts untouched). */
export function gridOrderToPadded(layout: PaddedLayout, field: Float64Array, padded: Float64Array): Float64Array {
  const { nx, ny, nz } = layout;
  if (field.length !== nx * ny * nz) {
    throw new RangeError(`field has ${field.length} values; the grid has nx * ny * nz = ${nx * ny * nz} cells`);
  }
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const to = paddedIndex(layout, 0, j, k);
      padded.set(field.subarray(nx * (j + ny * k), nx * (j + ny * k) + nx), to);
    }
  }
  return padded;
}

/** Mass held in the interior of a padded field [g]: sum of c * cell volume. */
export function paddedFieldMass_g(layout: PaddedLayout, grid: LocalGrid, padded: Float64Array): number {
  const cellArea_m2 = grid.spacing_m * grid.spacing_m;
  let mass = 0;
  for (let k = 0; k < layout.nz; k++) {
    let layerSum = 0;
    for (let j = 0; j < layout.ny; j++) {
      const from = paddedIndex(layout, 0, j, k);
      for (let i = 0; i < layout.nx; i++) layerSum += padded[from + i];
    }
    mass += layerSum * cellArea_m2 * grid.dz_m[k];
  }
  return mass;
}
