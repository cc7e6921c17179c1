/**
 * Grid mode marching in time: the continuous method for hourly series. One model carries its field from
 * hour to hour; each hour its weather parts (wind, closure weather, losses, lid, release heights after
 * plume rise) are replaced and it is marched on, with receptor and ground-level values averaged over the
 * hour. The near field is the steady solve's (DEFAULT_NEAR_FIELD, ../sources/nearField.ts), taken as
 * steady within each hour: a sub-grid plume crosses its few hundred metres to a few km in minutes, so
 * each hour's plan (what it hands to the grid, what it holds, what it loses) is used for the whole hour.
 *
 * @example
 *   const run = createGridTransient(input, hours[0]);
 *   for (const weather of hours) { const hour = marchGridHour(run, weather, 3600); ... }
 */
import { massBudgetFrom } from '../diagnostics/massBudget.ts';
import { fieldAtHeight, sampleField } from '../diagnostics/receptorSampling.ts';
import { runSimulation, type Callback } from '../timestepping/runLoop.ts';
import type { StepExecutor } from '../timestepping/timeStepper.ts';
import type { NearFieldPlan, NearFieldTreatment } from '../sources/nearField.ts';
import { DEFAULT_NEAR_FIELD, MICROGRAMS_PER_GRAM, gridModelParts, releaseHeights_m } from './gridSteady.ts';
import { createDispersionModel, replaceModelParts, type DispersionModel } from './model.ts';
import type { MassBudget, ResolvedWeather, RunControl, SteadyRunInput } from './types.ts';

export type TransientRunInput = Omit<SteadyRunInput, 'weather'>;

export interface GridTransientRun {
  input: TransientRunInput;
  model: DispersionModel;
  /** inflow background [g/m3] */
  background_g_m3: number;
  executor?: StepExecutor;
  nearField: NearFieldTreatment;
  /** what the sub-grid plumes emitted and lost since the start of the run [g] (the grid's budget has the rest) */
  subGrid: { emitted: number; decayed: number; washedOut: number; dryDeposited: number };
}

/** The near-field plan of a run under one weather state. */
function nearFieldPlanFor(run: Pick<GridTransientRun, 'input' | 'nearField'>, weather: ResolvedWeather, heights_m: number[]): NearFieldPlan {
  return run.nearField.plan({ ...run.input, weather, releaseHeights_m: heights_m });
}

export interface GridPeriodResult {
  /** time-mean over the period of the ground-level field, index i + nx * j [ug/m3] */
  groundLevelMean_ug_m3: Float64Array;
  /** time-mean over the period at each receptor [ug/m3] */
  receptorsMean_ug_m3: Float64Array;
  /** values at the end of the period [ug/m3] */
  receptorsEnd_ug_m3: Float64Array;
  /** effective height of each source in this period's weather [m] */
  effectiveHeights_m: number[];
  /** budget since the start of the run [g] */
  massBudget_g: MassBudget;
  steps: number;
  wallSeconds: number;
  notes: string[];
}

/**
 * A transient grid run, empty field, set up for a first weather state.
 *
 * @param input grid, sources, receptors, pollutant, dispersion, land use, wind profile
 * @param weather the first period's weather
 * @param options.background_g_m3 inflow concentration [g/m3], default 0; options.executor to step with threads
 */
export function createGridTransient(
  input: TransientRunInput,
  weather: ResolvedWeather,
  options: { background_g_m3?: number; executor?: StepExecutor; sharedMemory?: boolean; nearField?: NearFieldTreatment } = {},
): GridTransientRun {
  const background = options.background_g_m3 ?? 0;
  const nearField = options.nearField ?? DEFAULT_NEAR_FIELD;
  const heights = releaseHeights_m(input, weather);
  const plan = nearFieldPlanFor({ input, nearField }, weather, heights);
  const parts = gridModelParts(input, weather, heights, background, plan.emission);
  const model = createDispersionModel({ ...parts, sharedMemory: options.sharedMemory ?? options.executor !== undefined });
  return { input, model, background_g_m3: background, executor: options.executor, nearField, subGrid: { emitted: 0, decayed: 0, washedOut: 0, dryDeposited: 0 } };
}

/**
 * Replace the weather and march the run for a period, averaging receptors and the ground-level field.
 *
 * @param run the transient run (its field carries over)
 * @param weather this period's weather
 * @param duration_s length of the period [s]
 * @param control progress and cancellation
 */
