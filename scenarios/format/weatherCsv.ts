/**
 * Reads an hourly weather CSV (RFC 4180): a header row of weather-hour field names, then one row per
 * hour. Each row is checked by the same schema as an inline hour (`weatherHourSchema`), so the two
 * routes into a series cannot drift apart.
 *
 *   time,windSpeed_m_s,windFrom_deg,stability,mixingHeight_m
 *   2024-01-15T00:00Z,3.2,240,D,600
 *   2024-01-15T01:00Z,2.9,235,,          <- empty optional cells take their defaults
 *
 * Columns: time, windSpeed_m_s and windFrom_deg are required; stability, mixingHeight_m, rain_mm_h,
 * airTemperature_K, anemometerHeight_m and cloudCover_oktas may be absent or left empty. Unknown
 * columns are an error. A bad row is an issue naming the file, line, column and value; no row is
 * ever dropped. Times must strictly increase; gaps are allowed here (the weather runner counts and
 * reports them).
 */
import type { WeatherHour } from './types.ts';
import {
  findTimesNotIncreasing,
  parseIsoTime_ms,
  toScenarioIssues,
  weatherHourSchema,
  type ScenarioIssue,
} from './schema.ts';

export type WeatherCsvOutcome = { ok: true; hours: WeatherHour[] } | { ok: false; issues: ScenarioIssue[] };

/** The columns a weather CSV may have, in their usual order. */
export const WEATHER_CSV_COLUMNS = [
  'time',
  'windSpeed_m_s',
  'windFrom_deg',
  'stability',
  'mixingHeight_m',
  'rain_mm_h',
  'airTemperature_K',
  'anemometerHeight_m',
  'cloudCover_oktas',
] as const;
type WeatherCsvColumn = (typeof WEATHER_CSV_COLUMNS)[number];

const REQUIRED_COLUMNS: readonly WeatherCsvColumn[] = ['time', 'windSpeed_m_s', 'windFrom_deg'];
const TEXT_COLUMNS: ReadonlySet<WeatherCsvColumn> = new Set(['time', 'stability']);

/**
 * At most this many row issues are listed one by one; the rest are counted in one closing issue
 * (a year of hours with one bad column would otherwise print 8760 lines).
 */
const LISTED_ROW_ISSUES_MAX = 100;

/** A plain decimal number as a CSV cell may hold it: 12, -3.5, .5, 1e-3. Anything else stays text. */
const DECIMAL_PATTERN = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

interface CsvRecord {
  /** 1-based line of the file where the record starts */
  line: number;
  cells: string[];
}

/**
 * Splits CSV text into records (RFC 4180: quoted cells may hold commas, doubled quotes and line
 * breaks). Lines that are entirely empty are not records.
 * @returns the records, or the line of an unterminated quote
 */
function splitCsv(text: string): { records: CsvRecord[]; unterminatedQuoteLine: number | null } {
  const records: CsvRecord[] = [];
  let cells: string[] = [];
  let cell = '';
  let inQuotes = false;
  let line = 1;
  let recordLine = 1;
  let recordHasContent = false;
  const endRecord = (): void => {
    if (recordHasContent || cells.length > 0) {
      cells.push(cell);
      records.push({ line: recordLine, cells });
    }
    cells = [];
    cell = '';
    recordHasContent = false;
  };
  for (let index = 0; index < text.length; index++) {
    const character = text[index];
    if (inQuotes) {
      if (character === '"') {
        if (text[index + 1] === '"') {
          cell += '"';
          index++;
        } else inQuotes = false;
      } else {
        if (character === '\n') line++;
        cell += character;
      }
      continue;
    }
    if (character === '"') {
      inQuotes = true;
      recordHasContent = true;
    } else if (character === ',') {
      cells.push(cell);
      cell = '';
      recordHasContent = true;
    } else if (character === '\n' || character === '\r') {
      if (character === '\r' && text[index + 1] === '\n') index++;
      endRecord();
      line++;
      recordLine = line;
    } else {
      cell += character;
      if (character.trim() !== '') recordHasContent = true;
    }
  }
  if (inQuotes) return { records, unterminatedQuoteLine: recordLine };
  endRecord();
  return { records, unterminatedQuoteLine: null };
}

/**
 * Parses an hourly weather CSV into weather hours with defaults filled.
 * @param text the file's content
 * @param fileLabel how issues name the file, e.g. `weather.csv (met/hours.csv)`
 * @returns the hours in file order, or every issue found
 * @example parseWeatherCsv('time,windSpeed_m_s,windFrom_deg,stability\n2024-01-15T00:00Z,3,240,D\n', 'hours.csv')
 */
