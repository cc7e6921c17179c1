/**
 * The grid dispersion model, assembled from parts: a grid, a column wind, a diffusivity closure, an
 * advection scheme, an emission, first-order losses and boundary conditions, each passed in and each
 * swappable. Empty parts are real objects that contribute nothing (no losses = [], no emission =
 * NoEmission(), no diffusion = ConstantDiffusivity(0, 0)).
 *
 * The model also holds the state: the field (concentration [g/m3], padded layout, see
 * ../fields/paddedLayout.ts), the clock and the running mass budget. Between hours of a continuous series
 * the wind, closure, weather, losses and boundaries are replaced with `replaceModelParts`; the field and
 * the budget carry on.
 */
import { LimitedUpwindAdvection, type AdvectionScheme } from '../advection/schemes.ts';
import {
  GridTopLid,
  NoFluxGround,
  OpenBoundaries,
  lidFaceIndex,
  type BoundaryConditions,
} from '../boundaries/boundaryConditions.ts';
import type { DiffusivityClosure } from '../closures/types.ts';
import { createPaddedField, gridOrderToPadded, paddedFieldMass_g, paddedLayout, type PaddedLayout } from '../fields/paddedLayout.ts';
import type { LocalGrid } from '../grid/types.ts';
import { totalLossRate_per_s, type FirstOrderLoss } from '../losses/firstOrderLosses.ts';
import { NoEmission, type GridEmission } from '../sources/gridEmission.ts';
import { createKernelMemory, type KernelMemory } from '../timestepping/simd/transportRowModule.ts';
import { COURANT_TARGET, DEFAULT_MAX_TIME_STEP_S, stableTimeStep_s, type StepPhysics } from '../timestepping/stepPlan.ts';
import { layerSpeeds_m_s, type ColumnWind } from '../wind/columnWind.ts';
import type { ResolvedWeather } from './types.ts';

/**
 * The weather a closure is evaluated with when a verification model is built without one (constant
 * closures ignore it): neutral class D, 5 m/s at 10 m, no rain (plumeplan's choice).
 */
export const REFERENCE_WEATHER: ResolvedWeather = Object.freeze({
  windSpeed_m_s: 5,
  windFrom_deg: 270,
  stability: 'D',
  mixingHeight_m: 1e9,
  rain_mm_h: 0,
  airTemperature_K: 288.15,
  anemometerHeight_m: 10,
  calm: false,
});

export interface DispersionModelParts {
  grid: LocalGrid;
  wind: ColumnWind;
  closure: DiffusivityClosure;
  /** weather the closure reads (default REFERENCE_WEATHER) */
  weather?: ResolvedWeather;
  /** default LimitedUpwindAdvection */
  advection?: AdvectionScheme;
  /** default NoEmission() */
  emission?: GridEmission;
  /** default [] */
  losses?: FirstOrderLoss[];
  /** defaults: OpenBoundaries(0), NoFluxGround, GridTopLid */
  boundaries?: Partial<BoundaryConditions>;
  /** target of the positivity (Courant) number, default COURANT_TARGET = 0.9 */
  courantTarget?: number;
  /** longest time step [s], default 60 */
  maxTimeStep_s?: number;
  /** keep the field on shared memory so worker threads can step it */
  sharedMemory?: boolean;
  /**
   * step rows with the WebAssembly SIMD kernel where the runtime has it (default true); its results equal
   * the JavaScript loop's bit for bit. The fields then live in one shared WebAssembly memory.
   */
  simd?: boolean;
}

/** Running mass budget of a model [g], float64 throughout. */
export interface BudgetTally {
  /** emitted by the sources, plus the initial field (counted as released at t = 0) */
  emitted: number;
  decayed: number;
  washedOut: number;
  dryDeposited: number;
  /** net mass through the sides (negative when more came in than left) */
  outflow: number;
  /** mass in the domain after the last step */
  inDomain: number;
}

