/**
 * `plumeplan compare A B --out DIR [--mode grid|gaussian] [--levels L1,L2,...]`: run two scenarios and
 * write how B differs from A: comparison.json, difference.geojson, and each run's own result folder
 * (DIR/a, DIR/b). Exit codes as `run`.
 */
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import type { Comparison } from '../../solver/assessment/comparison.ts';
import { buildComparisonFiles, type ComparisonSide } from '../analyses/comparison.ts';
import { SCREENING_CAUTION } from '../writers/caution.ts';
import { comparisonJson, type DifferenceCollection } from '../writers/comparison.ts';
import { buildComparisonReportFiles } from '../writers/comparisonReport.ts';
import { isFolder, readRunFolder } from '../writers/runFolder.ts';
import { writeResultFolder } from '../writers/writeResultFolder.ts';
import { parseCommandLine, parseLevels, parseMode, UsageError } from './args.ts';
import type { CommandIO } from './io.ts';
import { createProgressReporter } from './progress.ts';
import { checkOutFolder, commandLine, executeScenario, loadScenarioForCommand, reportFailure, type RunCommandOptions } from './run.ts';

export type { ComparisonSide };

export const COMPARE_USAGE = `usage: plumeplan compare A B --out DIR [--mode grid|gaussian] [--levels L1,L2,...]

Compares A and B, each a scenario file (format plumeplan.scenario/1), which is run, or a finished
run folder (what "plumeplan run" wrote), which is read back without solving again: a path that is
a folder is taken as a run folder, anything else as a scenario file. Writes into DIR:
  comparison.json     peaks, the change at each receptor both share (a_ug_m3, b_ug_m3,
                      delta_ug_m3, change_pct), the change of each footprint level's area, every
                      screening verdict that changes, notes (resampling when the grids differ)
  difference.geojson  bands of B - A on A's grid, increases and decreases apart (WGS 84)
  difference-map.svg, difference-map.png   the difference figure: B - A on a diverging scale
  comparison-report.html, comparison-report.pdf   the comparison report (A4): caution, both
                      scenarios, the difference figure, receptor changes, areas and verdicts that change
  a/, b/              each run's own result folder, as "plumeplan run" writes it (scenario files only)

Options:
  -o, --out DIR      folder for the results (required)
  -m, --mode MODE    grid or gaussian for the scenario files run; default: each one's solver.mode
  -l, --levels LIST  footprint levels in ug/m3 whose areas are compared (and A's and B's footprints);
                     default: round numbers across the larger run's range
  -h, --help         show this help

A run folder gives its ground field from ground.tif (the pixel at each cell centre of its own grid)
and its receptor figures and verdicts from summary.json, as rounded there; comparison.json says so.

Exit codes: 0 done, 2 invalid input, 1 internal failure, 130 interrupted.
Results are screening estimates only; see the caution in comparison.json.
`;

interface CompareArguments {
  pathA: string;
  pathB: string;
  outDirectory: string;
  mode?: SolverMode;
  levels_ug_m3?: number[];
}

function readCompareArguments(argv: string[]): CompareArguments | 'help' {
  const { options, positionals } = parseCommandLine(argv, {
    out: { type: 'string', short: 'o' },
    mode: { type: 'string', short: 'm' },
    levels: { type: 'string', short: 'l' },
    help: { type: 'boolean', short: 'h' },
  });
  if (options.help === true) return 'help';
  if (positionals.length !== 2) {
    throw new UsageError(`compare takes two scenario files or run folders, A and B; got ${positionals.length}${positionals.length > 0 ? `: ${positionals.join(' ')}` : ''}`);
  }
  if (typeof options.out !== 'string' || options.out === '') throw new UsageError('--out DIR is required: the folder to write the comparison into');
  return {
    pathA: positionals[0],
    pathB: positionals[1],
    outDirectory: options.out,
    mode: typeof options.mode === 'string' ? parseMode(options.mode) : undefined,
    levels_ug_m3: typeof options.levels === 'string' ? parseLevels(options.levels) : undefined,
  };
}

/**
 * Run `plumeplan compare`.
 *
 * @returns the exit code
 */
export async function compareCommand(argv: string[], io: CommandIO, options: RunCommandOptions = {}): Promise<number> {
  let args: CompareArguments | 'help';
  try {
    args = readCompareArguments(argv);
  } catch (error) {
    if (!(error instanceof UsageError)) throw error;
    io.stderr.write(`plumeplan compare: ${error.message}\n\n${COMPARE_USAGE}`);
    return 2;
  }
  if (args === 'help') {
    io.stdout.write(COMPARE_USAGE);
    return 0;
  }
  const progress = createProgressReporter(io.stderr, io.now);
  try {
    if (!(await checkOutFolder(args.outDirectory, io, 'compare'))) return 2;
    // a folder is a finished run, read back; a file is a scenario, checked now and run below
    const load = async (file: string) => {
      if (!(await isFolder(file))) return { scenario: await loadScenarioForCommand(file, io, 'compare') };
      try {
        return { folder: await readRunFolder(file) };
      } catch (error) {
        if (!(error instanceof RangeError)) throw error;
        io.stderr.write(`plumeplan compare: ${error.message}\n`);
        return { scenario: null };
      }
    };
    const inputA = await load(args.pathA);
    if (inputA.scenario === null) return 2;
    const inputB = await load(args.pathB);
    if (inputB.scenario === null) return 2;
    const run = (scenario: Scenario, share: number, offset: number, name: string) =>
      executeScenario(scenario, args.mode ?? scenario.solver.mode, (fraction, message) => progress.update(offset + share * fraction, `${name}: ${message}`), options.solve);
    const side = async (input: typeof inputA, file: string, offset: number, name: string): Promise<ComparisonSide> =>
      input.folder !== undefined
        ? { source: file, scenario: input.folder.scenario, result: input.folder.result, readBack: input.folder.notes }
        : { source: file, scenario: input.scenario!, result: await run(input.scenario!, 0.5, offset, name) };
    const sideA = await side(inputA, args.pathA, 0, 'A');
    const sideB = await side(inputB, args.pathB, 0.5, 'B');
    progress.update(1, 'comparing');
    const written = await writeComparisonFolder(args.outDirectory, sideA, sideB, args.levels_ug_m3, commandLine(argv).replace(/^plumeplan run/, 'plumeplan compare'));
    progress.finish();
    io.stdout.write(describeComparison(written.comparison, written.directory, written.files));
    return 0;
  } catch (error) {
    progress.finish();
    return reportFailure(error, io, 'compare');
  }
}