export function parseWeatherCsv(text: string, fileLabel: string): WeatherCsvOutcome {
  const issues: ScenarioIssue[] = [];
  const { records, unterminatedQuoteLine } = splitCsv(text.replace(/^\uFEFF/, ''));
  if (unterminatedQuoteLine !== null) {
    return {
      ok: false,
      issues: [
        {
          path: `${fileLabel} line ${unterminatedQuoteLine}`,
          value: undefined,
          message: 'has a quoted cell that is never closed; a quoted cell must end with a double quote',
        },
      ],
    };
  }
  if (records.length < 2) {
    return {
      ok: false,
      issues: [
        {
          path: fileLabel,
          value: records.length === 0 ? '' : records[0].cells.join(','),
          message: `must have a header row (${WEATHER_CSV_COLUMNS.join(',')}) and at least one hour`,
        },
      ],
    };
  }

  // The header: known, distinct column names, the required ones present.
  const [header, ...rows] = records;
  const columns = header.cells.map((name) => name.trim());
  const allowed = `allowed columns: ${WEATHER_CSV_COLUMNS.join(', ')}`;
  columns.forEach((name, index) => {
    const headerPath = `${fileLabel} line ${header.line}, header column ${index + 1}`;
    if (!(WEATHER_CSV_COLUMNS as readonly string[]).includes(name)) {
      issues.push({ path: headerPath, value: name, message: `is not a weather column; ${allowed}` });
    } else if (columns.indexOf(name) !== index) {
      issues.push({ path: headerPath, value: name, message: `repeats column ${columns.indexOf(name) + 1}; each column once` });
    }
  });
  for (const required of REQUIRED_COLUMNS) {
    if (!columns.includes(required)) {
      issues.push({
        path: `${fileLabel} line ${header.line} (header)`,
        value: header.cells.join(','),
        message: `must have a ${required} column (required: ${REQUIRED_COLUMNS.join(', ')})`,
      });
    }
  }
  if (issues.length > 0) return { ok: false, issues };

  // The rows: each one checked as a weather hour; nothing is dropped.
  const hours: WeatherHour[] = [];
  /** every row's valid time with its line, also from rows with other problems, for the order check */
  const timedRows: { line: number; time: string }[] = [];
  /** each row issue with its line, so that they can be listed as the file reads */
  const rowIssues: { line: number; issue: ScenarioIssue }[] = [];
  for (const row of rows) {
    if (row.cells.length !== columns.length) {
      rowIssues.push({
        line: row.line,
        issue: {
          path: `${fileLabel} line ${row.line}`,
          value: row.cells.join(','),
          message: `has ${row.cells.length} cells; every row must have one cell per header column (${columns.length})`,
        },
      });
      continue;
    }
    const fields: Record<string, unknown> = {};
    columns.forEach((name, index) => {
      const cell = row.cells[index].trim();
      if (cell === '') return; // an empty optional cell takes the default; an empty required one is reported
      fields[name] = TEXT_COLUMNS.has(name as WeatherCsvColumn) || !DECIMAL_PATTERN.test(cell) ? cell : Number(cell);
    });
    if (typeof fields.time === 'string' && Number.isFinite(parseIsoTime_ms(fields.time))) {
      timedRows.push({ line: row.line, time: fields.time });
    }
    const parsed = weatherHourSchema.safeParse(fields);
    if (!parsed.success) {
      for (const issue of toScenarioIssues(parsed.error.issues, fields)) {
        rowIssues.push({ line: row.line, issue: { ...issue, path: `${fileLabel} line ${row.line}, column ${issue.path}` } });
      }
      continue;
    }
    hours.push(parsed.data);
  }

  // Times strictly increase down the file (rows whose time itself is bad are reported above).
  const times = timedRows.map((row) => row.time);
  for (const problem of findTimesNotIncreasing(times, (index) => `line ${timedRows[index].line}`)) {
    const line = timedRows[problem.index].line;
    rowIssues.push({
      line,
      issue: { path: `${fileLabel} line ${line}, column time`, value: times[problem.index], message: problem.message },
    });
  }

  if (rowIssues.length === 0) return { ok: true, hours };
  rowIssues.sort((a, b) => a.line - b.line); // stable: a row's own issues keep their order
  const listed = rowIssues.slice(0, LISTED_ROW_ISSUES_MAX).map((entry) => entry.issue);
  if (rowIssues.length > LISTED_ROW_ISSUES_MAX) {
    const rest = rowIssues.length - LISTED_ROW_ISSUES_MAX;
    listed.push({
      path: fileLabel,
      value: `${rest} more issues`,
      message: `has ${rest} more row issues like those above (${rowIssues.length} in all); fix those and validate again`,
    });
  }
  return { ok: false, issues: listed };
}
