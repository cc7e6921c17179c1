/**
 * Plausibility warnings (behaviour checks): each fires on the input it is about and on nothing else, and a
 * series says how often.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { inputWarnings } from '../../../solver/diagnostics/plausibility.ts';
import { prepareScenarioGeometry } from '../../../solver/grid/scenarioGeometry.ts';

const DEMO = new URL('../../../scenarios/merrowdene-heat-plant/scenario.json', import.meta.url);

function demo(change: (raw: Record<string, any>) => void = () => {}): Scenario {
  const raw = JSON.parse(readFileSync(DEMO, 'utf8'));
  raw.domain = { halfWidth_m: 3000, spacing_m: 200, height_m: 1000, layers: 10 };
  change(raw);
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  return outcome.scenario;
}
const warningsOf = (scenario: Scenario) => inputWarnings(scenario, prepareScenarioGeometry(scenario));

describe('inputWarnings', () => {
  it('the demo has none', () => {
    expect(warningsOf(demo())).toEqual([]);
  });

  it('a mixing height between the stack top (32 m) and the effective height (about 60 m) names the source', () => {
    const [warning, ...rest] = warningsOf(demo((raw) => (raw.weather.mixingHeight_m = 45)));
    expect(rest).toEqual([]);
    expect(warning.path).toBe('sources[0]');
    expect(warning.message).toMatch(/mixing height \(45 m\) is below the stack's effective height \(60 m/);
  });

  it('an hourly series counts the hours: cold flue gas in 2 of 3 hours, the first named', () => {
    const hour = (time: string, airTemperature_K: number) => ({
      time, windSpeed_m_s: 5, windFrom_deg: 250, stability: 'D', mixingHeight_m: 800, rain_mm_h: 0, airTemperature_K, anemometerHeight_m: 10,
    });
    const scenario = demo((raw) => {
      raw.sources[0].exitTemperature_K = 290;
      raw.weather = { kind: 'hourly', hours: [hour('2031-01-01T00:00Z', 285), hour('2031-01-01T01:00Z', 292), hour('2031-01-01T02:00Z', 295)] };
    });
    const warnings = warningsOf(scenario);
    expect(warnings.map((w) => w.path)).toEqual(['sources[0].exitTemperature_K']);
    expect(warnings[0].message).toContain('in 2 of 3 hours (first: weather.hours[1])');
  });

  it('without a site boundary no receptor is said to be on the site', () => {
    const scenario = demo((raw) => {
      delete raw.site.boundary;
      raw.receptors.push({ id: 'gate', name: 'Gate', lat: 54.061, lon: -2.2845, height_m: 1.5 });
    });
    expect(warningsOf(scenario)).toEqual([]);
  });

  it('says when a far receptor coarsens a derived domain, and not before', () => {
    // Without a domain the demo's plant takes 20 m cells (solver/grid/domainDefaults.ts); a farm 5 km south
    // needs a half-width whose 20 m grid passes the 4 M cells a derived domain may have (as
    // tests/solver/grid/receptorAdded.test.ts measures), so the cells become 50 m and validate says so.
    const near = demo((raw) => delete raw.domain);
    expect(warningsOf(near)).toEqual([]);
    const far = demo((raw) => {
      delete raw.domain;
      raw.receptors.push({ id: 'far-farm', name: 'Far farm', lon: raw.site.lon, lat: raw.site.lat - 0.045, height_m: 1.5 });
    });
    const warnings = warningsOf(far);
    expect(warnings).toHaveLength(1);
    expect(warnings[0]).toMatchObject({ path: 'receptors[3]', value: 'far-farm' });
    expect(warnings[0].message).toMatch(/^is 5\.0 km from the site: .* 20 m cells .* so its cells are 50 m;/);
  });
});
