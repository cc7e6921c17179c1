/**
 * A whole scenario, from the parsed file to what the result writers take: geometry (projection, grid,
 * placed sources and receptors), weather resolution, then a dispatch by weather kind. Pure: no files,
 * no process, no console; the command line and the server both call this.
 */
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import { SlabPoolExecutor } from '../parallel/slabPool.ts';
import { MAX_SLABS } from '../timestepping/simd/transportRowModule.ts';
import { prepareScenarioGeometry, type ScenarioGeometry } from '../grid/scenarioGeometry.ts';
import { resolveWeatherWithSource } from '../meteorology/resolveWeather.ts';
import { formatWarnings, inputWarnings } from '../diagnostics/plausibility.ts';
import { createGridTransient, marchGridPeriod } from './gridTransient.ts';
import { runHourlySeries, type ContinuousSeriesRunner } from './hourlySeries.ts';
import type { SeriesBaseInput } from './seriesSolves.ts';
import { runWindRose } from './windRose.ts';
import type { SteadySolver } from './solveSteady.ts';
import { GROUND_LEVEL_HEIGHT_m, runSteadyScenario, steadyRunResult } from './steadyScenario.ts';
import { solveSteady } from './solveSteady.ts';
import { AUTOMATIC_RESOLUTION_CHECK_CELLS, compareModes, compareResolutions } from './runChecks.ts';
import { halfSizeCells, type SeriesCheckOptions } from './seriesChecks.ts';
import { columnsPerSide } from '../grid/localGrid.ts';
import type { MassBudget, RunControl, ScenarioRunResult, SteadyFieldResult, SteadyRunInput } from './types.ts';
import { assessmentPlan, type AssessmentPlan } from '../assessment/standards.ts';
import { assessRun } from '../assessment/assessRun.ts';
import { runScreeningSet } from '../assessment/screeningWeather.ts';

/**
 * Input the scenario file passed its schema with but that cannot be run as given (a source outside the
 * domain, a grid too large for memory, weather that cannot be resolved). The message starts with the
 * field path. The command line exits 2 on it, as for any other invalid input.
 */
export class ScenarioInputError extends Error {
  override name = 'ScenarioInputError';
}

export interface RunScenarioOptions {
  /** overrides scenario.solver.mode */
  mode?: SolverMode;
  control?: RunControl;
  /** the steady solver; default solveSteady (in process); the command line may pass a worker-backed one */
  solve?: SteadySolver;
  /**
   * solvers for the many steady solves of an hourly series or a wind rose, one per lane (a pool of
   * worker threads, say: server/jobs/seriesSolverPool.ts); default: `solve`, or the series default
   */
  seriesSolvers?: readonly SteadySolver[];
  /** threads each step of a continuous grid march is split over (default 1) */
  stepThreads?: number;
  /**
   * the resolution check of a grid run (the same run at half the cell size, ./runChecks.ts; for an
   * hourly series or a wind rose at a few of its weathers, ./seriesChecks.ts): 'auto' (default) when the
   * half-size grid has at most AUTOMATIC_RESOLUTION_CHECK_CELLS cells, 'always', or 'never'
   */
  resolutionCheck?: 'auto' | 'always' | 'never';
}

/**
 * Run a scenario.
 *
 * @param scenario a parsed scenario (defaults filled by the schema)
 * @param options mode override, progress and cancellation, steady solver
 * @returns the result for the writers (summary.json, receptors.csv, footprint.geojson)
 * @throws ScenarioInputError naming the field when the geometry or the weather cannot be used
 * @example const result = await runScenario(scenario, { mode: 'gaussian' });
 */
