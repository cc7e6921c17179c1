/**
 * The `plumeplan` command line: dispatches to `run`, `site`, `validate`, `compare`, `sweep` and `stack-height`,
 * answers `--help` and `--version`.
 * `bin/plumeplan.mjs` calls `main` and sets the process exit code from its result.
 */
import { readFileSync } from 'node:fs';
import { processIO, type CommandIO } from './io.ts';
import { runCommand, type RunCommandOptions } from './run.ts';
import { siteCommand } from './site.ts';
import { validateCommand } from './validate.ts';
import { compareCommand } from './compare.ts';
import { sweepCommand } from './sweep.ts';
import { stackHeightCommand } from './stackHeight.ts';

export const MAIN_USAGE = `plumeplan: screening of planned emission sources (screening estimates only)

usage:
  plumeplan run SCENARIO --out DIR [--mode grid|gaussian] [--levels L1,L2,...]
  plumeplan site SCENARIO --out DIR [--candidates FILE] [--site-polygon FILE] [options]
  plumeplan validate FILE [FILE...]
  plumeplan compare A B --out DIR [--mode grid|gaussian] [--levels L1,L2,...]
  plumeplan sweep SCENARIO --parameter NAME --values V1,V2,... --out DIR [--source ID]
  plumeplan stack-height SCENARIO --out DIR (--target UG_M3 | --target-percent P --standard NAME)
  plumeplan --help | --version

commands:
  run        run a scenario; write summary.json, receptors.csv and footprint.geojson into DIR
  site       map where on the site the stack least affects the receptors; rank candidate positions
  validate   check scenario files without running them
  compare    run two scenarios and write how B differs from A
  sweep      run one parameter over a list of values: table and chart of PC against it
  stack-height  the lowest stack height at which the highest PC falls below a target

Run "plumeplan COMMAND --help" for a command's options.
Exit codes: 0 done, 2 invalid input, 1 internal failure, 130 interrupted.
`;

/** The version in package.json. */
export function plumeplanVersion(): string {
  const packageJson = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
  return packageJson.version;
}

/**
 * Run the command line.
 *
 * @param argv the arguments after the program name, e.g. ['run', 'scenario.json', '--out', 'out']
 * @param io streams, environment and clock; default: the process's own
 * @param options the steady solver `run` uses (default: in-process)
 * @returns the exit code: 0 done, 2 invalid input, 1 internal failure
 * @example process.exitCode = await main(process.argv.slice(2));
 */
export async function main(argv: string[], io: CommandIO = processIO(), options: RunCommandOptions = {}): Promise<number> {
  const [command, ...rest] = argv;
  try {
    switch (command) {
      case undefined:
        io.stderr.write(`plumeplan: no command given\n\n${MAIN_USAGE}`);
        return 2;
      case '--help':
      case '-h':
      case 'help':
        io.stdout.write(MAIN_USAGE);
        return 0;
      case '--version':
      case '-v':
        io.stdout.write(`plumeplan ${plumeplanVersion()}\n`);
        return 0;
      case 'run':
        return await runCommand(rest, io, options);
      case 'site':
        return await siteCommand(rest, io, { solve: options.solve });
      case 'compare':
        return await compareCommand(rest, io, options);
      case 'sweep':
        return await sweepCommand(rest, io);
      case 'stack-height':
        return await stackHeightCommand(rest, io);
      case 'validate':
        return await validateCommand(rest, {
          stdout: (text) => io.stdout.write(text),
          stderr: (text) => io.stderr.write(text),
        });
      default: {
        const what = command.startsWith('-') ? `unknown option ${command}` : `unknown command "${command}"`;
        io.stderr.write(`plumeplan: ${what}\n\n${MAIN_USAGE}`);
        return 2;
      }
    }
  } catch (error) {
    // Commands report their own failures; this is the last line of defence.
    io.stderr.write(`plumeplan: internal failure: ${error instanceof Error ? error.message : String(error)}\n`);
    if (io.env.PLUMEPLAN_DEBUG === '1' && error instanceof Error && error.stack !== undefined) io.stderr.write(`${error.stack}\n`);
    return 1;
  }
}
