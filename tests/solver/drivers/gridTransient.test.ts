/**
 * The continuous time-march: the field carried from hour to hour with new weather each hour, the mass
 * budget closing with every loss on (conservation check), and the march settling on the steady solve's
 * answer.
 */
import { describe, expect, it } from 'vitest';
import { solveGridSteady } from '../../../solver/drivers/gridSteady.ts';
import { createGridTransient, marchGridPeriod, runGridTransient } from '../../../solver/drivers/gridTransient.ts';
import type { ResolvedWeather, SteadyRunInput } from '../../../solver/drivers/types.ts';
import { testGrid } from '../verification/testGrid.ts';

const weather: ResolvedWeather = {
  windSpeed_m_s: 4,
  windFrom_deg: 260,
  stability: 'D',
  mixingHeight_m: 150,
  rain_mm_h: 1.5,
  airTemperature_K: 288.15,
  anemometerHeight_m: 10,
  calm: false,
};

function input(): SteadyRunInput {
  return {
    grid: testGrid({ nx: 48, ny: 24, nz: 12, height_m: 240, spacing_m: 25, xWest_m: -200, ySouth_m: -300 }),
    sources: [{ kind: 'point', id: 'stack', x_m: -100, y_m: 0, height_m: 40, diameter_m: 1, exitVelocity_m_s: 5, exitTemperature_K: 300, emission_g_s: 1, plumeRise: false }],
    receptors: [{ id: 'r', x_m: 600, y_m: 50, height_m: 1.5 }],
    pollutant: { name: 'tracer', halfLife_h: 0.5, washout: { a_per_s: 7e-5, b: 0.8 }, depositionVelocity_m_s: 0.005 },
    weather,
    dispersion: { kind: 'constant', horizontal_m2_s: 15, vertical_m2_s: 8 },
    landUse: 'rural',
    windProfile: 'powerLaw',
    groundLevelHeight_m: 1.5,
  };
}

describe('grid time-march', () => {
  it('carries the field across hours with new weather and closes the budget to 1e-9', () => {
    const run = createGridTransient(input(), weather);
    const first = marchGridPeriod(run, weather, 1800);
    const massAfterFirst = run.model.budget.inDomain;
    expect(massAfterFirst).toBeGreaterThan(0);
    // The wind turns and drops, the rain stops; the field is not reset.
    const second = marchGridPeriod(run, { ...weather, windFrom_deg: 200, windSpeed_m_s: 2.5, rain_mm_h: 0, mixingHeight_m: 220 }, 1800);
    const budget = second.massBudget_g;
    expect(budget.emitted).toBeCloseTo(3600, 6);
    expect(Math.abs(budget.relativeImbalance)).toBeLessThan(1e-9);
    for (const term of [budget.inDomain, budget.decayed, budget.washedOut, budget.dryDeposited, budget.outflow]) expect(term).toBeGreaterThan(0);
    expect(first.massBudget_g.washedOut).toBeCloseTo(budget.washedOut, 9); // no rain in the second half hour
    expect(run.model.clock.time_s).toBeCloseTo(3600, 9);
  });

  it('settles on the steady answer within 4 % (the steady solve weights slopes by 1/2, the march by (1 - C)/2)', () => {
    const steady = solveGridSteady(input());
    const march = runGridTransient(input(), 4 * 3600);
    expect(Math.abs(march.receptorsEnd_ug_m3[0] / steady.receptors_ug_m3[0] - 1)).toBeLessThan(0.04);
  });

  it('stops with an AbortError when the signal is aborted', () => {
    const controller = new AbortController();
    controller.abort();
    expect(() => runGridTransient(input(), 600, { signal: controller.signal })).toThrow(/aborted/);
  });
});
