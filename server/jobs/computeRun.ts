/**
 * What a run computes, wherever it runs (a worker thread today): the scenario is checked again, run
 * with runScenario, and turned into the result files the server stores: summary.json, receptors.csv,
 * footprint.geojson, the wind rose when there is one, and the ground field as binary for the map; with
 * `pack` "quick" or "full", also the consultation pack `plumeplan run` writes (ground.tif, map.svg,
 * report.html, receptors-with-caution.csv and the zip; "full" adds map.png and report.pdf). The pack is
 * made here, in the run's thread, because it needs the whole run result, which is not kept afterwards.
 * Compare, sweep, stack-height and site runs are computed by ./computeAnalysis.ts.
 */
import { parseScenario } from '../../scenarios/format/schema.ts';
import type { SolverMode } from '../../scenarios/format/types.ts';
import { runScenario, ScenarioInputError } from '../../solver/drivers/runScenario.ts';
import { UnavailableError } from '../../solver/drivers/solveSteady.ts';
import { GROUND_LEVEL_HEIGHT_m } from '../../solver/drivers/steadyScenario.ts';
import type { RunControl } from '../../solver/drivers/types.ts';
import { checkScenarioGeometry } from '../scenarioFiles/semantics.ts';
import type { ResultFileContent } from '../storage/resultFiles.ts';
import { encodeGroundField, GROUND_FIELD_CONTENT_TYPE, GROUND_FIELD_FILE } from '../writers/groundField.ts';
import { resolveLevels } from '../cli/run.ts';
import type { ContextLayer } from '../writers/map/mapSvg.ts';
import { runProvenance } from '../writers/provenance.ts';
import { buildConsultationPack, buildResultFiles, FOOTPRINT_FILE, RECEPTORS_FILE, SUMMARY_FILE, WIND_ROSE_FILE } from '../writers/writeResultFolder.ts';
import { asResultFiles, computeAnalysis, contentTypeOf, inputErrorDetail, RunInputError } from './computeAnalysis.ts';
import type { PackChoice, RunJob } from './runExecutor.ts';

/** Content types of the result files. */
export const RESULT_CONTENT_TYPES: Record<string, string> = {
  [SUMMARY_FILE]: 'application/json; charset=utf-8',
  [RECEPTORS_FILE]: 'text/csv; charset=utf-8',
  [FOOTPRINT_FILE]: 'application/geo+json; charset=utf-8',
  [WIND_ROSE_FILE]: 'image/svg+xml; charset=utf-8',
  [GROUND_FIELD_FILE]: GROUND_FIELD_CONTENT_TYPE,
};

export { RunInputError };

/**
 * Compute one run.
 * @param job the job (kind, stored scenario, options)
 * @param control progress and cancellation
 * @returns the result files
 * @throws RunInputError when the scenario or the options cannot be run
 */
export async function computeRun(job: RunJob, control: RunControl = {}): Promise<ResultFileContent[]> {
  switch (job.kind) {
    case 'scenario':
      return computeScenarioRun(job, control);
    default:
      return computeAnalysis(job, control);
  }
}

/** The reproducibility block's "command" for a run the server made: the request that asked for it. */
export function serverCommand(job: RunJob): string {
  const { contextLayers, ...options } = job.options;
  const layers = Array.isArray(contextLayers) ? `, ${contextLayers.length} context layer(s)` : '';
  return `plumeplan server: POST /api/runs ${JSON.stringify({ kind: job.kind, ...options })}${layers}`;
}

async function computeScenarioRun(job: RunJob, control: RunControl): Promise<ResultFileContent[]> {
  const startedAt = new Date();
  const parsed = parseScenario(job.scenario);
  if (!parsed.ok) {
    const [first] = parsed.issues;
    throw new RunInputError({ error: `scenario.${first.path}: ${first.message}`, field: `scenario.${first.path}`, allowed: first.message });
  }
  const scenario = parsed.scenario;
  const geometryIssues = checkScenarioGeometry(scenario);
  if (geometryIssues.length > 0) {
    const [first] = geometryIssues;
    throw new RunInputError({ error: `scenario.${first.path}: ${first.message}`, field: `scenario.${first.path}`, allowed: first.message });
  }
  const mode = job.options.mode as SolverMode | undefined;
  let result;
  try {
    result = await runScenario(scenario, { mode, control, resolutionCheck: job.options.resolutionCheck === true ? 'always' : 'auto' });
  } catch (error) {
    if (error instanceof ScenarioInputError) throw new RunInputError(inputErrorDetail(error.message));
    if (error instanceof UnavailableError) {
      throw new RunInputError({ error: error.message, field: 'mode', value: mode ?? scenario.solver.mode, allowed: error.alternativeMode ?? undefined });
    }
    throw error;
  }
  control.onProgress?.(1, 'writing the results');
  // Footprint levels as plumeplan run takes them (--levels, --percent-of): checked before queuing.
  const levels = resolveLevels(scenario, { levels_ug_m3: job.options.levels_ug_m3 as number[] | undefined, percentOf: job.options.percentOf as string | undefined });
  if (typeof levels === 'string') throw new RunInputError({ error: levels, field: 'percentOf', value: job.options.percentOf });
  const built = buildResultFiles(scenario, result, levels);
  const encoder = new TextEncoder();
  const files: ResultFileContent[] = built.contents.map(([name, text]) => ({
    name,
    contentType: RESULT_CONTENT_TYPES[name] ?? contentTypeOf(name),
    content: encoder.encode(text),
  }));
  files.push({ name: GROUND_FIELD_FILE, contentType: GROUND_FIELD_CONTENT_TYPE, content: encodeGroundField(scenario, result, GROUND_LEVEL_HEIGHT_m) });
  const pack = (job.options.pack as PackChoice | undefined) ?? 'none';
  if (pack !== 'none') {
    control.onProgress?.(1, pack === 'full' ? 'writing the report, the map figures and the zip' : 'writing the map figure, the report page and the zip');
    const packFiles = await buildConsultationPack(scenario, result, built, {
      ...levels,
      outputs: pack,
      crs: job.options.crs as string | undefined,
      contextLayers: job.options.contextLayers as ContextLayer[] | undefined,
      provenance: runProvenance(scenario, { runDate: startedAt, command: serverCommand(job) }),
    });
    files.push(...asResultFiles(packFiles.map((file) => [file.name, file.data])));
  }
  return files;
}
