// Behaviour checks of the hourly weather CSV reader (RFC 4180 for the quoting rules): rows become
// weather hours with the format's defaults, and every bad row is an issue naming file, line,
// column and value; no row is dropped.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { formatIssues } from '../../../scenarios/format/schema.ts';
import { parseWeatherCsv, WEATHER_CSV_COLUMNS } from '../../../scenarios/format/weatherCsv.ts';

const HEADER = 'time,windSpeed_m_s,windFrom_deg,stability';

function issuesOf(text: string) {
  const outcome = parseWeatherCsv(text, 'hours.csv');
  if (outcome.ok) throw new Error('expected the CSV to be refused');
  return outcome.issues;
}

describe('parseWeatherCsv', () => {
  it('reads every column, fills defaults for empty cells, keeps gaps, handles CRLF and quotes', () => {
    const text = readFileSync(new URL('../../fixtures/valid/weather/quillbrook-hours.csv', import.meta.url), 'utf8');
    const outcome = parseWeatherCsv(text, 'quillbrook-hours.csv');
    expect(outcome).toEqual({
      ok: true,
      hours: [
        {
          time: '2024-01-15T06:00:00+01:00',
          windSpeed_m_s: 3.2,
          windFrom_deg: 240,
          stability: 'D',
          mixingHeight_m: 600,
          rain_mm_h: 0,
          airTemperature_K: 276.4,
          anemometerHeight_m: 10,
        },
        {
          time: '2024-01-15T07:00:00+01:00',
          windSpeed_m_s: 2.9,
          windFrom_deg: 235,
          rain_mm_h: 0.4,
          airTemperature_K: 288.15,
          anemometerHeight_m: 10,
          cloudCover_oktas: 7,
        },
        // 08:00 is missing: a gap, which the weather runner reports, not an error here
        {
          time: '2024-01-15T09:00:00+01:00',
          windSpeed_m_s: 4.1,
          windFrom_deg: 230,
          stability: 'C',
          mixingHeight_m: 900,
          rain_mm_h: 0,
          airTemperature_K: 277,
          anemometerHeight_m: 10,
        },
      ],
    });
  });

  it('accepts the columns in any order, a byte-order mark and no final line break', () => {
    const outcome = parseWeatherCsv('\uFEFFstability,windFrom_deg,time,windSpeed_m_s\nF,10,2024-01-15T00:00Z,1.5', 'hours.csv');
    expect(outcome.ok && outcome.hours).toEqual([
      { time: '2024-01-15T00:00Z', windSpeed_m_s: 1.5, windFrom_deg: 10, stability: 'F', rain_mm_h: 0, airTemperature_K: 288.15, anemometerHeight_m: 10 },
    ]);
  });

  it('names file, line, column and value of a bad cell, and reports every bad row', () => {
    const text = [
      HEADER,
      '2024-01-15T00:00Z,3,240,D',
      '2024-01-15T01:00Z,fast,240,D',
      '2024-01-15T02:00Z,3,0x10,D', // hexadecimal is not a decimal number, though Number() reads it
      '2024-01-15T03:00Z,3,240,Q',
      '2024-01-15T04:00Z,-2,240,D',
    ].join('\n');
    expect(formatIssues(issuesOf(text)).split('\n')).toEqual([
      'hours.csv line 3, column windSpeed_m_s: got "fast"; must be a finite number > 0 [m/s]',
      'hours.csv line 4, column windFrom_deg: got "0x10"; must be a finite number in [0, 360] [deg]',
      'hours.csv line 5, column stability: got "Q"; must be one of "A", "B", "C", "D", "E", "F"',
      'hours.csv line 6, column windSpeed_m_s: got -2; must be a finite number > 0 [m/s]',
    ]);
  });

  it('refuses an empty required cell and a row that cannot give a stability class', () => {
    const text = [HEADER + ',cloudCover_oktas', '2024-01-15T00:00Z,,240,D,', '2024-01-15T01:00Z,3,240,,'].join('\n');
    const issues = issuesOf(text);
    expect(issues.map((issue) => issue.path)).toEqual(['hours.csv line 2, column windSpeed_m_s', 'hours.csv line 3, column stability']);
    expect(issues[0].value).toBeUndefined();
  });

  it('refuses a time without an offset, naming the line', () => {
    const [issue] = issuesOf([HEADER, '2024-01-15T00:00,3,240,D'].join('\n'));
    expect(issue).toMatchObject({ path: 'hours.csv line 2, column time', value: '2024-01-15T00:00' });
  });

  it('names both lines when a time repeats or goes backwards, even past a bad row', () => {
    const text = [
      HEADER,
      '2024-01-15T00:00Z,3,240,D',
      '2024-01-15T01:00Z,bad,240,D',
      '2024-01-15T02:00+01:00,3,240,D', // = 01:00Z, the time of line 3
      '2024-01-14T23:00Z,3,240,D',
    ].join('\n');
    const issues = issuesOf(text);
    expect(issues.map((issue) => issue.path)).toEqual([
      'hours.csv line 3, column windSpeed_m_s',
      'hours.csv line 4, column time',
      'hours.csv line 5, column time',
    ]);
    expect(issues[1].message).toContain('line 4 repeats the time of line 3 (2024-01-15T01:00Z)');
    expect(issues[2].message).toContain('line 5 goes back before line 4');
  });

  it('refuses unknown and repeated columns and a missing required column, listing the allowed ones', () => {
    const issues = issuesOf('time,windSpeed_m_s,wind_dir,time\n2024-01-15T00:00Z,3,240,2024-01-15T00:00Z\n');
    expect(formatIssues(issues).split('\n')).toEqual([
      `hours.csv line 1, header column 3: got "wind_dir"; is not a weather column; allowed columns: ${WEATHER_CSV_COLUMNS.join(', ')}`,
      'hours.csv line 1, header column 4: got "time"; repeats column 1; each column once',
      'hours.csv line 1 (header): got "time,windSpeed_m_s,wind_dir,time"; must have a windFrom_deg column (required: time, windSpeed_m_s, windFrom_deg)',
    ]);
  });

  it('refuses a row with too few or too many cells, and a header with no rows', () => {
    const issues = issuesOf([HEADER, '2024-01-15T00:00Z,3,240', '2024-01-15T01:00Z,3,240,D,extra'].join('\n'));
    expect(issues.map((issue) => issue.path)).toEqual(['hours.csv line 2', 'hours.csv line 3']);
    expect(issues[0].message).toBe('has 3 cells; every row must have one cell per header column (4)');
    expect(issuesOf(`${HEADER}\n`)[0].path).toBe('hours.csv');
    expect(issuesOf('')[0].path).toBe('hours.csv');
  });

  it('keeps line numbers right across blank lines and quoted line breaks', () => {
    const text = `${HEADER}\n\n2024-01-15T00:00Z,3,240,"D\nE"\n2024-01-15T01:00Z,3,400,D\n`;
    expect(issuesOf(text).map((issue) => issue.path)).toEqual(['hours.csv line 3, column stability', 'hours.csv line 5, column windFrom_deg']);
    expect(issuesOf(`${HEADER}\n2024-01-15T00:00Z,3,240,"D\n`)[0].path).toBe('hours.csv line 2');
  });

  it('lists the first 100 row issues and counts the rest, so nothing is dropped silently', () => {
    const rows = Array.from({ length: 250 }, (_, hour) => `${new Date(Date.UTC(2024, 0, 1, hour)).toISOString()},calm,240,D`);
    const issues = issuesOf([HEADER, ...rows].join('\n'));
    expect(issues).toHaveLength(101);
    expect(issues[99].path).toBe('hours.csv line 101, column windSpeed_m_s');
    expect(issues[100]).toMatchObject({ path: 'hours.csv', message: expect.stringContaining('150 more row issues like those above (250 in all)') });
  });
});