export async function runScenario(scenario: Scenario, options: RunScenarioOptions = {}): Promise<ScenarioRunResult> {
  const mode = options.mode ?? scenario.solver.mode;
  const control = options.control ?? {};
  control.onProgress?.(0, 'preparing the grid');
  const geometry = asInputError(() => prepareScenarioGeometry(scenario));
  // The same warnings `plumeplan validate` prints (server/scenarioFiles/semantics.ts calls this too).
  const warnings = asInputError(() => inputWarnings(scenario, geometry));
  const plan = scenario.assessment === undefined ? undefined : asInputError(() => assessmentPlan(scenario.assessment!, scenario.pollutant.name));
  // RangeErrors name a field of the scenario (project convention, inside the solver too): input errors.
  try {
    const result = await dispatchByWeather(scenario, geometry, mode, control, options, plan);
    const assessed = assessRun(scenario, plan, { ...result, site: geometry.site }, geometry.receptors);
    return {
      ...assessed,
      notes: [
        ...assessed.notes,
        ...(geometry.domainCoarsening === null ? [] : [geometry.domainCoarsening.note]),
        ...formatWarnings(warnings).map((line) => `input warning: ${line}`),
      ],
      extraSummary: { ...assessed.extraSummary, inputWarnings: warnings },
    };
  } catch (error) {
    if (error instanceof RangeError) throw new ScenarioInputError(error.message, { cause: error });
    throw error;
  }
}

async function dispatchByWeather(
  scenario: Scenario,
  geometry: ScenarioGeometry,
  mode: SolverMode,
  control: RunControl,
  options: RunScenarioOptions,
  plan: AssessmentPlan | undefined,
): Promise<ScenarioRunResult> {
  const { solve, seriesSolvers } = options;
  const stepThreads = options.stepThreads ?? 1;
  const domainSummary: Record<string, unknown> = { ...geometry.domain, derived: geometry.domainDerived };
  if (geometry.domainCoarsening !== null) {
    const { field, id, distance_m, nearSpacing_m, maxCells } = geometry.domainCoarsening;
    domainSummary.coarsened = { by: field, id, distance_m, nearSpacing_m, maxCells };
  }
  const weather = scenario.weather;
  switch (weather.kind) {
    case 'steady': {
      const resolution = resolveWeatherWithSource(weather, scenario.site, 'weather');
      const input = steadyInput(scenario, geometry, resolution.weather);
      const weatherSummary: Record<string, unknown> = {
        kind: 'steady',
        ...resolution.weather,
        stabilitySource: resolution.stabilitySource,
      };
      if (resolution.solarElevation_deg !== undefined) weatherSummary.solarElevation_deg = resolution.solarElevation_deg;
      const extraSummary: Record<string, unknown> = { domain: domainSummary, weather: weatherSummary };
      if (scenario.assessment !== undefined) {
        extraSummary.assessment = {
          ...scenario.assessment,
          note:
            'one steady weather state is one hour of one weather: compare with the standards through an hourly ' +
            'series or a wind rose, which give the statistics each standard is defined by',
        };
      }
      if (mode !== 'grid') return runSteadyScenario(input, { mode, control, solve, extraSummary });
      const solver = solve ?? solveSteady;
      const field = await solver(input, mode, control);
      const checkNotes = await steadyGridChecks(scenario, geometry, input, field, solver, options.resolutionCheck ?? 'auto', control, extraSummary);
      const result = steadyRunResult(input, field, extraSummary);
      result.notes.push(...checkNotes);
      return result;
    }
    case 'hourly': {
      return runHourlySeries(seriesBaseInput(scenario, geometry), weather.hours, {
        mode,
        method: scenario.solver.hourlyMethod,
        continuous: continuousGridSeriesWithThreads(stepThreads),
        site: scenario.site,
        assessment: plan && { background_ug_m3: plan.background_ug_m3, standards: plan.standards },
        control,
        solve: seriesSolvers ?? solve,
        extraSummary: { domain: domainSummary },
        checks: seriesChecks(scenario, geometry, options),
      });
    }
    case 'windRose':
      return runWindRose(seriesBaseInput(scenario, geometry), weather, {
        mode,
        site: scenario.site,
        assessment: plan && { background_ug_m3: plan.background_ug_m3, standards: plan.standards },
        control,
        solve: seriesSolvers ?? solve,
        extraSummary: { domain: domainSummary },
        checks: seriesChecks(scenario, geometry, options),
      });
    case 'screeningSet':
      return runScreeningSet(seriesBaseInput(scenario, geometry), weather, {
        mode,
        site: scenario.site,
        assessment: plan && { background_ug_m3: plan.background_ug_m3, standards: plan.standards },
        control,
        solve: seriesSolvers ?? solve,
        extraSummary: { domain: domainSummary },
        checks: seriesChecks(scenario, geometry, options),
      });
    default:
      throw new ScenarioInputError(`weather.kind: ${JSON.stringify((weather as { kind: unknown }).kind)} is not a weather kind`);
  }
}