export function marchGridPeriod(run: GridTransientRun, weather: ResolvedWeather, duration_s: number, control: RunControl = {}): GridPeriodResult {
  if (!(duration_s > 0) || !Number.isFinite(duration_s)) {
    throw new RangeError(`period duration is ${duration_s}; allowed: a finite time > 0 s`);
  }
  const started = performance.now();
  const { input, model } = run;
  const heights = releaseHeights_m(input, weather);
  const plan = nearFieldPlanFor(run, weather, heights);
  const parts = gridModelParts(input, weather, heights, run.background_g_m3, plan.emission);
  replaceModelParts(model, {
    wind: parts.wind,
    closure: parts.closure,
    weather,
    emission: parts.emission,
    losses: parts.losses,
    boundaries: parts.boundaries,
  });
  const grid = input.grid;
  const groundSum = new Float64Array(grid.nx * grid.ny);
  const groundNow = new Float64Array(grid.nx * grid.ny);
  const receptorSum = new Float64Array(input.receptors.length);
  let weightSum = 0;
  let previousTime = model.clock.time_s;
  // Step mean: each step's end value weighted by the step's length (first order in dt; exact for a steady field).
  const averager: Callback = {
    name: 'PeriodAverager',
    schedule: { kind: 'iterations', every: 1 },
    run(simulation) {
      const m = simulation.model;
      const weight = m.clock.time_s - previousTime;
      previousTime = m.clock.time_s;
      const ground = fieldAtHeight(grid, m.layout, m.field, input.groundLevelHeight_m, 1, groundNow);
      for (let n = 0; n < ground.length; n++) groundSum[n] += weight * ground[n];
      input.receptors.forEach((receptor, n) => {
        const value = sampleField(grid, m.layout, m.field, receptor.x_m, receptor.y_m, receptor.height_m);
        receptorSum[n] += weight * (value > 0 ? value : 0);
      });
      weightSum += weight;
    },
  };
  const stepsBefore = model.clock.iteration;
  const startTime = model.clock.time_s;
  runSimulation({ model, stopTime_s: startTime + duration_s, callbacks: [averager], executor: run.executor, control });
  const scale = MICROGRAMS_PER_GRAM / weightSum;
  const groundMean = groundSum.map((value) => value * scale);
  const receptorsMean = receptorSum.map((value) => value * scale);
  const receptorsEnd = Float64Array.from(input.receptors, (receptor) => {
    const value = sampleField(grid, model.layout, model.field, receptor.x_m, receptor.y_m, receptor.height_m);
    return (value > 0 ? value : 0) * MICROGRAMS_PER_GRAM;
  });
  // The sub-grid plumes, steady over the period, on top of the grid's means.
  if (plan.holdsConcentration) {
    input.receptors.forEach((receptor, n) => {
      const subGrid_ug_m3 = plan.concentration_g_m3(receptor.x_m, receptor.y_m, receptor.height_m) * MICROGRAMS_PER_GRAM;
      receptorsMean[n] += subGrid_ug_m3;
      receptorsEnd[n] += subGrid_ug_m3;
    });
    for (let j = 0; j < grid.ny; j++) {
      const y_m = grid.ySouth_m + (j + 0.5) * grid.spacing_m;
      for (let i = 0; i < grid.nx; i++) {
        const value = plan.concentration_g_m3(grid.xWest_m + (i + 0.5) * grid.spacing_m, y_m, input.groundLevelHeight_m);
        if (value > 0) groundMean[i + grid.nx * j] += value * MICROGRAMS_PER_GRAM;
      }
    }
  }
  const elapsed_s = model.clock.time_s - startTime;
  let handed_g_s = 0;
  for (let n = 0; n < plan.emission.rates_g_s.length; n++) handed_g_s += plan.emission.rates_g_s[n];
  run.subGrid.emitted += (plan.emitted_g_s - handed_g_s) * elapsed_s;
  run.subGrid.decayed += plan.losses_g_s.decayed * elapsed_s;
  run.subGrid.washedOut += plan.losses_g_s.washedOut * elapsed_s;
  run.subGrid.dryDeposited += plan.losses_g_s.dryDeposited * elapsed_s;
  const tally = {
    ...model.budget,
    emitted: model.budget.emitted + run.subGrid.emitted,
    decayed: model.budget.decayed + run.subGrid.decayed,
    washedOut: model.budget.washedOut + run.subGrid.washedOut,
    dryDeposited: model.budget.dryDeposited + run.subGrid.dryDeposited,
  };
  const steps = model.clock.iteration - stepsBefore;
  return {
    groundLevelMean_ug_m3: groundMean,
    receptorsMean_ug_m3: receptorsMean,
    receptorsEnd_ug_m3: receptorsEnd,
    effectiveHeights_m: heights,
    massBudget_g: massBudgetFrom(tally, `time-march, 0 to ${model.clock.time_s.toFixed(0)} s from an empty domain (sub-grid plumes taken as steady within each period)`),
    steps,
    wallSeconds: (performance.now() - started) / 1000,
    notes: [
      `grid mode, time-march: ${steps} steps of up to ${model.timeStep_s.toFixed(2)} s (Courant target ${model.courantTarget}), ` +
        `values are means over ${startTime.toFixed(0)} to ${model.clock.time_s.toFixed(0)} s`,
      ...plan.notes,
    ],
  };
}

/**
 * Time-march one weather state from an empty domain for a duration.
 *
 * @param input steady run input (its weather is used throughout)
 * @param duration_s how long to march [s]
 * @param control progress and cancellation
 * @returns means over the duration and the budget
 */
export function runGridTransient(input: SteadyRunInput, duration_s: number, control: RunControl = {}): GridPeriodResult {
  const run = createGridTransient(input, input.weather);
  return marchGridPeriod(run, input.weather, duration_s, control);
}
