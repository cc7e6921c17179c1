/**
 * Reading a scenario file: the JSON text (syntax errors with line and column), the schema
 * (`parseScenario`), an hourly series' CSV file (relative to the scenario file), then the checks that
 * need the local grid (`checkScenarioGeometry`). Everything found is reported together where the
 * steps allow: a file that is not JSON stops at the syntax error, and the grid checks wait for a
 * scenario that passes the schema.
 *
 * Example:
 *   const outcome = await loadScenarioFile('scenarios/demo/scenario.json');
 *   if (!outcome.ok) console.error(formatIssues(outcome.issues));
 */
import { readFile } from 'node:fs/promises';
import { dirname, resolve } from 'node:path';
import { parseScenario, type ParseOutcome, type ScenarioIssue } from '../../scenarios/format/schema.ts';
import { checkScenarioGeometry } from './semantics.ts';
import { parseWeatherCsv } from '../../scenarios/format/weatherCsv.ts';

/** What loading gives: the parse outcome, plus the folder relative paths in the file resolve against. */
export type LoadOutcome = ParseOutcome & {
  /** absolute folder of the scenario file */
  baseDir: string;
};

/**
 * Reads, checks and completes a scenario file.
 * @param path the scenario file (`*.scenario.json` or `scenario.json`), absolute or relative to the working folder
 * @returns `{ ok: true, scenario, baseDir }` with `weather.hours` filled from a CSV where one is named,
 *   or `{ ok: false, issues, baseDir }` with every issue found
 */
export async function loadScenarioFile(path: string): Promise<LoadOutcome> {
  const absolutePath = resolve(path);
  const baseDir = dirname(absolutePath);
  const fail = (issues: ScenarioIssue[]): LoadOutcome => ({ ok: false, issues, baseDir });

  let text: string;
  try {
    text = await readFile(absolutePath, 'utf8');
  } catch (error) {
    return fail([{ path: '(file)', value: path, message: `must be a readable scenario file (${describeFileError(error)})` }]);
  }

  const json = parseJsonText(text.replace(/^\uFEFF/, ''), path);
  if (!json.ok) return fail([json.issue]);
  const raw = json.value;

  const parsed = parseScenario(raw);
  const issues: ScenarioIssue[] = parsed.ok ? [] : [...parsed.issues];

  // An hourly series from a CSV: read it even when the rest has issues, so all are reported at once.
  const weather = (raw as { weather?: unknown } | null)?.weather as { kind?: unknown; csv?: unknown; hours?: unknown } | undefined;
  let csvHours = null;
  if (weather?.kind === 'hourly' && typeof weather.csv === 'string' && weather.csv !== '' && weather.hours === undefined) {
    const csvPath = resolve(baseDir, weather.csv);
    let csvText: string | null = null;
    try {
      csvText = await readFile(csvPath, 'utf8');
    } catch (error) {
      issues.push({
        path: 'weather.csv',
        value: weather.csv,
        message: `must name a readable CSV file, relative to the scenario file; ${csvPath}: ${describeFileError(error)}`,
      });
    }
    if (csvText !== null) {
      const csv = parseWeatherCsv(csvText, `weather.csv (${weather.csv})`);
      if (csv.ok) csvHours = csv.hours;
      else issues.push(...csv.issues);
    }
  }
  if (!parsed.ok || issues.length > 0) return fail(issues);

  const scenario = parsed.scenario;
  if (scenario.weather.kind === 'hourly' && csvHours !== null) scenario.weather.hours = csvHours;

  const geometryIssues = checkScenarioGeometry(scenario);
  if (geometryIssues.length > 0) return fail(geometryIssues);
  return { ok: true, scenario, baseDir };
}

/** "no such file or directory", "permission denied", ... from a Node file-system error. */
function describeFileError(error: unknown): string {
  const code = (error as { code?: string }).code;
  switch (code) {
    case 'ENOENT':
      return 'no such file';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    case 'EISDIR':
      return 'it is a folder, not a file';
    default:
      return error instanceof Error ? error.message : String(error);
  }
}

type JsonTextOutcome = { ok: true; value: unknown } | { ok: false; issue: ScenarioIssue };

/**
 * JSON.parse, with a syntax error turned into an issue naming the line and column. Node 20's own
 * messages give a character offset at best, so on failure a small scanner finds where and why.
 * @param text the file's content
 * @param fileLabel the file as the user named it, to start the issue's path
 */
export function parseJsonText(text: string, fileLabel: string): JsonTextOutcome {
  try {
    return { ok: true, value: JSON.parse(text) as unknown };
  } catch {
    const error = findJsonSyntaxError(text) ?? { offset: 0, message: 'is not valid JSON' };
    const { line, column } = lineAndColumn(text, error.offset);
    const found = error.offset >= text.length ? 'the end of the file' : text.slice(error.offset, error.offset + 12).split(/\r?\n/)[0];
    return {
      ok: false,
      issue: {
        path: `${fileLabel} line ${line}, column ${column}`,
        value: found,
        message: `must be valid JSON: ${error.message}`,
      },
    };
  }
}

