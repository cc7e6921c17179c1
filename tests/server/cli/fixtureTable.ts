// The scenario fixtures and what validate must say about each, shared by validate.test.ts (in-process)
// and validateCli.test.ts (the real command line).
import { fileURLToPath } from 'node:url';

export const repoRoot = fileURLToPath(new URL('../../..', import.meta.url));
export const invalidDir = 'tests/fixtures/invalid/';
export const validDir = 'tests/fixtures/valid/';

/**
 * Each invalid fixture and the issue paths it must give, in order. One fixture, one kind of mistake
 * (the unknown field is a misspelt required field, so it also leaves that field missing).
 */
export const INVALID_FIXTURES: Record<string, string[]> = {
  'missing-field.scenario.json': ['pollutant.name'],
  'negative-emission.scenario.json': ['sources[0].emission_g_s'],
  'zero-wind-speed.scenario.json': ['weather.windSpeed_m_s'],
  'zero-diameter.scenario.json': ['sources[0].diameter_m'],
  'polygon-not-closed.scenario.json': ['sources[1].polygon'],
  'polygon-self-intersecting.scenario.json': ['sources[1].polygon'],
  'source-outside-domain.scenario.json': ['sources[0]'],
  'receptor-outside-domain.scenario.json': ['receptors[1]'],
  'area-partly-outside-domain.scenario.json': ['sources[1].polygon[1]'], // the first vertex outside; one issue per source
  'unknown-field.scenario.json': ['sources[0].emission_g_s', 'sources[0].emision_g_s'],
  'string-for-number.scenario.json': ['sources[0].height_m'],
  'infinity-literal.scenario.json': ['weather.mixingHeight_m'],
  'nan-literal.scenario.json': [`${invalidDir}nan-literal.scenario.json line 43, column 23`],
  'json-trailing-comma.scenario.json': [`${invalidDir}json-trailing-comma.scenario.json line 16, column 3`],
  'grid-exhausts-memory.scenario.json': ['domain'],
  'duplicate-source-ids.scenario.json': ['sources[1].id'],
  'duplicate-receptor-ids.scenario.json': ['receptors[1].id'],
  'bad-stability-letter.scenario.json': ['weather.stability'],
  'stability-not-derivable.scenario.json': ['weather.stability'],
  'bad-time.scenario.json': ['weather.hours[1].time'],
  'times-not-increasing.scenario.json': ['weather.hours[1].time'],
  'wind-rose-frequencies.scenario.json': ['weather.cells'],
  'bad-csv-row.scenario.json': ['weather.csv (bad-csv-row.csv) line 4, column windSpeed_m_s'],
  'missing-csv-file.scenario.json': ['weather.csv'],
  'hourly-hours-and-csv.scenario.json': ['weather'],
  'layers-not-whole.scenario.json': ['domain.layers'],
  'latitude-too-polar.scenario.json': ['site.lat', 'sources[0].lat'],
  'stack-above-grid-top.scenario.json': ['sources[0].height_m'],
  'wrong-format.scenario.json': ['format'],
  'unknown-weather-kind.scenario.json': ['weather.kind'],
};

export const VALID_FIXTURES: Record<string, string> = {
  'spec-example.scenario.json': '2 sources, 1 receptor, grid 200 x 200 x 30',
  'minimal.scenario.json': '2 sources, 1 receptor, grid',
  'hourly-csv.scenario.json': '1 source, 1 receptor, grid',
  'quillbrook-steady.scenario.json': '2 sources, 2 receptors, grid 80 x 80 x 20',
};

/** The issue paths in validate's stderr: each issue line is "  <path>: got ...". */
export function issuePaths(stderr: string): string[] {
  return stderr
    .split('\n')
    .filter((line) => line.startsWith('  '))
    .map((line) => line.slice(2, line.indexOf(': got ')));
}
