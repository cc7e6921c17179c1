/**
 * The pool of series solver threads (server/jobs/seriesSolverPool.ts): an hourly series solved through two
 * worker threads gives the in-process statistics (to the series tolerance: each thread warm-starts from
 * its own solves), input errors come back as RangeErrors naming the field, and an abort stops the run
 * at once with an AbortError.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { createSeriesSolverPool } from '../../../server/jobs/seriesSolverPool.ts';
import { runHourlySeries } from '../../../solver/drivers/hourlySeries.ts';
import type { ScenarioRunResult } from '../../../solver/drivers/types.ts';
import { SITE, baseInput, hoursFrom, seriesScenario } from '../../solver/meteorology/seriesFixture.ts';

const column = (result: ScenarioRunResult, key: string) => result.receptorColumns.find((c) => c.key === key)?.values as Float64Array;

describe('series solver pool', () => {
  const pool = createSeriesSolverPool(2);
  afterAll(() => pool.close());
  const scenario = seriesScenario({}, { halfWidth_m: 2000, spacing_m: 100, height_m: 1000, layers: 14 });
  const base = baseInput(scenario);
  // Three directions and two classes: several runs of one direction and class for the two lanes.
  const hours = hoursFrom('2031-06-01T00:00Z', 12, (h) => ({
    windSpeed_m_s: 3 + (h % 4) * 0.5,
    windFrom_deg: [250, 200, 300][h % 3],
    stability: h < 6 ? 'C' : 'D',
    mixingHeight_m: 800,
  }));

  it('gives the in-process series statistics within the series tolerance, solving in two threads', async () => {
    const threaded = await runHourlySeries(base, hours, { mode: 'grid', method: 'independentHours', site: SITE, solve: pool.solvers });
    const direct = await runHourlySeries(base, hours, { mode: 'grid', method: 'independentHours', site: SITE });
    const series = threaded.extraSummary.series as { solves: number; scaledReuses: number };
    // three directions x two classes; the other hours are exact wind-speed rescalings (no plume rise)
    expect(series.solves).toBe(6);
    expect(series.scaledReuses).toBe(6);
    for (const key of ['mean_ug_m3', 'max_ug_m3']) {
      const a = column(threaded, key);
      const b = column(direct, key);
      for (let r = 0; r < b.length; r++) {
        expect(b[r]).toBeGreaterThan(0);
        // Both stop at the series tolerance 1e-4 (relative change per sweep) from different warm starts.
        expect(Math.abs(a[r] - b[r]) / b[r]).toBeLessThan(2e-3);
      }
    }
  });

  it('passes an input error on as a RangeError naming the field', async () => {
    const bad = { ...base, sources: base.sources.map((source) => ({ ...source, emission_g_s: -1 })) };
    await expect(runHourlySeries(bad, hours.slice(0, 2), { mode: 'grid', method: 'independentHours', site: SITE, solve: pool.solvers })).rejects.toThrow(
      /emission_g_s is -1/,
    );
  });

  it('stops at once with an AbortError when aborted, and the pool is then closed', async () => {
    const own = createSeriesSolverPool(2);
    const controller = new AbortController();
    const run = runHourlySeries(base, hours, {
      mode: 'grid',
      method: 'independentHours',
      site: SITE,
      solve: own.solvers,
      control: { signal: controller.signal, onProgress: () => controller.abort() },
    });
    setTimeout(() => controller.abort(), 50);
    await expect(run).rejects.toMatchObject({ name: 'AbortError' });
    await expect(own.solvers[0]({ ...base, weather: undefined as never }, 'grid')).rejects.toThrow(/closed/);
    await own.close();
  });
});
