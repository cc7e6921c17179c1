/**
 * One transport step of a model, and who runs it: the calling thread (`SerialStepExecutor`) or worker
 * threads over slabs of rows (`../parallel/slabPool.ts`). The step books its mass budget in float64:
 * emitted, decayed and washed out (split in proportion to their rates), dry deposited, outflow and the
 * mass left in the domain.
 */
import { fillGhostCells } from '../boundaries/boundaryConditions.ts';
import type { DispersionModel } from '../drivers/model.ts';
import { buildStepPlan, type StepPhysics, type StepPlan } from './stepPlan.ts';
import { TALLY_GROUND_SUM, TALLY_LENGTH, TALLY_MASS, TALLY_OUTFLOW, createSlabScratch, transportSlab, type SlabScratch } from './transportKernel.ts';

/** Something that advances a field by one planned step and returns the summed tally. */
export interface StepExecutor {
  readonly name: string;
  readonly threads: number;
  /** fill ghosts of `previous`, write `next`, return [outflow g, mass g, ground-layer sum] */
  step(model: DispersionModel, plan: StepPlan, previous: Float64Array, next: Float64Array): Float64Array;
  /** release threads (no-op for the serial executor) */
  close(): Promise<void>;
}

/** Runs the whole field on the calling thread. */
export class SerialStepExecutor implements StepExecutor {
  readonly name = 'SerialStepExecutor';
  readonly threads = 1;
  private scratch: SlabScratch | null = null;
  private scratchMemory: unknown = null;
  private readonly tally = new Float64Array(TALLY_LENGTH);

  step(model: DispersionModel, plan: StepPlan, previous: Float64Array, next: Float64Array): Float64Array {
    const { nx, ny } = model.grid;
    if (this.scratch === null || this.scratch.slopeY.length !== nx || this.scratch.fluxZ.length !== nx * ny || this.scratchMemory !== model.kernelMemory) {
      this.scratch = createSlabScratch(nx, ny, model.kernelMemory, 0);
      this.scratchMemory = model.kernelMemory;
    }
    fillGhostCells(model.layout, previous, model.boundaries.lateral, model.wind.u_m_s, model.wind.v_m_s, 0, ny);
    this.tally.fill(0);
    transportSlab(plan, previous, next, 0, ny, this.scratch, this.tally, 0);
    return this.tally;
  }

  async close(): Promise<void> {}
}

const planCache = new WeakMap<StepPhysics, Map<number, StepPlan>>();

/** The step plan for the model's current physics and a step length (cached: plans change only with the weather). */
export function planFor(model: DispersionModel, dt_s: number): StepPlan {
  let byStep = planCache.get(model.physics);
  if (!byStep) {
    byStep = new Map();
    planCache.set(model.physics, byStep);
  }
  let plan = byStep.get(dt_s);
  if (!plan) {
    if (byStep.size > 4) byStep.clear();
    plan = buildStepPlan(model.physics, dt_s);
    byStep.set(dt_s, plan);
  }
  return plan;
}

const defaultExecutor = new SerialStepExecutor();

/**
 * Advance the model by one step of dt [s] (default: its stable time step), updating field, clock and budget.
 */
export function advanceOneStep(model: DispersionModel, dt_s = model.timeStep_s, executor: StepExecutor = defaultExecutor): void {
  if (!(dt_s > 0) || dt_s > model.timeStep_s * (1 + 1e-12)) {
    throw new RangeError(`time step is ${dt_s} s; allowed: > 0 and at most the stable step ${model.timeStep_s} s`);
  }
  const plan = planFor(model, dt_s);
  const tally = executor.step(model, plan, model.field, model.spare);
  const swap = model.field;
  model.field = model.spare;
  model.spare = swap;

  const budget = model.budget;
  const massAfter = tally[TALLY_MASS];
  budget.emitted += plan.emittedPerStep_g;
  budget.outflow += tally[TALLY_OUTFLOW];
  // The loss factor f was applied after the vertical solve: the mass before it was massAfter / f.
  const lossRate = model.physics.lossRate_per_s;
  if (lossRate > 0) {
    const lost = massAfter * Math.expm1(lossRate * dt_s);
    for (const loss of model.losses) {
      budget[loss.budgetTerm] += (lost * loss.rate_per_s) / lossRate;
    }
  }
  if (plan.depositionDepth_m > 0) {
    const cellArea = model.grid.spacing_m * model.grid.spacing_m;
    budget.dryDeposited += (plan.depositionDepth_m * cellArea * tally[TALLY_GROUND_SUM]) / plan.lossFactor;
  }
  budget.inDomain = massAfter;
  model.clock.time_s += dt_s;
  model.clock.iteration += 1;
}
