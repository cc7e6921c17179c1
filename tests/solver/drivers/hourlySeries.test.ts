/**
 * Hourly series, hour by hour, in Gaussian mode (fast): behaviour and linearity checks from the issue.
 * - 24 identical hours reproduce the steady result within 1 % (exactly here: one solve reused);
 * - a series alternating two wind directions gives receptor means equal to the average of the two
 *   steady results within 3 % (linearity of the mean in the fields);
 * - the standard's column is the nearest-rank percentile of the receptor's own hourly values;
 * - speed-scaled reuse equals fresh solves (the Gaussian plume is exactly proportional to 1 / u
 *   without losses or plume rise: the plume formula, REFERENCES.md).
 */
import { describe, expect, it } from 'vitest';
import { runHourlySeries } from '../../../solver/drivers/hourlySeries.ts';
import { reuseRules } from '../../../solver/drivers/seriesSolves.ts';
import { runGaussianSteady } from '../../../solver/drivers/gaussianSteady.ts';
import { resolveWeather } from '../../../solver/meteorology/resolveWeather.ts';
import { nthHighest } from '../../../solver/diagnostics/statistics.ts';
import type { SteadySolver } from '../../../solver/drivers/solveSteady.ts';
import type { ScenarioRunResult } from '../../../solver/drivers/types.ts';
import { SITE, baseInput, hoursFrom, seriesScenario } from '../meteorology/seriesFixture.ts';

const gaussian: SteadySolver = async (input, _mode, control) => runGaussianSteady(input, control);
const column = (result: ScenarioRunResult, key: string) => {
  const found = result.receptorColumns.find((c) => c.key === key);
  if (!found) throw new Error(`no column ${key}: ${result.receptorColumns.map((c) => c.key).join(', ')}`);
  return found.values;
};