export interface DispersionModel {
  readonly grid: LocalGrid;
  readonly layout: PaddedLayout;
  wind: ColumnWind;
  closure: DiffusivityClosure;
  weather: ResolvedWeather;
  advection: AdvectionScheme;
  emission: GridEmission;
  losses: FirstOrderLoss[];
  boundaries: BoundaryConditions;
  courantTarget: number;
  maxTimeStep_s: number;
  /** concentration [g/m3], padded layout */
  field: Float64Array;
  /** the second buffer the stepper writes into */
  spare: Float64Array;
  /** the shared WebAssembly memory holding field and spare when the SIMD kernel is used, else null */
  readonly kernelMemory: KernelMemory | null;
  clock: { time_s: number; iteration: number };
  budget: BudgetTally;
  /** physics derived from the parts (recomputed by replaceModelParts) */
  physics: StepPhysics;
  /** the stable time step of the current physics [s] */
  timeStep_s: number;
  /** evaluated closure: horizontal per layer and vertical per face [m2/s] */
  horizontal_m2_s: Float64Array;
  vertical_m2_s: Float64Array;
}

function derivePhysics(model: Omit<DispersionModel, 'physics' | 'timeStep_s' | 'horizontal_m2_s' | 'vertical_m2_s'>): {
  physics: StepPhysics;
  horizontal_m2_s: Float64Array;
  vertical_m2_s: Float64Array;
} {
  const { grid, wind, closure, weather, layout } = model;
  if (wind.u_m_s.length !== grid.nz || wind.v_m_s.length !== grid.nz || wind.w_m_s.length !== grid.nz + 1) {
    throw new RangeError(`wind ${wind.name} has ${wind.u_m_s.length} layers; the grid has nz = ${grid.nz} (and nz + 1 faces for w)`);
  }
  const speeds = layerSpeeds_m_s(wind);
  const horizontal = closure.horizontal_m2_s(grid, weather, speeds);
  const vertical = closure.vertical_m2_s(grid, weather, speeds);
  if (horizontal.length !== grid.nz || vertical.length !== grid.nz + 1) {
    throw new RangeError(`closure ${closure.name} gave ${horizontal.length} horizontal and ${vertical.length} vertical values; expected nz = ${grid.nz} and nz + 1`);
  }
  for (const [name, values] of [['horizontal', horizontal], ['vertical', vertical]] as const) {
    for (let n = 0; n < values.length; n++) {
      if (!(values[n] >= 0) || !Number.isFinite(values[n])) {
        throw new RangeError(`closure ${closure.name}: ${name} diffusivity [${n}] is ${values[n]}; allowed: finite >= 0 m2/s`);
      }
    }
  }
  const sourceCells = new Int32Array(model.emission.cells.length);
  const nxy = grid.nx * grid.ny;
  for (let n = 0; n < sourceCells.length; n++) {
    const cell = model.emission.cells[n];
    const k = Math.floor(cell / nxy);
    const j = Math.floor((cell - k * nxy) / grid.nx);
    const i = cell - k * nxy - j * grid.nx;
    sourceCells[n] = i + 2 + layout.rowStride * (j + 2 + layout.columnRows * k);
  }
  const physics: StepPhysics = {
    grid,
    layout,
    u_m_s: wind.u_m_s,
    v_m_s: wind.v_m_s,
    w_m_s: wind.w_m_s,
    horizontal_m2_s: horizontal,
    vertical_m2_s: vertical,
    limitedSlopeWeight: model.advection.limitedSlopeWeight,
    lossRate_per_s: totalLossRate_per_s(model.losses),
    depositionVelocity_m_s: model.boundaries.ground.depositionVelocity_m_s,
    lidFace: lidFaceIndex(grid, model.boundaries.lid),
    sourceCells,
    sourceRates_g_s: model.emission.rates_g_s,
  };
  return { physics, horizontal_m2_s: horizontal, vertical_m2_s: vertical };
}

/**
 * Assemble a model from its parts, with an empty field.
 *
 * @example
 * const model = createDispersionModel({ grid, wind: uniformColumnWind(grid, 5, 270), closure: new ConstantDiffusivity(10, 5) });
 */
