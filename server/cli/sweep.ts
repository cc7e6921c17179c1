/**
 * `plumeplan sweep SCENARIO --parameter NAME --values V1,V2,... --out DIR [--source ID] [--mode grid|gaussian]`:
 * run one parameter over a list of values and write sweep.csv (the table), sweep.svg (the chart of PC
 * against the parameter) and sweep.json. Exit codes as `run`.
 */
import path from 'node:path';
import type { SolverMode } from '../../scenarios/format/types.ts';
import { SWEEP_PARAMETERS, type SweepParameter, type SweepResult } from '../../solver/assessment/sweep.ts';
import { buildSweepFiles, computeSweep } from '../analyses/sweep.ts';
import { SCREENING_CAUTION } from '../writers/caution.ts';
import { parseCommandLine, parseMode, UsageError } from './args.ts';
import type { CommandIO } from './io.ts';
import { onMemberThreads, writeBuiltFiles } from './memberCommand.ts';
import { createProgressReporter } from './progress.ts';
import { checkOutFolder, loadScenarioForCommand, reportFailure } from './run.ts';

const PARAMETER_LINES = Object.entries(SWEEP_PARAMETERS)
  .map(([name, p]) => `  ${name.padEnd(24)}${p.description} [${p.unit}]${p.perSource ? ' (--source)' : ''}`)
  .join('\n');

export const SWEEP_USAGE = `usage: plumeplan sweep SCENARIO --parameter NAME --values V1,V2,... --out DIR [--source ID] [--mode grid|gaussian]

Runs the scenario once for each value of one parameter (members in parallel in worker threads;
an emission sweep needs one run, the figures scaling with the emission) and writes into DIR:
  sweep.csv   one row per value: the highest ground-level PC and the PC at each receptor
              (and each assessed standard's highest figure), ug/m3
  sweep.svg   the chart of those PCs against the parameter
  sweep.json  the same figures, the notes and the caution

Parameters:
${PARAMETER_LINES}

Options:
  -P, --parameter NAME  the parameter to vary (above)
  -V, --values LIST     its values, comma-separated, e.g. 20,30,40,50
  -s, --source ID       the source, for a per-source parameter (default: the only candidate)
  -o, --out DIR         folder for the results (required)
  -m, --mode MODE       grid or gaussian; default: the scenario's solver.mode
  -h, --help            show this help

Exit codes: 0 done, 2 invalid input, 1 internal failure, 130 interrupted.
Results are screening estimates only; see the caution in sweep.json.
`;

interface SweepArguments {
  scenarioPath: string;
  outDirectory: string;
  parameter: SweepParameter;
  values: number[];
  sourceId?: string;
  mode?: SolverMode;
}

/** Read a comma-separated list of finite numbers, naming the option and the bad entry. */
export function parseNumberList(text: string, option: string): number[] {
  return text.split(',').map((entry, index) => {
    const trimmed = entry.trim();
    const value = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(trimmed) ? Number(trimmed) : Number.NaN;
    if (!Number.isFinite(value)) throw new UsageError(`${option}: entry ${index + 1} ("${trimmed}") is not a number; give numbers separated by commas`);
    return value;
  });
}

function readSweepArguments(argv: string[]): SweepArguments | 'help' {
  const { options, positionals } = parseCommandLine(argv, {
    parameter: { type: 'string', short: 'P' },
    values: { type: 'string', short: 'V' },
    source: { type: 'string', short: 's' },
    out: { type: 'string', short: 'o' },
    mode: { type: 'string', short: 'm' },
    help: { type: 'boolean', short: 'h' },
  });
  if (options.help === true) return 'help';
  if (positionals.length !== 1) throw new UsageError(`sweep takes one SCENARIO file; got ${positionals.length}`);
  if (typeof options.out !== 'string' || options.out === '') throw new UsageError('--out DIR is required: the folder to write the sweep into');
  const parameter = options.parameter;
  if (typeof parameter !== 'string' || !(parameter in SWEEP_PARAMETERS)) {
    throw new UsageError(`--parameter: ${parameter === undefined ? 'missing' : JSON.stringify(parameter)}; use one of ${Object.keys(SWEEP_PARAMETERS).join(', ')}`);
  }
  if (typeof options.values !== 'string') throw new UsageError('--values LIST is required, e.g. --values 20,30,40');
  return {
    scenarioPath: positionals[0],
    outDirectory: options.out,
    parameter: parameter as SweepParameter,
    values: parseNumberList(options.values, '--values'),
    sourceId: typeof options.source === 'string' ? options.source : undefined,
    mode: typeof options.mode === 'string' ? parseMode(options.mode) : undefined,
  };
}

/** The members as an aligned table: the value, the highest ground PC, each receptor's PC (3 significant figures). */
function memberTable(sweep: SweepResult): string[] {
  const figure = (value: number): string => String(Number(value.toPrecision(3)));
  const header = [`${sweep.parameter} [${sweep.unit}]`, 'ground max ug/m3', ...sweep.receptorIds];
  const rows = sweep.members.map((m) => [String(m.value), figure(m.groundMax_ug_m3), ...m.receptors_ug_m3.map(figure)]);
  const widths = header.map((title, c) => Math.max(title.length, ...rows.map((row) => row[c].length)));
  return [header, ...rows].map((row) => `  ${row.map((cell, c) => cell.padEnd(widths[c])).join('  ').trimEnd()}`);
}

/** Run `plumeplan sweep`; returns the exit code. */
export async function sweepCommand(argv: string[], io: CommandIO): Promise<number> {
  let args: SweepArguments | 'help';
  try {
    args = readSweepArguments(argv);
  } catch (error) {
    if (!(error instanceof UsageError)) throw error;
    io.stderr.write(`plumeplan sweep: ${error.message}\n\n${SWEEP_USAGE}`);
    return 2;
  }
  if (args === 'help') {
    io.stdout.write(SWEEP_USAGE);
    return 0;
  }
  const progress = createProgressReporter(io.stderr, io.now);
  try {
    if (!(await checkOutFolder(args.outDirectory, io, 'sweep'))) return 2;
    const scenario = await loadScenarioForCommand(args.scenarioPath, io, 'sweep');
    if (scenario === null) return 2;
    const mode = args.mode ?? scenario.solver.mode;
    const request = { parameter: args.parameter, values: args.values, sourceId: args.sourceId };
    const sweep = await onMemberThreads(scenario, mode, progress, (runner, control) => computeSweep(scenario, request, runner, control));
    const files = buildSweepFiles(sweep, scenario.name);
    await writeBuiltFiles(args.outDirectory, files);
    progress.finish();
    io.stdout.write(
      `${scenario.name}: ${sweep.members.length} values of ${sweep.parameter}${sweep.sourceId ? ` (${sweep.sourceId})` : ''}, ${sweep.runs} ${sweep.runs === 1 ? 'run' : 'runs'}, ${mode} mode\n` +
        `Results written to ${path.resolve(args.outDirectory)}: ${files.map(([name]) => name).join(', ')}\n` +
        `${memberTable(sweep).join('\n')}\n` +
        `Caution: ${SCREENING_CAUTION}\n`,
    );
    return 0;
  } catch (error) {
    progress.finish();
    return reportFailure(error, io, 'sweep');
  }
}