/**
 * The checks a steady grid run makes on itself (./runChecks.ts): the Gaussian mode's figures beside its
 * own (always: the Gaussian mode costs a fraction of a grid solve), and, when asked or when the half-size
 * grid is small, the same run at half the cell size. Their tables go into `extraSummary` (modeCheck,
 * resolutionCheck); the notes for figures beyond the thresholds are returned.
 */
async function steadyGridChecks(
  scenario: Scenario,
  geometry: ScenarioGeometry,
  input: SteadyRunInput,
  field: SteadyFieldResult,
  solver: SteadySolver,
  resolutionCheck: 'auto' | 'always' | 'never',
  control: RunControl,
  extraSummary: Record<string, unknown>,
): Promise<string[]> {
  const ids = input.receptors.map((receptor) => receptor.id);
  const notes: string[] = [];
  const gaussian = await solveSteady(input, 'gaussian', { signal: control.signal });
  const modeCheck = compareModes(field, gaussian, ids);
  extraSummary.modeCheck = modeCheck;
  notes.push(...modeCheck.notes);
  const halfDomain = { ...geometry.domain, spacing_m: geometry.domain.spacing_m / 2 };
  const halfCells = columnsPerSide(halfDomain) ** 2 * halfDomain.layers;
  const wanted = resolutionCheck === 'always' || (resolutionCheck === 'auto' && halfCells <= AUTOMATIC_RESOLUTION_CHECK_CELLS);
  if (!wanted) {
    const reason =
      resolutionCheck === 'never'
        ? 'not asked for'
        : `not made: the half-size grid would have ${halfCells} cells, above the ${AUTOMATIC_RESOLUTION_CHECK_CELLS} made without asking (ask for it: plumeplan run --resolution-check)`;
    extraSummary.resolutionCheck = { made: false, reason };
    return notes;
  }
  try {
    control.onProgress?.(0, `resolution check: the same run at ${halfDomain.spacing_m} m cells`);
    const finer = prepareScenarioGeometry({ ...scenario, domain: halfDomain });
    const finerField = await solver(steadyInput(scenario, finer, input.weather), 'grid', { signal: control.signal });
    const comparison = compareResolutions(field, finerField, ids, geometry.domain.spacing_m);
    extraSummary.resolutionCheck = { made: true, ...comparison };
    notes.push(...comparison.notes);
  } catch (error) {
    if (!(error instanceof RangeError)) throw error;
    extraSummary.resolutionCheck = { made: false, reason: `not made: ${error.message}` };
  }
  return notes;
}

/**
 * The checks of a grid-mode series or rose (./seriesChecks.ts): the half-size domain, built only when
 * the resolution check is made, and the steady solver for the checks' solves (the caller's steady
 * solver, cold: the series solvers keep warm starts of the run's own grid).
 */
function seriesChecks(scenario: Scenario, geometry: ScenarioGeometry, options: RunScenarioOptions): SeriesCheckOptions {
  const halfDomain = { ...geometry.domain, spacing_m: geometry.domain.spacing_m / 2 };
  return {
    resolutionCheck: options.resolutionCheck ?? 'auto',
    spacing_m: geometry.domain.spacing_m,
    halfSizeCells: halfSizeCells(geometry.domain),
    halfSizeBase: () => seriesBaseInput(scenario, prepareScenarioGeometry({ ...scenario, domain: halfDomain })),
    solve: options.solve,
  };
}

/** Rows per step thread below which a continuous march stays on one thread. */
const ROWS_PER_STEP_THREAD = 16;

/** One hour [s]: an hourly record's period. */
const HOUR_s = 3600;

/**
 * The continuous method of an hourly series in grid mode: one time-march from an empty domain, the field
 * carried over from hour to hour, each hour's value its mean over the hour. A gap in the series is
 * marched through with the weather of the hour before it, unrecorded, so the field arriving at the next
 * hour has aged by the right time (stated in the notes).
 */
export const continuousGridSeries: ContinuousSeriesRunner = continuousGridSeriesWithThreads(1);

