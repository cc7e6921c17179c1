/**
 * Steady state of the grid model without marching in time: block Gauss-Seidel sweeps over the columns in
 * downwind order, each column's vertical diffusion, vertical upwind advection, deposition, losses and
 * upwind horizontal outflow solved implicitly (one tridiagonal solve; the matrix is the same for every
 * column, so its Thomas factors are computed once), with the upwind inflow from the columns already
 * swept. The limited second-order part of the advective fluxes and the downwind half of the horizontal
 * diffusion enter as a deferred correction from the latest values. With pure upwind advection and no
 * horizontal diffusion one sweep is the exact steady solution; the deferred terms need a few more.
 *
 * The discrete equations solved are the steady form of the time step's (same faces, same limiter with
 * weight 1/2 in place of (1 - |Courant|)/2), in flux form: interior face fluxes cancel, so the mass budget
 * of the converged field closes to the convergence tolerance.
 */
import { fillGhostCells } from '../boundaries/boundaryConditions.ts';
import type { DispersionModel } from '../drivers/model.ts';
import type { RunControl } from '../drivers/types.ts';
import type { StepPhysics } from './stepPlan.ts';

/** Stop when the estimated remaining error of the field (L1, mass-weighted, relative) is below this. */
export const STEADY_TOLERANCE = 1e-6;

/** Most sweeps before giving up (the result then says it did not converge). */
export const STEADY_MAX_SWEEPS = 400;

export interface SteadySolveOptions {
  /** relative tolerance on the estimated error, default STEADY_TOLERANCE */
  tolerance?: number;
  /** default STEADY_MAX_SWEEPS */
  maxSweeps?: number;
  /** least number of sweeps (default 2) */
  minSweeps?: number;
  /** Anderson mixing depth, default ANDERSON_DEPTH; 0 = plain sweeps */
  andersonDepth?: number;
  /**
   * Solve only the layers below the no-flux lid when nothing can reach the layers above it (default true;
   * see {@link layersBelowLidToSolve}). The answer is the same: those layers hold exactly zero either way.
   */
  lidLimited?: boolean;
  control?: RunControl;
}

export interface SteadySolveReport {
  sweeps: number;
  converged: boolean;
  /** relative L1 change of the last sweep */
  lastChange: number;
  /** estimated relative error left: last change x rho / (1 - rho), rho the observed contraction per sweep */
  estimatedError: number;
  /** observed contraction factor per sweep (ratio of the last two changes) */
  contraction: number;
  tolerance: number;
  /** layers swept (the lowest ones); fewer than nz when the solve was limited to the layers below the lid */
  layersSolved: number;
}

/**
 * How many of the lowest layers can hold pollutant in the steady state: the layers below the no-flux lid
 * when every source cell is below it, no vertical wind crosses any face (so no advective flux through the
 * lid and no limited slope reading across it) and the inflow background is zero. The layers above then
 * have no source, take in only zero from the sides and exchange nothing through the lid: their steady
 * value is exactly zero, and sweeping them changes nothing. Otherwise all nz layers.
 */
export function layersBelowLidToSolve(model: DispersionModel): number {
  const { physics, grid, layout } = model;
  const lidFace = physics.lidFace;
  if (lidFace >= grid.nz) return grid.nz;
  const lateral = model.boundaries.lateral;
  if (lateral.kind === 'open' && lateral.background_g_m3 !== 0) return grid.nz;
  for (let f = 0; f <= grid.nz; f++) if (physics.w_m_s[f] !== 0) return grid.nz;
  const firstAboveLid = lidFace * layout.planeStride;
  for (let n = 0; n < physics.sourceCells.length; n++) {
    if (physics.sourceCells[n] >= firstAboveLid && physics.sourceRates_g_s[n] !== 0) return grid.nz;
  }
  return lidFace;
}

