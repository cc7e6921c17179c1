/**
 * Series statistics against the standards' definitions (REFERENCES.md: Directive 2008/50/EC [read];
 * percentile from allowed exceedances 100 (1 - n/N) [derived]) and against plain sorting.
 */
import { describe, expect, it } from 'vitest';
import {
  averagingPlan,
  exceedanceCount,
  maximum,
  mean,
  nearestRankForAllowedExceedances,
  nthHighest,
  percentileForStandard,
  percentileNearestRank,
  periodMeans,
  seriesCoverage,
  standardColumnKey,
  standardExceedanceKey,
  standardFigures,
} from '../../../solver/diagnostics/statistics.ts';
import { parseIsoTime } from '../../../solver/meteorology/time.ts';

const HOUR = 3_600_000;

/** A deterministic shuffle (linear congruential generator) so the order of values is not sorted. */
function shuffled(values: Float64Array, seed = 12345): Float64Array {
  const out = values.slice();
  let state = seed;
  for (let i = out.length - 1; i > 0; i--) {
    state = (state * 1664525 + 1013904223) >>> 0;
    const j = state % (i + 1);
    [out[i], out[j]] = [out[j], out[i]];
  }
  return out;
}

const hourStarts = (first: string, count: number) => {
  const start = parseIsoTime(first).epoch_ms;
  return Float64Array.from({ length: count }, (_, h) => start + h * HOUR);
};

describe('percentiles from allowed exceedances (Directive 2008/50/EC via REFERENCES.md)', () => {
  it('p = 100 (1 - n/N): NO2 1-h 18 -> 99.79, PM10 24-h 35 -> 90.41, SO2 1-h 24 -> 99.73, SO2 24-h 3 -> 99.18', () => {
    expect(percentileForStandard({ name: 'NO2 1-h', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 18 })).toBeCloseTo(99.79, 2);
    expect(percentileForStandard({ name: 'PM10 24-h', limit_ug_m3: 50, averaging_h: 24, allowedExceedances: 35 })).toBeCloseTo(90.41, 2);
    expect(percentileForStandard({ name: 'SO2 1-h', limit_ug_m3: 350, averaging_h: 1, allowedExceedances: 24 })).toBeCloseTo(99.73, 2);
    expect(percentileForStandard({ name: 'SO2 24-h', limit_ug_m3: 125, averaging_h: 24, allowedExceedances: 3 })).toBeCloseTo(99.18, 2);
  });

  it('18 allowed in 8760 hours: the 99.79th percentile of a year is its 19th highest hour', () => {
    const values = shuffled(Float64Array.from({ length: 8760 }, (_, i) => i + 1)); // 1..8760
    expect(nearestRankForAllowedExceedances(8760, 18, 8760)).toBe(8742);
    const standard = { name: '1-hour mean', limit_ug_m3: 8742, averaging_h: 1, allowedExceedances: 18 };
    const plan = averagingPlan(hourStarts('2031-01-01T00:00Z', 8760), 0, 1);
    const figures = standardFigures(values, plan, standard, 0);
    expect(figures.value_ug_m3).toBe(8742);
    expect(figures.value_ug_m3).toBe(nthHighest(values, 19));
    // at the limit: exactly 18 hours exceed it (strictly above), the allowed number
    expect(figures.exceedances).toBe(18);
    // lower the limit by half a unit: 19 exceedances, and the percentile is then above the limit
    expect(standardFigures(values, plan, { ...standard, limit_ug_m3: 8741.5 }, 0).exceedances).toBe(19);
    // background counts towards exceedances only
    expect(standardFigures(values, plan, standard, 10).exceedances).toBe(28);
    expect(standardFigures(values, plan, standard, 10).value_ug_m3).toBe(8742);
  });

  it('35 allowed in 365 days: the 90.41st percentile of daily means is the 36th highest day', () => {
    // 365 days, each day constant at its day number, so the daily means are 1..365
    const starts = hourStarts('2031-01-01T00:00+01:00', 8760);
    const hourly = Float64Array.from({ length: 8760 }, (_, h) => Math.floor(h / 24) + 1);
    const standard = { name: 'PM10 24-hour', limit_ug_m3: 50, averaging_h: 24, allowedExceedances: 35 };
    const plan = averagingPlan(starts, 60, 24);
    expect(plan.periodCount).toBe(365);
    const figures = standardFigures(hourly, plan, standard, 0);
    expect(figures.value_ug_m3).toBe(330); // 365 - 35
    expect(figures.exceedances).toBe(315); // days 51..365
  });

  it('nearest-rank percentile agrees with sorting for random data, and nth highest with sorting', () => {
    let state = 7;
    const values = Float64Array.from({ length: 1001 }, () => ((state = (state * 1103515245 + 12345) % 2147483648) / 2147483648) * 100);
    const sorted = Array.from(values).sort((a, b) => a - b);
    for (const p of [1, 50, 90.41, 99.79, 100]) {
      expect(percentileNearestRank(values, p)).toBe(sorted[Math.ceil((p / 100) * values.length) - 1]);
    }
    for (const n of [1, 2, 19, 500, 1001]) expect(nthHighest(values, n)).toBe(sorted[sorted.length - n]);
    expect(maximum(values)).toBe(sorted[1000]);
    expect(mean(Float64Array.of(1, 2, 3, 6))).toBe(3);
    expect(exceedanceCount(Float64Array.of(1, 2, 3, 6), 2)).toBe(2);
  });

  it('a short series (two weeks): the 99.79th percentile is the highest hour (nearest rank ceil(0.9979 x 336) = 336)', () => {
    const values = Float64Array.from({ length: 336 }, (_, i) => i);
    expect(nearestRankForAllowedExceedances(336, 18, 8760)).toBe(336);
    const plan = averagingPlan(hourStarts('2031-03-01T00:00Z', 336), 0, 1);
    expect(standardFigures(values, plan, { name: 'x', limit_ug_m3: 1, averaging_h: 1, allowedExceedances: 18 }, 0).value_ug_m3).toBe(335);
  });
});

