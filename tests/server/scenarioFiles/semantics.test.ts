// Behaviour checks of the grid-dependent scenario checks: they call the solver's own geometry
// (prepareScenarioGeometry) and report its refusals as issues with the field path.
import { describe, expect, it } from 'vitest';
import { parseScenario, formatIssues } from '../../../scenarios/format/schema.ts';
import { checkScenarioGeometry, examineScenarioGeometry } from '../../../server/scenarioFiles/semantics.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { estimateGridMemory_bytes, GRID_MEMORY_LIMIT_bytes } from '../../../solver/grid/domainDefaults.ts';

/** At 52 N one degree of longitude is about 68.7 km and one of latitude about 111.3 km (WGS 84, common practice). */
function scenarioWith(change: (raw: Record<string, any>) => void): Scenario {
  const raw: Record<string, any> = {
    format: 'plumeplan.scenario/1',
    name: 'Tarnwick heat plant, geometry test',
    site: { lat: 52.0, lon: 5.0 },
    domain: { halfWidth_m: 1000, spacing_m: 25, height_m: 600, layers: 16 },
    pollutant: { name: 'NOx' },
    weather: { kind: 'steady', windSpeed_m_s: 5, windFrom_deg: 270, stability: 'D' },
    sources: [
      { kind: 'point', id: 'stack-1', lat: 52.001, lon: 5.002, height_m: 30, diameter_m: 1, exitVelocity_m_s: 12, exitTemperature_K: 420, emission_g_s: 1.5 },
      { kind: 'area', id: 'yard', polygon: [[5.003, 52.002], [5.006, 52.002], [5.006, 52.004], [5.003, 52.004], [5.003, 52.002]], releaseHeight_m: 1, emission_g_s: 0.4 },
    ],
    receptors: [
      { id: 'school', lat: 52.004, lon: 5.01 },
      { id: 'farm', lat: 51.996, lon: 4.995, height_m: 0 },
    ],
  };
  change(raw);
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(formatIssues(outcome.issues));
  return outcome.scenario;
}

describe('checkScenarioGeometry', () => {
  it('finds nothing wrong with a layout inside its domain and hands back the grid', () => {
    const scenario = scenarioWith(() => {});
    expect(checkScenarioGeometry(scenario)).toEqual([]);
    const { geometry } = examineScenarioGeometry(scenario);
    // 2 x 1000 m / 25 m = 80 columns a side.
    expect([geometry?.grid.nx, geometry?.grid.ny, geometry?.grid.nz]).toEqual([80, 80, 16]);
  });

  it('refuses a grid over the memory limit from its numbers alone, naming domain', () => {
    const domain = { halfWidth_m: 40_000, spacing_m: 5, height_m: 1000, layers: 50 };
    // 16000 x 16000 x 50 cells: far above the limit, so building it would exhaust memory.
    expect(estimateGridMemory_bytes(domain)).toBeGreaterThan(GRID_MEMORY_LIMIT_bytes);
    const issues = checkScenarioGeometry(scenarioWith((raw) => (raw.domain = domain)));
    expect(issues).toHaveLength(1);
    expect(issues[0]).toMatchObject({ path: 'domain', value: domain });
    expect(issues[0].message).toContain('16000 x 16000 x 50');
  });

  it('reports every source and receptor outside the domain, not only the first', () => {
    const scenario = scenarioWith((raw) => {
      raw.sources[0].lat = 52.02; // about 2.2 km north: outside a 1 km half-width
      raw.sources[1].polygon = [[5.003, 52.002], [5.02, 52.002], [5.02, 52.004], [5.003, 52.004], [5.003, 52.002]]; // reaches 1.4 km east
      raw.receptors[1].lon = 4.98; // about 1.4 km west
    });
    const issues = checkScenarioGeometry(scenario);
    expect(issues.map((issue) => issue.path)).toEqual(['sources[0]', 'sources[1].polygon[1]', 'receptors[1]']);
    expect(issues[0].message).toContain('outside the domain');
    expect(issues[1].value).toEqual([5.02, 52.002]);
    expect(issues[2].value).toMatchObject({ id: 'farm', lon: 4.98 });
  });

  it('refuses a release at or above the grid top, and a receptor above it', () => {
    const high = checkScenarioGeometry(
      scenarioWith((raw) => {
        raw.sources[0].height_m = 600;
        raw.sources[1].releaseHeight_m = 700;
      }),
    );
    expect(high.map((issue) => [issue.path, issue.value])).toEqual([
      ['sources[0].height_m', 600],
      ['sources[1].releaseHeight_m', 700],
    ]);
    const receptor = checkScenarioGeometry(scenarioWith((raw) => (raw.receptors[0].height_m = 601)));
    expect(receptor.map((issue) => issue.path)).toEqual(['receptors[0].height_m']);
  });

  it('derives a domain when none is given, and names sources beyond its reach', () => {
    const derived = scenarioWith((raw) => delete raw.domain);
    expect(checkScenarioGeometry(derived)).toEqual([]);
    expect(examineScenarioGeometry(derived).geometry?.domainDerived).toBe(true);

    const far = scenarioWith((raw) => {
      delete raw.domain;
      raw.sources[0].lat = 53.0; // 111 km north: more likely a typing slip than a layout
      raw.receptors[0].lon = 6.0; // 69 km east
    });
    expect(checkScenarioGeometry(far).map((issue) => issue.path)).toEqual(['sources[0]', 'receptors[0]']);
  });

  it('refuses a spacing wider than the domain', () => {
    const issues = checkScenarioGeometry(scenarioWith((raw) => (raw.domain.spacing_m = 2500)));
    expect(issues.map((issue) => [issue.path, issue.value])).toEqual([['domain.spacing_m', 2500]]);
  });
});