interface SteadyCoefficients {
  nx: number;
  ny: number;
  nz: number;
  rowStride: number;
  planeStride: number;
  /** per layer [1/s]: inflow weights from the west, east, south, north neighbours (upwind + diffusion) */
  fromWest: Float64Array;
  fromEast: Float64Array;
  fromSouth: Float64Array;
  fromNorth: Float64Array;
  /** per layer: Thomas factors of the column matrix */
  lower: Float64Array;
  inversePivot: Float64Array;
  upperFactor: Float64Array;
  /** per layer: limited-correction weights [1/s] = alpha u+/dx etc. */
  xPlus: Float64Array;
  xMinus: Float64Array;
  yPlus: Float64Array;
  yMinus: Float64Array;
  /** per face: alpha w+ and alpha w- [m/s]; per layer 1/dz */
  zPlus: Float64Array;
  zMinus: Float64Array;
  inverseDz: Float64Array;
  verticalAdvection: boolean;
}

function steadyCoefficients(physics: StepPhysics, layers: number): SteadyCoefficients {
  const { grid, layout } = physics;
  // Only the lowest `layers` layers are swept (all of them unless the solve is limited to the lid).
  const nz = layers;
  const dx = grid.spacing_m;
  const alpha = 0.5 * physics.limitedSlopeWeight;
  const perLayer = (): Float64Array => new Float64Array(nz);
  const c: SteadyCoefficients = {
    nx: grid.nx,
    ny: grid.ny,
    nz,
    rowStride: layout.rowStride,
    planeStride: layout.planeStride,
    fromWest: perLayer(),
    fromEast: perLayer(),
    fromSouth: perLayer(),
    fromNorth: perLayer(),
    lower: perLayer(),
    inversePivot: perLayer(),
    upperFactor: perLayer(),
    xPlus: perLayer(),
    xMinus: perLayer(),
    yPlus: perLayer(),
    yMinus: perLayer(),
    zPlus: new Float64Array(nz + 1),
    zMinus: new Float64Array(nz + 1),
    inverseDz: perLayer(),
    verticalAdvection: false,
  };
  const diagonal = perLayer();
  const below = perLayer(); // coefficient of c_{k-1} moved to the right-hand side (>= 0)
  const above = perLayer(); // coefficient of c_{k+1} (>= 0)
  for (let k = 0; k < nz; k++) {
    const uPlus = Math.max(physics.u_m_s[k], 0) / dx;
    const uMinus = Math.min(physics.u_m_s[k], 0) / dx;
    const vPlus = Math.max(physics.v_m_s[k], 0) / dx;
    const vMinus = Math.min(physics.v_m_s[k], 0) / dx;
    const diffusion = physics.horizontal_m2_s[k] / (dx * dx);
    c.fromWest[k] = uPlus + diffusion;
    c.fromEast[k] = -uMinus + diffusion;
    c.fromSouth[k] = vPlus + diffusion;
    c.fromNorth[k] = -vMinus + diffusion;
    diagonal[k] = uPlus - uMinus + vPlus - vMinus + 4 * diffusion + physics.lossRate_per_s;
    c.xPlus[k] = alpha * uPlus;
    c.xMinus[k] = alpha * uMinus;
    c.yPlus[k] = alpha * vPlus;
    c.yMinus[k] = alpha * vMinus;
    c.inverseDz[k] = 1 / grid.dz_m[k];
  }
  diagonal[0] += physics.depositionVelocity_m_s / grid.dz_m[0];
  for (let f = 1; f < nz; f++) {
    // (with nz = the lid face, the lid's own face is not among these: it carries nothing anyway)
    const conductance = f === physics.lidFace ? 0 : physics.vertical_m2_s[f] / (grid.zCentres_m[f] - grid.zCentres_m[f - 1]);
    const w = physics.w_m_s[f];
    const wPlus = Math.max(w, 0);
    const wMinus = Math.min(w, 0);
    if (w !== 0) c.verticalAdvection = true;
    c.zPlus[f] = alpha * wPlus;
    c.zMinus[f] = alpha * wMinus;
    // Face f between layer f - 1 (below) and f (above): upwind flux wPlus c_{f-1} + wMinus c_f.
    diagonal[f - 1] += (conductance + wPlus) / grid.dz_m[f - 1];
    above[f - 1] += (conductance - wMinus) / grid.dz_m[f - 1];
    diagonal[f] += (conductance - wMinus) / grid.dz_m[f];
    below[f] += (conductance + wPlus) / grid.dz_m[f];
  }
  let previousUpper = 0;
  for (let k = 0; k < nz; k++) {
    const pivot = diagonal[k] - below[k] * previousUpper;
    if (!(pivot > 0)) {
      throw new RangeError(`steady solve: layer ${k} has no outflow, loss or exchange (pivot ${pivot}); a steady state does not exist`);
    }
    c.lower[k] = below[k];
    c.inversePivot[k] = 1 / pivot;
    c.upperFactor[k] = above[k] / pivot;
    previousUpper = c.upperFactor[k];
  }
  return c;
}

