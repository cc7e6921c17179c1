/**
 * runScenario and the steady scenario driver: behaviour checks of the dispatch (mode override, weather
 * kinds, input errors named by field) and of the shaping for the writers (footprint = the ground-level
 * field, one concentration_ug_m3 column), plus the linearity every steady run promises
 * (solver/drivers/types.ts: doubling every emission doubles every field).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { runGaussianSteady } from '../../../solver/drivers/gaussianSteady.ts';
import { runScenario, ScenarioInputError, steadyInput } from '../../../solver/drivers/runScenario.ts';
import type { SteadySolver } from '../../../solver/drivers/solveSteady.ts';
import { prepareScenarioGeometry } from '../../../solver/grid/scenarioGeometry.ts';
import { resolveWeather } from '../../../solver/meteorology/resolveWeather.ts';

const DEMO = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');

/** The demo on a coarse grid (quick), parsed by the schema as the command line would. */
function smallDemo(change: (raw: Record<string, any>) => void = () => {}): Scenario {
  const raw = JSON.parse(readFileSync(DEMO, 'utf8'));
  raw.domain = { halfWidth_m: 3000, spacing_m: 150, height_m: 1000, layers: 10 };
  change(raw);
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  return outcome.scenario;
}

describe('runScenario, steady weather', () => {
  it('hands the writers the ground-level field as the footprint and one concentration column', async () => {
    const scenario = smallDemo();
    const result = await runScenario(scenario, { mode: 'gaussian' });
    // The same solve done by hand: the driver must pass it through unchanged.
    const geometry = prepareScenarioGeometry(scenario);
    if (scenario.weather.kind !== 'steady') throw new Error('the demo has steady weather');
    const direct = runGaussianSteady(steadyInput(scenario, geometry, resolveWeather(scenario.weather, scenario.site)));
    expect(result.mode).toBe('gaussian');
    expect(result.weatherKind).toBe('steady');
    expect(result.footprintStatistic).toBe('concentration');
    expect(Array.from(result.footprint_ug_m3)).toEqual(Array.from(direct.groundLevel_ug_m3));
    expect(result.receptorColumns.map((column) => column.key)).toEqual(['concentration_ug_m3']);
    expect(Array.from(result.receptorColumns[0].values)).toEqual(Array.from(direct.receptors_ug_m3));
    expect(result.sources.map((source) => source.id)).toEqual(['boiler-stack', 'fuel-yard']);
    expect(result.extraSummary).toMatchObject({ weather: { kind: 'steady', stability: 'D', stabilitySource: 'given' } });
    expect(result.extraSummary).toHaveProperty('assessment.background_ug_m3', 14);
  });

  it('is linear in the emissions: doubling every emission doubles every figure (1e-12 relative)', async () => {
    const once = await runScenario(smallDemo(), { mode: 'gaussian' });
    const twice = await runScenario(
      smallDemo((raw) => raw.sources.forEach((source: { emission_g_s: number }) => (source.emission_g_s *= 2))),
      { mode: 'gaussian' },
    );
    let largest = 0;
    once.footprint_ug_m3.forEach((value, index) => {
      largest = Math.max(largest, Math.abs(twice.footprint_ug_m3[index] - 2 * value) / Math.max(2 * value, 1e-300));
    });
    expect(largest).toBeLessThan(1e-12);
    const receptorsOnce = once.receptorColumns[0].values;
    twice.receptorColumns[0].values.forEach((value, index) => expect(value).toBeCloseTo(2 * receptorsOnce[index], 12));
  });

  it('uses the mode given over the scenario, and the scenario mode without one', async () => {
    const seen: string[] = [];
    const recording: SteadySolver = async (input, mode) => {
      seen.push(mode);
      return runGaussianSteady(input);
    };
    const scenario = smallDemo((raw) => (raw.solver = { mode: 'grid' }));
    await runScenario(scenario, { mode: 'gaussian', solve: recording });
    await runScenario(scenario, { solve: recording });
    // the grid run's second solve is its resolution check at half the cell size (made without asking
    // on a grid this small: solver/drivers/runChecks.ts)
    expect(seen).toEqual(['gaussian', 'grid', 'grid']);
  });

  it('names the field when the geometry cannot be built (a ScenarioInputError, exit 2 on the command line)', async () => {
    // A receptor 20 km away on a 6 km grid: the schema accepts it, the grid does not.
    const scenario = smallDemo((raw) => (raw.receptors[0].lat += 0.2));
    const attempt = runScenario(scenario, { mode: 'gaussian' });
    await expect(attempt).rejects.toBeInstanceOf(ScenarioInputError);
    await expect(runScenario(scenario, { mode: 'gaussian' })).rejects.toThrow(/^receptors\[0\]/);
  });
});