describe('hourly series, independent hours (Gaussian mode)', () => {
  const scenario = seriesScenario();
  const base = baseInput(scenario);
  const steadyFields = { windSpeed_m_s: 4, windFrom_deg: 250, stability: 'D' as const, mixingHeight_m: 800, rain_mm_h: 0, airTemperature_K: 285, anemometerHeight_m: 10 };
  const steady = runGaussianSteady({ ...base, weather: resolveWeather(steadyFields, SITE) });

  it('24 identical hours reproduce the steady result within 1 % (one solve, reused 23 times)', async () => {
    const hours = hoursFrom('2031-03-02T00:00Z', 24, () => ({ windSpeed_m_s: 4, windFrom_deg: 250, stability: 'D', mixingHeight_m: 800 }));
    let solves = 0;
    const counting: SteadySolver = async (input, mode, control) => { solves++; return gaussian(input, mode, control); };
    const result = await runHourlySeries(base, hours, { mode: 'gaussian', method: 'independentHours', site: SITE, solve: counting, assessment: scenario.assessment });
    expect(solves).toBe(1);
    const mean = column(result, 'mean_ug_m3');
    const max = column(result, 'max_ug_m3');
    // the two east receptors are downwind; the north one gets nothing in a wind from 250 degrees
    expect(steady.receptors_ug_m3[0]).toBeGreaterThan(1);
    expect(steady.receptors_ug_m3[2]).toBeGreaterThan(0.1);
    for (const r of [0, 2]) {
      expect(Math.abs(mean[r] / steady.receptors_ug_m3[r] - 1)).toBeLessThan(0.01);
      expect(Math.abs(max[r] / steady.receptors_ug_m3[r] - 1)).toBeLessThan(0.01);
    }
    expect(mean[1]).toBe(steady.receptors_ug_m3[1]);
    // the footprint is the mean field; stored in float32, so within 1e-6 relative of the steady field
    let worst = 0;
    for (let c = 0; c < steady.groundLevel_ug_m3.length; c++) {
      const s = steady.groundLevel_ug_m3[c];
      if (s > 1e-6) worst = Math.max(worst, Math.abs(result.footprint_ug_m3[c] / s - 1));
    }
    expect(worst).toBeLessThan(1e-6);
    expect(result.footprintStatistic).toBe('mean');
    expect(result.windRose?.caption).toMatch(/^Hourly weather /);
  });

  it('alternating two wind directions: receptor means are the average of the two steady results within 3 %', async () => {
    const other = runGaussianSteady({ ...base, weather: resolveWeather({ ...steadyFields, windFrom_deg: 200 }, SITE) });
    const hours = hoursFrom('2031-03-02T00:00Z', 48, (h) => ({ windSpeed_m_s: 4, windFrom_deg: h % 2 === 0 ? 250 : 200, stability: 'D', mixingHeight_m: 800 }));
    const result = await runHourlySeries(base, hours, { mode: 'gaussian', method: 'independentHours', site: SITE, solve: gaussian });
    const mean = column(result, 'mean_ug_m3');
    for (let r = 0; r < base.receptors.length; r++) {
      const expected = (steady.receptors_ug_m3[r] + other.receptors_ug_m3[r]) / 2;
      expect(expected).toBeGreaterThan(0.01);
      expect(Math.abs(mean[r] / expected - 1)).toBeLessThan(0.03);
    }
    expect(result.extraSummary.series).toMatchObject({ solves: 2, identicalReuses: 46 });
  });

  it('standard columns follow the definition: 18 allowed in 8760 -> the 19th highest hour of a year', async () => {
    // a year in which the direction sweeps through 360 degrees and the class cycles, so values vary
    const classes = ['B', 'C', 'D', 'D', 'E', 'F'] as const;
    const hours = hoursFrom('2031-01-01T00:00Z', 8760, (h) => ({
      windSpeed_m_s: 2 + (h % 7), windFrom_deg: (30 * (h % 12) + 75) % 360, stability: classes[h % 5], mixingHeight_m: 900,
    }));
    const smallBase = baseInput(seriesScenario({}, { halfWidth_m: 2500, spacing_m: 500, height_m: 1000, layers: 8 }));
    const result = await runHourlySeries(smallBase, hours, { mode: 'gaussian', method: 'independentHours', site: SITE, solve: gaussian, assessment: scenario.assessment });
    // recompute one receptor's hourly values from fresh steady solves of the distinct hours
    const hourly = new Float64Array(8760);
    const cache = new Map<string, number>();
    for (let h = 0; h < 8760; h++) {
      const w = resolveWeather(hours[h], SITE);
      const key = `${w.windFrom_deg}|${w.stability}|${w.windSpeed_m_s}`;
      if (!cache.has(key)) cache.set(key, runGaussianSteady({ ...smallBase, weather: w }).receptors_ug_m3[0]);
      hourly[h] = cache.get(key) as number;
    }
    expect(column(result, 'no2_1_hour_mean_p99_79_ug_m3')[0]).toBeCloseTo(nthHighest(hourly, 19), 9);
    const exceedances = hourly.filter((v) => v + 10 > 200).length;
    expect(column(result, 'no2_1_hour_mean_exceedances')[0]).toBe(exceedances);
    let sum = 0;
    for (const v of hourly) sum += v;
    expect(column(result, 'no2_annual_mean_period_mean_ug_m3')[0]).toBeCloseTo(sum / 8760, 9);
    expect(column(result, 'mean_ug_m3')[0]).toBeCloseTo(sum / 8760, 9);
    // 365 daily means, 35 allowed -> the 36th highest day
    const daily = Float64Array.from({ length: 365 }, (_, d) => hourly.slice(24 * d, 24 * d + 24).reduce((a, b) => a + b, 0) / 24);
    expect(column(result, 'daily_mean_p90_41_ug_m3')[0]).toBeCloseTo(nthHighest(daily, 36), 9);
  });

  it('speed-scaled reuse equals fresh solves (no losses, no plume rise: C proportional to 1/u)', async () => {
    const hours = hoursFrom('2031-06-01T00:00Z', 30, (h) => ({ windSpeed_m_s: 1.5 + (h % 10) * 0.7, windFrom_deg: h < 15 ? 240 : 300, stability: h % 3 === 0 ? 'C' : 'E', mixingHeight_m: 700 }));
    expect(reuseRules(base).speedScaling).toBe(true);
    const scaled = await runHourlySeries(base, hours, { mode: 'gaussian', method: 'independentHours', site: SITE, solve: gaussian, assessment: scenario.assessment });
    const fresh = await runHourlySeries(base, hours, { mode: 'gaussian', method: 'independentHours', site: SITE, solve: gaussian, assessment: scenario.assessment, speedScaling: false });
    expect((scaled.extraSummary.series as { solves: number }).solves).toBe(4);
    const distinct = new Set(hours.map((h) => `${h.windSpeed_m_s}|${h.windFrom_deg}|${h.stability}`)).size;
    expect(distinct).toBeGreaterThan(20);
    expect((fresh.extraSummary.series as { solves: number }).solves).toBe(distinct);
    for (const key of ['mean_ug_m3', 'max_ug_m3', 'no2_1_hour_mean_p99_79_ug_m3']) {
      const a = column(scaled, key);
      const b = column(fresh, key);
      for (let r = 0; r < a.length; r++) expect(Math.abs(a[r] - b[r])).toBeLessThanOrEqual(1e-9 * Math.abs(b[r]));
      expect(b[0]).toBeGreaterThan(0);
    }
  });

  it('no speed scaling with plume rise, decay or deposition; rain ignored only without washout', () => {
    const withRise = baseInput(seriesScenario({ sources: [{ kind: 'point', id: 's', name: 's', lat: 52.31, lon: 4.62, height_m: 30, diameter_m: 1, exitVelocity_m_s: 10, exitTemperature_K: 400, emission_g_s: 2, plumeRise: true }] }));
    expect(reuseRules(withRise).speedScaling).toBe(false);
    expect(reuseRules(withRise).ignoresTemperature).toBe(false);
    const decaying = baseInput(seriesScenario({ pollutant: { name: 'x', halfLife_h: 4, washout: { a_per_s: 7e-5, b: 0.8 }, depositionVelocity_m_s: 0 } }));
    expect(reuseRules(decaying).speedScaling).toBe(false);
    expect(reuseRules(decaying).ignoresRain).toBe(false);
    expect(reuseRules(base).ignoresRain).toBe(true);
  });

  it('counts and reports gaps; rejects hours out of order naming the row', async () => {
    const hours = hoursFrom('2031-03-02T00:00Z', 30, () => ({ windSpeed_m_s: 4, windFrom_deg: 250, stability: 'D' })).filter((_, h) => h < 10 || h > 14);
    const result = await runHourlySeries(base, hours, { mode: 'gaussian', method: 'independentHours', site: SITE, solve: gaussian });
    expect((result.extraSummary.weather as { coverage: { gapCount: number; missingHours: number } }).coverage).toMatchObject({ gapCount: 1, missingHours: 5 });
    expect(result.notes.some((n) => /1 gaps \(5 missing hours of 30\)/.test(n))).toBe(true);
    const swapped = [...hours];
    [swapped[3], swapped[4]] = [swapped[4], swapped[3]];
    await expect(runHourlySeries(base, swapped, { mode: 'gaussian', method: 'independentHours', site: SITE, solve: gaussian })).rejects.toThrow(/weather\.hours\[4\]\.time/);
    const bad = [...hours];
    bad[2] = { ...bad[2], windSpeed_m_s: -1 };
    await expect(runHourlySeries(base, bad, { mode: 'gaussian', method: 'independentHours', site: SITE, solve: gaussian })).rejects.toThrow(/weather\.hours\[2\]\.windSpeed_m_s: -1/);
  });

  it('continuous needs grid mode, said plainly', async () => {
    const hours = hoursFrom('2031-03-02T00:00Z', 2, () => ({ windSpeed_m_s: 4, windFrom_deg: 250, stability: 'D' }));
    await expect(runHourlySeries(base, hours, { mode: 'gaussian', method: 'continuous', site: SITE, solve: gaussian })).rejects.toThrow(/continuous" needs grid mode/);
  });
});
