/**
 * `plumeplan site SCENARIO --out DIR [...]`: where on the site may the stack go? Builds the siting map
 * (one adjoint solve per sensitive receptor in grid mode, direct evaluation in Gaussian mode), ranks the
 * candidate positions and writes siting.json, candidates.csv, siting-map.tif, siting.geojson and the
 * siting figure and report (siting-map.svg/.png, siting-report.html/.pdf; --quick leaves out the PNG and PDF).
 *
 * Loading, progress and exit codes as `run`: 0 done; 2 invalid input (usage, scenario issues, candidates
 * or polygon that cannot be used), naming the option or field; 1 internal failure or a capability this
 * build lacks; 130 interrupted (Ctrl-C at any point: the siting runs in a worker thread, ./siteInWorker.ts,
 * which is stopped at once). Nothing is written before the end, and files written when Ctrl-C comes
 * during the writing are removed again.
 */
import { readFile, stat } from 'node:fs/promises';
import path from 'node:path';
import { loadScenarioFile } from '../scenarioFiles/load.ts';
import { formatIssues } from '../../scenarios/format/schema.ts';
import type { SolverMode } from '../../scenarios/format/types.ts';
import { ScenarioInputError } from '../../solver/drivers/runScenario.ts';
import { UnavailableError, type SteadySolver } from '../../solver/drivers/solveSteady.ts';
import type { CandidateInput, SitingResult } from '../../solver/siting/runSiting.ts';
import { computeSiting, parseCandidates, parseSitePolygon, SitingInputError, sitingOptions } from '../analyses/siting.ts';
import { SCREENING_CAUTION } from '../writers/caution.ts';
import { writeSitingFolder } from '../writers/siting.ts';
import { parseCommandLine, parseLevels, parseMode, UsageError } from './args.ts';
import type { CommandIO } from './io.ts';
import { createProgressReporter } from './progress.ts';
import { commandLine, INTERRUPTED_EXIT_CODE } from './run.ts';
import { runSitingInWorker } from './siteInWorker.ts';

export const SITE_USAGE = `usage: plumeplan site SCENARIO --out DIR [options]

Maps, for every grid column, the highest process contribution (PC) at the sensitive receptors if the
scenario's stack stood there, finds the best position on the site and ranks candidate positions.
Writes into DIR (created if missing):
  siting.json      the result: best position, ranked candidates, standard, limits, caution
  candidates.csv   the ranked candidates, one row each (PC in ug/m3)
  siting-map.tif   the map as a GeoTIFF in the site's UTM zone (ug/m3; nodata off the site),
                   and siting-map-<receptor>.tif for each receptor (up to 5 receptors)
  siting.geojson   the map's isopleth bands, best position, candidates, receptors, site polygon
  siting-map.svg   the siting figure (map bands, site polygon, receptors, ranked candidates, best
  siting-map.png   position, scale bar, north arrow, caution); the PNG at 2000 x 1580 pixels
  siting-report.html  the siting report: caution, question, figure, ranked candidates, best position,
  siting-report.pdf   limits and measured agreement, reproducibility (the PDF on A4)

Options:
  -o, --out DIR          folder for the results (required)
  -m, --mode MODE        grid (adjoint solves on the local grid) or gaussian (direct evaluation);
                         default: the scenario's solver.mode
      --stack ID         the point source to site; default: the scenario's first point source
      --receptors LIST   sensitive receptor ids, comma-separated; default: every receptor
      --weights LIST     combine the receptors as a weighted sum (one weight each) instead of the highest
      --candidates FILE  candidate positions: a GeoJSON FeatureCollection of Points (id from the
                         feature's id or properties.id) or a JSON list of {"id", "lon", "lat"}
      --site-polygon FILE  the site as a GeoJSON Polygon (a Feature or a FeatureCollection of one);
                         default: the scenario's site.boundary when it has one
      --spacing M        lattice spacing the site polygon is sampled at for candidates [m];
                         default: the grid spacing
      --standard NAME    the standard to compare with (one of assessment.standards); default: the
                         shortest averaging period for steady weather, the long-term one for a wind rose
      --level L          ground level whose area each forward run reports [ug/m3]; default: the
                         standard's screening threshold
      --forward-runs N   forward runs of the best-ranked candidates (ground peak, area, check of the
                         map); default: every candidate, at most 50 in grid mode
      --footprints       also write footprint-<id>.geojson for each forward-run candidate
  -l, --levels LIST      the map's isopleth levels in ug/m3, increasing; default: round numbers
      --quick            leave out the slow rendered files (siting-map.png, siting-report.pdf)
  -h, --help             show this help

The map assumes flat terrain, the same stack at every position and effective heights that do not depend
on position. Exit codes: 0 done, 2 invalid input, 1 internal failure, 130 interrupted.
Results are screening estimates only; see the caution in siting.json.
`;

