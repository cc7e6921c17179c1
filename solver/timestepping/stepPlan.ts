/**
 * The coefficients of one transport step of length dt, computed once whenever the wind, the closure, the
 * losses or dt change, and shared by every slab (and every worker thread) that steps the field.
 *
 * Normalised fluxes: a horizontal face flux is stored as flux * dt / spacing [g/m3], so a cell changes by
 * the difference of its two face values; a vertical advective face flux as flux * dt [g/m2], divided by the
 * layer thickness of the cell it enters or leaves.
 *
 * The time step (Courant rule). For the unsplit limited scheme the new value is a convex combination of
 * old values (so never negative and no new extrema) while the positivity number
 *   P = sum over x, y, z of |C| (1 + w (1 - |C|)) + 2 (Dx + Dy) <= 1,
 * with C = velocity dt / spacing the Courant number, w the scheme's limited-slope weight (1 for the limited
 * scheme: the MC slope makes each face value differ from the upwind value by at most (1 - |C|) times a
 * one-sided difference, Sweby 1984) and D = K dt / spacing^2. plumeplan's target is P <= 0.9
 * (COURANT_TARGET); vertical diffusion is implicit and puts no limit on dt.
 */
import type { PaddedLayout } from '../fields/paddedLayout.ts';
import type { LocalGrid } from '../grid/types.ts';

/** target of the positivity number P (a total Courant number for pure advection with a first-order scheme) */
export const COURANT_TARGET = 0.9;

/** longest step taken when nothing limits it [s] (keeps the implicit vertical diffusion accurate) */
export const DEFAULT_MAX_TIME_STEP_S = 60;

export interface StepPhysics {
  grid: LocalGrid;
  layout: PaddedLayout;
  /** layer wind [m/s] */
  u_m_s: Float64Array;
  v_m_s: Float64Array;
  /** vertical velocity at faces [m/s], length nz + 1 */
  w_m_s: Float64Array;
  /** horizontal diffusivity per layer [m2/s] */
  horizontal_m2_s: Float64Array;
  /** vertical diffusivity per face [m2/s], length nz + 1 (entries 0 and nz ignored) */
  vertical_m2_s: Float64Array;
  /** weight of the limited slope (the advection scheme) */
  limitedSlopeWeight: number;
  /** sum of first-order loss rates [1/s] */
  lossRate_per_s: number;
  /** dry deposition velocity [m/s] */
  depositionVelocity_m_s: number;
  /** index of the lid face (1..nz) */
  lidFace: number;
  /** emission cells in padded order and their rates [g/s] */
  sourceCells: Int32Array;
  sourceRates_g_s: Float64Array;
}

/** Everything the kernel reads, in plain typed arrays (so it can be posted to worker threads). */
export interface StepPlan {
  nx: number;
  ny: number;
  nz: number;
  rowStride: number;
  planeStride: number;
  dt_s: number;
  /** per layer: positive and negative parts of the Courant numbers, slope weights, diffusion numbers */
  xPlus: Float64Array;
  xMinus: Float64Array;
  xSlope: Float64Array;
  xDiffusion: Float64Array;
  yPlus: Float64Array;
  yMinus: Float64Array;
  ySlope: Float64Array;
  yDiffusion: Float64Array;
  /** true when some interior face has a vertical velocity */
  verticalAdvection: boolean;
  /** per face: w+ dt and w- dt [m]; slope weights for the cell below (w > 0) and above (w < 0) */
  zPlus: Float64Array;
  zMinus: Float64Array;
  zSlopeBelow: Float64Array;
  zSlopeAbove: Float64Array;
  inverseDz_per_m: Float64Array;
  /**
   * Thomas factors of the implicit vertical diffusion, row k: (1 + lo + hi) c_k - lo c_{k-1} - hi c_{k+1} = d_k.
   * lower = lo_k, inversePivot = 1 / m_k, upperFactor = hi_k / m_k, with m_k = 1 + lo_k + hi_k - lo_k hi_{k-1} / m_{k-1}.
   */
  lower: Float64Array;
  inversePivot: Float64Array;
  upperFactor: Float64Array;
  /** exp(-(k + Lambda) dt) */
  lossFactor: number;
  /** v_d dt [m] */
  depositionDepth_m: number;
  /** cell volume per layer [m3] */
  cellVolume_m3: Float64Array;
  sourceCells: Int32Array;
  /** concentration added per step, already divided by the pivot of the cell's layer [g/m3] */
  sourceIncrements: Float64Array;
  /** mass emitted per step [g] */
  emittedPerStep_g: number;
}

