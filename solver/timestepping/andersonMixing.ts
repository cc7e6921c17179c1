/**
 * Anderson mixing of the steady sweeps (Anderson 1965, J. ACM 12:547; Walker & Ni 2011, SIAM J.
 * Numer. Anal. 49:1715), as passes over the active ranges of the solved layers (./activeColumns.ts):
 * the sweep's change and the differences of residuals and images, their projections, and the mixed
 * iterate. Used by ./steadySweep.ts.
 */

/** Anderson mixing depth: how many past sweeps the accelerated iterate combines. */
export const ANDERSON_DEPTH = 5;

/** Deepest mixing the fused passes hold. */
export const MAX_ANDERSON_DEPTH = 6;

/**
 * Least-squares coefficients gamma minimising |f - sum_i gamma_i dF_i| by the normal equations (m <= 8,
 * Gaussian elimination with partial pivoting and a small ridge against near-dependent columns).
 */
export function leastSquares(gram: Float64Array[], rhs: Float64Array, m: number): Float64Array {
  const a = gram.slice(0, m).map((row) => Float64Array.from(row.subarray(0, m)));
  const b = Float64Array.from(rhs.subarray(0, m));
  let trace = 0;
  for (let i = 0; i < m; i++) trace += a[i][i];
  for (let i = 0; i < m; i++) a[i][i] += 1e-12 * (trace / m) + 1e-300;
  for (let col = 0; col < m; col++) {
    let pivotRow = col;
    for (let r = col + 1; r < m; r++) if (Math.abs(a[r][col]) > Math.abs(a[pivotRow][col])) pivotRow = r;
    [a[col], a[pivotRow]] = [a[pivotRow], a[col]];
    [b[col], b[pivotRow]] = [b[pivotRow], b[col]];
    for (let r = col + 1; r < m; r++) {
      const factor = a[r][col] / a[col][col];
      for (let cc = col; cc < m; cc++) a[r][cc] -= factor * a[col][cc];
      b[r] -= factor * b[col];
    }
  }
  const gamma = new Float64Array(m);
  for (let r = m - 1; r >= 0; r--) {
    let sum = b[r];
    for (let cc = r + 1; cc < m; cc++) sum -= a[r][cc] * gamma[cc];
    gamma[r] = sum / a[r][r];
  }
  return gamma;
}

/*
 * The mixing passes, each over the active ranges of the solved layers, kept as small functions of typed
 * arrays only: inlined into the (large, often re-optimised) driver they were deoptimised again and
 * again ("wrong map") and ran at a fraction of memory speed.
 */

export interface RangeShape {
  ny: number;
  layers: number;
  rowStride: number;
  planeStride: number;
  first: Int32Array;
  end: Int32Array;
}

/**
 * Remember this sweep's residual (image - iterate) and image over the ranges and, when given, store
 * their differences from the previous ones (the newest history slot).
 */
export function recordResidual(
  shape: RangeShape,
  field: Float64Array,
  iterate: Float64Array,
  previousResidual: Float64Array,
  previousImage: Float64Array,
  residualDifference: Float32Array | null,
  imageDifference: Float32Array | null,
): void {
  const { ny, layers, rowStride, planeStride, first, end } = shape;
  for (let k = 0; k < layers; k++) {
    for (let j = 0; j < ny; j++) {
      const base = k * planeStride + 2 + rowStride * (j + 2);
      const to = base + end[j];
      if (residualDifference !== null && imageDifference !== null) {
        for (let n = base + first[j]; n < to; n++) {
          const image = field[n];
          const residual = image - iterate[n];
          residualDifference[n] = residual - previousResidual[n];
          imageDifference[n] = image - previousImage[n];
          previousResidual[n] = residual;
          previousImage[n] = image;
        }
      } else {
        for (let n = base + first[j]; n < to; n++) {
          const image = field[n];
          previousResidual[n] = image - iterate[n];
          previousImage[n] = image;
        }
      }
    }
  }
}

/** sums[i] = d_i . fresh, sums[MAX_ANDERSON_DEPTH + i] = d_i . residual, for the six slots. */
export function projectionPass(
  shape: RangeShape,
  d0: Float32Array,
  d1: Float32Array,
  d2: Float32Array,
  d3: Float32Array,
  d4: Float32Array,
  d5: Float32Array,
  fresh: Float32Array,
  residual: Float64Array,
  sums: Float64Array,
): void {
  const { ny, layers, rowStride, planeStride, first, end } = shape;
  let n0 = 0, n1 = 0, n2 = 0, n3 = 0, n4 = 0, n5 = 0;
  let r0 = 0, r1 = 0, r2 = 0, r3 = 0, r4 = 0, r5 = 0;
  for (let k = 0; k < layers; k++) {
    for (let j = 0; j < ny; j++) {
      const base = k * planeStride + 2 + rowStride * (j + 2);
      const to = base + end[j];
      for (let n = base + first[j]; n < to; n++) {
        const f = fresh[n];
        const r = residual[n];
        const a0 = d0[n], a1 = d1[n], a2 = d2[n], a3 = d3[n], a4 = d4[n], a5 = d5[n];
        n0 += a0 * f; r0 += a0 * r;
        n1 += a1 * f; r1 += a1 * r;
        n2 += a2 * f; r2 += a2 * r;
        n3 += a3 * f; r3 += a3 * r;
        n4 += a4 * f; r4 += a4 * r;
        n5 += a5 * f; r5 += a5 * r;
      }
    }
  }
  sums[0] = n0; sums[1] = n1; sums[2] = n2; sums[3] = n3; sums[4] = n4; sums[5] = n5;
  sums[6] = r0; sums[7] = r1; sums[8] = r2; sums[9] = r3; sums[10] = r4; sums[11] = r5;
}

/** field = iterate = max(0, field - sum_i weights[i] e_i) over the ranges. */
export function mixPass(
  shape: RangeShape,
  field: Float64Array,
  iterate: Float64Array,
  e0: Float32Array,
  e1: Float32Array,
  e2: Float32Array,
  e3: Float32Array,
  e4: Float32Array,
  e5: Float32Array,
  weights: Float64Array,
): void {
  const { ny, layers, rowStride, planeStride, first, end } = shape;
  const g0 = weights[0], g1 = weights[1], g2 = weights[2], g3 = weights[3], g4 = weights[4], g5 = weights[5];
  for (let k = 0; k < layers; k++) {
    for (let j = 0; j < ny; j++) {
      const base = k * planeStride + 2 + rowStride * (j + 2);
      const to = base + end[j];
      for (let n = base + first[j]; n < to; n++) {
        const value = field[n] - (g0 * e0[n] + g1 * e1[n] + g2 * e2[n] + g3 * e3[n] + g4 * e4[n] + g5 * e5[n]);
        const clipped = value > 0 ? value : 0;
        field[n] = clipped;
        iterate[n] = clipped;
      }
    }
  }
}

/** iterate = field over the ranges. */
export function copyPass(shape: RangeShape, field: Float64Array, iterate: Float64Array): void {
  const { ny, layers, rowStride, planeStride, first, end } = shape;
  for (let k = 0; k < layers; k++) {
    for (let j = 0; j < ny; j++) {
      const base = k * planeStride + 2 + rowStride * (j + 2);
      iterate.set(field.subarray(base + first[j], base + end[j]), base + first[j]);
    }
  }
}