describe('runScenario, hourly series', () => {
  it('dispatches to the hourly driver: mean footprint, mean and max columns, standards by name', async () => {
    const scenario = smallDemo((raw) => {
      const { kind: _kind, ...fields } = raw.weather;
      raw.weather = {
        kind: 'hourly',
        hours: [0, 1, 2].map((hour) => ({ ...fields, time: `2026-03-02T0${hour}:00:00+00:00`, windFrom_deg: 240 + 10 * hour })),
      };
    });
    const result = await runScenario(scenario, { mode: 'gaussian' });
    expect(result.weatherKind).toBe('hourly');
    expect(result.footprintStatistic).toBe('mean');
    const keys = result.receptorColumns.map((column) => column.key);
    expect(keys.slice(0, 2)).toEqual(['mean_ug_m3', 'max_ug_m3']);
    expect(keys.some((key) => key.startsWith('no2_1_hour_mean'))).toBe(true);
    expect(result.extraSummary).toHaveProperty('domain.derived', false);
    // The mean never exceeds the hourly maximum at any receptor.
    const [mean, max] = result.receptorColumns;
    mean.values.forEach((value, index) => expect(value).toBeLessThanOrEqual(max.values[index]));
  });
});

describe('runScenario, wind rose', () => {
  it('dispatches to the wind-rose driver: mean footprint, mean and max columns', async () => {
    const scenario = smallDemo((raw) => {
      raw.weather = {
        kind: 'windRose',
        sectorWidth_deg: 90,
        cells: [0, 90, 180, 270].map((windFrom_deg) => ({ windFrom_deg, windSpeed_m_s: 5, stability: 'D', frequency: 0.25 })),
        rain_mm_h: 0,
        airTemperature_K: 283.15,
        anemometerHeight_m: 10,
      };
    });
    const result = await runScenario(scenario, { mode: 'gaussian' });
    expect(result.weatherKind).toBe('windRose');
    expect(result.footprintStatistic).toBe('mean');
    expect(result.receptorColumns.map((column) => column.key).slice(0, 2)).toEqual(['mean_ug_m3', 'max_ug_m3']);
  });
});

describe('runScenario, grid mode', () => {
  // The steady solve stops at a stated change tolerance, so its budget closes only approximately;
  // this is a behaviour check of the wiring, asking for 1e-3.
  it('solves on the grid by default and reports a mass budget that nearly closes', async () => {
    const result = await runScenario(smallDemo((raw) => (raw.solver = { mode: 'grid' })));
    expect(result.mode).toBe('grid');
    expect(result.massBudget_g).not.toBeNull();
    expect(Math.abs(result.massBudget_g!.relativeImbalance)).toBeLessThan(1e-3);
    expect(Math.max(...result.footprint_ug_m3)).toBeGreaterThan(0);
  });

  it('runs the continuous method as one time-march, bridging a gap, with a budget closing to 1e-9', async () => {
    const scenario = smallDemo((raw) => {
      const { kind: _kind, ...fields } = raw.weather;
      raw.weather = {
        kind: 'hourly',
        // Hours 0, 1 and 3: hour 2 is missing.
        hours: [0, 1, 3].map((hour) => ({ ...fields, time: `2026-03-02T0${hour}:00:00+00:00`, windFrom_deg: 250 })),
      };
      raw.solver = { mode: 'grid', hourlyMethod: 'continuous' };
    });
    const result = await runScenario(scenario);
    expect(result.weatherKind).toBe('hourly');
    const budget = result.massBudget_g!;
    // Conservation: emitted = in domain + decayed + washed out + deposited + outflow, over 4 hours marched.
    expect(budget.basis).toMatch(/0 to 14400 s/);
    expect(Math.abs(budget.relativeImbalance)).toBeLessThan(1e-9);
    expect(result.notes.some((note) => /1 missing hours marched through/.test(note))).toBe(true);
    const [mean, max] = result.receptorColumns;
    mean.values.forEach((value, index) => expect(value).toBeLessThanOrEqual(max.values[index] * (1 + 1e-12)));
  });
});