/**
 * Compare two runs and write the comparison folder (comparison.json, difference.geojson, a/, b/).
 *
 * @param directory the folder (created if missing)
 * @param a the reference side (its source: the scenario file)
 * @param b the other side
 * @param levels_ug_m3 levels whose areas are compared; default round numbers across the larger peak
 * @param command the command as typed, for the report's reproducibility block
 * @returns the comparison, the folder and the files written
 */
export async function writeComparisonFolder(
  directory: string,
  a: ComparisonSide,
  b: ComparisonSide,
  levels_ug_m3?: number[],
  command?: string,
): Promise<{ comparison: Comparison; directory: string; files: string[]; difference: DifferenceCollection }> {
  const built = buildComparisonFiles(a, b, levels_ug_m3);
  await mkdir(directory, { recursive: true });
  // a run folder read back has its own folder already
  const own = [a, b].flatMap((side, k) => (side.readBack === undefined ? [[side, k === 0 ? 'a' : 'b'] as const] : []));
  for (const [side, name] of own) await writeResultFolder(path.join(directory, name), side.scenario, side.result, built.sideOptions);
  for (const [name, text] of built.files) await writeFile(path.join(directory, name), text, 'utf8');
  const reportFiles = await buildComparisonReportFiles({
    a: { path: a.source, scenario: a.scenario, result: a.result },
    b: { path: b.source, scenario: b.scenario, result: b.result },
    comparison: built.comparison,
    difference: built.difference,
    levelsBasis: built.levelsBasis,
    command,
  });
  for (const [name, data] of reportFiles) await writeFile(path.join(directory, name), data);
  const names = [...built.files.map(([name]) => name), ...reportFiles.map(([name]) => name), ...own.map(([, name]) => `${name}/`)];
  return { comparison: built.comparison, directory, files: names, difference: built.difference };
}

/** What stdout says after a comparison. */
export function describeComparison(comparison: Comparison, directory: string, files: string[]): string {
  const json = comparisonJson(comparison, '');
  const lines = [
    `Compared A: ${comparison.a.label}`,
    `    with B: ${comparison.b.label}`,
    `Results written to ${path.resolve(directory)}: ${files.join(', ')}`,
  ];
  if (comparison.identical) lines.push('B is identical to A: every difference is exactly zero');
  else {
    const { a, b, largestIncrease, largestDecrease } = json as {
      a: { peak_ug_m3: number };
      b: { peak_ug_m3: number };
      largestIncrease: { delta_ug_m3: number };
      largestDecrease: { delta_ug_m3: number };
    };
    lines.push(`Peak ${a.peak_ug_m3} -> ${b.peak_ug_m3} ug/m3; largest increase ${largestIncrease.delta_ug_m3}, largest decrease ${largestDecrease.delta_ug_m3} ug/m3`);
  }
  const receptors = (json.receptors as { id: string; a_ug_m3: number; b_ug_m3: number; delta_ug_m3: number; change_pct: number | null }[]) ?? [];
  if (receptors.length > 0) {
    lines.push('Receptors (A -> B, ug/m3):');
    for (const r of receptors) lines.push(`  ${r.id}: ${r.a_ug_m3} -> ${r.b_ug_m3} (${r.delta_ug_m3 >= 0 ? '+' : ''}${r.delta_ug_m3}${r.change_pct === null ? '' : `, ${r.change_pct >= 0 ? '+' : ''}${r.change_pct} %`})`);
  }
  const areas = (json.levels as { areas: { level_ug_m3: number; a_m2: number; b_m2: number; change_pct: number | null }[] }).areas;
  if (areas.length > 0) {
    const hectares = (m2: number): number => Number((m2 / 10_000).toPrecision(2));
    lines.push('Ground at or above each level (ha, A -> B):');
    for (const level of areas) lines.push(`  ${level.level_ug_m3} ug/m3: ${hectares(level.a_m2)} -> ${hectares(level.b_m2)}${level.change_pct === null ? '' : ` (${level.change_pct >= 0 ? '+' : ''}${level.change_pct} %)`}`);
  }
  if (comparison.verdictChanges.length > 0) {
    lines.push('Screening verdicts that change:');
    for (const change of comparison.verdictChanges) lines.push(`  ${change.standard} at ${change.where}: ${change.a} -> ${change.b}`);
  }
  for (const note of comparison.notes) lines.push(`Note: ${note}`);
  lines.push(`Caution: ${SCREENING_CAUTION}`);
  return `${lines.join('\n')}\n`;
}
