/**
 * What compare, sweep, stack-height and site runs compute, wherever they run (a worker thread of the
 * run executor): the stored scenarios are checked again, the work is done by the same functions the
 * CLI commands use (../analyses/), and the files they build are the result files, byte for byte what
 * the CLI writes (a comparison's side folders a/ and b/ become a.NAME and b.NAME: their core files).
 *
 * Members of a sweep or a search run one after another on this job's own thread: the executor already
 * runs one job per core, and cancelling the job ends the thread and everything in it at once.
 */
import { parseScenario } from '../../scenarios/format/schema.ts';
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import { isLinearSweep, SWEEP_PARAMETERS, sweptSourceId, type SweepParameter } from '../../solver/assessment/sweep.ts';
import { runScenario, ScenarioInputError } from '../../solver/drivers/runScenario.ts';
import { UnavailableError } from '../../solver/drivers/solveSteady.ts';
import type { RunControl } from '../../solver/drivers/types.ts';
import { buildComparisonFiles, type ComparisonSide } from '../analyses/comparison.ts';
import { computeSiting, type SiteRequest } from '../analyses/siting.ts';
import { buildStackHeightFiles, computeStackHeight, resolveStackHeightTarget, TargetError, type StackHeightRequest } from '../analyses/stackHeight.ts';
import { buildSweepFiles, computeSweep, type MemberLanes } from '../analyses/sweep.ts';
import { checkScenarioGeometry } from '../scenarioFiles/semantics.ts';
import type { ResultFileContent } from '../storage/resultFiles.ts';
import type { RunError } from '../storage/runStore.ts';
import { buildComparisonReportFiles } from '../writers/comparisonReport.ts';
import { buildSitingFiles } from '../writers/siting.ts';
import { buildResultFiles } from '../writers/writeResultFolder.ts';
import type { RunJob } from './runExecutor.ts';

/** A run that cannot go ahead as asked, in the API's error shape. */
export class RunInputError extends Error {
  override name = 'RunInputError';
  constructor(readonly detail: RunError) {
    super(detail.error);
  }
}

/** Content types by file name ending, for the files these runs make. */
const CONTENT_TYPES: [RegExp, string][] = [
  [/\.geojson$/, 'application/geo+json; charset=utf-8'],
  [/\.json$/, 'application/json; charset=utf-8'],
  [/\.csv$/, 'text/csv; charset=utf-8'],
  [/\.svg$/, 'image/svg+xml; charset=utf-8'],
  [/\.tif$/, 'image/tiff'],
  [/\.png$/, 'image/png'],
  [/\.html$/, 'text/html; charset=utf-8'],
  [/\.pdf$/, 'application/pdf'],
  [/\.zip$/, 'application/zip'],
];

/** The content type of a result file, by its name. */
export function contentTypeOf(name: string): string {
  return CONTENT_TYPES.find(([pattern]) => pattern.test(name))?.[1] ?? 'application/octet-stream';
}

/** Built files as result files (text as UTF-8). */
export function asResultFiles(files: readonly [string, string | Uint8Array][]): ResultFileContent[] {
  const encoder = new TextEncoder();
  return files.map(([name, content]) => ({ name, contentType: contentTypeOf(name), content: typeof content === 'string' ? encoder.encode(content) : content }));
}

/**
 * The stored scenario, checked again.
 * @param field how the scenario is named in errors ("scenario", or "a.scenario" for a comparison's side)
 * @throws RunInputError naming the field
 */
export function storedScenario(raw: unknown, field = 'scenario'): Scenario {
  const parsed = parseScenario(raw);
  if (!parsed.ok) {
    const [first] = parsed.issues;
    throw new RunInputError({ error: `${field}.${first.path}: ${first.message}`, field: `${field}.${first.path}`, allowed: first.message });
  }
  const issues = checkScenarioGeometry(parsed.scenario);
  if (issues.length > 0) {
    const [first] = issues;
    throw new RunInputError({ error: `${field}.${first.path}: ${first.message}`, field: `${field}.${first.path}`, allowed: first.message });
  }
  return parsed.scenario;
}

/** The solver's and the analyses' input errors as a run error naming the field. */
export function asRunInputError(error: unknown, mode: SolverMode | undefined): unknown {
  if (error instanceof RunInputError) return error;
  if (error instanceof ScenarioInputError || error instanceof RangeError) return new RunInputError(inputErrorDetail(error.message));
  if (error instanceof TargetError) return new RunInputError({ error: `${error.field}: ${error.message}`, field: error.field, allowed: error.allowed });
  if (error instanceof UnavailableError) {
    return new RunInputError({ error: error.message, field: 'mode', value: mode, allowed: error.alternativeMode ?? undefined });
  }
  return error;
}

/** Messages start with the field path ("sources[1]: ...", "sweep stackHeight_m: ..."): name it. */
export function inputErrorDetail(message: string): RunError {
  const match = /^([A-Za-z_][\w]*(?:\[\d+\]|\.[A-Za-z_][\w]*)*):/.exec(message);
  return { error: message, field: match === null ? 'scenario' : `scenario.${match[1]}` };
}

/**
 * Members one after another on this thread, each in the job's mode, reporting progress within each
 * member too (a grid member takes a while): as a share of `expectedMembers` when the count is known,
 * else at the fraction the search last reported, with the member's own message.
 * @returns the runner and the control to hand the sweep or search (it tracks their fraction)
 */