export function createDispersionModel(parts: DispersionModelParts): DispersionModel {
  const layout = paddedLayout(parts.grid);
  const shared = parts.sharedMemory ?? false;
  const kernelMemory = parts.simd === false ? null : createKernelMemory(layout.size, layout.nx);
  const fields: [Float64Array, Float64Array] = kernelMemory
    ? [
        new Float64Array(kernelMemory.memory.buffer, kernelMemory.fieldOffsets[0], layout.size),
        new Float64Array(kernelMemory.memory.buffer, kernelMemory.fieldOffsets[1], layout.size),
      ]
    : [createPaddedField(layout, shared), createPaddedField(layout, shared)];
  const base = {
    grid: parts.grid,
    layout,
    wind: parts.wind,
    closure: parts.closure,
    weather: parts.weather ?? REFERENCE_WEATHER,
    advection: parts.advection ?? LimitedUpwindAdvection,
    emission: parts.emission ?? NoEmission(),
    losses: parts.losses ?? [],
    boundaries: {
      lateral: parts.boundaries?.lateral ?? OpenBoundaries(0),
      ground: parts.boundaries?.ground ?? NoFluxGround,
      lid: parts.boundaries?.lid ?? GridTopLid,
    },
    courantTarget: parts.courantTarget ?? COURANT_TARGET,
    maxTimeStep_s: parts.maxTimeStep_s ?? DEFAULT_MAX_TIME_STEP_S,
    field: fields[0],
    spare: fields[1],
    kernelMemory,
    clock: { time_s: 0, iteration: 0 },
    budget: { emitted: 0, decayed: 0, washedOut: 0, dryDeposited: 0, outflow: 0, inDomain: 0 },
  };
  const derived = derivePhysics(base);
  return { ...base, ...derived, timeStep_s: stableTimeStep_s(derived.physics, base.courantTarget, base.maxTimeStep_s) };
}

/** The parts that may change between hours of a continuous run. */
export type ReplaceableParts = Partial<
  Pick<DispersionModelParts, 'wind' | 'closure' | 'weather' | 'advection' | 'emission' | 'losses' | 'boundaries' | 'courantTarget' | 'maxTimeStep_s'>
>;

/** Replace parts (new weather for the next hour, say); the field, clock and budget carry on. */
export function replaceModelParts(model: DispersionModel, parts: ReplaceableParts): DispersionModel {
  if (parts.wind) model.wind = parts.wind;
  if (parts.closure) model.closure = parts.closure;
  if (parts.weather) model.weather = parts.weather;
  if (parts.advection) model.advection = parts.advection;
  if (parts.emission) model.emission = parts.emission;
  if (parts.losses) model.losses = parts.losses;
  if (parts.boundaries) model.boundaries = { ...model.boundaries, ...parts.boundaries };
  if (parts.courantTarget !== undefined) model.courantTarget = parts.courantTarget;
  if (parts.maxTimeStep_s !== undefined) model.maxTimeStep_s = parts.maxTimeStep_s;
  const derived = derivePhysics(model);
  model.physics = derived.physics;
  model.horizontal_m2_s = derived.horizontal_m2_s;
  model.vertical_m2_s = derived.vertical_m2_s;
  model.timeStep_s = stableTimeStep_s(model.physics, model.courantTarget, model.maxTimeStep_s);
  return model;
}

/**
 * Set the field from values in the public order i + nx * (j + ny * k) [g/m3]. Its mass is booked as
 * emitted at the current time (an instantaneous release), so the budget still closes.
 */
export function setInitialField(model: DispersionModel, field_g_m3: Float64Array): void {
  const previousMass = paddedFieldMass_g(model.layout, model.grid, model.field);
  gridOrderToPadded(model.layout, field_g_m3, model.field);
  const mass = paddedFieldMass_g(model.layout, model.grid, model.field);
  model.budget.emitted += mass - previousMass;
  model.budget.inDomain = mass;
}
