/**
 * The worker-thread wrapper of the grid steady solve gives exactly the in-process answer, reports
 * progress, passes input errors on as RangeErrors and stops at once when aborted.
 */
import { describe, expect, it } from 'vitest';
import { solveGridSteadyInWorker } from '../../../server/jobs/solveInWorker.ts';
import { solveGridSteady } from '../../../solver/drivers/gridSteady.ts';
import type { SteadyRunInput } from '../../../solver/drivers/types.ts';
import { testGrid } from '../../solver/verification/testGrid.ts';

function input(emission_g_s = 1): SteadyRunInput {
  return {
    grid: testGrid({ nx: 40, ny: 20, nz: 10, height_m: 200, spacing_m: 25, xWest_m: -200, ySouth_m: -250 }),
    sources: [{ kind: 'point', id: 'stack', x_m: -100, y_m: 0, height_m: 40, diameter_m: 1, exitVelocity_m_s: 5, exitTemperature_K: 300, emission_g_s, plumeRise: false }],
    receptors: [{ id: 'r', x_m: 500, y_m: 20, height_m: 1.5 }],
    pollutant: { name: 'tracer', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 },
    weather: { windSpeed_m_s: 4, windFrom_deg: 265, stability: 'D', mixingHeight_m: 150, rain_mm_h: 0, airTemperature_K: 288, anemometerHeight_m: 10, calm: false },
    dispersion: { kind: 'constant', horizontal_m2_s: 10, vertical_m2_s: 5 },
    landUse: 'rural',
    windProfile: 'powerLaw',
    groundLevelHeight_m: 1.5,
  };
}

describe('solveGridSteadyInWorker', () => {
  it('gives the in-process result exactly, with progress messages', async () => {
    const messages: string[] = [];
    const threaded = await solveGridSteadyInWorker(input(), { onProgress: (_fraction, message) => messages.push(message) });
    const direct = solveGridSteady(input());
    expect(threaded.receptors_ug_m3).toEqual(direct.receptors_ug_m3);
    expect(threaded.groundLevel_ug_m3).toEqual(direct.groundLevel_ug_m3);
    expect(threaded.massBudget_g).toEqual(direct.massBudget_g);
    expect(threaded.receptors_ug_m3[0]).toBeGreaterThan(0);
    expect(messages.some((message) => /steady sweep/.test(message))).toBe(true);
  });

  it('passes a bad input on as a RangeError naming the field', async () => {
    await expect(solveGridSteadyInWorker(input(-1))).rejects.toThrow(RangeError);
    await expect(solveGridSteadyInWorker(input(-1))).rejects.toThrow(/emission_g_s is -1/);
  });

  it('rejects with an AbortError when aborted', async () => {
    const controller = new AbortController();
    const running = solveGridSteadyInWorker(input(), { signal: controller.signal });
    controller.abort();
    await expect(running).rejects.toMatchObject({ name: 'AbortError' });
  });
});
