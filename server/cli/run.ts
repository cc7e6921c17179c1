/**
 * `plumeplan run SCENARIO --out DIR [--mode grid|gaussian] [--levels L1,L2,...]`: load a scenario, run
 * it, write the result folder (summary.json, receptors.csv, footprint.geojson), and say where the
 * results went and what the peak is.
 *
 * Exit codes: 0 done; 2 invalid input (usage, scenario issues, geometry or weather that cannot be used),
 * each message naming the option or field; 1 internal failure or a capability this build lacks;
 * 130 interrupted (Ctrl-C during a grid solve in its worker thread).
 */
import { readFile, stat } from 'node:fs/promises';
import path from 'node:path';
import { loadScenarioFile } from '../scenarioFiles/load.ts';
import { formatIssues } from '../../scenarios/format/schema.ts';
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import { runScenario, ScenarioInputError } from '../../solver/drivers/runScenario.ts';
import { solveSteady, UnavailableError, type SteadySolver } from '../../solver/drivers/solveSteady.ts';
import { createSeriesSolverPool, defaultSeriesThreads } from '../jobs/seriesSolverPool.ts';
import { solveGridSteadyInWorker } from '../jobs/solveInWorker.ts';
import type { ScenarioRunResult } from '../../solver/drivers/types.ts';
import { SCREENING_CAUTION } from '../writers/caution.ts';
import { resolveCrs, type ExportCrs } from '../writers/crs.ts';
import { parseContextLayers } from '../writers/contextLayers.ts';
import type { ContextLayer } from '../writers/map/mapSvg.ts';
import { runProvenance } from '../writers/provenance.ts';
import { writeResultFolder, type WrittenResultFolder } from '../writers/writeResultFolder.ts';
import { parseCommandLine, parseLevels, parseMode, UsageError } from './args.ts';
import type { CommandIO } from './io.ts';
import { createProgressReporter } from './progress.ts';
import { assessmentPlan, type AssessedStandard } from '../../solver/assessment/standards.ts';
import { levelsFromPercentages } from '../../solver/assessment/footprintAreas.ts';
import { verdictTable } from '../writers/assessmentFigures.ts';
import type { ScreeningVerdicts } from '../../solver/assessment/verdicts.ts';

export const RUN_USAGE = `usage: plumeplan run SCENARIO --out DIR [--mode grid|gaussian] [--levels L1,L2,...] [--percent-of STANDARD] [--resolution-check] [--crs EPSG:n] [--context-layers FILE] [--quick]

Runs a scenario file (format plumeplan.scenario/1) and writes into DIR (created if missing):
  summary.json       the run at a glance: grid, mass budget, sources, peak, receptors, caution
  receptors.csv      one row per receptor, concentrations in ug/m3
  footprint.geojson  ground-level isopleth bands (WGS 84 lon/lat), lower_ug_m3 and upper_ug_m3
  ground.tif         the ground-level field as a float32 GeoTIFF (the site's UTM zone, or --crs)
  map.svg, map.png   the site map figure: bands, sources, receptors, legend, scale, caution
  report.html, report.pdf   the consultation report (A4): caution, map, receptors, sources, method
  receptors-with-caution.csv   receptors.csv after comment lines with the caution and provenance
  plumeplan-run.zip  every file above, the scenario as run and manifest.json (SHA-256 of each)

Options:
  -o, --out DIR      folder for the results (required)
  -m, --mode MODE    grid (advection-diffusion on the local grid) or gaussian (Gaussian plume
                     reference); default: the scenario's solver.mode
  -l, --levels LIST  footprint levels in ug/m3, positive and increasing, e.g. 1,2,5,10;
                     default: round numbers (1-2-5 series) across the field's range, at most 7
  -p, --percent-of STANDARD
                     read --levels as percentages of this assessed standard's limit (its name as
                     in summary.json's verdicts); without --levels: 1,10,50,100
  -r, --resolution-check
                     grid runs: solve again at half the cell size and report how much each
                     figure changes (series and wind roses: at the weathers of the highest
                     figures); made without asking when the finer grid is small
      --crs EPSG:n   CRS of ground.tif and the map figure; default the site's WGS 84 UTM zone;
                     e.g. EPSG:27700 (British National Grid), EPSG:3035, any EPSG:326nn/327nn
      --context-layers FILE
                     a GeoJSON file (RFC 7946, WGS 84 lon/lat) of context drawn thinly on the map
                     figure: site boundary, buildings, roads; each feature's properties.layer names
                     its layer in the legend (default: the collection's name, else the file's)
  -q, --quick        leave out the rendered files (map.png, report.pdf), the slowest to write
  -h, --help         show this help

Steady grid runs also report how far their figures are from the Gaussian mode's, receptor by
receptor and at the peak, with a note when one is more than 1.25 times the other.

With an assessment in the scenario, summary.json holds the screening verdicts (PC, PEC, % of each
standard, the two-stage screen as common practice in permit guidance, never a legal decision) and
each standard's statistic is mapped on the ground (standard-*.geojson). summary.json's footprint
lists, for every level, the area inside it, the farthest distance from each source and the
receptors inside it.

Exit codes: 0 done, 2 invalid input, 1 internal failure, 130 interrupted.
Set PLUMEPLAN_DEBUG=1 to see the stack of an internal failure.
Results are screening estimates only; see the caution in summary.json.
`;

