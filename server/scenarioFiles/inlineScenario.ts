/**
 * A scenario file as the server keeps it: the JSON as written, without the editor's `$schema`, and
 * with an hourly series read from its CSV file put inline (`weather.hours`), since the server reads no
 * files named inside a stored scenario. Used to load the demo scenarios into an empty database.
 */
import { readFile } from 'node:fs/promises';
import { formatIssues } from '../../scenarios/format/schema.ts';
import { loadScenarioFile } from './load.ts';

/**
 * @param path a scenario file
 * @returns the scenario as JSON, self-contained
 * @throws Error listing the issues when the file is not a valid scenario
 * @example const stored = await inlineScenarioFile('scenarios/merrowdene-heat-plant/scenario.json');
 */
export async function inlineScenarioFile(path: string): Promise<Record<string, unknown>> {
  const outcome = await loadScenarioFile(path);
  if (!outcome.ok) throw new Error(`${path} is not a valid scenario:\n${formatIssues(outcome.issues)}`);
  const raw = JSON.parse((await readFile(path, 'utf8')).replace(/^\uFEFF/, '')) as Record<string, unknown>;
  const { $schema: _editorSchema, ...stored } = raw;
  const weather = stored.weather as { kind?: string; csv?: unknown };
  if (weather.kind === 'hourly' && weather.csv !== undefined && outcome.scenario.weather.kind === 'hourly') {
    const { csv: _file, ...rest } = weather;
    stored.weather = { ...rest, hours: outcome.scenario.weather.hours };
  }
  return stored;
}
