/**
 * `plumeplan stack-height SCENARIO --out DIR (--target UG_M3 | --target-percent P --standard NAME)
 *   [--at ground|ID,ID] [--min M] [--max M] [--tolerance M] [--source ID] [--mode grid|gaussian]`:
 * the lowest stack height (within the tolerance) at which the highest PC falls below the target, with
 * the curve of PC against height: stack-height.json, stack-height.csv, stack-height.svg. Exit codes as `run`.
 */
import path from 'node:path';
import type { SolverMode } from '../../scenarios/format/types.ts';
import { buildStackHeightFiles, computeStackHeight, resolveStackHeightTarget, TargetError, type StackHeightRequest } from '../analyses/stackHeight.ts';
import { SCREENING_CAUTION } from '../writers/caution.ts';
import { parseCommandLine, parseMode, UsageError } from './args.ts';
import type { CommandIO } from './io.ts';
import { onMemberThreads, writeBuiltFiles } from './memberCommand.ts';
import { createProgressReporter } from './progress.ts';
import { checkOutFolder, loadScenarioForCommand, reportFailure } from './run.ts';
import { parseNumberList } from './sweep.ts';

export const STACK_HEIGHT_USAGE = `usage: plumeplan stack-height SCENARIO --out DIR (--target UG_M3 | --target-percent P --standard NAME)
         [--at ground|ID,ID,...] [--min M] [--max M] [--tolerance M] [--source ID] [--mode grid|gaussian]

Finds the lowest stack height, within the tolerance, at which the highest process contribution (on
the ground, or at the receptors named) falls below a target, by a bracketing search over runs (in
parallel in worker threads), and writes into DIR:
  stack-height.json  the height (or that none in the range meets the target), the bracket, the
                     downwash check at that height, the curve and the caution
  stack-height.csv   the curve: height_m, pc_ug_m3, meets_target
  stack-height.svg   the chart of PC against height with the target

Options:
  -t, --target UG_M3        the target PC [ug/m3]
  -p, --target-percent P    the target as P % of the standard named by --standard (e.g. 1 for 1 %);
  -S, --standard NAME       the figure compared is then that standard's (the assessed pollutant: NO2
                            from NOx by the stated ratio)
  -a, --at WHERE            "ground" (default) or receptor ids, comma-separated
      --min M, --max M      the allowed heights [m] (default: 1 m to 200 m, below the grid's top)
      --tolerance M         width of the final bracket [m] (default 1)
  -s, --source ID           the stack (default: the only point source)
  -o, --out DIR             folder for the results (required)
  -m, --mode MODE           grid or gaussian; default: the scenario's solver.mode
  -h, --help                show this help

Exit codes: 0 done, 2 invalid input, 1 internal failure, 130 interrupted.
Results are screening estimates only; see the caution in stack-height.json.
`;

interface StackHeightArguments {
  scenarioPath: string;
  outDirectory: string;
  target_ug_m3?: number;
  targetPercent?: number;
  standard?: string;
  at: 'ground' | string[];
  min_m: number;
  max_m: number;
  tolerance_m: number;
  sourceId?: string;
  mode?: SolverMode;
}

function single(text: unknown, option: string): number | undefined {
  if (typeof text !== 'string') return undefined;
  const values = parseNumberList(text, option);
  if (values.length !== 1) throw new UsageError(`${option}: give one number, not ${values.length}`);
  return values[0];
}