describe('averaging periods', () => {
  it('calendar-day means follow the series offset, not UTC', () => {
    // 48 hours from local midnight at +01:00 (= 23:00Z the day before): day 1 all 1, day 2 all 3
    const starts = hourStarts('2031-01-01T00:00+01:00', 48);
    const hourly = Float64Array.from({ length: 48 }, (_, h) => (h < 24 ? 1 : 3));
    const local = periodMeans(hourly, averagingPlan(starts, 60, 24));
    expect(Array.from(local)).toEqual([1, 3]);
    // grouped in UTC the first hour would fall on 31 Dec (one hour: an incomplete day) and 1 Jan would
    // take one hour of the second local day
    const utcPlan = averagingPlan(starts, 0, 24);
    expect(utcPlan.incompletePeriods).toBe(1);
    expect(Array.from(periodMeans(hourly, utcPlan))).toEqual([(23 + 3) / 24, 3]);
  });

  it('a day with fewer than 18 of 24 hours is left out (75 % capture, Directive 2008/50/EC, from memory)', () => {
    const all = hourStarts('2031-05-01T00:00Z', 72);
    const kept = Array.from(all).filter((t, h) => !(h >= 24 && h < 31)); // day 2 loses 7 hours -> 17 left
    const plan = averagingPlan(kept, 0, 24);
    expect(plan.periodCount).toBe(2);
    expect(plan.incompletePeriods).toBe(1);
    const keptSix = Array.from(all).filter((t, h) => !(h >= 24 && h < 30)); // 18 left: counts
    expect(averagingPlan(keptSix, 0, 24).periodCount).toBe(3);
  });

  it('8-hour blocks are calendar aligned; the period mean is the mean of all hours', () => {
    const starts = hourStarts('2031-05-01T00:00Z', 24);
    const hourly = Float64Array.from({ length: 24 }, (_, h) => h);
    expect(Array.from(periodMeans(hourly, averagingPlan(starts, 0, 8)))).toEqual([3.5, 11.5, 19.5]);
    const annual = { name: 'Annual mean', limit_ug_m3: 10, averaging_h: 8760, allowedExceedances: 0 };
    const f = standardFigures(hourly, averagingPlan(starts, 0, 8760), annual, 0);
    expect(f).toEqual({ statistic: 'mean', value_ug_m3: 11.5, exceedances: 1, periods: 1 });
  });

  it('rejects an averaging period that does not divide a day, naming the standard', () => {
    expect(() => percentileForStandard({ name: 'odd', limit_ug_m3: 1, averaging_h: 5, allowedExceedances: 0 })).toThrow(/"odd"\]\.averaging_h: 5/);
  });
});

describe('coverage', () => {
  it('counts and lists gaps; hours present / expected', () => {
    const starts = Array.from(hourStarts('2031-01-01T00:00Z', 10)).filter((_, h) => h !== 3 && h !== 4 && h !== 7);
    const coverage = seriesCoverage(starts);
    expect(coverage.hoursPresent).toBe(7);
    expect(coverage.hoursExpected).toBe(10);
    expect(coverage.fraction).toBeCloseTo(0.7, 12);
    expect(coverage.gapCount).toBe(2);
    expect(coverage.missingHours).toBe(3);
    expect(coverage.gaps).toEqual([
      { from: '2031-01-01T03:00:00.000Z', missingHours: 2 },
      { from: '2031-01-01T07:00:00.000Z', missingHours: 1 },
    ]);
  });

  it('rejects duplicated, reversed or off-grid hours, naming the row', () => {
    const t = parseIsoTime('2031-01-01T00:00Z').epoch_ms;
    expect(() => seriesCoverage([t, t + HOUR, t + HOUR])).toThrow(/weather\.hours\[2\]\.time/);
    expect(() => seriesCoverage([t, t + 1.5 * HOUR])).toThrow(/1\.5 h after/);
  });
});

