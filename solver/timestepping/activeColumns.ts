/**
 * Which columns a steady solve sweeps (./steadySweep.ts): the part of the ground plan a plume reaches.
 * Index conventions are the padded layout's (../fields/paddedLayout.ts): two ghost cells on each side,
 * cell (i, j, k) at 2 + i + rowStride (j + 2) + planeStride k; columns in the plan are i + nx j.
 */

/** The grid shape the ranges are kept for. */
export interface ColumnShape {
  nx: number;
  ny: number;
  /** layers swept */
  nz: number;
  rowStride: number;
  planeStride: number;
}

/**
 * Columns whose every value is below this fraction of the field's peak, and whose four neighbours' are
 * too, are not swept: they stay as they are (zero, or a warm start's trace). A plume's far crosswind
 * flanks and everything upwind of the sources are such columns (about two thirds of the demo's
 * columns); what they would hold is below 1e-10 of the peak, far under the solve's tolerance.
 */
export const ACTIVE_COLUMN_THRESHOLD = 1e-10;

/**
 * The part of the ground plan being swept: per row j, the columns i in [first[j], end[j]), grown (never
 * shrunk) after each sweep to cover every column above the threshold with a margin of two columns and
 * two rows (the reach of the limited slopes), so the deferred correction and the mixing see a fixed set
 * of cells from sweep to sweep. Within a sweep a column outside the ranges is solved as well when it or
 * a neighbour is above the threshold, so a plume still crosses the whole domain in one downwind sweep.
 */
export interface ActiveColumns {
  /** false: every column is swept, ranges are whole rows */
  limited: boolean;
  first: Int32Array;
  end: Int32Array;
  /** per column i + nx j: largest value of the column's solved layers at its last solve [g/m3] */
  columnPeak: Float64Array;
  /** largest value of the field seen [g/m3] */
  peak: number;
  /** columns solved in the last sweep */
  solvedColumns: number;
}

const RANGE_MARGIN = 2;

/**
 * The starting ranges: the source columns (they must be swept whatever the field holds) and the
 * columns the field (a warm start, or empty) already holds something in, with the margin. With
 * `limited` false every row is whole.
 */
export function activeColumnsFor(c: ColumnShape, field: Float64Array, limited: boolean, sourceCells: Int32Array): ActiveColumns {
  const { nx, ny, nz, rowStride, planeStride } = c;
  const region: ActiveColumns = {
    limited,
    first: new Int32Array(ny),
    end: new Int32Array(ny).fill(limited ? 0 : nx),
    columnPeak: new Float64Array(nx * ny),
    peak: 0,
    solvedColumns: 0,
  };
  const columnPeak = region.columnPeak;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const base = 2 + rowStride * (j + 2) + k * planeStride;
      for (let i = 0; i < nx; i++) {
        const value = field[base + i];
        if (value > columnPeak[i + nx * j]) columnPeak[i + nx * j] = value;
      }
    }
  }
  for (let n = 0; n < nx * ny; n++) if (columnPeak[n] > region.peak) region.peak = columnPeak[n];
  if (!limited) return region;
  const seeds = new Uint8Array(nx * ny);
  for (let n = 0; n < sourceCells.length; n++) {
    const inPlane = sourceCells[n] % planeStride;
    const i = (inPlane % rowStride) - 2;
    const j = Math.floor(inPlane / rowStride) - 2;
    if (i >= 0 && i < nx && j >= 0 && j < ny) seeds[i + nx * j] = 1;
  }
  growActiveColumns(region, nx, ny, seeds);
  return region;
}

/** Grow the ranges to cover, with the margin, every column above the threshold or marked in `seeds`. */
export function growActiveColumns(region: ActiveColumns, nx: number, ny: number, seeds: Uint8Array | null): void {
  const threshold = ACTIVE_COLUMN_THRESHOLD * region.peak;
  const { first, end, columnPeak } = region;
  for (let j = 0; j < ny; j++) {
    let lowest = nx;
    let highest = -1;
    for (let jj = Math.max(0, j - RANGE_MARGIN); jj <= Math.min(ny - 1, j + RANGE_MARGIN); jj++) {
      const row = nx * jj;
      for (let i = 0; i < nx; i++) {
        if (columnPeak[row + i] > threshold || (seeds !== null && seeds[row + i] === 1)) {
          if (i < lowest) lowest = i;
          break;
        }
      }
      for (let i = nx - 1; i > highest; i--) {
        if (columnPeak[row + i] > threshold || (seeds !== null && seeds[row + i] === 1)) {
          highest = i;
          break;
        }
      }
    }
    if (highest < 0) continue;
    const from = Math.max(0, lowest - RANGE_MARGIN);
    const to = Math.min(nx, highest + 1 + RANGE_MARGIN);
    if (first[j] >= end[j]) {
      first[j] = from;
      end[j] = to;
    } else {
      if (from < first[j]) first[j] = from;
      if (to > end[j]) end[j] = to;
    }
  }
}
