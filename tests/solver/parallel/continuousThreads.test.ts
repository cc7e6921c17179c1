/**
 * A continuous grid march with its steps split over two threads by rows (the command line's default on
 * two cores) gives the one-thread march's hourly values exactly (the slab kernel is bit-identical) and
 * its mass budget to rounding.
 */
import { describe, expect, it } from 'vitest';
import { runHourlySeries } from '../../../solver/drivers/hourlySeries.ts';
import { continuousGridSeries, continuousGridSeriesWithThreads } from '../../../solver/drivers/runScenario.ts';
import { SITE, baseInput, hoursFrom, seriesScenario } from '../meteorology/seriesFixture.ts';

describe('continuous march on two step threads', () => {
  it('gives the one-thread hourly receptor values and mass budget exactly', async () => {
    // 40 x 40 cells: two slabs of 20 rows
    const base = baseInput(seriesScenario({}, { halfWidth_m: 2000, spacing_m: 100, height_m: 1000, layers: 10 }));
    const hours = hoursFrom('2031-06-01T00:00Z', 2, (h) => ({ windSpeed_m_s: 6, windFrom_deg: 250 + 20 * h, stability: 'D', mixingHeight_m: 800 }));
    const run = (continuous: typeof continuousGridSeries) => runHourlySeries(base, hours, { mode: 'grid', method: 'continuous', site: SITE, continuous });
    const one = await run(continuousGridSeries);
    const two = await run(continuousGridSeriesWithThreads(2));
    expect(two.steps).toBe(one.steps);
    for (const column of one.receptorColumns) {
      const other = two.receptorColumns.find((c) => c.key === column.key)!;
      expect(Array.from(other.values)).toEqual(Array.from(column.values));
    }
    // The field is bit-identical; the budget's tallies are summed slab by slab, so they agree to rounding.
    for (const term of ['emitted', 'inDomain', 'outflow', 'decayed', 'washedOut', 'dryDeposited'] as const) {
      expect(Math.abs(two.massBudget_g![term] - one.massBudget_g![term])).toBeLessThanOrEqual(1e-12 * one.massBudget_g!.emitted);
    }
    expect(Math.max(...one.receptorColumns.find((c) => c.key === 'mean_ug_m3')!.values)).toBeGreaterThan(0);
    expect(() => continuousGridSeriesWithThreads(0)).toThrow(/stepThreads is 0/);
  });
});