interface RunArguments {
  scenarioPath: string;
  outDirectory: string;
  mode?: SolverMode;
  levels_ug_m3?: number[];
  resolutionCheck?: boolean;
  /** the standard whose limit --levels are percentages of */
  percentOf?: string;
  crs?: ExportCrs;
  /** the GeoJSON file of context layers for the map figure */
  contextLayersPath?: string;
  quick: boolean;
}

export interface RunCommandOptions {
  /** steady solver to use (a worker-backed one, say); default: in-process */
  solve?: SteadySolver;
}

/**
 * Run `plumeplan run`.
 *
 * @param argv the arguments after `run`
 * @param io streams, environment and clock
 * @param options the steady solver to use
 * @returns the exit code
 * @example await runCommand(['scenarios/merrowdene-heat-plant/scenario.json', '--out', 'out/m'], processIO())
 */
export async function runCommand(argv: string[], io: CommandIO, options: RunCommandOptions = {}): Promise<number> {
  let args: RunArguments | 'help';
  try {
    args = readRunArguments(argv);
  } catch (error) {
    if (!(error instanceof UsageError)) throw error;
    io.stderr.write(`plumeplan run: ${error.message}\n\n${RUN_USAGE}`);
    return 2;
  }
  if (args === 'help') {
    io.stdout.write(RUN_USAGE);
    return 0;
  }

  const progress = createProgressReporter(io.stderr, io.now);
  const startedAt = new Date();
  try {
    // A folder argument that names a file is caught now, not after a long run.
    if (!(await checkOutFolder(args.outDirectory, io, 'run'))) return 2;

    const scenario = await loadScenarioForCommand(args.scenarioPath, io, 'run');
    if (scenario === null) return 2;
    const mode = args.mode ?? scenario.solver.mode;
    const levels = resolveLevels(scenario, args);
    if (typeof levels === 'string') {
      io.stderr.write(`plumeplan run: ${levels}\n`);
      return 2;
    }
    // read before the run, so a bad file is said at once and not after a long solve
    const contextLayers = args.contextLayersPath === undefined ? undefined : await readContextLayers(args.contextLayersPath, io);
    if (contextLayers === null) return 2;

    const result = await executeScenario(scenario, mode, (fraction, message) => progress.update(fraction, message), options.solve, args.resolutionCheck === true ? 'always' : 'auto');
    progress.update(1, 'writing the result folder');
    const written = await writeResultFolder(args.outDirectory, scenario, result, {
      ...levels,
      crs: args.crs,
      contextLayers,
      outputs: args.quick ? 'quick' : 'full',
      provenance: runProvenance(scenario, { runDate: startedAt, command: commandLine(argv) }),
    });
    progress.finish();
    io.stdout.write(describeRun(scenario, result, written));
    return 0;
  } catch (error) {
    progress.finish();
    return reportFailure(error, io, 'run');
  }
}

