/**
 * Command-line argument parsing: Node's own `util.parseArgs` in strict mode, with every complaint turned
 * into a UsageError that names the option and says what is allowed (the command prints it with its
 * usage and exits 2).
 */
import { parseArgs } from 'node:util';
import type { SolverMode } from '../../scenarios/format/types.ts';

/** Bad command-line input: the command prints the message and its usage, and exits 2. */
export class UsageError extends Error {
  override name = 'UsageError';
}

export interface OptionSpec {
  type: 'string' | 'boolean';
  /** one-letter alias, e.g. "h" for --help */
  short?: string;
}

export interface ParsedCommandLine {
  /** option values by long name; absent options are missing */
  options: Record<string, string | boolean | undefined>;
  positionals: string[];
}

/**
 * Parse a command's arguments.
 *
 * @param argv the arguments after the command name
 * @param optionSpecs the options the command accepts, by long name
 * @returns option values and positional arguments
 * @throws UsageError for an unknown option, a missing option value, or an option given twice
 * @example
 *   parseCommandLine(['demo.json', '--out', 'out'], { out: { type: 'string' } })
 *   // { options: { out: 'out' }, positionals: ['demo.json'] }
 */
export function parseCommandLine(argv: string[], optionSpecs: Record<string, OptionSpec>): ParsedCommandLine {
  let parsed;
  try {
    parsed = parseArgs({ args: argv, options: optionSpecs, strict: true, allowPositionals: true, tokens: true });
  } catch (error) {
    throw new UsageError(describeParseError(error));
  }
  const seen = new Set<string>();
  for (const token of parsed.tokens) {
    if (token.kind !== 'option') continue;
    if (seen.has(token.name)) throw new UsageError(`--${token.name} is given more than once; give it once`);
    seen.add(token.name);
  }
  return { options: { ...parsed.values }, positionals: parsed.positionals };
}

/** Node's messages are clear but long; keep their first sentence and the option's name. */
function describeParseError(error: unknown): string {
  const message = error instanceof Error ? error.message : String(error);
  const code = (error as { code?: string }).code;
  if (code === 'ERR_PARSE_ARGS_UNKNOWN_OPTION') {
    const option = /'([^']+)'/.exec(message)?.[1] ?? message;
    return `unknown option ${option}`;
  }
  if (code === 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE') {
    // Node names the option as '-o, --out <value>': prefer the long name.
    const option = /(--[\w-]+)/.exec(message)?.[1] ?? /'(-\w)/.exec(message)?.[1] ?? 'an option';
    if (/does not take an argument/.test(message)) return `${option} takes no value`;
    return `${option} needs a value (write ${option} VALUE, or ${option}=VALUE for a value starting with "-")`;
  }
  if (code === 'ERR_PARSE_ARGS_UNEXPECTED_POSITIONAL') return message.split('\n')[0];
  return message;
}

/** The solver modes `--mode` accepts. */
export const SOLVER_MODES: readonly SolverMode[] = ['grid', 'gaussian'];

/**
 * Read `--mode`.
 *
 * @throws UsageError naming --mode, the value and the allowed modes
 */
export function parseMode(text: string): SolverMode {
  if ((SOLVER_MODES as readonly string[]).includes(text)) return text as SolverMode;
  throw new UsageError(`--mode: "${text}" is not a mode; use one of ${SOLVER_MODES.join(', ')}`);
}

/**
 * Read `--levels`: comma-separated positive numbers in ug/m3, strictly increasing.
 *
 * @param text e.g. "1,2,5,10"
 * @returns the levels [ug/m3]
 * @throws UsageError naming --levels, the bad entry and what is allowed
 * @example parseLevels('0.5, 1, 2') // [0.5, 1, 2]
 */
export function parseLevels(text: string): number[] {
  const entries = text.split(',').map((entry) => entry.trim());
  const levels = entries.map((entry, index) => {
    // Number('') is 0 and Number('0x10') is 16: accept plain decimal numbers only.
    const plainNumber = /^[+]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(entry);
    const value = plainNumber ? Number(entry) : Number.NaN;
    if (!Number.isFinite(value) || value <= 0) {
      throw new UsageError(
        `--levels: entry ${index + 1} ("${entry}") is not allowed; give positive numbers in ug/m3 separated by commas, e.g. --levels 1,2,5,10`,
      );
    }
    return value;
  });
  for (let index = 1; index < levels.length; index += 1) {
    if (levels[index] <= levels[index - 1]) {
      throw new UsageError(
        `--levels: ${levels[index]} does not exceed ${levels[index - 1]} before it; levels must increase, e.g. --levels 1,2,5,10`,
      );
    }
  }
  return levels;
}
