// Behaviour checks of loadScenarioFile: JSON syntax errors with line and column (RFC 8259 grammar),
// a weather CSV resolved relative to the scenario file, and the grid checks run last.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { findJsonSyntaxError, loadScenarioFile, parseJsonText } from '../../../server/scenarioFiles/load.ts';
import { formatIssues } from '../../../scenarios/format/schema.ts';

const validDir = fileURLToPath(new URL('../../fixtures/valid', import.meta.url));
const scratch = mkdtempSync(join(tmpdir(), 'plumeplan-load-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe('loadScenarioFile', () => {
  it('loads a valid file and reports the folder it is in', async () => {
    const outcome = await loadScenarioFile(join(validDir, 'spec-example.scenario.json'));
    expect(outcome.ok).toBe(true);
    expect(outcome.baseDir).toBe(dirname(join(validDir, 'spec-example.scenario.json')));
  });

  it('fills weather.hours from the CSV named relative to the scenario file, not the working folder', async () => {
    const outcome = await loadScenarioFile(join(validDir, 'hourly-csv.scenario.json'));
    if (!outcome.ok) throw new Error(formatIssues(outcome.issues));
    const weather = outcome.scenario.weather;
    expect(weather.kind).toBe('hourly');
    if (weather.kind !== 'hourly') return;
    expect(weather.csv).toBe('weather/quillbrook-hours.csv');
    expect(weather.hours.map((hour) => hour.time)).toEqual([
      '2024-01-15T06:00:00+01:00',
      '2024-01-15T07:00:00+01:00',
      '2024-01-15T09:00:00+01:00',
    ]);
  });

  it('names weather.csv and the resolved path when the CSV is missing', async () => {
    const file = join(scratch, 'no-csv.scenario.json');
    writeFileSync(file, JSON.stringify({ ...minimalScenario(), weather: { kind: 'hourly', csv: 'met/absent.csv' } }));
    const outcome = await loadScenarioFile(file);
    expect(outcome.ok).toBe(false);
    if (outcome.ok) return;
    expect(outcome.issues).toEqual([
      {
        path: 'weather.csv',
        value: 'met/absent.csv',
        message: `must name a readable CSV file, relative to the scenario file; ${join(scratch, 'met/absent.csv')}: no such file`,
      },
    ]);
  });

  it('reports the schema issues and the CSV issues of one file together', async () => {
    const file = join(scratch, 'both.scenario.json');
    writeFileSync(join(scratch, 'both.csv'), 'time,windSpeed_m_s,windFrom_deg,stability\n2024-01-15T00:00Z,3,999,D\n');
    const scenario: Record<string, any> = { ...minimalScenario(), weather: { kind: 'hourly', csv: 'both.csv' } };
    scenario.sources[0].height_m = -3;
    writeFileSync(file, JSON.stringify(scenario));
    const outcome = await loadScenarioFile(file);
    expect(outcome.ok ? [] : outcome.issues.map((issue) => issue.path)).toEqual([
      'sources[0].height_m',
      'weather.csv (both.csv) line 2, column windFrom_deg',
    ]);
  });

  it('names a missing scenario file', async () => {
    const outcome = await loadScenarioFile(join(scratch, 'nowhere.scenario.json'));
    expect(outcome.ok ? null : outcome.issues[0]).toMatchObject({ path: '(file)', message: expect.stringContaining('no such file') });
  });

  it('runs the grid checks once the schema passes', async () => {
    const file = join(scratch, 'far.scenario.json');
    const scenario: Record<string, any> = { ...minimalScenario(), domain: { halfWidth_m: 1000, spacing_m: 50, height_m: 800, layers: 12 } };
    scenario.receptors[0].lon = 5.05; // about 3.4 km east of the site at 52 N
    writeFileSync(file, JSON.stringify(scenario));
    const outcome = await loadScenarioFile(file);
    expect(outcome.ok ? [] : outcome.issues.map((issue) => issue.path)).toEqual(['receptors[0]']);
  });
});

describe('JSON syntax errors give the line and column', () => {
  // Lines and columns are 1-based, as editors count them.
  it.each([
    ['a trailing comma', '{\n  "a": 1,\n}', 3, 1, 'remove the trailing comma'],
    ['a missing comma', '{\n  "a": 1\n  "b": 2\n}', 3, 3, 'expected "," or "}"'],
    ['a comment', '{\n  // note\n  "a": 1\n}', 2, 3, 'comments are not allowed'],
    ['single quotes', "{ 'a': 1 }", 1, 3, 'expected a field name in double quotes'],
    ['NaN', '{ "a": NaN }', 1, 8, 'NaN and Infinity are not JSON'],
    ['a leading plus', '{ "a": +1 }', 1, 8, 'expected a value'],
    ['an unclosed text', '{ "a": "open\n}', 1, 13, 'a line break or control character'],
    ['an unclosed object', '{ "a": [1, 2]', 1, 14, 'a "}" is missing'],
    ['text after the value', '{ "a": 1 } x', 1, 12, 'unexpected text after the end'],
    ['an empty file', '', 1, 1, 'the file ends where a value was expected'],
  ])('%s', (_label, text, line, column, message) => {
    const outcome = parseJsonText(text, 'x.json');
    expect(outcome.ok).toBe(false);
    if (outcome.ok) return;
    expect(outcome.issue.path).toBe(`x.json line ${line}, column ${column}`);
    expect(outcome.issue.message).toContain(message);
  });

  it('finds no error in valid JSON (the scanner agrees with JSON.parse)', () => {
    for (const text of ['{}', '[]', '{"a":[1,-2.5e-3,true,false,null,"x\\u00e9\\n"],"b":{"c":{}}}', ' 0 ', '"\\/"']) {
      expect(() => JSON.parse(text)).not.toThrow();
      expect(findJsonSyntaxError(text)).toBeNull();
    }
  });

  it('lets 1e999 through as Infinity for the schema to refuse by name', () => {
    // JSON.parse turns an overflowing literal into Infinity (ECMA-262 JSON.parse, Number conversion).
    expect(parseJsonText('{ "a": 1e999 }', 'x.json')).toEqual({ ok: true, value: { a: Number.POSITIVE_INFINITY } });
  });
});

/** A small valid scenario at an invented site, as an object to vary. */
function minimalScenario(): Record<string, any> {
  return {
    format: 'plumeplan.scenario/1',
    name: 'Tarnwick heat plant, load test',
    site: { lat: 52.0, lon: 5.0 },
    pollutant: { name: 'NOx' },
    weather: { kind: 'steady', windSpeed_m_s: 5, windFrom_deg: 270, stability: 'D' },
    sources: [
      { kind: 'point', id: 'stack-1', lat: 52.001, lon: 5.002, height_m: 30, diameter_m: 1, exitVelocity_m_s: 12, exitTemperature_K: 420, emission_g_s: 1.5 },
    ],
    receptors: [{ id: 'school', lat: 52.004, lon: 5.03 }],
  };
}