function readRunArguments(argv: string[]): RunArguments | 'help' {
  const { options, positionals } = parseCommandLine(argv, {
    out: { type: 'string', short: 'o' },
    mode: { type: 'string', short: 'm' },
    levels: { type: 'string', short: 'l' },
    'resolution-check': { type: 'boolean', short: 'r' },
    'percent-of': { type: 'string', short: 'p' },
    crs: { type: 'string' },
    'context-layers': { type: 'string' },
    quick: { type: 'boolean', short: 'q' },
    help: { type: 'boolean', short: 'h' },
  });
  if (options.help === true) return 'help';
  if (positionals.length === 0) throw new UsageError('run needs a SCENARIO file');
  if (positionals.length > 1) {
    throw new UsageError(`run takes one SCENARIO file; got ${positionals.length}: ${positionals.join(' ')}`);
  }
  if (typeof options.out !== 'string' || options.out === '') {
    throw new UsageError('--out DIR is required: the folder to write the results into');
  }
  return {
    scenarioPath: positionals[0],
    outDirectory: options.out,
    mode: typeof options.mode === 'string' ? parseMode(options.mode) : undefined,
    levels_ug_m3: typeof options.levels === 'string' ? parseLevels(options.levels) : undefined,
    resolutionCheck: options['resolution-check'] === true,
    percentOf: typeof options['percent-of'] === 'string' ? options['percent-of'] : undefined,
    crs: typeof options.crs === 'string' ? parseCrs(options.crs) : undefined,
    contextLayersPath: typeof options['context-layers'] === 'string' ? options['context-layers'] : undefined,
    quick: options.quick === true,
  };
}

/**
 * Load a scenario file for a command, printing every issue (naming the file and the field) when it is
 * not valid.
 *
 * @returns the scenario, or null after printing the issues (the command exits 2)
 */
export async function loadScenarioForCommand(scenarioPath: string, io: CommandIO, command: string): Promise<Scenario | null> {
  const outcome = await loadScenarioFile(scenarioPath);
  if (outcome.ok) return outcome.scenario;
  const count = outcome.issues.length;
  io.stderr.write(
    `plumeplan ${command}: ${scenarioPath} is not a valid scenario (${count} ${count === 1 ? 'issue' : 'issues'}):\n` +
      `${indent(formatIssues(outcome.issues))}\n`,
  );
  return null;
}

/**
 * Refuse an output path that names a file, before any long run.
 *
 * @returns true when the path is free or a folder; false after printing the message (the command exits 2)
 */
export async function checkOutFolder(outDirectory: string, io: CommandIO, command: string): Promise<boolean> {
  const existing = await stat(outDirectory).catch(() => null);
  if (existing !== null && !existing.isDirectory()) {
    io.stderr.write(`plumeplan ${command}: --out: ${outDirectory} exists and is not a folder; give a folder for the results\n`);
    return false;
  }
  return true;
}

/**
 * Read --context-layers: the file's GeoJSON as map layers.
 *
 * @returns the layers, or null after printing what is wrong (the command exits 2)
 */
async function readContextLayers(file: string, io: CommandIO): Promise<ContextLayer[] | null> {
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch (error) {
    io.stderr.write(`plumeplan run: --context-layers: cannot read ${file} (${(error as NodeJS.ErrnoException).code ?? (error as Error).message}); give a GeoJSON file\n`);
    return null;
  }
  try {
    return parseContextLayers(text, file);
  } catch (error) {
    if (!(error instanceof RangeError)) throw error;
    io.stderr.write(`plumeplan run: --context-layers: ${error.message}\n`);
    return null;
  }
}

/** Default percentages of a standard's limit for --percent-of without --levels [%]. */
const DEFAULT_PERCENT_LEVELS = [1, 10, 50, 100];

/**
 * The footprint levels: as given in ug/m3, or as percentages of an assessed standard's limit.
 *
 * @returns the levels and how they were chosen, or a message naming --percent-of and the allowed names
 */