const SLOPE_FLOOR = 1e-150;

function slope(backward: number, forward: number): number {
  const absBackward = Math.abs(backward);
  const absForward = Math.abs(forward);
  return (backward * absForward + absBackward * forward) / (absBackward + absForward + SLOPE_FLOOR);
}

/**
 * Deferred correction [g/m3/s] of the current field: minus the divergence of the limited part of the
 * advective fluxes, plus the sources. Written for every interior cell of `out`.
 */
function deferredCorrection(c: SteadyCoefficients, field: Float64Array, out: Float64Array, sourceCells: Int32Array, sourceDensities: Float64Array): void {
  const { nx, ny, nz, rowStride, planeStride } = c;
  for (let k = 0; k < nz; k++) {
    const xPlus = c.xPlus[k];
    const xMinus = c.xMinus[k];
    const yPlus = c.yPlus[k];
    const yMinus = c.yMinus[k];
    for (let j = 0; j < ny; j++) {
      const base = k * planeStride + 2 + rowStride * (j + 2);
      let sW = slope(field[base - 1] - field[base - 2], field[base] - field[base - 1]);
      let s0 = slope(field[base] - field[base - 1], field[base + 1] - field[base]);
      let correctionW = xPlus * sW - xMinus * s0;
      for (let i = 0; i < nx; i++) {
        const n = base + i;
        const c0 = field[n];
        const sE = slope(field[n + 1] - c0, field[n + 2] - field[n + 1]);
        const correctionE = xPlus * s0 - xMinus * sE;
        const cS = field[n - rowStride];
        const cN = field[n + rowStride];
        const sS = slope(cS - field[n - 2 * rowStride], c0 - cS);
        const sC = slope(c0 - cS, cN - c0);
        const sN = slope(cN - c0, field[n + 2 * rowStride] - cN);
        const correctionS = yPlus * sS - yMinus * sC;
        const correctionN = yPlus * sC - yMinus * sN;
        out[n] = -(correctionE - correctionW) - (correctionN - correctionS);
        correctionW = correctionE;
        sW = s0;
        s0 = sE;
      }
      void sW;
    }
  }
  if (c.verticalAdvection) {
    for (let k = 0; k < nz; k++) {
      for (let j = 0; j < ny; j++) {
        const base = k * planeStride + 2 + rowStride * (j + 2);
        for (let i = 0; i < nx; i++) {
          const n = base + i;
          const slopeAt = (kk: number): number =>
            kk <= 0 || kk >= nz - 1 ? 0 : slope(field[n + (kk - k) * planeStride] - field[n + (kk - k - 1) * planeStride], field[n + (kk - k + 1) * planeStride] - field[n + (kk - k) * planeStride]);
          const top = k < nz - 1 ? c.zPlus[k + 1] * slopeAt(k) - c.zMinus[k + 1] * slopeAt(k + 1) : 0;
          const bottom = k > 0 ? c.zPlus[k] * slopeAt(k - 1) - c.zMinus[k] * slopeAt(k) : 0;
          out[n] -= (top - bottom) * c.inverseDz[k];
        }
      }
    }
  }
  for (let n = 0; n < sourceCells.length; n++) out[sourceCells[n]] += sourceDensities[n];
}

/**
 * One downwind Gauss-Seidel sweep: every column solved with the latest neighbours. Returns the L1 change
 * weighted by layer thickness.
 */
