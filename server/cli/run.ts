/**
 * `plumeplan run SCENARIO --out DIR [--mode grid|gaussian] [--levels L1,L2,...]`: load a scenario, run
 * it, write the result folder (summary.json, receptors.csv, footprint.geojson), and say where the
 * results went and what the peak is.
 *
 * Exit codes: 0 done; 2 invalid input (usage, scenario issues, geometry or weather that cannot be used),
 * each message naming the option or field; 1 internal failure or a capability this build lacks;
 * 130 interrupted (Ctrl-C during a grid solve in its worker thread).
 */
import { stat } from 'node:fs/promises';
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
import { runProvenance } from '../writers/provenance.ts';
import { writeResultFolder, type WrittenResultFolder } from '../writers/writeResultFolder.ts';
import { parseCommandLine, parseLevels, parseMode, UsageError } from './args.ts';
import type { CommandIO } from './io.ts';
import { createProgressReporter } from './progress.ts';

export const RUN_USAGE = `usage: plumeplan run SCENARIO --out DIR [--mode grid|gaussian] [--levels L1,L2,...] [--resolution-check] [--crs EPSG:n] [--quick]

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
  -r, --resolution-check
                     steady grid runs: solve again at half the cell size and report how much
                     each figure changes (made without asking when the finer grid is small)
      --crs EPSG:n   CRS of ground.tif and the map figure; default the site's WGS 84 UTM zone;
                     e.g. EPSG:27700 (British National Grid), EPSG:3035, any EPSG:326nn/327nn
  -q, --quick        leave out the rendered files (map.png, report.pdf), the slowest to write
  -h, --help         show this help

Steady grid runs also report how far their figures are from the Gaussian mode's, receptor by
receptor and at the peak, with a note when one is more than 1.25 times the other.

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
  crs?: ExportCrs;
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
    const existing = await stat(args.outDirectory).catch(() => null);
    if (existing !== null && !existing.isDirectory()) {
      io.stderr.write(`plumeplan run: --out: ${args.outDirectory} exists and is not a folder; give a folder for the results\n`);
      return 2;
    }

    const outcome = await loadScenarioFile(args.scenarioPath);
    if (!outcome.ok) {
      const count = outcome.issues.length;
      io.stderr.write(
        `plumeplan run: ${args.scenarioPath} is not a valid scenario (${count} ${count === 1 ? 'issue' : 'issues'}):\n` +
          `${indent(formatIssues(outcome.issues))}\n`,
      );
      return 2;
    }
    const scenario = outcome.scenario;
    const mode = args.mode ?? scenario.solver.mode;

    // A single steady grid solve runs in a worker thread (the command stays responsive and Ctrl-C stops
    // it at once). The many solves of an hour-by-hour series or a wind rose go to a pool of worker
    // threads, one per core, each (grid mode) warm-starting from its own previous solves. Measured back
    // to back on the demo year, two cores: Gaussian 75.5 s in process, 55.8 s in the pool.
    const solve = options.solve ?? (scenario.weather.kind === 'steady' ? workerSteadySolver : undefined);
    const pooled = options.solve === undefined && usesSeriesPool(scenario);
    const pool = pooled ? createSeriesSolverPool() : null;
    const interrupt = new AbortController();
    const onInterrupt = (): void => interrupt.abort();
    if (pool !== null) process.once('SIGINT', onInterrupt);
    let result;
    try {
      result = await runScenario(scenario, {
        mode,
        solve,
        seriesSolvers: pool?.solvers,
        stepThreads: defaultSeriesThreads(),
        resolutionCheck: args.resolutionCheck === true ? 'always' : 'auto',
        control: { onProgress: (fraction, message) => progress.update(fraction, message), signal: pool !== null ? interrupt.signal : undefined },
      });
    } finally {
      process.off('SIGINT', onInterrupt);
      await pool?.close();
    }
    progress.update(1, 'writing the result folder');
    const written = await writeResultFolder(args.outDirectory, scenario, result, {
      levels_ug_m3: args.levels_ug_m3,
      crs: args.crs,
      outputs: args.quick ? 'quick' : 'full',
      provenance: runProvenance(scenario, { runDate: startedAt, command: commandLine(argv) }),
    });
    progress.finish();
    io.stdout.write(describeRun(scenario, result, written));
    return 0;
  } catch (error) {
    progress.finish();
    return reportFailure(error, io);
  }
}

function readRunArguments(argv: string[]): RunArguments | 'help' {
  const { options, positionals } = parseCommandLine(argv, {
    out: { type: 'string', short: 'o' },
    mode: { type: 'string', short: 'm' },
    levels: { type: 'string', short: 'l' },
    'resolution-check': { type: 'boolean', short: 'r' },
    crs: { type: 'string' },
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
    crs: typeof options.crs === 'string' ? parseCrs(options.crs) : undefined,
    quick: options.quick === true,
  };
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
export function commandLine(argv: string[]): string {
  const quote = (argument: string): string => (/^[\w@%+=:,./-]+$/.test(argument) ? argument : `'${argument.replaceAll("'", "'\\''")}'`);
  return ['plumeplan', 'run', ...argv.map(quote)].join(' ');
}

/** Whether a run makes many steady solves (a pool of worker threads takes them). */
function usesSeriesPool(scenario: Scenario): boolean {
  const weather = scenario.weather;
  return weather.kind === 'windRose' || (weather.kind === 'hourly' && scenario.solver.hourlyMethod === 'independentHours');
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

/** Exit code and message for an error thrown while running. */
function reportFailure(error: unknown, io: CommandIO): number {
  if (error instanceof Error && error.name === 'AbortError') {
    io.stderr.write('plumeplan run: interrupted; no results written\n');
    return INTERRUPTED_EXIT_CODE;
  }
  if (error instanceof ScenarioInputError) {
    io.stderr.write(`plumeplan run: invalid scenario: ${error.message}\n`);
    return 2;
  }
  if (error instanceof UnavailableError) {
    const suggestion = error.alternativeMode === null ? '' : `; use --mode ${error.alternativeMode} meanwhile`;
    io.stderr.write(`plumeplan run: ${error.message}${suggestion}\n`);
    return 1;
  }
  const message = error instanceof Error ? error.message : String(error);
  io.stderr.write(`plumeplan run: internal failure: ${message}\n`);
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
  const weather = { steady: 'steady weather', hourly: 'hourly series', windRose: 'wind rose' }[result.weatherKind];
  const statistic = peak.statistic === 'mean' ? 'mean ' : '';
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