describe('column keys', () => {
  it('derive from the standard name and statistic', () => {
    expect(standardColumnKey({ name: '1-hour mean', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 18 })).toBe('1_hour_mean_p99_79_ug_m3');
    expect(standardColumnKey({ name: 'NO2 annual', limit_ug_m3: 40, averaging_h: 8760, allowedExceedances: 0 })).toBe('no2_annual_period_mean_ug_m3');
    expect(standardExceedanceKey({ name: 'PM10 24-h (EU)', limit_ug_m3: 50, averaging_h: 24, allowedExceedances: 35 })).toBe('pm10_24_h_eu_exceedances');
  });
});

describe('weighted percentile (frequency distribution of a wind rose)', () => {
  it('is the nearest-rank percentile when every weight is equal', async () => {
    const { weightedPercentile } = await import('../../../solver/diagnostics/statistics.ts');
    const values = Float64Array.from({ length: 200 }, (_, i) => (i * 7919) % 200);
    const weights = new Float64Array(200).fill(1 / 200);
    for (const p of [50, 90.41, 99.5, 100]) expect(weightedPercentile(values, weights, p)).toBe(percentileNearestRank(values, p));
  });
  it('takes the value where the cumulative frequency reaches p', async () => {
    const { weightedPercentile } = await import('../../../solver/diagnostics/statistics.ts');
    // 90 % of the time 1, 9.9 % 5, 0.1 % 100: 99.79th -> 5, 99.95th -> 100
    expect(weightedPercentile([5, 1, 100], [0.099, 0.9, 0.001], 99.79)).toBe(5);
    expect(weightedPercentile([5, 1, 100], [0.099, 0.9, 0.001], 99.95)).toBe(100);
    expect(weightedPercentile([5, 1, 100], [0.099, 0.9, 0.001], 50)).toBe(1);
  });
});

describe('daily maximum of running 8-hour means (the CO standard; Directive 2008/50/EC Annex VII, from memory)', () => {
  const HOUR = 3_600_000;
  const start = Date.UTC(2031, 0, 1);
  const hoursFrom = (count: number, skip: (h: number) => boolean = () => false) =>
    Float64Array.from(Array.from({ length: count }, (_, h) => h).filter((h) => !skip(h)).map((h) => start + h * HOUR));
  const co = { name: 'CO 8-hour', limit_ug_m3: 1.28, averaging_h: 8, allowedExceedances: 0, runningMean: true };

  it('each running mean belongs to the day its last hour is in; the day takes the largest (worked by hand)', () => {
    // Day 1: 1 from 10:00 to 17:00, 8 at 23:00; day 2: 2.4 at 06:00 (UTC, offset 0). By hand:
    // day 1: the window 10:00-17:00 has mean 1, the window 16:00-23:00 (1 + 1 + 8) / 8 = 1.25, its largest;
    // day 2: 17:00-00:00 gives 9 / 8 = 1.125 and 23:00-06:00 gives (8 + 2.4) / 8 = 1.3, its largest.
    // Calendar-aligned 8-hour blocks would give 1.25 and 0.3: the 23:00 peak counts for day 2 only when running.
    const starts = hoursFrom(48);
    const hourly = new Float64Array(48);
    for (let h = 10; h <= 17; h++) hourly[h] = 1;
    hourly[23] = 8;
    hourly[30] = 2.4;
    const plan = averagingPlan(starts, 0, 8, true);
    expect(plan.periodCount).toBe(2);
    const maxima = periodMeans(hourly, plan);
    expect(maxima[0]).toBeCloseTo(1.25, 12);
    expect(maxima[1]).toBeCloseTo(1.3, 12);
    const blocks = periodMeans(hourly, averagingPlan(starts, 0, 8));
    expect(blocks[2]).toBeCloseTo(1.25, 12);
    expect(blocks[3]).toBeCloseTo(0.3, 12);
    // The standard: periods are days (365 a year), 0 allowed -> the highest daily maximum; one day above 1.28.
    const figures = standardFigures(hourly, plan, co, 0);
    expect(figures.value_ug_m3).toBeCloseTo(1.3, 12);
    expect(figures.exceedances).toBe(1);
    expect(figures.periods).toBe(2);
    expect(percentileForStandard({ ...co, allowedExceedances: 3 })).toBeCloseTo(100 * (1 - 3 / 365), 12);
  });

  it('a running mean needs 6 of its 8 hours, a day 18 of its 24 running means (75 %)', () => {
    // Day 2 misses 16:00-18:00: the windows ending at 19:00-23:00 hold 5 hours each and are dropped; the
    // series starts at 00:00 on day 1, so day 1's windows ending before 05:00 are dropped too (19 kept).
    const starts = hoursFrom(48, (h) => h >= 40 && h <= 42);
    const plan = averagingPlan(starts, 0, 8, true);
    expect(plan.periodCount).toBe(1);
    expect(plan.incompletePeriods).toBe(1);
  });

  it('refuses averaging periods it cannot compute, naming the standard', () => {
    expect(() => percentileForStandard({ ...co, averaging_h: 30 })).toThrow(/CO 8-hour.*averaging_h: 30 is not allowed for running means/);
    expect(() => percentileForStandard({ ...co, runningMean: false, averaging_h: 5 })).toThrow(/averaging_h: 5 is not allowed/);
  });
});
