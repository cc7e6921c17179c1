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
 *
 * Where the time goes, and what keeps it down (measured on the demo year's hours):
 * - only columns the plume reaches are swept (ActiveColumns; about a third of the demo's);
 * - rows are solved two at a time, one column apart, so two elimination chains overlap (same values);
 * - the y slopes of the deferred correction are computed once per cell and read three times;
 * - single runs accelerate the sweeps by Anderson mixing; the warm-started solves of a series use plain
 *   sweeps, the correction refreshed every other sweep (the mixing passes cost more than they saved).
 */
import { fillGhostCells } from '../boundaries/boundaryConditions.ts';
import type { DispersionModel } from '../drivers/model.ts';
import type { RunControl } from '../drivers/types.ts';
import { ACTIVE_COLUMN_THRESHOLD, activeColumnsFor, growActiveColumns, type ActiveColumns } from './activeColumns.ts';
import { ANDERSON_DEPTH, MAX_ANDERSON_DEPTH, copyPass, leastSquares, mixPass, projectionPass, recordResidual, type RangeShape } from './andersonMixing.ts';
import type { StepPhysics } from './stepPlan.ts';

export { ACTIVE_COLUMN_THRESHOLD } from './activeColumns.ts';
export { ANDERSON_DEPTH, MAX_ANDERSON_DEPTH } from './andersonMixing.ts';

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
   * Sweeps per refresh of the deferred limited correction (default 1: every sweep). Plain sweeps (depth
   * 0) may reuse it for a sweep: it changes slowly, and the fixed point is the same. Measured on the
   * demo year's first ten days (217 solves): 2 gave 3 % more sweeps for about 12 % less time.
   */
  correctionInterval?: number;
  /**
   * Solve only the layers below the no-flux lid when nothing can reach the layers above it (default true;
   * see {@link layersBelowLidToSolve}). The answer is the same: those layers hold exactly zero either way.
   */
  lidLimited?: boolean;
  /**
   * Sweep only the columns that hold more than ACTIVE_COLUMN_THRESHOLD of the field's peak, or border
   * one that does (default true; open boundaries with a zero background only). See ActiveColumns.
   */
  activeColumnsOnly?: boolean;
  /**
   * The relative mass-budget imbalance of the current field, (emitted - accounted) / emitted (the driver's
   * budget; ../drivers/gridSteady.ts). When given, the solve stops only once |imbalance| <= tolerance as
   * well as the change: the change per sweep alone left the demo's imbalance 55 times its tolerance.
   * Evaluated only on sweeps whose change already passes (one pass over the field each).
   */
  budgetImbalance?: () => number;
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
  /** fraction of the nx x ny columns swept in the last sweep (1 when every column was) */
  activeColumnFraction: number;
  /** Anderson mixing depth used (0: plain sweeps) */
  andersonDepth: number;
  /** relative budget imbalance at the stop, when budgetImbalance was given (else null) */
  budgetImbalance: number | null;
  /** sweeps per refresh of the deferred correction */
  correctionInterval: number;
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
  /**
   * The column solve's coefficients, per layer k at k * PACKED (one small block the column loops read):
   * inflow weights [1/s] from the west, east, south and north neighbours (upwind + diffusion), the
   * Thomas factors of the column matrix (lower, inverse pivot, upper factor) and the layer's dz [m].
   */
  packed: Float64Array;
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

const PACKED = 8;

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
    packed: new Float64Array(nz * PACKED),
    xPlus: perLayer(),
    xMinus: perLayer(),
    yPlus: perLayer(),
    yMinus: perLayer(),
    zPlus: new Float64Array(nz + 1),
    zMinus: new Float64Array(nz + 1),
    inverseDz: perLayer(),
    verticalAdvection: false,
  };
  const packed = c.packed;
  const diagonal = perLayer();
  const below = perLayer(); // coefficient of c_{k-1} moved to the right-hand side (>= 0)
  const above = perLayer(); // coefficient of c_{k+1} (>= 0)
  for (let k = 0; k < nz; k++) {
    const uPlus = Math.max(physics.u_m_s[k], 0) / dx;
    const uMinus = Math.min(physics.u_m_s[k], 0) / dx;
    const vPlus = Math.max(physics.v_m_s[k], 0) / dx;
    const vMinus = Math.min(physics.v_m_s[k], 0) / dx;
    const diffusion = physics.horizontal_m2_s[k] / (dx * dx);
    packed[k * PACKED] = uPlus + diffusion; // from the west
    packed[k * PACKED + 1] = -uMinus + diffusion; // from the east
    packed[k * PACKED + 2] = vPlus + diffusion; // from the south
    packed[k * PACKED + 3] = -vMinus + diffusion; // from the north
    packed[k * PACKED + 7] = grid.dz_m[k];
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
    previousUpper = above[k] / pivot;
    packed[k * PACKED + 4] = below[k]; // lower
    packed[k * PACKED + 5] = 1 / pivot; // inverse pivot
    packed[k * PACKED + 6] = previousUpper; // upper factor
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
function deferredCorrection(
  c: SteadyCoefficients,
  field: Float64Array,
  out: Float64Array,
  sourceCells: Int32Array,
  sourceDensities: Float64Array,
  first: Int32Array,
  end: Int32Array,
  ySlopes: Float64Array,
): void {
  const { nx, ny, nz, rowStride, planeStride } = c;
  for (let k = 0; k < nz; k++) {
    const xPlus = c.xPlus[k];
    const xMinus = c.xMinus[k];
    const yPlus = c.yPlus[k];
    const yMinus = c.yMinus[k];
    // Limited slopes along y, each once: rows -1..ny (row r at (r + 1) nx), over the columns that rows
    // r - 1..r + 1 are corrected in, so each cell's three y slopes are read, not recomputed.
    for (let r = -1; r <= ny; r++) {
      let from = nx;
      let to = 0;
      for (let jj = Math.max(0, r - 1); jj <= Math.min(ny - 1, r + 1); jj++) {
        if (first[jj] < end[jj]) {
          if (first[jj] < from) from = first[jj];
          if (end[jj] > to) to = end[jj];
        }
      }
      const base = k * planeStride + 2 + rowStride * (r + 2);
      const row = (r + 1) * nx;
      for (let i = from; i < to; i++) {
        const n = base + i;
        const c0 = field[n];
        ySlopes[row + i] = slope(c0 - field[n - rowStride], field[n + rowStride] - c0);
      }
    }
    for (let j = 0; j < ny; j++) {
      const iFirst = first[j];
      const iEnd = end[j];
      if (iFirst >= iEnd) continue;
      const base = k * planeStride + 2 + rowStride * (j + 2) + iFirst;
      const southRow = j * nx + iFirst;
      let s0 = slope(field[base] - field[base - 1], field[base + 1] - field[base]);
      let correctionW = xPlus * slope(field[base - 1] - field[base - 2], field[base] - field[base - 1]) - xMinus * s0;
      for (let i = 0; i < iEnd - iFirst; i++) {
        const n = base + i;
        const c0 = field[n];
        const sE = slope(field[n + 1] - c0, field[n + 2] - field[n + 1]);
        const correctionE = xPlus * s0 - xMinus * sE;
        const sS = ySlopes[southRow + i];
        const sC = ySlopes[southRow + nx + i];
        const sN = ySlopes[southRow + 2 * nx + i];
        const correctionS = yPlus * sS - yMinus * sC;
        const correctionN = yPlus * sC - yMinus * sN;
        out[n] = -(correctionE - correctionW) - (correctionN - correctionS);
        correctionW = correctionE;
        s0 = sE;
      }
    }
  }
  if (c.verticalAdvection) {
    for (let k = 0; k < nz; k++) {
      for (let j = 0; j < ny; j++) {
        const base = k * planeStride + 2 + rowStride * (j + 2);
        for (let i = first[j]; i < end[j]; i++) {
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

/** Scratch and running totals of a sweep, shared by its column solves. */
interface SweepState {
  c: SteadyCoefficients;
  field: Float64Array;
  correction: Float64Array;
  /** two columns of scratch: [0, nz) and [nz, 2 nz) */
  column: Float64Array;
  region: ActiveColumns;
  change: number;
  norm: number;
  peak: number;
  solvedColumns: number;
}

/** Whether column (i, j) is to be solved: inside the ranges, or it or a neighbour above the threshold. */
function columnIsActive(state: SweepState, i: number, j: number): boolean {
  const region = state.region;
  if (!region.limited || (i >= region.first[j] && i < region.end[j])) return true;
  const { nx, ny } = state.c;
  const columnPeak = region.columnPeak;
  const at = i + nx * j;
  const threshold = ACTIVE_COLUMN_THRESHOLD * state.peak;
  return (
    columnPeak[at] > threshold ||
    (i > 0 && columnPeak[at - 1] > threshold) ||
    (i < nx - 1 && columnPeak[at + 1] > threshold) ||
    (j > 0 && columnPeak[at - nx] > threshold) ||
    (j < ny - 1 && columnPeak[at + nx] > threshold)
  );
}

/** Solve column (i, j) with its latest neighbours, in place. */
function solveOneColumn(state: SweepState, i: number, j: number): void {
  const { c, field, correction, column } = state;
  const { nx, nz, rowStride, planeStride, packed } = c;
  const columnBase = 2 + i + rowStride * (j + 2);
  // forward elimination (packed per layer: west, east, south, north, lower, inverse pivot, upper, dz)
  let previous = 0;
  for (let k = 0, n = columnBase, p = 0; k < nz; k++, n += planeStride, p += PACKED) {
    const rhs = correction[n] + packed[p] * field[n - 1] + packed[p + 1] * field[n + 1] + packed[p + 2] * field[n - rowStride] + packed[p + 3] * field[n + rowStride];
    previous = (rhs + packed[p + 4] * previous) * packed[p + 5];
    column[k] = previous;
  }
  // back substitution and update
  let above = 0;
  let top = 0;
  let change = 0;
  let norm = 0;
  for (let k = nz - 1, n = columnBase + (nz - 1) * planeStride, p = (nz - 1) * PACKED; k >= 0; k--, n -= planeStride, p -= PACKED) {
    const value = column[k] + packed[p + 6] * above;
    above = value;
    if (value > top) top = value;
    const difference = value - field[n];
    const thickness = packed[p + 7];
    change += (difference < 0 ? -difference : difference) * thickness;
    norm += (value < 0 ? -value : value) * thickness;
    field[n] = value;
  }
  state.region.columnPeak[i + nx * j] = top;
  if (top > state.peak) state.peak = top;
  state.change += change;
  state.norm += norm;
  state.solvedColumns++;
}

/**
 * Solve columns (iA, jA) and (iB, jB) together: the same arithmetic as one after the other, in one
 * loop, so the two elimination chains overlap. Only for two columns neither of which reads the other.
 */
function solveTwoColumns(state: SweepState, iA: number, jA: number, iB: number, jB: number): void {
  const { c, field, correction, column } = state;
  const { nx, nz, rowStride, planeStride, packed } = c;
  const baseA = 2 + iA + rowStride * (jA + 2);
  const baseB = 2 + iB + rowStride * (jB + 2);
  let previousA = 0;
  let previousB = 0;
  for (let k = 0, a = baseA, b = baseB, p = 0; k < nz; k++, a += planeStride, b += planeStride, p += PACKED) {
    const west = packed[p];
    const east = packed[p + 1];
    const south = packed[p + 2];
    const north = packed[p + 3];
    const lower = packed[p + 4];
    const inversePivot = packed[p + 5];
    const rhsA = correction[a] + west * field[a - 1] + east * field[a + 1] + south * field[a - rowStride] + north * field[a + rowStride];
    const rhsB = correction[b] + west * field[b - 1] + east * field[b + 1] + south * field[b - rowStride] + north * field[b + rowStride];
    previousA = (rhsA + lower * previousA) * inversePivot;
    previousB = (rhsB + lower * previousB) * inversePivot;
    column[k] = previousA;
    column[nz + k] = previousB;
  }
  let aboveA = 0;
  let aboveB = 0;
  let topA = 0;
  let topB = 0;
  let changeA = 0;
  let changeB = 0;
  let normA = 0;
  let normB = 0;
  for (let k = nz - 1, offset = (nz - 1) * planeStride, p = (nz - 1) * PACKED; k >= 0; k--, offset -= planeStride, p -= PACKED) {
    const upper = packed[p + 6];
    const thickness = packed[p + 7];
    const valueA = column[k] + upper * aboveA;
    const valueB = column[nz + k] + upper * aboveB;
    aboveA = valueA;
    aboveB = valueB;
    if (valueA > topA) topA = valueA;
    if (valueB > topB) topB = valueB;
    const differenceA = valueA - field[baseA + offset];
    const differenceB = valueB - field[baseB + offset];
    changeA += (differenceA < 0 ? -differenceA : differenceA) * thickness;
    changeB += (differenceB < 0 ? -differenceB : differenceB) * thickness;
    normA += (valueA < 0 ? -valueA : valueA) * thickness;
    normB += (valueB < 0 ? -valueB : valueB) * thickness;
    field[baseA + offset] = valueA;
    field[baseB + offset] = valueB;
  }
  const columnPeak = state.region.columnPeak;
  columnPeak[iA + nx * jA] = topA;
  columnPeak[iB + nx * jB] = topB;
  const top = topA > topB ? topA : topB;
  if (top > state.peak) state.peak = top;
  state.change += changeA + changeB;
  state.norm += normA + normB;
  state.solvedColumns += 2;
}

/**
 * One downwind Gauss-Seidel sweep: every active column solved with the latest neighbours (see
 * ActiveColumns). Updates the columns' peaks and the field's peak; sums[0] and sums[1] get the
 * depth-weighted L1 change and L1 norm of the solved cells.
 *
 * Rows are taken two at a time, the second one column behind the first: column i of the first row and
 * column i - 1 of the second read none of each other's cells, and each reads its west and south
 * neighbours only after they are solved, as in a row-by-row sweep, so the pair is solved together
 * (solveTwoColumns) with exactly the row-by-row sweep's values.
 */
function sweep(c: SteadyCoefficients, field: Float64Array, correction: Float64Array, column: Float64Array, iForward: boolean, jForward: boolean, region: ActiveColumns, sums: Float64Array): void {
  const { nx, ny } = c;
  const state: SweepState = { c, field, correction, column, region, change: 0, norm: 0, peak: region.peak, solvedColumns: 0 };
  const iStep = iForward ? 1 : -1;
  const iStart = iForward ? 0 : nx - 1;
  for (let jn = 0; jn < ny; jn += 2) {
    const jA = jForward ? jn : ny - 1 - jn;
    const hasB = jn + 1 < ny;
    const jB = jForward ? jA + 1 : jA - 1;
    for (let step = 0; step <= nx; step++) {
      const iA = iStart + iStep * step;
      const iB = iA - iStep;
      const doA = step < nx && columnIsActive(state, iA, jA);
      const doB = hasB && step >= 1 && columnIsActive(state, iB, jB);
      if (doA && doB) solveTwoColumns(state, iA, jA, iB, jB);
      else if (doA) solveOneColumn(state, iA, jA);
      else if (doB) solveOneColumn(state, iB, jB);
    }
  }
  region.peak = state.peak;
  region.solvedColumns = state.solvedColumns;
  sums[0] = state.change;
  sums[1] = state.norm;
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
 * minimises the sweep residual G(x) - x, clipped at zero (concentrations are never negative). With
 * andersonDepth 0 the sweeps are plain and may reuse the correction (correctionInterval).
 */
export function solveSteadyState(model: DispersionModel, options: SteadySolveOptions = {}): SteadySolveReport {
  const tolerance = options.tolerance ?? STEADY_TOLERANCE;
  const maxSweeps = options.maxSweeps ?? STEADY_MAX_SWEEPS;
  const minSweeps = options.minSweeps ?? 2;
  const depth = options.andersonDepth ?? ANDERSON_DEPTH;
  if (!Number.isInteger(depth) || depth < 0 || depth > MAX_ANDERSON_DEPTH) {
    throw new RangeError(`andersonDepth is ${depth}; allowed: an integer from 0 to ${MAX_ANDERSON_DEPTH}`);
  }
  const correctionInterval = options.correctionInterval ?? 1;
  if (!Number.isInteger(correctionInterval) || correctionInterval < 1 || (depth > 0 && correctionInterval !== 1)) {
    throw new RangeError(`correctionInterval is ${correctionInterval}; allowed: an integer >= 1, and 1 with Anderson mixing (it needs a fixed map)`);
  }
  const physics = model.physics;
  const { grid, layout } = model;
  const layersSolved = options.lidLimited === false ? grid.nz : layersBelowLidToSolve(model);
  const coefficients = steadyCoefficients(physics, layersSolved);
  const field = model.field;
  // Above the lid the steady value is zero (a warm start may have brought something there).
  if (layersSolved < grid.nz) field.fill(0, layersSolved * layout.planeStride);
  const correction = model.spare;
  const column = new Float64Array(2 * grid.nz);
  const ySlopes = new Float64Array((grid.ny + 2) * grid.nx);
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
  const lateral = model.boundaries.lateral;
  // Skipping quiet columns needs zero inflow from the sides and no wrap-around.
  // (The adjoint sides bring in only a fraction of the edge's own value: nothing from outside either.)
  const activeOnly = options.activeColumnsOnly !== false && ((lateral.kind === 'open' && lateral.background_g_m3 === 0) || lateral.kind === 'adjointOpen');
  const region = activeColumnsFor(coefficients, field, activeOnly, physics.sourceCells);
  const shape: RangeShape = { ny: grid.ny, layers: layersSolved, rowStride: layout.rowStride, planeStride, first: region.first, end: region.end };
  correction.fill(0);
  // The mixing works on the active ranges of the solved layers only (the rest stays as it is).
  // Plain sweeps (depth 0) need no copies: the sweep measures its own change.
  const size = depth === 0 ? 0 : layersSolved < grid.nz ? layersSolved * planeStride : layout.size;
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
  const passSums = new Float64Array(2 * MAX_ANDERSON_DEPTH);
  const mixingWeights = new Float64Array(MAX_ANDERSON_DEPTH);

  let lastChange = Infinity;
  let previousChange = Infinity;
  let contraction = 1;
  let estimatedError = Infinity;
  let sweeps = 0;
  let converged = false;
  let budgetImbalance: number | null = null;
  fillGhostCells(layout, field, lateral, physics.u_m_s, physics.v_m_s, 0, grid.ny);
  iterate.set(field.subarray(0, size));
  while (sweeps < maxSweeps) {
    if (signal?.aborted) {
      const error = new Error('grid steady solve aborted');
      error.name = 'AbortError';
      throw error;
    }
    // A correction is refreshed on the first two sweeps and then every correctionInterval sweeps; the
    // solve may only stop after a sweep that used a fresh one.
    const fresh = sweeps < 2 || sweeps % correctionInterval === 0;
    if (fresh) deferredCorrection(coefficients, field, correction, physics.sourceCells, sourceDensities, region.first, region.end, ySlopes);
    sweep(coefficients, field, correction, column, iForward, jForward, region, passSums);
    sweeps++;
    if (activeOnly) growActiveColumns(region, grid.nx, grid.ny, null);
    fillGhostCells(layout, field, lateral, physics.u_m_s, physics.v_m_s, 0, grid.ny);
    // field = G(iterate). One pass: the change and the new differences.
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
    // The sweep measured its change and norm (passSums); mixing keeps the residuals' history.
    if (depth > 0) {
      recordResidual(
        shape,
        field,
        iterate,
        previousResidual,
        previousImage,
        mixing ? residualDifferences[newest] : null,
        mixing ? imageDifferences[newest] : null,
      );
    }
    const change = passSums[0];
    const norm = passSums[1];
    previousChange = lastChange;
    lastChange = norm > 0 ? change / norm : 0;
    contraction = Number.isFinite(previousChange) && previousChange > 0 ? Math.min(lastChange / previousChange, 0.999) : 0.999;
    estimatedError = (lastChange * Math.min(contraction, 0.9)) / (1 - Math.min(contraction, 0.9));
    onProgress?.(Math.min(0.99, sweeps / maxSweeps), `steady sweep ${sweeps}: change ${lastChange.toExponential(2)}`);
    if (fresh && sweeps >= minSweeps && (lastChange < tolerance || lastChange === 0)) {
      // The budget must close to the same tolerance: the field's imbalance is the sum of the sweep's
      // residuals over the domain, which the change per sweep does not bound.
      budgetImbalance = options.budgetImbalance ? options.budgetImbalance() : null;
      if (budgetImbalance === null || !(Math.abs(budgetImbalance) > tolerance) || lastChange === 0) {
        converged = true;
        break;
      }
    }
    if (mixing) {
      // Projections of the newest difference and of the residual on every stored difference (one pass;
      // empty slots point at a zero array), then the mixed iterate (one pass).
      const slot = (index: number): Float32Array => (index < stored ? residualDifferences[index] : zeros);
      projectionPass(shape, slot(0), slot(1), slot(2), slot(3), slot(4), slot(5), residualDifferences[newest], previousResidual, passSums);
      for (let index = 0; index < stored; index++) {
        gram[index][newest] = passSums[index];
        gram[newest][index] = passSums[index];
        projections[index] = passSums[MAX_ANDERSON_DEPTH + index];
      }
      const gamma = leastSquares(gram, projections, stored);
      for (let index = 0; index < MAX_ANDERSON_DEPTH; index++) mixingWeights[index] = index < stored ? gamma[index] : 0;
      const image = (index: number): Float32Array => (index < stored ? imageDifferences[index] : zeros);
      // x_next = G(x) - sum gamma_i dG_i, clipped at zero; it is also the next sweep's start.
      mixPass(shape, field, iterate, image(0), image(1), image(2), image(3), image(4), image(5), mixingWeights);
    } else if (depth > 0) {
      copyPass(shape, field, iterate);
    }
  }
  fillGhostCells(layout, field, lateral, physics.u_m_s, physics.v_m_s, 0, grid.ny);
  const activeColumnFraction = region.solvedColumns / (grid.nx * grid.ny);
  return { sweeps, converged, lastChange, estimatedError, contraction, tolerance, layersSolved, activeColumnFraction, andersonDepth: depth, correctionInterval, budgetImbalance };
}