/**
 * The continuous method with each step split by rows over `stepThreads` threads (the result is
 * bit-identical to one thread; ../parallel/slabPool.ts), fewer where the grid has under 16 rows a thread.
 */
export function continuousGridSeriesWithThreads(stepThreads: number): ContinuousSeriesRunner {
  if (!Number.isInteger(stepThreads) || stepThreads < 1) throw new RangeError(`stepThreads is ${stepThreads}; allowed: an integer >= 1`);
  return (base, hours, hourStarts_ms, control, onHour) => continuousGridSeriesOn(stepThreads, base, hours, hourStarts_ms, control, onHour);
}

async function continuousGridSeriesOn(
  stepThreads: number,
  ...[base, hours, hourStarts_ms, control, onHour]: Parameters<ContinuousSeriesRunner>
): ReturnType<ContinuousSeriesRunner> {
  const threads = Math.max(1, Math.min(stepThreads, MAX_SLABS, Math.floor(base.grid.ny / ROWS_PER_STEP_THREAD)));
  const executor = threads > 1 ? await SlabPoolExecutor.create(threads) : undefined;
  const run = createGridTransient(base, hours[0], { executor });
  let steps = 0;
  let bridged_h = 0;
  let massBudget: MassBudget | null = null;
  const heightSums = new Float64Array(base.sources.length);
  let firstNote: string | null = null;
  try {
    for (let h = 0; h < hours.length; h += 1) {
      control.signal?.throwIfAborted();
      if (h > 0) {
        const gap_h = Math.round((hourStarts_ms[h] - hourStarts_ms[h - 1]) / (HOUR_s * 1000)) - 1;
        if (gap_h > 0) {
          steps += marchGridPeriod(run, hours[h - 1], gap_h * HOUR_s, { signal: control.signal }).steps;
          bridged_h += gap_h;
        }
      }
      const period = marchGridPeriod(run, hours[h], HOUR_s, { signal: control.signal });
      steps += period.steps;
      massBudget = period.massBudget_g;
      period.effectiveHeights_m.forEach((height, n) => (heightSums[n] += height));
      firstNote ??= period.notes[0] ?? null;
      onHour(h, period.receptorsMean_ug_m3, period.groundLevelMean_ug_m3);
      control.onProgress?.((h + 1) / hours.length, `hour ${h + 1} of ${hours.length}`);
    }
  } finally {
    await executor?.close();
  }
  const notes = [`grid mode, continuous time-march of ${hours.length} hours from an empty domain, ${steps} steps in all`];
  if (firstNote !== null) notes.push(`first hour: ${firstNote}`);
  if (bridged_h > 0) notes.push(`${bridged_h} missing hours marched through with the weather of the hour before each gap, not recorded`);
  return {
    steps,
    massBudget_g: massBudget,
    sources: base.sources.map((source, n) => ({
      id: source.id,
      x_m: source.x_m,
      y_m: source.y_m,
      effectiveHeight_m: heightSums[n] / hours.length,
    })),
    notes,
  };
}

/** Everything a steady solve needs except the weather (what a series runs every hour with). */
export function seriesBaseInput(scenario: Scenario, geometry: ScenarioGeometry): SeriesBaseInput {
  return {
    grid: geometry.grid,
    sources: geometry.sources,
    receptors: geometry.receptors,
    pollutant: scenario.pollutant,
    dispersion: scenario.dispersion,
    landUse: scenario.site.landUse,
    windProfile: scenario.windProfile,
    groundLevelHeight_m: GROUND_LEVEL_HEIGHT_m,
    site: geometry.site,
  };
}

/** The steady solve's input for one resolved weather state. */
export function steadyInput(
  scenario: Scenario,
  geometry: ScenarioGeometry,
  weather: SteadyRunInput['weather'],
): SteadyRunInput {
  const { site: _siteForPeaks, ...base } = seriesBaseInput(scenario, geometry);
  return { ...base, weather };
}

/** RangeErrors from geometry and weather name a field of the scenario: they are input errors. */
function asInputError<T>(compute: () => T): T {
  try {
    return compute();
  } catch (error) {
    if (error instanceof RangeError) throw new ScenarioInputError(error.message, { cause: error });
    throw error;
  }
}
