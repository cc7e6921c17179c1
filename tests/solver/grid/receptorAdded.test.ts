/**
 * Adding a far receptor to a scenario whose domain is derived coarsens the derived cells (the half-width
 * follows the farthest receptor: solver/grid/domainDefaults.ts); the figures at the receptors already
 * there must not move by more than the stated resolution error, RESOLUTION_CHANGE_LIMIT (10 %, the
 * yardstick of the grid-convergence check in docs/near-field.md). Issue 9's example: one far receptor
 * switched the derived cells from 25 m to 50 m and moved the others by about 10 %.
 *
 * The demo scenario without its domain, in its own steady weather (class D, 5 m/s from 250 deg): with its
 * three receptors the derived cells are 50 m, with a farm 5 km south 100 m; with its two nearer receptors
 * 20 m, with a farm 3 km south 50 m. Classes B and F do not meet the 10 % yet and are not asserted here
 * (measured: B moves the school by -25 % from 50 to 100 m cells; in F the small fuel yard is released
 * straight into the grid at 20 m cells but carried as a sub-grid plume at 50 m, and the two nearer
 * receptors move by -57 % and -55 %). docs/near-field.md ("A receptor added") has every figure, the
 * reasons and what is left to do.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import { steadyInput } from '../../../solver/drivers/runScenario.ts';
import { RESOLUTION_CHANGE_LIMIT } from '../../../solver/drivers/runChecks.ts';
import { solveSteady } from '../../../solver/drivers/solveSteady.ts';
import { prepareScenarioGeometry } from '../../../solver/grid/scenarioGeometry.ts';
import { resolveWeather } from '../../../solver/meteorology/resolveWeather.ts';

const demo = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');

/** The demo without a domain, in the given class, with its first `keep` receptors and perhaps a farm `south_deg` south of the site. */
async function figures(stability: string, keep: number, farSouth_deg: number | null): Promise<{ spacing_m: number; receptors: Float64Array }> {
  const raw = JSON.parse(readFileSync(demo, 'utf8'));
  delete raw.domain;
  raw.weather.stability = stability;
  raw.receptors = raw.receptors.slice(0, keep);
  if (farSouth_deg !== null) raw.receptors.push({ id: 'far-farm', name: 'Far farm', lon: raw.site.lon, lat: raw.site.lat - farSouth_deg, height_m: 1.5 });
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  const scenario = outcome.scenario;
  if (scenario.weather.kind !== 'steady') throw new Error('the demo has steady weather');
  const geometry = prepareScenarioGeometry(scenario);
  const field = await solveSteady(steadyInput(scenario, geometry, resolveWeather(scenario.weather, scenario.site)), 'grid');
  return { spacing_m: geometry.domain.spacing_m, receptors: field.receptors_ug_m3.slice(0, keep) };
}

describe('a far receptor added to a derived domain', () => {
  for (const [keep, farSouth_deg, cells, stabilities] of [
    [3, 0.045, [50, 100], ['D']],
    [2, 0.027, [20, 50], ['D']],
  ] as const) {
    for (const stability of stabilities) {
      it(`${keep} receptors, class ${stability}: cells ${cells[0]} m -> ${cells[1]} m, the others' figures within ${100 * RESOLUTION_CHANGE_LIMIT} %`, async () => {
        const before = await figures(stability, keep, null);
        const after = await figures(stability, keep, farSouth_deg);
        expect([before.spacing_m, after.spacing_m]).toEqual(cells);
        for (let r = 0; r < keep; r++) {
          expect(before.receptors[r]).toBeGreaterThan(0.1);
          expect(Math.abs(after.receptors[r] / before.receptors[r] - 1)).toBeLessThanOrEqual(RESOLUTION_CHANGE_LIMIT);
        }
      }, 240_000);
    }
  }
});