function inThreadMembers(mode: SolverMode, control: RunControl, expectedMembers?: number): { runner: MemberLanes; control: RunControl } {
  let started = 0;
  let reported = 0;
  const outer: RunControl = {
    signal: control.signal,
    onProgress: (fraction, message) => {
      reported = fraction;
      control.onProgress?.(fraction, message);
    },
  };
  const runner: MemberLanes = {
    lanes: 1,
    runMember: (member, _lane, memberControl) => {
      const index = started++;
      const label = expectedMembers === undefined ? `run ${index + 1}` : `member ${index + 1} of ${expectedMembers}`;
      return runScenario(member, {
        mode,
        control: {
          signal: memberControl.signal,
          onProgress: (fraction, message) =>
            control.onProgress?.(expectedMembers === undefined ? reported : Math.min(0.99, Math.max(reported, (index + fraction) / expectedMembers)), `${label}: ${message}`),
        },
      });
    },
  };
  return { runner, control: outer };
}

/** Compute a compare, sweep, stack-height or site run. */
export async function computeAnalysis(job: RunJob, control: RunControl): Promise<ResultFileContent[]> {
  const mode = job.options.mode as SolverMode | undefined;
  try {
    switch (job.kind) {
      case 'compare':
        return await computeCompare(job, control);
      case 'sweep':
        return await computeSweepRun(job, control);
      case 'stack-height':
        return await computeStackHeightRun(job, control);
      case 'site':
        return await computeSiteRun(job, control);
      default:
        throw new RunInputError({ error: `kind: ${JSON.stringify(job.kind)} is not a kind of run`, field: 'kind', value: job.kind });
    }
  } catch (error) {
    throw asRunInputError(error, mode);
  }
}

/** A comparison side as the job options hold it. */
export interface ComparedSideOptions {
  scenarioId: string;
  revision: number;
  mode: SolverMode;
  /** when the side was given as a finished run */
  runId?: string;
}

/** How a side is named in comparison.json: the stored scenario revision, or the run it was given as. */
export function sideSource(side: ComparedSideOptions): string {
  return side.runId !== undefined ? `run ${side.runId}` : `scenario ${side.scenarioId} revision ${side.revision}`;
}

async function computeCompare(job: RunJob, control: RunControl): Promise<ResultFileContent[]> {
  const a = job.options.a as ComparedSideOptions;
  const b = job.options.b as ComparedSideOptions;
  const scenarioA = storedScenario(job.scenario, 'a.scenario');
  const scenarioB = storedScenario(job.secondScenario, 'b.scenario');
  const part = (offset: number, name: string): RunControl => ({
    signal: control.signal,
    onProgress: (fraction, message) => control.onProgress?.(offset + 0.5 * fraction, `${name}: ${message}`),
  });
  const resultA = await runScenario(scenarioA, { mode: a.mode, control: part(0, 'A') });
  const resultB = await runScenario(scenarioB, { mode: b.mode, control: part(0.5, 'B') });
  control.onProgress?.(1, 'comparing');
  const sideA: ComparisonSide = { source: sideSource(a), scenario: scenarioA, result: resultA };
  const sideB: ComparisonSide = { source: sideSource(b), scenario: scenarioB, result: resultB };
  const built = buildComparisonFiles(sideA, sideB, job.options.levels_ug_m3 as number[] | undefined, 'levels_ug_m3');
  const sideFiles = (prefix: string, side: ComparisonSide): [string, string][] =>
    buildResultFiles(side.scenario, side.result, built.sideOptions).contents.map(([name, text]) => [`${prefix}.${name}`, text]);
  const reportFiles = await buildComparisonReportFiles({
    a: { path: sideA.source, scenario: scenarioA, result: resultA },
    b: { path: sideB.source, scenario: scenarioB, result: resultB },
    comparison: built.comparison,
    difference: built.difference,
    levelsBasis: built.levelsBasis,
    command: 'POST /api/runs {"kind": "compare"}',
  });
  return asResultFiles([...built.files, ...reportFiles, ...sideFiles('a', sideA), ...sideFiles('b', sideB)]);
}

async function computeSweepRun(job: RunJob, control: RunControl): Promise<ResultFileContent[]> {
  const scenario = storedScenario(job.scenario);
  const mode = job.options.mode as SolverMode;
  const request = { parameter: job.options.parameter as SweepParameter, values: job.options.values as number[], sourceId: job.options.sourceId as string | undefined };
  const swept = SWEEP_PARAMETERS[request.parameter]?.perSource ? sweptSourceId(scenario, request.parameter, request.sourceId) : null;
  const members = isLinearSweep(scenario, request.parameter, swept) ? 1 : request.values.length;
  const lanes = inThreadMembers(mode, control, members);
  const sweep = await computeSweep(scenario, request, lanes.runner, lanes.control);
  return asResultFiles(buildSweepFiles(sweep, scenario.name));
}

async function computeStackHeightRun(job: RunJob, control: RunControl): Promise<ResultFileContent[]> {
  const scenario = storedScenario(job.scenario);
  const mode = job.options.mode as SolverMode;
  const request = job.options as unknown as StackHeightRequest;
  const target = resolveStackHeightTarget(scenario, request);
  const lanes = inThreadMembers(mode, control);
  const result = await computeStackHeight(scenario, request, target.target_ug_m3, lanes.runner, lanes.control);
  return asResultFiles(buildStackHeightFiles(result, scenario.name, target.basis));
}

async function computeSiteRun(job: RunJob, control: RunControl): Promise<ResultFileContent[]> {
  const scenario = storedScenario(job.scenario);
  const request = job.options as SiteRequest & { levels_ug_m3?: number[]; quick?: boolean };
  const result = await computeSiting(scenario, request, undefined, control);
  control.onProgress?.(1, 'writing the siting files');
  return asResultFiles(
    await buildSitingFiles(result, {
      levels_ug_m3: request.levels_ug_m3,
      site: scenario.site,
      scenario,
      command: 'POST /api/runs {"kind": "site"}',
      outputs: request.quick === true ? 'quick' : 'full',
    }),
  );
}