function readArguments(argv: string[]): StackHeightArguments | 'help' {
  const { options, positionals } = parseCommandLine(argv, {
    out: { type: 'string', short: 'o' },
    target: { type: 'string', short: 't' },
    'target-percent': { type: 'string', short: 'p' },
    standard: { type: 'string', short: 'S' },
    at: { type: 'string', short: 'a' },
    min: { type: 'string' },
    max: { type: 'string' },
    tolerance: { type: 'string' },
    source: { type: 'string', short: 's' },
    mode: { type: 'string', short: 'm' },
    help: { type: 'boolean', short: 'h' },
  });
  if (options.help === true) return 'help';
  if (positionals.length !== 1) throw new UsageError(`stack-height takes one SCENARIO file; got ${positionals.length}`);
  if (typeof options.out !== 'string' || options.out === '') throw new UsageError('--out DIR is required: the folder to write the result into');
  const target = single(options.target, '--target');
  const percent = single(options['target-percent'], '--target-percent');
  const standard = typeof options.standard === 'string' ? options.standard : undefined;
  if ((target === undefined) === (percent === undefined)) throw new UsageError('give either --target UG_M3 or --target-percent P with --standard NAME');
  if (percent !== undefined && standard === undefined) throw new UsageError('--target-percent needs --standard NAME: the standard whose limit it is a percentage of');
  if (target !== undefined && !(target > 0)) throw new UsageError(`--target: ${target} is not allowed (a concentration > 0 ug/m3)`);
  if (percent !== undefined && !(percent > 0)) throw new UsageError(`--target-percent: ${percent} is not allowed (a percentage > 0)`);
  const atText = typeof options.at === 'string' ? options.at.trim() : 'ground';
  return {
    scenarioPath: positionals[0],
    outDirectory: options.out,
    target_ug_m3: target,
    targetPercent: percent,
    standard,
    at: atText === 'ground' ? 'ground' : atText.split(',').map((id) => id.trim()),
    min_m: single(options.min, '--min') ?? 1,
    max_m: single(options.max, '--max') ?? 200,
    tolerance_m: single(options.tolerance, '--tolerance') ?? 1,
    sourceId: typeof options.source === 'string' ? options.source : undefined,
    mode: typeof options.mode === 'string' ? parseMode(options.mode) : undefined,
  };
}

/** Run `plumeplan stack-height`; returns the exit code. */
export async function stackHeightCommand(argv: string[], io: CommandIO): Promise<number> {
  let args: StackHeightArguments | 'help';
  try {
    args = readArguments(argv);
  } catch (error) {
    if (!(error instanceof UsageError)) throw error;
    io.stderr.write(`plumeplan stack-height: ${error.message}\n\n${STACK_HEIGHT_USAGE}`);
    return 2;
  }
  if (args === 'help') {
    io.stdout.write(STACK_HEIGHT_USAGE);
    return 0;
  }
  const progress = createProgressReporter(io.stderr, io.now);
  try {
    if (!(await checkOutFolder(args.outDirectory, io, 'stack-height'))) return 2;
    const scenario = await loadScenarioForCommand(args.scenarioPath, io, 'stack-height');
    if (scenario === null) return 2;
    const request: StackHeightRequest = {
      target_ug_m3: args.target_ug_m3,
      targetPercent: args.targetPercent,
      standard: args.standard,
      at: args.at,
      minHeight_m: args.min_m,
      maxHeight_m: args.max_m,
      tolerance_m: args.tolerance_m,
      sourceId: args.sourceId,
    };
    let target: { target_ug_m3: number; basis: string };
    try {
      target = resolveStackHeightTarget(scenario, request);
    } catch (error) {
      if (!(error instanceof TargetError)) throw error;
      io.stderr.write(`plumeplan stack-height: --${error.field}: ${error.message}\n`);
      return 2;
    }
    const mode = args.mode ?? scenario.solver.mode;
    const result = await onMemberThreads(scenario, mode, progress, (runner, control) => computeStackHeight(scenario, request, target.target_ug_m3, runner, control));
    const files = buildStackHeightFiles(result, scenario.name, target.basis);
    await writeBuiltFiles(args.outDirectory, files);
    progress.finish();
    io.stdout.write(
      `${scenario.name}: stack ${result.sourceId}, target ${target.basis}, ${result.runs} runs, ${mode} mode\n` +
        `${result.found ? 'Found' : 'Not found'}: ${result.message}\n` +
        `Results written to ${path.resolve(args.outDirectory)}: ${files.map(([name]) => name).join(', ')}\n` +
        `Caution: ${SCREENING_CAUTION}\n`,
    );
    return 0;
  } catch (error) {
    progress.finish();
    return reportFailure(error, io, 'stack-height');
  }
}
