/**
 * Adding a receptor to a scenario whose domain is derived must not move the figures at the receptors
 * already there by more than the stated resolution error, RESOLUTION_CHANGE_LIMIT (10 %, the yardstick of
 * the grid-convergence check in docs/near-field.md). Issue 9's example: one far receptor switched the
 * derived cells from 25 m to 50 m and moved the others by about 10 %.
 *
 * The rule (solver/grid/domainDefaults.ts): the derived cell is the one the sources' near field takes
 * (about 200 cells over a 2 km box for the demo: 20 m); a far receptor widens the domain at that spacing
 * while the grid stays within DERIVED_DOMAIN_MAX_CELLS (4 M), and only beyond it are the cells coarsened,
 * with a note naming the receptor and both cell sizes. The expected bound is the convergence argument:
 * at the same spacing only the domain's extent changes, and the grid-convergence check holds 25 m and
 * 50 m cells within 10 % of 12.5 m.
 *
 * The demo scenario without its domain, in its own steady weather (5 m/s from 250 deg) and in classes B,
 * D and F: its two nearer receptors (2 km at 20 m) with a farm 1.95 km south (3 km at 20 m: 2.16 M cells,
 * no coarsening), asserted within 10 %; with a farm 3 km south (5 km: 6 M cells at 20 m, so 25 m) and,
 * with all three receptors (4 km at 20 m), a farm 5 km south (8 km: 15.4 M cells at 20 m, so 50 m), where
 * the cell limit forces coarser cells: the note is asserted, and for the 5 km farm the figures too (they
 * hold the 10 %, measured). docs/near-field.md ("A receptor added") has
 * the measured figures of every case.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { runScenario, steadyInput } from '../../../solver/drivers/runScenario.ts';
import { RESOLUTION_CHANGE_LIMIT } from '../../../solver/drivers/runChecks.ts';
import { solveSteady } from '../../../solver/drivers/solveSteady.ts';
import { prepareScenarioGeometry } from '../../../solver/grid/scenarioGeometry.ts';
import { resolveWeather } from '../../../solver/meteorology/resolveWeather.ts';

const demo = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');

/** The demo without a domain, in the given class, with its first `keep` receptors and perhaps a farm `south_deg` south of the site. */
function demoScenario(stability: string, keep: number, farSouth_deg: number | null): Scenario {
  const raw = JSON.parse(readFileSync(demo, 'utf8'));
  delete raw.domain;
  raw.weather.stability = stability;
  raw.receptors = raw.receptors.slice(0, keep);
  if (farSouth_deg !== null) raw.receptors.push({ id: 'far-farm', name: 'Far farm', lon: raw.site.lon, lat: raw.site.lat - farSouth_deg, height_m: 1.5 });
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  return outcome.scenario;
}

async function figures(stability: string, keep: number, farSouth_deg: number | null): Promise<{ spacing_m: number; receptors: Float64Array }> {
  const scenario = demoScenario(stability, keep, farSouth_deg);
  if (scenario.weather.kind !== 'steady') throw new Error('the demo has steady weather');
  const geometry = prepareScenarioGeometry(scenario);
  const field = await solveSteady(steadyInput(scenario, geometry, resolveWeather(scenario.weather, scenario.site)), 'grid');
  return { spacing_m: geometry.domain.spacing_m, receptors: field.receptors_ug_m3.slice(0, keep) };
}

describe('a far receptor added to a derived domain', () => {
  for (const stability of ['B', 'D', 'F']) {
    it(`2 receptors and a farm 1.95 km south, class ${stability}: cells stay 20 m, the others' figures within ${100 * RESOLUTION_CHANGE_LIMIT} %`, async () => {
      const before = await figures(stability, 2, null);
      const after = await figures(stability, 2, 0.0175);
      expect([before.spacing_m, after.spacing_m]).toEqual([20, 20]);
      for (let r = 0; r < 2; r++) {
        expect(before.receptors[r]).toBeGreaterThan(0.1);
        expect(Math.abs(after.receptors[r] / before.receptors[r] - 1)).toBeLessThanOrEqual(RESOLUTION_CHANGE_LIMIT);
      }
    }, 240_000);
  }

  for (const [keep, farSouth_deg, distance, cells] of [
    [2, 0.027, '3.0', [20, 25]],
    [3, 0.045, '5.0', [20, 50]],
  ] as const) {
    it(`${keep} receptors and a farm ${distance} km south: the cell limit forces ${cells[0]} m -> ${cells[1]} m, and the run says so`, () => {
      for (const stability of ['B', 'D', 'F']) {
        const before = prepareScenarioGeometry(demoScenario(stability, keep, null));
        const after = prepareScenarioGeometry(demoScenario(stability, keep, farSouth_deg));
        expect([before.domain.spacing_m, after.domain.spacing_m]).toEqual(cells);
        expect(before.domainCoarsening).toBeNull();
        expect(after.domainCoarsening?.note).toMatch(
          new RegExp(`^derived domain: receptors\\[${keep}\\] \\('far-farm', ${distance.replace('.', '\\.')} km from the site\\).* the cells are ${cells[1]} m instead of ${cells[0]} m`),
        );
      }
    });
  }

  // Where the limit forces coarser cells the note is what is promised; measured, the figures still hold the
  // 10 % here (the fuel yard is carried below the grid at both cells: SMALL_AREA_SPREADS), so that is asserted too.
  for (const stability of ['B', 'D', 'F']) {
    it(`3 receptors and a farm 5.0 km south, class ${stability}: cells 20 m -> 50 m (noted), the others' figures within ${100 * RESOLUTION_CHANGE_LIMIT} %`, async () => {
      const before = await figures(stability, 3, null);
      const after = await figures(stability, 3, 0.045);
      expect([before.spacing_m, after.spacing_m]).toEqual([20, 50]);
      for (let r = 0; r < 3; r++) {
        // the care-home is far off the class F plume (4e-4 ug/m3): held to the limit all the same
        expect(before.receptors[r]).toBeGreaterThan(0);
        expect(Math.abs(after.receptors[r] / before.receptors[r] - 1)).toBeLessThanOrEqual(RESOLUTION_CHANGE_LIMIT);
      }
    }, 400_000);
  }

  it("puts the note in the run's notes and the coarsening in summary.json's domain", async () => {
    // Gaussian mode: the note comes from the geometry, whatever the mode.
    const result = await runScenario(demoScenario('D', 3, 0.045), { mode: 'gaussian' });
    expect(result.notes.filter((note) => note.startsWith('derived domain: receptors[3]'))).toHaveLength(1);
    expect(result.extraSummary.domain).toMatchObject({ spacing_m: 50, derived: true, coarsened: { by: 'receptors[3]', id: 'far-farm', nearSpacing_m: 20, maxCells: 4_000_000 } });
  }, 120_000);
});
