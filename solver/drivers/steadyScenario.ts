/**
 * A steady-weather scenario: one steady solve, handed to the result writers as a ScenarioRunResult with
 * one receptor column (`concentration_ug_m3`) and the ground-level field as the footprint.
 */
import type { SolverMode } from '../../scenarios/format/types.ts';
import { solveSteady, type SteadySolver } from './solveSteady.ts';
import type { RunControl, ScenarioRunResult, SteadyFieldResult, SteadyRunInput } from './types.ts';

/**
 * Height of the ground-level field the footprint is drawn from [m]: the receptor default (spec:
 * "Concentrations are at receptor height (default 1.5 m)").
 */
export const GROUND_LEVEL_HEIGHT_m = 1.5;

/** The receptor column of a steady run (spec: one concentration per receptor). */
export const STEADY_RECEPTOR_COLUMN = 'concentration_ug_m3';

export interface SteadyScenarioOptions {
  mode: SolverMode;
  control?: RunControl;
  /** the steady solver to use; default solveSteady (in process) */
  solve?: SteadySolver;
  /** entries for summary.json (the resolved weather, the domain) */
  extraSummary?: Record<string, unknown>;
}

/**
 * Run one steady weather state and shape it for the result writers.
 *
 * @param input everything the steady solve needs, already placed on the grid
 * @param options mode, progress and cancellation, solver, extra summary entries
 * @returns the run result: footprint = the ground-level field, receptor column concentration_ug_m3
 * @example const result = await runSteadyScenario(input, { mode: 'gaussian' });
 */
export async function runSteadyScenario(input: SteadyRunInput, options: SteadyScenarioOptions): Promise<ScenarioRunResult> {
  const solve = options.solve ?? solveSteady;
  const field = await solve(input, options.mode, options.control);
  return steadyRunResult(input, field, options.extraSummary ?? {});
}

/**
 * Shape one steady field as a ScenarioRunResult.
 *
 * @throws Error when the field's arrays do not match the grid or the receptors (a solver fault)
 */
export function steadyRunResult(
  input: SteadyRunInput,
  field: SteadyFieldResult,
  extraSummary: Record<string, unknown> = {},
): ScenarioRunResult {
  const { grid } = input;
  if (field.groundLevel_ug_m3.length !== grid.nx * grid.ny) {
    throw new Error(`steady solve: ground-level field has ${field.groundLevel_ug_m3.length} values for ${grid.nx * grid.ny} columns`);
  }
  if (field.receptors_ug_m3.length !== input.receptors.length) {
    throw new Error(`steady solve: ${field.receptors_ug_m3.length} receptor values for ${input.receptors.length} receptors`);
  }
  const notes = [...field.notes];
  // The calms rule changes the answer, so it is always said; once, whether or not the solver said it.
  if (input.weather.calm && !notes.some((note) => /calm/i.test(note))) {
    notes.push('the wind speed given was below the calms threshold and was raised to it (calms rule)');
  }
  return {
    mode: field.mode,
    weatherKind: 'steady',
    grid,
    sources: field.sources,
    massBudget_g: field.massBudget_g,
    steps: field.steps,
    wallSeconds: field.wallSeconds,
    footprint_ug_m3: field.groundLevel_ug_m3,
    footprintStatistic: 'concentration',
    receptorColumns: [{ key: STEADY_RECEPTOR_COLUMN, values: field.receptors_ug_m3 }],
    notes,
    extraSummary,
  };
}