export function resolveLevels(
  scenario: Scenario,
  args: { levels_ug_m3?: number[]; percentOf?: string },
): { levels_ug_m3?: number[]; levelsBasis?: string } | string {
  if (args.percentOf === undefined) return { levels_ug_m3: args.levels_ug_m3 };
  let standards: AssessedStandard[] = [];
  try {
    standards = scenario.assessment === undefined ? [] : assessmentPlan(scenario.assessment, scenario.pollutant.name).standards;
  } catch (error) {
    if (!(error instanceof RangeError)) throw error;
    return `invalid scenario: ${error.message}`;
  }
  const standard = standards.find((candidate) => candidate.name === args.percentOf);
  if (standard === undefined) {
    const names = standards.map((candidate) => JSON.stringify(candidate.name)).join(', ');
    return `--percent-of: ${JSON.stringify(args.percentOf)} is not an assessed standard of this scenario; ` +
      (names === '' ? 'the scenario has no assessment standards' : `use one of ${names}`);
  }
  const percents = args.levels_ug_m3 ?? DEFAULT_PERCENT_LEVELS;
  return {
    levels_ug_m3: levelsFromPercentages(percents, standard.limit_ug_m3),
    levelsBasis: `${percents.join(', ')} % of ${standard.name}, ${standard.limit_ug_m3} ug/m3`,
  };
}

/**
 * Run a loaded scenario the way the command line does: a single steady grid solve in a worker thread
 * (the command stays responsive and Ctrl-C stops it at once); the many solves of an hour-by-hour series,
 * a wind rose or the screening weather set in a pool of worker threads, one per core, each (grid mode)
 * warm-starting from its own previous solves (measured back to back on the demo year, two cores:
 * Gaussian 75.5 s in process, 55.8 s in the pool). Ctrl-C aborts with an AbortError.
 *
 * @param scenario a parsed scenario
 * @param mode the solver mode
 * @param onProgress progress callback
 * @param solve a steady solver to use instead (tests); no pool then
 */
export async function executeScenario(
  scenario: Scenario,
  mode: SolverMode,
  onProgress: (fraction: number, message: string) => void,
  solve?: SteadySolver,
  resolutionCheck: 'always' | 'auto' = 'auto',
): Promise<ScenarioRunResult> {
  const steadySolve = solve ?? (scenario.weather.kind === 'steady' ? workerSteadySolver : undefined);
  const pooled = solve === undefined && usesSeriesPool(scenario);
  const pool = pooled ? createSeriesSolverPool() : null;
  const interrupt = new AbortController();
  const onInterrupt = (): void => interrupt.abort();
  if (pool !== null) process.once('SIGINT', onInterrupt);
  try {
    return await runScenario(scenario, {
      mode,
      solve: steadySolve,
      seriesSolvers: pool?.solvers,
      stepThreads: defaultSeriesThreads(),
      resolutionCheck,
      control: { onProgress, signal: pool !== null ? interrupt.signal : undefined },
    });
  } finally {
    process.off('SIGINT', onInterrupt);
    await pool?.close();
  }
}

/** Read `--crs`: an EPSG code plumeplan knows. */
function parseCrs(text: string): ExportCrs {
  try {
    return resolveCrs(text, '--crs');
  } catch (error) {
    throw new UsageError((error as Error).message);
  }
}

/** The command as typed, for the reproducibility block: arguments quoted where the shell would need it. */
export function commandLine(argv: string[], subcommand = 'run'): string {
  const quote = (argument: string): string => (/^[\w@%+=:,./-]+$/.test(argument) ? argument : `'${argument.replaceAll("'", "'\\''")}'`);
  return ['plumeplan', subcommand, ...argv.map(quote)].join(' ');
}

/** Whether a run makes many steady solves (a pool of worker threads takes them). */
function usesSeriesPool(scenario: Scenario): boolean {
  const weather = scenario.weather;
  return weather.kind === 'windRose' || weather.kind === 'screeningSet' || (weather.kind === 'hourly' && scenario.solver.hourlyMethod === 'independentHours');
}

/** Exit code of a run stopped by an interrupt (128 + SIGINT, the shell convention). */
export const INTERRUPTED_EXIT_CODE = 130;

/**
 * Grid steady solves in a worker thread, everything else in process. While the worker runs, Ctrl-C
 * (SIGINT) aborts it; the in-process solves keep Node's own Ctrl-C behaviour (the process stops).
 */
export const workerSteadySolver: SteadySolver = async (input, mode, control = {}) => {
  if (mode !== 'grid') return solveSteady(input, mode, control);
  const controller = new AbortController();
  const abort = (): void => controller.abort();
  control.signal?.addEventListener('abort', abort, { once: true });
  process.once('SIGINT', abort);
  try {
    return await solveGridSteadyInWorker(input, { onProgress: control.onProgress, signal: controller.signal });
  } finally {
    process.off('SIGINT', abort);
    control.signal?.removeEventListener('abort', abort);
  }
};