/** 1-based line and column (in UTF-16 units, as editors count for most text) of an offset. */
function lineAndColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let index = 0; index < offset && index < text.length; index++) {
    if (text[index] === '\n') {
      line++;
      lineStart = index + 1;
    }
  }
  return { line, column: offset - lineStart + 1 };
}

/**
 * Finds the first JSON syntax error (RFC 8259) in a text: its offset and what was expected there.
 * Returns null for valid JSON. Only used once JSON.parse has already failed.
 */
export function findJsonSyntaxError(text: string): { offset: number; message: string } | null {
  let position = 0;
  class Failure {
    constructor(
      readonly offset: number,
      readonly message: string,
    ) {}
  }
  const fail = (message: string, offset = position): never => {
    throw new Failure(offset, message);
  };
  const skipSpace = (): void => {
    for (;;) {
      const character = text[position];
      if (character === ' ' || character === '\t' || character === '\n' || character === '\r') position++;
      else if (character === '/' && (text[position + 1] === '/' || text[position + 1] === '*')) {
        fail('comments are not allowed in JSON; remove them (or move the note into a "name" field)');
      } else return;
    }
  };
  const parseString = (): void => {
    const start = position;
    position++; // opening quote
    for (;;) {
      if (position >= text.length) fail('a text value is never closed; add the closing double quote', start);
      const character = text[position];
      if (character === '"') {
        position++;
        return;
      }
      if (character === '\\') {
        const escape = text[position + 1];
        if (escape === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(position + 2, position + 6))) fail('\\u must be followed by 4 hex digits');
          position += 6;
        } else if (escape !== undefined && '"\\/bfnrt'.includes(escape)) position += 2;
        else fail(`\\${escape ?? ''} is not a JSON escape; allowed: \\" \\\\ \\/ \\b \\f \\n \\r \\t \\uXXXX`);
        continue;
      }
      if (character.charCodeAt(0) < 0x20) fail('a line break or control character inside a text value; close the quote first');
      position++;
    }
  };
  const parseNumber = (): void => {
    const match = /^-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/.exec(text.slice(position));
    if (!match) fail('is not a JSON number (write e.g. 12, -0.5, 1e-3; no leading +, no leading point)');
    position += match![0].length;
  };
  const parseValue = (): void => {
    skipSpace();
    const character = text[position];
    if (character === undefined) fail('the file ends where a value was expected');
    if (character === '{') return parseObject();
    if (character === '[') return parseArray();
    if (character === '"') return parseString();
    if (character === '-' || (character >= '0' && character <= '9')) return parseNumber();
    for (const word of ['true', 'false', 'null']) {
      if (text.startsWith(word, position)) {
        position += word.length;
        return;
      }
    }
    if (/^[+-]?(NaN|Infinity)/.test(text.slice(position))) fail('NaN and Infinity are not JSON; every number must be finite');
    if (character === "'") fail('text must be in double quotes, not single quotes');
    fail('expected a value: an object, a list, text in double quotes, a number, true, false or null');
  };
  const parseObject = (): void => {
    position++; // {
    skipSpace();
    if (text[position] === '}') {
      position++;
      return;
    }
    for (;;) {
      skipSpace();
      if (text[position] === '}') fail('a comma before } is not allowed in JSON; remove the trailing comma');
      if (text[position] !== '"') fail('expected a field name in double quotes');
      parseString();
      skipSpace();
      if (text[position] !== ':') fail('expected ":" after the field name');
      position++;
      parseValue();
      skipSpace();
      if (text[position] === ',') {
        position++;
        continue;
      }
      if (text[position] === '}') {
        position++;
        return;
      }
      fail(position >= text.length ? 'the file ends inside an object; a "}" is missing' : 'expected "," or "}" after a field');
    }
  };
  const parseArray = (): void => {
    position++; // [
    skipSpace();
    if (text[position] === ']') {
      position++;
      return;
    }
    for (;;) {
      skipSpace();
      if (text[position] === ']') fail('a comma before ] is not allowed in JSON; remove the trailing comma');
      parseValue();
      skipSpace();
      if (text[position] === ',') {
        position++;
        continue;
      }
      if (text[position] === ']') {
        position++;
        return;
      }
      fail(position >= text.length ? 'the file ends inside a list; a "]" is missing' : 'expected "," or "]" after a list item');
    }
  };
  try {
    parseValue();
    skipSpace();
    if (position < text.length) fail('unexpected text after the end of the JSON value');
    return null;
  } catch (error) {
    if (error instanceof Failure) return { offset: error.offset, message: error.message };
    return null; // e.g. nesting too deep for the stack: the caller falls back to a plain message
  }
}