function sweep(c: SteadyCoefficients, field: Float64Array, correction: Float64Array, column: Float64Array, dz: Float64Array, iForward: boolean, jForward: boolean): number {
  const { nx, ny, nz, rowStride, planeStride } = c;
  let change = 0;
  for (let jn = 0; jn < ny; jn++) {
    const j = jForward ? jn : ny - 1 - jn;
    for (let in_ = 0; in_ < nx; in_++) {
      const i = iForward ? in_ : nx - 1 - in_;
      const columnBase = 2 + i + rowStride * (j + 2);
      // forward elimination
      let previous = 0;
      for (let k = 0; k < nz; k++) {
        const n = columnBase + k * planeStride;
        const rhs =
          correction[n] +
          c.fromWest[k] * field[n - 1] +
          c.fromEast[k] * field[n + 1] +
          c.fromSouth[k] * field[n - rowStride] +
          c.fromNorth[k] * field[n + rowStride];
        previous = (rhs + c.lower[k] * previous) * c.inversePivot[k];
        column[k] = previous;
      }
      // back substitution and update
      let above = 0;
      for (let k = nz - 1; k >= 0; k--) {
        const value = column[k] + c.upperFactor[k] * above;
        above = value;
        const n = columnBase + k * planeStride;
        const difference = value - field[n];
        change += (difference < 0 ? -difference : difference) * dz[k];
        field[n] = value;
      }
    }
  }
  return change;
}

function fieldL1Difference(c: SteadyCoefficients, a: Float64Array, b: Float64Array, dz: Float64Array): number {
  let total = 0;
  for (let k = 0; k < c.nz; k++) {
    let layer = 0;
    for (let j = 0; j < c.ny; j++) {
      const base = k * c.planeStride + 2 + c.rowStride * (j + 2);
      for (let i = 0; i < c.nx; i++) {
        const value = a[base + i] - b[base + i];
        layer += value < 0 ? -value : value;
      }
    }
    total += layer * dz[k];
  }
  return total;
}

function fieldL1(c: SteadyCoefficients, field: Float64Array, dz: Float64Array): number {
  let total = 0;
  for (let k = 0; k < c.nz; k++) {
    let layer = 0;
    for (let j = 0; j < c.ny; j++) {
      const base = k * c.planeStride + 2 + c.rowStride * (j + 2);
      for (let i = 0; i < c.nx; i++) {
        const value = field[base + i];
        layer += value < 0 ? -value : value;
      }
    }
    total += layer * dz[k];
  }
  return total;
}

/** Anderson mixing depth: how many past sweeps the accelerated iterate combines. */
export const ANDERSON_DEPTH = 5;

/** Deepest mixing the fused passes hold. */
export const MAX_ANDERSON_DEPTH = 6;

function dot(a: Float64Array, b: Float64Array): number {
  let sum = 0;
  for (let n = 0; n < a.length; n++) sum += a[n] * b[n];
  return sum;
}

/**
 * Least-squares coefficients gamma minimising |f - sum_i gamma_i dF_i| by the normal equations (m <= 8,
 * Gaussian elimination with partial pivoting and a small ridge against near-dependent columns).
 */
