/**
 * A scenario arriving over HTTP: it must pass the format (`parseScenario`), and its hourly weather
 * must be inline (`weather.hours`): the server reads no files named in a request.
 */
import { parseScenario } from '../../scenarios/format/schema.ts';
import type { Scenario } from '../../scenarios/format/types.ts';
import { ApiError, echoValue, scenarioIssuesError } from './errors.ts';

export interface AcceptedScenario {
  /** what is stored: the scenario as submitted, without the editor's `$schema` */
  stored: Record<string, unknown>;
  /** the parsed scenario, defaults filled */
  scenario: Scenario;
}

/**
 * @param raw the request's `scenario` field
 * @throws ApiError 422 listing every issue with its field path
 */
export function acceptScenario(raw: unknown): AcceptedScenario {
  if (raw === undefined) {
    throw new ApiError(400, { error: 'scenario: missing; send {"scenario": {...}}', field: 'scenario', allowed: 'a scenario object, format plumeplan.scenario/1' });
  }
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) {
    throw new ApiError(422, {
      error: 'scenario: must be a JSON object, format plumeplan.scenario/1',
      field: 'scenario',
      value: echoValue(raw),
      allowed: 'a scenario object, format plumeplan.scenario/1',
    });
  }
  const weather = (raw as { weather?: { csv?: unknown } }).weather;
  if (weather !== null && typeof weather === 'object' && 'csv' in weather && weather.csv !== undefined) {
    throw new ApiError(422, {
      error: 'scenario.weather.csv: the server reads no files; give the hours inline in weather.hours',
      field: 'scenario.weather.csv',
      value: echoValue(weather.csv),
      allowed: 'absent; hourly weather inline in weather.hours',
    });
  }
  const parsed = parseScenario(raw);
  if (!parsed.ok) throw scenarioIssuesError(parsed.issues);
  const { $schema: _editorSchema, ...stored } = raw as Record<string, unknown>;
  return { stored, scenario: parsed.scenario };
}
