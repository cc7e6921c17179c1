/**
 * One steady solve in the mode asked for: the single place where "grid" and "gaussian" part ways.
 * Steady scenarios, hourly series and wind roses all reach the solvers through here (or through a
 * function of the same shape that a caller passes in, such as a worker-thread wrapper).
 */
import type { SolverMode } from '../../scenarios/format/types.ts';
import { runGaussianSteady } from './gaussianSteady.ts';
import { createWarmStartGridSolver, solveGridSteady, type WarmStartSolverOptions } from './gridSteady.ts';
import type { RunControl, SteadyFieldResult, SteadyRunInput } from './types.ts';

/** The shape of a steady solver; `solveSteady` is the in-process one. */
export type SteadySolver = (input: SteadyRunInput, mode: SolverMode, control?: RunControl) => Promise<SteadyFieldResult>;

/**
 * A capability that this build does not have yet (not bad input, not a failure of a run). Carries the
 * mode that can be used instead, when there is one, so the caller can suggest it.
 */
export class UnavailableError extends Error {
  override name = 'UnavailableError';
  readonly alternativeMode: SolverMode | null;

  constructor(message: string, alternativeMode: SolverMode | null = null) {
    super(message);
    this.alternativeMode = alternativeMode;
  }
}

/**
 * Solve one steady weather state.
 *
 * @param input grid, placed sources and receptors, pollutant, resolved weather and dispersion
 * @param mode "grid" (advection-diffusion) or "gaussian" (the Gaussian plume reference)
 * @param control progress callback and abort signal, passed on to the solver
 * @returns the ground-level field and receptor values [ug/m3] with the run's figures
 * @throws RangeError for a mode that is neither
 * @example const field = await solveSteady(input, 'gaussian');
 */
export async function solveSteady(
  input: SteadyRunInput,
  mode: SolverMode,
  control: RunControl = {},
): Promise<SteadyFieldResult> {
  control.signal?.throwIfAborted();
  switch (mode) {
    case 'gaussian':
      return runGaussianSteady(input, control);
    case 'grid':
      return solveGridSteady(input, control);
    default:
      throw new RangeError(`solver.mode: ${JSON.stringify(mode)} is not a mode; allowed: "grid" or "gaussian"`);
  }
}

/**
 * A steady solver for the many related solves of a series: grid solves start warm from the nearest
 * weather state already solved and stop at the series tolerance (SERIES_STEADY_TOLERANCE, 1e-4 relative
 * change per sweep, unless given); Gaussian solves are as in {@link solveSteady}. It holds solved fields,
 * so make one per series run.
 *
 * @param options tolerance and the other warm-start options (see createWarmStartGridSolver)
 * @example const solve = createSeriesSteadySolver(); await solve(input, 'grid');
 */
export function createSeriesSteadySolver(options: WarmStartSolverOptions = {}): SteadySolver {
  const warmGrid = createWarmStartGridSolver(options);
  return async (input, mode, control = {}) => {
    control.signal?.throwIfAborted();
    return mode === 'grid' ? warmGrid(input, control) : solveSteady(input, mode, control);
  };
}