/**
 * Exit code and message for an error thrown while running a command.
 *
 * @param command the command's name for the message, e.g. "run" or "compare"
 */
export function reportFailure(error: unknown, io: CommandIO, command: string): number {
  if (error instanceof Error && error.name === 'AbortError') {
    io.stderr.write(`plumeplan ${command}: interrupted; no results written\n`);
    return INTERRUPTED_EXIT_CODE;
  }
  if (error instanceof ScenarioInputError) {
    io.stderr.write(`plumeplan ${command}: invalid scenario: ${error.message}\n`);
    return 2;
  }
  if (error instanceof UnavailableError) {
    const suggestion = error.alternativeMode === null ? '' : `; use --mode ${error.alternativeMode} meanwhile`;
    io.stderr.write(`plumeplan ${command}: ${error.message}${suggestion}\n`);
    return 1;
  }
  const message = error instanceof Error ? error.message : String(error);
  io.stderr.write(`plumeplan ${command}: internal failure: ${message}\n`);
  if (io.env.PLUMEPLAN_DEBUG === '1' && error instanceof Error && error.stack !== undefined) {
    io.stderr.write(`${error.stack}\n`);
  } else {
    io.stderr.write('(set PLUMEPLAN_DEBUG=1 to see where it happened)\n');
  }
  return 1;
}

/** What stdout says after a run: where the results went, the peak, the receptors, the caution. */
export function describeRun(scenario: Scenario, result: ScenarioRunResult, written: WrittenResultFolder): string {
  const { summary, footprint } = written;
  const { peak } = summary;
  const weather = { steady: 'steady weather', hourly: 'hourly series', windRose: 'wind rose', screeningSet: 'screening weather set' }[result.weatherKind];
  const statistic = { concentration: '', mean: 'mean ', maximum: 'highest hourly ' }[peak.statistic];
  const lines = [
    `${scenario.name}: ${scenario.pollutant.name}, ${result.mode} mode, ${weather}, ` +
      `grid ${result.grid.nx} x ${result.grid.ny} x ${result.grid.nz} at ${result.grid.spacing_m} m, ` +
      `${formatSeconds(result.wallSeconds)}`,
    `Results written to ${path.resolve(written.directory)}: ${written.files.join(', ')}`,
    ...(written.removed.length > 0
      ? [`Removed from that folder the files of an earlier run that this run does not write: ${written.removed.join(', ')}`]
      : []),
    peak.onSite !== undefined || scenario.site.boundary !== undefined
      ? `Peak ground-level ${statistic}concentration off the site: ${peak.concentration_ug_m3} ug/m3 at lat ${peak.lat}, ` +
        `lon ${peak.lon} (${describeOffset(peak.x_m, peak.y_m)} of the site)`
      : `Peak ground-level ${statistic}concentration: ${peak.concentration_ug_m3} ug/m3 at lat ${peak.lat}, lon ${peak.lon} ` +
        `(${describeOffset(peak.x_m, peak.y_m)} of the site; no site boundary given, so it may be on the site itself)`,
  ];
  if (peak.onSite !== undefined) {
    lines.push(
      `  on the site (not where the public is; for reference): ${peak.onSite.concentration_ug_m3} ug/m3 at ` +
        `${describeOffset(peak.onSite.x_m, peak.onSite.y_m)} of the site`,
    );
  }
  const warnings = result.notes.filter((note) => note.startsWith('input warning: '));
  if (warnings.length > 0) lines.push('Input warnings (also in summary.json):', ...warnings.map((note) => `  ${note.slice('input warning: '.length)}`));
  if (summary.receptors.length > 0) {
    lines.push('Receptors:', ...receptorTable(summary.receptors, result.receptorColumns.map((column) => column.key)));
  }
  const levels = footprint.properties.levels_ug_m3;
  if (levels.length === 0) lines.push('Footprint: no bands (the field is zero or flat)');
  else if (footprint.features.length === 0) lines.push(`Footprint: no ground reaches the lowest level, ${levels[0]} ug/m3`);
  else lines.push(`Footprint bands from ${levels.join(', ')} ug/m3 (the top band open-ended)`);
  lines.push(...checkLines(result, summary.notes));
  const areas = summary.footprint.areas.filter((entry) => entry.area_m2 > 0);
  if (areas.length > 0) {
    lines.push(
      `Ground at or above each level${summary.footprint.levelsBasis ? ` (${summary.footprint.levelsBasis})` : ''}:`,
      ...areas.map((entry) => {
        const farthest = entry.farthest
          .filter((f) => f.distance_m !== null)
          .map((f) => `${f.distance_m} m from ${f.sourceId}`)
          .join(', ');
        const inside = entry.receptorsInside.length > 0 ? `; receptors inside: ${entry.receptorsInside.join(', ')}` : '';
        return `  ${entry.level_ug_m3} ug/m3: ${entry.area_ha} ha, up to ${farthest}${entry.reachesGridEdge ? ' (reaches the grid edge: at least)' : ''}${inside}`;
      }),
    );
  }
  const verdicts = summary.verdicts as ScreeningVerdicts | undefined;
  if (verdicts !== undefined && verdicts.standards.length > 0) lines.push(...verdictTable(verdicts));
  for (const flag of result.downwash ?? []) if (flag.flagged) lines.push(`Building downwash: ${flag.message}`);
  lines.push(`Caution: ${SCREENING_CAUTION}`);
  return `${lines.join('\n')}\n`;
}

