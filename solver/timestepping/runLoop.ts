/**
 * The run loop: holds a model, steps it to a stop time with its stable (Courant) time step, and calls
 * callbacks on schedules: progress, output, and the field-health guard installed by default (stops the run
 * with a clear message at the first non-finite or negative value).
 */
import type { DispersionModel } from '../drivers/model.ts';
import type { RunControl } from '../drivers/types.ts';
import { paddedIndex } from '../fields/paddedLayout.ts';
import { advanceOneStep, type StepExecutor } from './timeStepper.ts';

export type Schedule =
  /** every n-th iteration */
  | { kind: 'iterations'; every: number }
  /** whenever the clock passes a multiple of every_s [s] (the step is not shortened to land on it) */
  | { kind: 'time'; every_s: number };

export interface Callback {
  readonly name: string;
  readonly schedule: Schedule;
  run(simulation: Simulation): void;
}

export interface Simulation {
  model: DispersionModel;
  /** stop when the clock reaches this time [s] (the last step is shortened to land on it) */
  stopTime_s: number;
  /** stop after this many iterations in all, if reached first */
  stopIteration?: number;
  callbacks: Callback[];
  executor?: StepExecutor;
  control?: RunControl;
  /** set by a callback to stop the run early (e.g. steady state reached) */
  stopRequested?: boolean;
  /** why the run stopped */
  stopReason?: string;
}

/** Relative tolerance below which negative round-off is accepted: |c| <= 1e-10 * (field maximum). */
export const NEGATIVE_ROUND_OFF_TOLERANCE = 1e-10;

/** The first problem in the field: a non-finite or clearly negative value, or null when healthy. */
export function fieldProblem(model: DispersionModel): string | null {
  const { nx, ny, nz } = model.grid;
  const field = model.field;
  let maximum = 0;
  let minimum = 0;
  let minimumAt = -1;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const base = paddedIndex(model.layout, 0, j, k);
      for (let i = 0; i < nx; i++) {
        const value = field[base + i];
        if (value !== value || value === Infinity || value === -Infinity) {
          return `concentration is ${value} at cell (i ${i}, j ${j}, k ${k}) at t = ${model.clock.time_s} s (iteration ${model.clock.iteration})`;
        }
        if (value > maximum) maximum = value;
        if (value < minimum) {
          minimum = value;
          minimumAt = i + nx * (j + ny * k);
        }
      }
    }
  }
  if (minimum < -NEGATIVE_ROUND_OFF_TOLERANCE * maximum) {
    const k = Math.floor(minimumAt / (nx * ny));
    const j = Math.floor((minimumAt - k * nx * ny) / nx);
    const i = minimumAt - nx * (j + ny * k);
    return `concentration is negative (${minimum} g/m3, field maximum ${maximum}) at cell (i ${i}, j ${j}, k ${k}) at t = ${model.clock.time_s} s`;
  }
  return null;
}

/** The default guard: every `every` iterations, stop with an Error if the field has gone bad. */
export function FieldHealthGuard(every = 10): Callback {
  return {
    name: 'FieldHealthGuard',
    schedule: { kind: 'iterations', every },
    run(simulation) {
      const problem = fieldProblem(simulation.model);
      if (problem !== null) throw new Error(`grid solver stopped: ${problem}`);
    },
  };
}

/** Reports fraction of the stop time reached through RunControl.onProgress. */
export function ProgressReporter(onProgress: (fraction: number, message: string) => void, every = 20): Callback {
  return {
    name: 'ProgressReporter',
    schedule: { kind: 'iterations', every },
    run(simulation) {
      const { time_s, iteration } = simulation.model.clock;
      onProgress(Math.min(1, time_s / simulation.stopTime_s), `time-march: t = ${time_s.toFixed(0)} s, ${iteration} steps`);
    },
  };
}

function abortError(): Error {
  const error = new Error('grid run aborted');
  error.name = 'AbortError';
  return error;
}

function due(schedule: Schedule, iteration: number, before_s: number, after_s: number): boolean {
  if (schedule.kind === 'iterations') return iteration % schedule.every === 0;
  return Math.floor(after_s / schedule.every_s) > Math.floor(before_s / schedule.every_s);
}

/**
 * Step the simulation's model to its stop time (or stop iteration, or a callback's stop request). The
 * field-health guard runs every 10 iterations and at the end, whatever callbacks are given.
 */
export function runSimulation(simulation: Simulation): Simulation {
  const { model } = simulation;
  const guard = FieldHealthGuard();
  const callbacks = [...simulation.callbacks];
  if (!callbacks.some((callback) => callback.name === 'FieldHealthGuard')) callbacks.push(guard);
  const onProgress = simulation.control?.onProgress;
  if (onProgress) callbacks.push(ProgressReporter(onProgress));
  const signal = simulation.control?.signal;
  const endTolerance_s = 1e-9 * Math.max(1, simulation.stopTime_s);
  simulation.stopRequested = false;
  while (model.clock.time_s < simulation.stopTime_s - endTolerance_s) {
    if (simulation.stopIteration !== undefined && model.clock.iteration >= simulation.stopIteration) {
      simulation.stopReason = 'stop iteration reached';
      break;
    }
    if (signal?.aborted) throw abortError();
    const before_s = model.clock.time_s;
    const dt_s = Math.min(model.timeStep_s, simulation.stopTime_s - before_s);
    advanceOneStep(model, dt_s, simulation.executor);
    for (const callback of callbacks) {
      if (due(callback.schedule, model.clock.iteration, before_s, model.clock.time_s)) callback.run(simulation);
    }
    if (simulation.stopRequested) break;
  }
  simulation.stopReason ??= simulation.stopRequested ? 'stopped by a callback' : 'stop time reached';
  guard.run(simulation);
  return simulation;
}
