/**
 * Wind roses in Gaussian mode: the rose's mean equals the frequency-weighted mean of the matching
 * steady runs (the definition of the long-term mean from a rose; each steady run made afresh here),
 * with and without speed-scaled reuse; the saving is counted.
 */
import { describe, expect, it } from 'vitest';
import { runWindRose } from '../../../solver/drivers/windRose.ts';
import { runGaussianSteady } from '../../../solver/drivers/gaussianSteady.ts';
import { resolveWeather } from '../../../solver/meteorology/resolveWeather.ts';
import { weightedPercentile } from '../../../solver/diagnostics/statistics.ts';
import type { SteadySolver } from '../../../solver/drivers/solveSteady.ts';
import type { ScenarioRunResult } from '../../../solver/drivers/types.ts';
import type { WindRoseWeather } from '../../../scenarios/format/types.ts';
import { SITE, baseInput, seriesScenario } from '../meteorology/seriesFixture.ts';

const gaussian: SteadySolver = async (input, _mode, control) => runGaussianSteady(input, control);
const column = (result: ScenarioRunResult, key: string) => result.receptorColumns.find((c) => c.key === key)?.values as Float64Array;

/** 12 sectors x 3 speeds x 2 classes, frequencies favouring the south-west. */
function rose(): WindRoseWeather {
  const cells: WindRoseWeather['cells'] = [];
  for (let s = 0; s < 12; s++) {
    for (const [speed, share] of [[2, 0.3], [5, 0.5], [9, 0.2]] as const) {
      for (const [stability, classShare] of [['D', 0.7], ['E', 0.3]] as const) {
        const sectorShare = 1 + 2 * Math.max(0, Math.cos(((s * 30 - 240) * Math.PI) / 180));
        cells.push({ windFrom_deg: s * 30, windSpeed_m_s: speed, stability, frequency: sectorShare * share * classShare });
      }
    }
  }
  const total = cells.reduce((sum, c) => sum + c.frequency, 0);
  for (const c of cells) c.frequency /= total;
  return { kind: 'windRose', sectorWidth_deg: 30, cells, rain_mm_h: 0, airTemperature_K: 283, anemometerHeight_m: 10 };
}

describe('wind rose (Gaussian mode)', () => {
  const scenario = seriesScenario();
  const base = baseInput(scenario);
  const weather = rose();
  // the matching steady runs, each made afresh
  const steady = weather.cells.map((cell) =>
    runGaussianSteady({ ...base, weather: resolveWeather({ ...cell, rain_mm_h: 0, airTemperature_K: 283, anemometerHeight_m: 10 }, SITE) }),
  );

  for (const speedScaling of [true, false]) {
    it(`mean = frequency-weighted mean of the steady runs (speed scaling ${speedScaling ? 'on' : 'off'})`, async () => {
      const result = await runWindRose(base, weather, { mode: 'gaussian', site: SITE, solve: gaussian, assessment: scenario.assessment, speedScaling });
      const mean = column(result, 'mean_ug_m3');
      for (let r = 0; r < base.receptors.length; r++) {
        const expected = weather.cells.reduce((sum, cell, i) => sum + cell.frequency * steady[i].receptors_ug_m3[r], 0);
        expect(expected).toBeGreaterThan(0.001);
        expect(Math.abs(mean[r] / expected - 1)).toBeLessThan(1e-9);
        // hourly standard: the weighted nearest-rank percentile of the cells' values
        const values = Float64Array.from(steady, (s) => s.receptors_ug_m3[r]);
        const p = weightedPercentile(values, weather.cells.map((c) => c.frequency), 100 * (1 - 18 / 8760));
        expect(column(result, 'no2_1_hour_mean_p99_79_ug_m3')[r]).toBeCloseTo(p, 9);
      }
      let worst = 0;
      for (let c = 0; c < base.grid.nx * base.grid.ny; c++) {
        const expected = weather.cells.reduce((sum, cell, i) => sum + cell.frequency * steady[i].groundLevel_ug_m3[c], 0);
        if (expected > 1e-6) worst = Math.max(worst, Math.abs(result.footprint_ug_m3[c] / expected - 1));
      }
      expect(worst).toBeLessThan(1e-6); // ground fields kept in float32
      const series = result.extraSummary.series as { solves: number; solvesSaved: number };
      expect(series.solves).toBe(speedScaling ? 24 : 72);
      expect(series.solvesSaved).toBe(speedScaling ? 48 : 0);
      // the daily standard needs a time order: left out, and said
      expect(result.receptorColumns.some((c) => c.key.startsWith('daily_mean'))).toBe(false);
      expect(result.notes.some((n) => /"Daily mean".*not computed from a wind rose/.test(n))).toBe(true);
      expect(result.windRose?.table.sectorCentres_deg.length).toBeGreaterThan(0);
    });
  }

  it('rejects frequencies that do not sum to 1, naming the field', async () => {
    const bad = { ...weather, cells: weather.cells.map((c) => ({ ...c, frequency: c.frequency * 0.9 })) };
    await expect(runWindRose(base, bad, { mode: 'gaussian', site: SITE, solve: gaussian })).rejects.toThrow(/weather\.cells: the frequencies sum to 0\.8999/);
  });
});
