/**
 * What the server checks before it queues a run, so a run that cannot succeed is refused at once with
 * a 4xx naming the field, instead of failing later in a thread: the stored scenario still passes the
 * format, the mode is known, the grid is within the server's cell limit (estimated from the domain's
 * numbers before anything is allocated), and everything lies inside the grid.
 */
import { parseScenario } from '../../scenarios/format/schema.ts';
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import { deriveDomain, estimateGridMemory_bytes, GRID_ARRAYS_PER_CELL } from '../../solver/grid/domainDefaults.ts';
import { createLocalProjection } from '../../solver/grid/projection.ts';
import { checkScenarioGeometry } from '../scenarioFiles/semantics.ts';
import type { RunError } from '../storage/runStore.ts';

/** A run refused before it was queued: the HTTP status and the error. */
export class RunRefusedError extends Error {
  override name = 'RunRefusedError';
  constructor(
    readonly status: number,
    readonly detail: RunError,
  ) {
    super(detail.error);
  }
}

export interface RunPlan {
  scenario: Scenario;
  mode: SolverMode;
  /** cells the run's grid has (nx * ny * nz in grid mode, nx * ny ground cells in Gaussian mode) */
  cells: number;
  /** the grid solver's estimated memory (grid mode), 0 in Gaussian mode [B] */
  estimatedMemory_bytes: number;
}

/**
 * Check a stored scenario and the run options before queuing.
 * @param raw the scenario revision as stored
 * @param mode the mode asked for, or undefined for the scenario's own
 * @param maxCells the most cells a run may have
 * @param side how the fields start: "" for a run's scenario, "a." or "b." for a comparison's sides
 * @throws RunRefusedError (422) naming the field
 */
export function planRun(raw: unknown, mode: SolverMode | undefined, maxCells: number, side = ''): RunPlan {
  const parsed = parseScenario(raw);
  if (!parsed.ok) {
    const [first] = parsed.issues;
    throw new RunRefusedError(422, {
      error: `the stored scenario no longer passes the format: ${first.path}: ${first.message}`,
      field: `${side}scenario.${first.path}`,
      allowed: first.message,
    });
  }
  const scenario = parsed.scenario;
  const runMode = mode ?? scenario.solver.mode;

  let domain = scenario.domain;
  if (domain === undefined) {
    try {
      domain = deriveDomain({ sources: scenario.sources, receptors: scenario.receptors, projection: createLocalProjection(scenario.site) });
    } catch (error) {
      if (!(error instanceof RangeError)) throw error;
      throw new RunRefusedError(422, { error: error.message, field: `${side}scenario.${error.message.split(':')[0]}` });
    }
  }
  const gridCells = estimateGridMemory_bytes(domain) / (GRID_ARRAYS_PER_CELL * 8);
  const cells = runMode === 'grid' ? gridCells : gridCells / domain.layers;
  if (cells > maxCells) {
    throw new RunRefusedError(422, {
      error:
        `scenario.domain: the grid would have ${cells} cells in ${runMode} mode; this server runs at most ${maxCells}. ` +
        'Use a larger spacing_m, a smaller halfWidth_m or fewer layers',
      field: `${side}scenario.domain`,
      value: domain,
      allowed: `at most ${maxCells} cells`,
    });
  }
  const issues = checkScenarioGeometry(scenario);
  if (issues.length > 0) {
    const [first] = issues;
    throw new RunRefusedError(422, { error: `${first.path}: ${first.message}`, field: `${side}scenario.${first.path}`, allowed: first.message });
  }
  return { scenario, mode: runMode, cells, estimatedMemory_bytes: runMode === 'grid' ? estimateGridMemory_bytes(domain) : 0 };
}