/** The positivity number P of a time step (see the module comment). */
export function positivityNumber(physics: StepPhysics, dt_s: number): number {
  const { grid, limitedSlopeWeight: weight } = physics;
  const dx = grid.spacing_m;
  const term = (courant: number): number => courant * (1 + weight * (1 - Math.min(courant, 1)));
  let worst = 0;
  for (let k = 0; k < grid.nz; k++) {
    const cx = (Math.abs(physics.u_m_s[k]) * dt_s) / dx;
    const cy = (Math.abs(physics.v_m_s[k]) * dt_s) / dx;
    const wOut = Math.max(physics.w_m_s[k + 1], 0) + Math.max(-physics.w_m_s[k], 0);
    const cz = (wOut * dt_s) / grid.dz_m[k];
    const diffusion = (2 * 2 * physics.horizontal_m2_s[k] * dt_s) / (dx * dx);
    const p = term(cx) + term(cy) + term(cz) + diffusion;
    if (p > worst) worst = p;
  }
  return worst;
}

/**
 * The largest step whose positivity number is at most the target, capped at maxTimeStep_s.
 *
 * @param physics the model's current physics
 * @param courantTarget target for P, in (0, 1)
 * @param maxTimeStep_s cap [s]
 * @returns dt [s]
 */
export function stableTimeStep_s(physics: StepPhysics, courantTarget = COURANT_TARGET, maxTimeStep_s = DEFAULT_MAX_TIME_STEP_S): number {
  if (!(courantTarget > 0 && courantTarget < 1)) {
    throw new RangeError(`courantTarget is ${courantTarget}; allowed: a number in (0, 1)`);
  }
  if (!(maxTimeStep_s > 0) || !Number.isFinite(maxTimeStep_s)) {
    throw new RangeError(`maxTimeStep_s is ${maxTimeStep_s}; allowed: a finite time > 0 s`);
  }
  if (positivityNumber(physics, maxTimeStep_s) <= courantTarget) return maxTimeStep_s;
  // P grows monotonically with dt: bisect.
  let low = 0;
  let high = maxTimeStep_s;
  for (let n = 0; n < 80; n++) {
    const mid = 0.5 * (low + high);
    if (positivityNumber(physics, mid) <= courantTarget) low = mid;
    else high = mid;
  }
  return low;
}