function leastSquares(gram: Float64Array[], rhs: Float64Array, m: number): Float64Array {
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

/**
 * Drive the model's field to the steady state of its current parts (sources, wind, closure, losses,
 * boundaries), starting from whatever the field holds (zero for a cold start; a warm start puts a nearby
 * solution there first, see ../drivers/gridSteady.ts). The budget tally is not touched (see
 * ../drivers/gridSteady.ts).
 *
 * Each sweep is a fixed-point map x -> G(x) whose fixed point is the steady solution. Its slow modes (the
 * lagged correction and the lagged downwind and crosswind diffusion need many sweeps to be carried out of
 * the domain) are removed by Anderson mixing (Anderson 1965, J. ACM 12:547; Walker & Ni 2011, SIAM J.
 * Numer. Anal. 49:1715): the next iterate is the combination of the last ANDERSON_DEPTH sweeps that
 * minimises the sweep residual G(x) - x, clipped at zero (concentrations are never negative).
 */
export function solveSteadyState(model: DispersionModel, options: SteadySolveOptions = {}): SteadySolveReport {
  const tolerance = options.tolerance ?? STEADY_TOLERANCE;
  const maxSweeps = options.maxSweeps ?? STEADY_MAX_SWEEPS;
  const minSweeps = options.minSweeps ?? 2;
  const depth = options.andersonDepth ?? ANDERSON_DEPTH;
  if (!Number.isInteger(depth) || depth < 0 || depth > MAX_ANDERSON_DEPTH) {
    throw new RangeError(`andersonDepth is ${depth}; allowed: an integer from 0 to ${MAX_ANDERSON_DEPTH}`);
  }
  const physics = model.physics;
  const { grid, layout } = model;
  const layersSolved = options.lidLimited === false ? grid.nz : layersBelowLidToSolve(model);
  const coefficients = steadyCoefficients(physics, layersSolved);
  const field = model.field;
  // Above the lid the steady value is zero (a warm start may have brought something there).
  if (layersSolved < grid.nz) field.fill(0, layersSolved * layout.planeStride);
  const correction = model.spare;
  const column = new Float64Array(grid.nz);
  const sourceDensities = new Float64Array(physics.sourceCells.length);
  for (let n = 0; n < sourceDensities.length; n++) {
    const k = Math.floor(physics.sourceCells[n] / layout.planeStride);
    sourceDensities[n] = physics.sourceRates_g_s[n] / (grid.spacing_m * grid.spacing_m * grid.dz_m[k]);
  }
  // Sweep downwind: the direction of the depth-weighted mean wind.
  let meanU = 0;
  let meanV = 0;
  for (let k = 0; k < grid.nz; k++) {
    meanU += physics.u_m_s[k] * grid.dz_m[k];
    meanV += physics.v_m_s[k] * grid.dz_m[k];
  }
  const iForward = meanU >= 0;
  const jForward = meanV >= 0;
  const signal = options.control?.signal;
  const onProgress = options.control?.onProgress;

  const planeStride = layout.planeStride;
  // The mixing works on the solved layers only (the rest stays zero).
  const size = layersSolved < grid.nz ? layersSolved * planeStride : layout.size;
  const iterate = new Float64Array(size);
  const previousResidual = new Float64Array(size);
  const previousImage = new Float64Array(size);
  // History of differences of residuals and images, in float32: Anderson mixing only needs them to a few
  // digits (the mixed iterate is checked by the next sweep), and half the bytes halve its cost.
  const residualDifferences: Float32Array[] = [];
  const imageDifferences: Float32Array[] = [];
  const gram: Float64Array[] = Array.from({ length: Math.max(depth, 1) }, () => new Float64Array(Math.max(depth, 1)));
  const projections = new Float64Array(Math.max(depth, 1));
  const zeros = new Float32Array(size);
  let stored = 0;
  let newest = -1;

  let lastChange = Infinity;
  let previousChange = Infinity;
  let contraction = 1;
  let estimatedError = Infinity;
  let sweeps = 0;
  let converged = false;
  fillGhostCells(layout, field, model.boundaries.lateral, physics.u_m_s, physics.v_m_s, 0, grid.ny);
  iterate.set(field.subarray(0, size));
  while (sweeps < maxSweeps) {
    if (signal?.aborted) {
      const error = new Error('grid steady solve aborted');
      error.name = 'AbortError';
      throw error;
    }
    deferredCorrection(coefficients, field, correction, physics.sourceCells, sourceDensities);
    sweep(coefficients, field, correction, column, grid.dz_m, iForward, jForward);
    sweeps++;
    fillGhostCells(layout, field, model.boundaries.lateral, physics.u_m_s, physics.v_m_s, 0, grid.ny);
    // field = G(iterate). One pass: the change, the new differences and their projections.
    const mixing = depth > 0 && sweeps > 1;
    if (mixing) {
      newest = (newest + 1) % depth;
      if (residualDifferences.length < depth) {
        residualDifferences.push(new Float32Array(size));
        imageDifferences.push(new Float32Array(size));
      }
      stored = Math.min(stored + 1, depth);
      for (let slot = 0; slot < stored; slot++) gram[slot][newest] = 0;
      projections.fill(0);
    }
    const newestResidual = mixing ? residualDifferences[newest] : null;
    const newestImage = mixing ? imageDifferences[newest] : null;
    let change = 0;
    let norm = 0;
    for (let k = 0; k < layersSolved; k++) {
      const from = k * planeStride;
      const to = from + planeStride;
      let layerChange = 0;
      let layerNorm = 0;
      for (let n = from; n < to; n++) {
        const image = field[n];
        const residual = image - iterate[n];
        layerChange += residual < 0 ? -residual : residual;
        layerNorm += image < 0 ? -image : image;
        if (newestResidual !== null && newestImage !== null) {
          newestResidual[n] = residual - previousResidual[n];
          newestImage[n] = image - previousImage[n];
        }
        previousResidual[n] = residual;
        previousImage[n] = image;
      }
      change += layerChange * grid.dz_m[k];
      norm += layerNorm * grid.dz_m[k];
    }
    previousChange = lastChange;
    lastChange = norm > 0 ? change / norm : 0;
    contraction = Number.isFinite(previousChange) && previousChange > 0 ? Math.min(lastChange / previousChange, 0.999) : 0.999;
    estimatedError = (lastChange * Math.min(contraction, 0.9)) / (1 - Math.min(contraction, 0.9));
    onProgress?.(Math.min(0.99, sweeps / maxSweeps), `steady sweep ${sweeps}: change ${lastChange.toExponential(2)}`);
    if (sweeps >= minSweeps && (lastChange < tolerance || lastChange === 0)) {
      converged = true;
      break;
    }
    if (mixing && newestResidual !== null) {
      // Projections of the newest difference and of the residual on every stored difference, and the
      // mixed iterate, each in one pass over the field (up to six slots held in locals; empty slots
      // point at a zero array with weight 0).
      const slot = (index: number): Float32Array => (index < stored ? residualDifferences[index] : zeros);
      const d0 = slot(0), d1 = slot(1), d2 = slot(2), d3 = slot(3), d4 = slot(4), d5 = slot(5);
      let n0 = 0, n1 = 0, n2 = 0, n3 = 0, n4 = 0, n5 = 0;
      let r0 = 0, r1 = 0, r2 = 0, r3 = 0, r4 = 0, r5 = 0;
      for (let n = 0; n < size; n++) {
        const fresh = newestResidual[n];
        const residual = previousResidual[n];
        n0 += d0[n] * fresh; r0 += d0[n] * residual;
        n1 += d1[n] * fresh; r1 += d1[n] * residual;
        n2 += d2[n] * fresh; r2 += d2[n] * residual;
        n3 += d3[n] * fresh; r3 += d3[n] * residual;
        n4 += d4[n] * fresh; r4 += d4[n] * residual;
        n5 += d5[n] * fresh; r5 += d5[n] * residual;
      }
      const withNewest = [n0, n1, n2, n3, n4, n5];
      const withResidual = [r0, r1, r2, r3, r4, r5];
      for (let index = 0; index < stored; index++) {
        gram[index][newest] = withNewest[index];
        gram[newest][index] = withNewest[index];
        projections[index] = withResidual[index];
      }
      const gamma = leastSquares(gram, projections, stored);
      const weight = (index: number): number => (index < stored ? gamma[index] : 0);
      const image = (index: number): Float32Array => (index < stored ? imageDifferences[index] : zeros);
      const g0 = weight(0), g1 = weight(1), g2 = weight(2), g3 = weight(3), g4 = weight(4), g5 = weight(5);
      const e0 = image(0), e1 = image(1), e2 = image(2), e3 = image(3), e4 = image(4), e5 = image(5);
      // x_next = G(x) - sum gamma_i dG_i, clipped at zero; it is also the next sweep's start.
      for (let n = 0; n < size; n++) {
        const value = field[n] - (g0 * e0[n] + g1 * e1[n] + g2 * e2[n] + g3 * e3[n] + g4 * e4[n] + g5 * e5[n]);
        const clipped = value > 0 ? value : 0;
        field[n] = clipped;
        iterate[n] = clipped;
      }
    } else {
      iterate.set(field.subarray(0, size));
    }
  }
  fillGhostCells(layout, field, model.boundaries.lateral, physics.u_m_s, physics.v_m_s, 0, grid.ny);
  return { sweeps, converged, lastChange, estimatedError, contraction, tolerance, layersSolved };
}