/** The run's checks on itself (solver/drivers/runChecks.ts), in a line each, and their notes. */
function checkLines(result: ScenarioRunResult, notes: readonly string[]): string[] {
  const lines: string[] = [];
  const largestFactor = (check: { receptors: { ratio: number | null }[]; peak: { ratio: number | null } }): string => {
    const ratios = [...check.receptors, check.peak].map((item) => item.ratio).filter((ratio): ratio is number => ratio !== null && ratio > 0);
    if (ratios.length === 0) return 'nothing to compare';
    return `largest factor ${Math.max(...ratios.map((ratio) => Math.max(ratio, 1 / ratio))).toFixed(2)}`;
  };
  const modeCheck = result.extraSummary.modeCheck as Parameters<typeof largestFactor>[0] | undefined;
  if (modeCheck !== undefined) lines.push(`Mode check (grid against Gaussian, receptors and peak): ${largestFactor(modeCheck)}`);
  const resolutionCheck = result.extraSummary.resolutionCheck as ({ made: true } & Parameters<typeof largestFactor>[0]) | { made: false; reason: string } | undefined;
  if (resolutionCheck !== undefined) {
    lines.push(resolutionCheck.made ? `Resolution check (half the cell size): ${largestFactor(resolutionCheck)}` : `Resolution check ${resolutionCheck.reason}`);
  }
  lines.push(...notes.filter((note) => /^(mode check|resolution check|domain edge):/.test(note)).map((note) => `Note: ${note}`));
  return lines;
}

/** The receptors as an aligned table: id, the figure columns (their names as headers), the name. */
function receptorTable(receptors: WrittenResultFolder['summary']['receptors'], keys: string[]): string[] {
  const header = ['id', ...keys, 'name'];
  const rows = receptors.map((receptor) => [receptor.id, ...keys.map((key) => String(receptor[key])), receptor.name]);
  const widths = header.map((title, column) => Math.max(title.length, ...rows.map((row) => row[column].length)));
  const format = (row: string[]): string =>
    `  ${row.map((cell, column) => (column === row.length - 1 ? cell : cell.padEnd(widths[column]))).join('  ')}`;
  return [format(header), ...rows.map(format)];
}

function describeOffset(x_m: number, y_m: number): string {
  const east = `${Math.round(Math.abs(x_m))} m ${x_m < 0 ? 'west' : 'east'}`;
  const north = `${Math.round(Math.abs(y_m))} m ${y_m < 0 ? 'south' : 'north'}`;
  return `${east}, ${north}`;
}

function formatSeconds(seconds: number): string {
  return seconds < 1 ? `${Math.round(seconds * 1000)} ms` : `${seconds.toFixed(1)} s`;
}

function indent(text: string): string {
  return text
    .split('\n')
    .map((line) => `  ${line}`)
    .join('\n');
}
