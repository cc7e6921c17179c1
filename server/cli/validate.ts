/**
 * `plumeplan validate FILE...`: checks scenario files without running them (the schema, a weather
 * CSV, and that sources and receptors fit the grid) and says which grid a run would use.
 * Exit codes: 0 every file valid, 2 invalid input (each issue names the field), 1 internal failure.
 */
import { loadScenarioFile } from '../scenarioFiles/load.ts';
import { formatIssues } from '../../scenarios/format/schema.ts';
import { examineScenarioGeometry } from '../scenarioFiles/semantics.ts';
import { formatWarnings } from '../../solver/diagnostics/plausibility.ts';
import { parseCommandLine, UsageError } from './args.ts';

export const VALIDATE_USAGE = `usage: plumeplan validate FILE [FILE...]

Checks scenario files (format plumeplan.scenario/1) without running them: every field against the
format, the weather CSV an hourly series names, and that the sources and receptors fit the grid
(including its memory estimate). Prints each file's grid, or every issue with its field path.

Exit codes: 0 every file valid, 2 invalid input, 1 internal failure.

Options:
  -h, --help   show this help
`;

/** Where the command writes; tests pass their own. */
export interface CommandOutput {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
}

const processOutput: CommandOutput = {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
};

/**
 * Runs `plumeplan validate`.
 * @param argv the arguments after `validate`
 * @param output where to write (default: the process's stdout and stderr)
 * @returns the exit code: 0 all valid (or --help), 2 invalid input or usage, 1 internal failure
 * @example await validateCommand(['scenarios/demo/scenario.json']) // prints "...: valid (2 sources, 3 receptors, grid 200 x 200 x 24)"
 */
export async function validateCommand(argv: string[], output: CommandOutput = processOutput): Promise<number> {
  let files: string[];
  try {
    const { options, positionals } = parseCommandLine(argv, { help: { type: 'boolean', short: 'h' } });
    if (options.help) {
      output.stdout(VALIDATE_USAGE);
      return 0;
    }
    if (positionals.length === 0) throw new UsageError('validate needs a scenario FILE');
    files = positionals;
  } catch (error) {
    if (!(error instanceof UsageError)) throw error;
    output.stderr(`plumeplan validate: ${error.message}\n\n${VALIDATE_USAGE}`);
    return 2;
  }

  let anyInvalid = false;
  let anyInternalFailure = false;
  for (const file of files) {
    try {
      const outcome = await loadScenarioFile(file);
      if (!outcome.ok) {
        const count = outcome.issues.length;
        output.stderr(`${file}: invalid, ${count} ${count === 1 ? 'issue' : 'issues'}:\n`);
        output.stderr(`${indent(formatIssues(outcome.issues))}\n`);
        anyInvalid = true;
        continue;
      }
      // loadScenarioFile has checked the geometry; build it once more to name the grid.
      const { geometry, warnings } = examineScenarioGeometry(outcome.scenario);
      const { sources, receptors } = outcome.scenario;
      const grid = geometry ? `grid ${geometry.grid.nx} x ${geometry.grid.ny} x ${geometry.grid.nz}` : 'grid not built';
      output.stdout(
        `${file}: valid (${sources.length} ${sources.length === 1 ? 'source' : 'sources'}, ` +
          `${receptors.length} ${receptors.length === 1 ? 'receptor' : 'receptors'}, ${grid})\n`,
      );
      // Warnings are not errors: the exit code stays 0. A run prints and records the same ones.
      for (const line of formatWarnings(warnings)) output.stdout(`  warning: ${line}\n`);
    } catch (error) {
      // Same convention as server/cli/main.ts: the stack only with PLUMEPLAN_DEBUG=1.
      const debug = process.env.PLUMEPLAN_DEBUG === '1' && error instanceof Error && error.stack !== undefined;
      output.stderr(
        `${file}: internal failure while checking it (please report this): ` +
          `${debug ? (error as Error).stack : error instanceof Error ? error.message : String(error)}\n`,
      );
      anyInternalFailure = true;
    }
  }
  return anyInternalFailure ? 1 : anyInvalid ? 2 : 0;
}

function indent(lines: string): string {
  return lines
    .split('\n')
    .map((line) => `  ${line}`)
    .join('\n');
}