interface SiteArguments {
  scenarioPath: string;
  outDirectory: string;
  mode?: SolverMode;
  stackId?: string;
  receptorIds?: string[];
  weights?: number[];
  candidatesPath?: string;
  sitePolygonPath?: string;
  spacing_m?: number;
  standardName?: string;
  level_ug_m3?: number;
  forwardRuns?: number;
  footprints: boolean;
  levels_ug_m3?: number[];
  quick: boolean;
}

export interface SiteCommandOptions {
  /** the forward runs' steady solver, and the siting in process (tests); default: the whole siting in a worker thread */
  solve?: SteadySolver;
}

/**
 * Run `plumeplan site`.
 *
 * @param argv the arguments after `site`
 * @param io streams, environment and clock
 * @returns the exit code
 * @example await siteCommand(['scenarios/merrowdene-heat-plant/scenario.json', '--out', 'out/site'], processIO())
 */
export async function siteCommand(argv: string[], io: CommandIO, options: SiteCommandOptions = {}): Promise<number> {
  let args: SiteArguments | 'help';
  try {
    args = readSiteArguments(argv);
  } catch (error) {
    if (!(error instanceof UsageError)) throw error;
    io.stderr.write(`plumeplan site: ${error.message}\n\n${SITE_USAGE}`);
    return 2;
  }
  if (args === 'help') {
    io.stdout.write(SITE_USAGE);
    return 0;
  }
  const progress = createProgressReporter(io.stderr, io.now);
  const interrupt = new AbortController();
  const onInterrupt = (): void => interrupt.abort();
  process.once('SIGINT', onInterrupt);
  try {
    const existing = await stat(args.outDirectory).catch(() => null);
    if (existing !== null && !existing.isDirectory()) {
      io.stderr.write(`plumeplan site: --out: ${args.outDirectory} exists and is not a folder; give a folder for the results\n`);
      return 2;
    }
    const candidates = args.candidatesPath === undefined ? undefined : await readCandidates(args.candidatesPath);
    const sitePolygon = args.sitePolygonPath === undefined ? undefined : await readSitePolygon(args.sitePolygonPath);
    const outcome = await loadScenarioFile(args.scenarioPath);
    if (!outcome.ok) {
      const count = outcome.issues.length;
      io.stderr.write(
        `plumeplan site: ${args.scenarioPath} is not a valid scenario (${count} ${count === 1 ? 'issue' : 'issues'}):\n` +
          `${formatIssues(outcome.issues).split('\n').map((line) => `  ${line}`).join('\n')}\n`,
      );
      return 2;
    }
    const scenario = outcome.scenario;
    const request = {
      mode: args.mode,
      stackId: args.stackId,
      receptorIds: args.receptorIds,
      weights: args.weights,
      candidates,
      sitePolygon,
      spacing_m: args.spacing_m,
      standard: args.standardName,
      level_ug_m3: args.level_ug_m3,
      forwardRuns: args.forwardRuns,
      footprints: args.footprints,
    };
    const control = { onProgress: (fraction: number, message: string) => progress.update(fraction, message), signal: interrupt.signal };
    // in a worker thread, so that Ctrl-C stops the adjoint solves at once (./siteInWorker.ts)
    const result =
      options.solve === undefined ? await runSitingInWorker(scenario, sitingOptions(request, undefined, control)) : await computeSiting(scenario, request, options.solve, control);
    progress.update(1, 'writing the siting folder');
    const files = await writeSitingFolder(args.outDirectory, result, {
      levels_ug_m3: args.levels_ug_m3,
      site: scenario.site,
      scenario,
      command: commandLine(argv, 'site'),
      outputs: args.quick ? 'quick' : 'full',
      signal: interrupt.signal,
    });
    progress.finish();
    io.stdout.write(describeSiting(result, args.outDirectory, files));
    return 0;
  } catch (error) {
    progress.finish();
    return reportFailure(error, io);
  } finally {
    process.off('SIGINT', onInterrupt);
  }
}