/** Build the step plan for a time step dt [s]. */
export function buildStepPlan(physics: StepPhysics, dt_s: number): StepPlan {
  const { grid, layout } = physics;
  const { nz } = grid;
  if (!(dt_s > 0) || !Number.isFinite(dt_s)) throw new RangeError(`time step is ${dt_s}; allowed: a finite step > 0 s`);
  const dx = grid.spacing_m;
  const weight = physics.limitedSlopeWeight;
  const perLayer = (): Float64Array => new Float64Array(nz);
  const plan: StepPlan = {
    nx: layout.nx,
    ny: layout.ny,
    nz,
    rowStride: layout.rowStride,
    planeStride: layout.planeStride,
    dt_s,
    xPlus: perLayer(),
    xMinus: perLayer(),
    xSlope: perLayer(),
    xDiffusion: perLayer(),
    yPlus: perLayer(),
    yMinus: perLayer(),
    ySlope: perLayer(),
    yDiffusion: perLayer(),
    verticalAdvection: false,
    zPlus: new Float64Array(nz + 1),
    zMinus: new Float64Array(nz + 1),
    zSlopeBelow: new Float64Array(nz + 1),
    zSlopeAbove: new Float64Array(nz + 1),
    inverseDz_per_m: perLayer(),
    lower: perLayer(),
    inversePivot: perLayer(),
    upperFactor: perLayer(),
    lossFactor: Math.exp(-physics.lossRate_per_s * dt_s),
    depositionDepth_m: physics.depositionVelocity_m_s * dt_s,
    cellVolume_m3: perLayer(),
    sourceCells: physics.sourceCells,
    sourceIncrements: new Float64Array(physics.sourceCells.length),
    emittedPerStep_g: 0,
  };
  for (let k = 0; k < nz; k++) {
    const cx = (physics.u_m_s[k] * dt_s) / dx;
    const cy = (physics.v_m_s[k] * dt_s) / dx;
    plan.xPlus[k] = Math.max(cx, 0);
    plan.xMinus[k] = Math.min(cx, 0);
    plan.xSlope[k] = 0.5 * weight * (1 - Math.min(Math.abs(cx), 1));
    plan.yPlus[k] = Math.max(cy, 0);
    plan.yMinus[k] = Math.min(cy, 0);
    plan.ySlope[k] = 0.5 * weight * (1 - Math.min(Math.abs(cy), 1));
    plan.xDiffusion[k] = (physics.horizontal_m2_s[k] * dt_s) / (dx * dx);
    plan.yDiffusion[k] = plan.xDiffusion[k];
    plan.inverseDz_per_m[k] = 1 / grid.dz_m[k];
    plan.cellVolume_m3[k] = dx * dx * grid.dz_m[k];
  }
  for (let f = 1; f < nz; f++) {
    const w = physics.w_m_s[f];
    if (w !== 0) plan.verticalAdvection = true;
    plan.zPlus[f] = Math.max(w, 0) * dt_s;
    plan.zMinus[f] = Math.min(w, 0) * dt_s;
    plan.zSlopeBelow[f] = 0.5 * weight * (1 - Math.min((Math.abs(w) * dt_s) / grid.dz_m[f - 1], 1));
    plan.zSlopeAbove[f] = 0.5 * weight * (1 - Math.min((Math.abs(w) * dt_s) / grid.dz_m[f], 1));
  }
  // Implicit vertical diffusion (backward Euler), flux -K dC/dz between layer centres, none through the
  // ground (deposition instead) or the lid face. Row k: (1 + lo + hi + dep) c_k - lo c_{k-1} - hi c_{k+1}.
  const lowerCoupling = new Float64Array(nz);
  const upperCoupling = new Float64Array(nz);
  for (let f = 1; f < nz; f++) {
    if (f === physics.lidFace) continue;
    const conductance = (physics.vertical_m2_s[f] * dt_s) / (grid.zCentres_m[f] - grid.zCentres_m[f - 1]);
    upperCoupling[f - 1] = conductance / grid.dz_m[f - 1];
    lowerCoupling[f] = conductance / grid.dz_m[f];
  }
  let previousUpper = 0;
  for (let k = 0; k < nz; k++) {
    let diagonal = 1 + lowerCoupling[k] + upperCoupling[k];
    if (k === 0) diagonal += plan.depositionDepth_m / grid.dz_m[0];
    const pivot = diagonal - lowerCoupling[k] * previousUpper;
    plan.lower[k] = lowerCoupling[k];
    plan.inversePivot[k] = 1 / pivot;
    plan.upperFactor[k] = upperCoupling[k] / pivot;
    previousUpper = plan.upperFactor[k];
  }
  let emitted = 0;
  for (let n = 0; n < physics.sourceCells.length; n++) {
    const k = Math.floor(physics.sourceCells[n] / layout.planeStride);
    plan.sourceIncrements[n] = ((physics.sourceRates_g_s[n] * dt_s) / plan.cellVolume_m3[k]) * plan.inversePivot[k];
    emitted += physics.sourceRates_g_s[n] * dt_s;
  }
  plan.emittedPerStep_g = emitted;
  return plan;
}