function readSiteArguments(argv: string[]): SiteArguments | 'help' {
  const { options, positionals } = parseCommandLine(argv, {
    out: { type: 'string', short: 'o' },
    mode: { type: 'string', short: 'm' },
    stack: { type: 'string' },
    receptors: { type: 'string' },
    weights: { type: 'string' },
    candidates: { type: 'string' },
    'site-polygon': { type: 'string' },
    spacing: { type: 'string' },
    standard: { type: 'string' },
    level: { type: 'string' },
    'forward-runs': { type: 'string' },
    footprints: { type: 'boolean' },
    levels: { type: 'string', short: 'l' },
    quick: { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
  });
  if (options.help === true) return 'help';
  if (positionals.length === 0) throw new UsageError('site needs a SCENARIO file');
  if (positionals.length > 1) throw new UsageError(`site takes one SCENARIO file; got ${positionals.length}: ${positionals.join(' ')}`);
  if (typeof options.out !== 'string' || options.out === '') throw new UsageError('--out DIR is required: the folder to write the results into');
  const text = (name: string): string | undefined => (typeof options[name] === 'string' ? (options[name] as string) : undefined);
  const positive = (name: string, allowZero = false): number | undefined => {
    const value = text(name);
    if (value === undefined) return undefined;
    const number = /^[+]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(value.trim()) ? Number(value) : Number.NaN;
    if (!Number.isFinite(number) || (allowZero ? number < 0 : number <= 0)) {
      throw new UsageError(`--${name}: "${value}" is not allowed; give a ${allowZero ? 'number >= 0' : 'positive number'}`);
    }
    return number;
  };
  const list = (name: string): string[] | undefined => text(name)?.split(',').map((entry) => entry.trim()).filter((entry) => entry !== '');
  const receptorIds = list('receptors');
  let weightValues: number[] | undefined;
  const weights = list('weights');
  if (weights !== undefined) {
    weightValues = weights.map((entry, n) => {
      const value = Number(entry);
      if (!/^[+]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(entry) || !Number.isFinite(value)) {
        throw new UsageError(`--weights: entry ${n + 1} ("${entry}") is not allowed; give one number >= 0 per receptor, e.g. --weights 1,2,1`);
      }
      return value;
    });
  }
  const forwardRuns = positive('forward-runs', true);
  if (forwardRuns !== undefined && !Number.isInteger(forwardRuns)) throw new UsageError(`--forward-runs: ${forwardRuns} is not allowed; give a whole number >= 0`);
  return {
    scenarioPath: positionals[0],
    outDirectory: options.out,
    mode: text('mode') === undefined ? undefined : parseMode(text('mode') as string),
    stackId: text('stack'),
    receptorIds,
    weights: weightValues,
    candidatesPath: text('candidates'),
    sitePolygonPath: text('site-polygon'),
    spacing_m: positive('spacing'),
    standardName: text('standard'),
    level_ug_m3: positive('level'),
    forwardRuns,
    footprints: options.footprints === true,
    levels_ug_m3: text('levels') === undefined ? undefined : parseLevels(text('levels') as string),
    quick: options.quick === true,
  };
}

async function readJson(file: string, option: string): Promise<unknown> {
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch (error) {
    throw new UsageError(`${option}: cannot read ${file} (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})`);
  }
  try {
    return JSON.parse(text);
  } catch (error) {
    throw new UsageError(`${option}: ${file} is not JSON (${(error as Error).message})`);
  }
}

/** Read a file's JSON with a parser shared with the API; its complaints become usage errors. */
async function readWith<T>(file: string, option: string, parse: (data: unknown, field: string) => T): Promise<T> {
  const data = await readJson(file, option);
  try {
    return parse(data, option);
  } catch (error) {
    throw error instanceof SitingInputError ? new UsageError(error.message) : error;
  }
}

/** Candidates from a GeoJSON FeatureCollection of Points or a JSON list of {id, lon, lat}. */
export async function readCandidates(file: string): Promise<CandidateInput[]> {
  return readWith(file, '--candidates', parseCandidates);
}

/** The site polygon's outer ring from a GeoJSON Polygon, a Feature of one or a FeatureCollection of one. */
export async function readSitePolygon(file: string): Promise<[number, number][]> {
  return readWith(file, '--site-polygon', parseSitePolygon);
}

function reportFailure(error: unknown, io: CommandIO): number {
  if (error instanceof UsageError) {
    io.stderr.write(`plumeplan site: ${error.message}\n`);
    return 2;
  }
  if (error instanceof Error && error.name === 'AbortError') {
    io.stderr.write('plumeplan site: interrupted; no results written\n');
    return INTERRUPTED_EXIT_CODE;
  }
  if (error instanceof ScenarioInputError || error instanceof RangeError) {
    io.stderr.write(`plumeplan site: invalid input: ${error.message}\n`);
    return 2;
  }
  if (error instanceof UnavailableError) {
    const suggestion = error.alternativeMode === null ? '' : `; use --mode ${error.alternativeMode} meanwhile`;
    io.stderr.write(`plumeplan site: ${error.message}${suggestion}\n`);
    return 1;
  }
  const message = error instanceof Error ? error.message : String(error);
  io.stderr.write(`plumeplan site: internal failure: ${message}\n`);
  if (io.env.PLUMEPLAN_DEBUG === '1' && error instanceof Error && error.stack !== undefined) io.stderr.write(`${error.stack}\n`);
  else io.stderr.write('(set PLUMEPLAN_DEBUG=1 to see where it happened)\n');
  return 1;
}

function describeOffset(x_m: number, y_m: number): string {
  return `${Math.round(Math.abs(x_m))} m ${x_m < 0 ? 'west' : 'east'}, ${Math.round(Math.abs(y_m))} m ${y_m < 0 ? 'south' : 'north'}`;
}

const figure = (value: number): string => String(Number(value.toPrecision(3)));

/** What stdout says after siting: where the files went, the best position, the top candidates, the limits, the caution. */
export function describeSiting(result: SitingResult, directory: string, files: string[]): string {
  const { map, best, grid } = result;
  const what = result.statistic === 'mean' ? 'long-term mean' : 'steady-weather';
  const lines = [
    `${result.scenarioName}: siting ${result.stack.id} (${result.pollutant}), ${result.mode} mode, ` +
      `${map.mode === 'grid' ? `${map.solves} adjoint solves` : 'direct evaluation'}, grid ${grid.nx} x ${grid.ny} at ${grid.spacing_m} m, ` +
      `map ${result.mapSeconds.toFixed(1)} s, ${result.forwardRunCount} forward runs ${result.forwardSeconds.toFixed(1)} s`,
    `Results written to ${path.resolve(directory)}: ${files.join(', ')}`,
    `Map: ${map.combination}, ${what} PC [ug/m3] if the stack stood at each column`,
    `Best position (${best.within}, ${best.from === 'map' ? 'a map column' : best.from}): lat ${best.lat.toFixed(7)}, lon ${best.lon.toFixed(7)} ` +
      `(${describeOffset(best.x_m, best.y_m)} of the site): ${figure(best.combined_ug_m3)} ug/m3`,
  ];
  if (result.candidates.length > 0) {
    lines.push(`Candidates (${result.candidates.length}, best first; PC at ${result.receptors.map((receptor) => receptor.id).join(', ')}):`);
    for (const candidate of result.candidates.slice(0, 10)) {
      const percent = candidate.percentOfStandard === null ? '' : `, ${Number(candidate.percentOfStandard.toPrecision(2))} % of ${result.standard?.name}: ${candidate.verdict}`;
      lines.push(`  ${candidate.rank}. ${candidate.id}: ${candidate.receptorPc_ug_m3.map(figure).join(', ')} ug/m3${percent}`);
    }
    if (result.candidates.length > 10) lines.push(`  ... ${result.candidates.length - 10} more in candidates.csv`);
  }
  if (result.forwardAgreement !== null) {
    lines.push(`Check: forward runs at ${result.forwardRunCount} candidates agree with the map ${result.forwardAgreement === 0 ? 'exactly' : `within ${Number((100 * result.forwardAgreement).toPrecision(2))} % of the largest PC`}`);
  }
  lines.push(`Holds only for: ${result.limits.join('; ')}`);
  lines.push(`Caution: ${SCREENING_CAUTION}`);
  return `${lines.join('\n')}\n`;
}
