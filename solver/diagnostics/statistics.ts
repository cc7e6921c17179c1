/**
 * Statistics of a series of hourly concentrations against air-quality standards: mean, maximum, n-th
 * highest, the percentile matching a standard's allowed exceedances, exceedance counts, calendar-day
 * means, the period mean, and the coverage of the series.
 *
 * Definitions, stated once:
 * - Percentile matching a standard (REFERENCES.md [derived]): p = 100 (1 - n / N) with n the allowed
 *   exceedances a year and N the averaging periods in a year, N = 8760 / averaging_h (8760 hours,
 *   365 days: a calendar year of 365 days, as the standards count). 18 allowed hourly exceedances ->
 *   99.79th percentile.
 * - Rank (nearest-rank method): the p-th percentile of M values is the value at ascending rank
 *   ceil(p M / 100) (1-based), i.e. the (M - ceil(p M / 100) + 1)-th highest. For a full year this is
 *   the (n + 1)-th highest value, so "the percentile is at or below the limit" is the same statement
 *   as "at most n periods exceed it". The rank is computed in integers from n and N where it can be
 *   (M p / 100 = M (N - n) / N), so no rounding of p moves it.
 * - An exceedance is a period whose value is strictly above the limit.
 * - Calendar-day means (averaging_h = 24) are taken over the days of the series' own time-zone offset
 *   (the offset of its first hour); a day counts when at least 18 of its 24 hours are present (75 %, the
 *   data-capture rule for daily means from hourly values in Directive 2008/50/EC, from memory); the
 *   others are reported as incomplete and left out. Other averaging periods shorter than a day must
 *   divide 24 and are calendar-aligned blocks in the same way (same 75 % rule).
 * - Running means (a standard with runningMean, the CO standard's "maximum daily 8-hour running mean",
 *   Directive 2008/50/EC Annex VII, from memory): for every hour present, the mean of the hours present
 *   among the averaging_h hours ending with it, kept when at least 75 % of them are present (6 of 8); each
 *   running mean is assigned to the calendar day (series offset) in which its last hour falls, and the
 *   day's statistic is its largest running mean. A day counts when at least 75 % of its 24 running means
 *   are kept (18); periods a year are then days (365), and allowedExceedances counts days.
 * - averaging_h >= 8760: the mean over the whole series (the period mean), compared with the limit.
 * - Hours missing from the series are neither invented nor interpolated: statistics use the hours
 *   present, and the coverage (present / expected, with each gap) is reported beside them.
 */
import type { AirQualityStandard } from '../../scenarios/format/types.ts';
import { calendarDay, HOUR_MS } from '../meteorology/time.ts';

/** Hours in the year the standards count in [h]. */
export const HOURS_PER_YEAR = 8760;

/** Fraction of an averaging period's hours that must be present for its mean to count [-] (75 %). */
export const MINIMUM_PERIOD_CAPTURE = 0.75;

/** A run of missing hours. */
export interface SeriesGap {
  /** start of the first missing hour, ISO 8601 UTC */
  from: string;
  /** number of consecutive missing hours */
  missingHours: number;
}

/** How much of the span between the first and last hour the series covers. */
export interface SeriesCoverage {
  hoursPresent: number;
  /** (last start - first start) / 1 h + 1 */
  hoursExpected: number;
  /** hoursPresent / hoursExpected [-] */
  fraction: number;
  gapCount: number;
  missingHours: number;
  /** the gaps, in time order (at most the first 100 listed) */
  gaps: SeriesGap[];
}

/** Most gaps listed one by one in a coverage report; the counts cover all of them. */
const MAX_GAPS_LISTED = 100;

/**
 * Coverage of hour starts that must be strictly increasing whole hours apart.
 *
 * @param hourStarts_ms the start of each hour present [ms since epoch], strictly increasing
 * @throws RangeError naming the first hour that is out of order, duplicated or off the hour grid
 */
export function seriesCoverage(hourStarts_ms: ArrayLike<number>, field = 'weather.hours'): SeriesCoverage {
  const count = hourStarts_ms.length;
  if (count === 0) throw new RangeError(`${field}: the series is empty (at least one hour is needed)`);
  const gaps: SeriesGap[] = [];
  let gapCount = 0;
  let missingHours = 0;
  for (let h = 1; h < count; h++) {
    const step_h = (hourStarts_ms[h] - hourStarts_ms[h - 1]) / HOUR_MS;
    if (!(step_h >= 1) || !Number.isInteger(step_h)) {
      throw new RangeError(
        `${field}[${h}].time: ${new Date(hourStarts_ms[h]).toISOString()} is ${step_h} h after the hour before; ` +
          'allowed: strictly increasing hour starts, whole hours apart',
      );
    }
    if (step_h > 1) {
      gapCount++;
      missingHours += step_h - 1;
      if (gaps.length < MAX_GAPS_LISTED) {
        gaps.push({ from: new Date(hourStarts_ms[h - 1] + HOUR_MS).toISOString(), missingHours: step_h - 1 });
      }
    }
  }
  const hoursExpected = (hourStarts_ms[count - 1] - hourStarts_ms[0]) / HOUR_MS + 1;
  return { hoursPresent: count, hoursExpected, fraction: count / hoursExpected, gapCount, missingHours, gaps };
}

/** Arithmetic mean; NaN for no values. */
export function mean(values: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < values.length; i++) sum += values[i];
  return values.length > 0 ? sum / values.length : Number.NaN;
}

/** Largest value; NaN for no values. */
export function maximum(values: ArrayLike<number>): number {
  let largest = Number.NEGATIVE_INFINITY;
  for (let i = 0; i < values.length; i++) if (values[i] > largest) largest = values[i];
  return values.length > 0 ? largest : Number.NaN;
}

/** Number of values strictly above the limit. */
export function exceedanceCount(values: ArrayLike<number>, limit: number): number {
  let count = 0;
  for (let i = 0; i < values.length; i++) if (values[i] > limit) count++;
  return count;
}

/**
 * The k-th smallest value (0-based) by quickselect; reorders `work` in place. O(length) on average.
 */
function selectKthSmallest(work: Float64Array, k: number): number {
  let left = 0;
  let right = work.length - 1;
  while (right > left) {
    // median of three as pivot keeps sorted and reversed inputs fast
    const middle = (left + right) >>> 1;
    const a = work[left];
    const b = work[middle];
    const c = work[right];
    const pivot = a < b ? (b < c ? b : a < c ? c : a) : a < c ? a : b < c ? c : b;
    let i = left;
    let j = right;
    while (i <= j) {
      while (work[i] < pivot) i++;
      while (work[j] > pivot) j--;
      if (i <= j) {
        const swap = work[i];
        work[i] = work[j];
        work[j] = swap;
        i++;
        j--;
      }
    }
    if (k <= j) right = j;
    else if (k >= i) left = i;
    else return work[k];
  }
  return work[k];
}

/**
 * The n-th highest value (n = 1 is the maximum).
 *
 * @param values the series (not modified)
 * @param n rank from the top, 1 <= n <= values.length
 * @param work optional scratch array of at least values.length, to avoid allocating in loops
 */
export function nthHighest(values: ArrayLike<number>, n: number, work?: Float64Array): number {
  const count = values.length;
  if (!Number.isInteger(n) || n < 1 || n > count) {
    throw new RangeError(`n: ${n} is not allowed (an integer rank from 1 to the number of values, ${count})`);
  }
  const scratch = work && work.length >= count ? work.subarray(0, count) : new Float64Array(count);
  for (let i = 0; i < count; i++) scratch[i] = values[i];
  return selectKthSmallest(scratch, count - n);
}

/**
 * Ascending nearest rank (1-based) of the percentile 100 (1 - n/N) among M values: ceil(M (N - n) / N),
 * at least 1. Computed in integers when M, N and n are integers, so 8760 values with 18 allowed in
 * 8760 give rank 8742, the 19th highest.
 */
export function nearestRankForAllowedExceedances(valueCount: number, allowedExceedances: number, periodsPerYear: number): number {
  if (!Number.isInteger(valueCount) || valueCount < 1) throw new RangeError(`valueCount: ${valueCount} is not allowed (an integer >= 1)`);
  if (!(allowedExceedances >= 0 && allowedExceedances < periodsPerYear)) {
    throw new RangeError(`allowedExceedances: ${allowedExceedances} is not allowed (0 <= n < ${periodsPerYear} periods a year)`);
  }
  const numerator = valueCount * (periodsPerYear - allowedExceedances);
  // ceil(numerator / N): exact in integers when both are (they are far below 2^53); otherwise a
  // tolerance of 1e-9 keeps a product like 8760 * 0.99794... from rounding up past an exact rank.
  const rank =
    Number.isInteger(numerator) && Number.isInteger(periodsPerYear)
      ? Math.floor((numerator + periodsPerYear - 1) / periodsPerYear)
      : Math.ceil(numerator / periodsPerYear - 1e-9);
  return Math.max(1, Math.min(valueCount, rank));
}

/**
 * Percentile value by the nearest-rank method: the value at ascending rank ceil(p M / 100).
 *
 * @param values the series (not modified)
 * @param percentile p in (0, 100]
 */
export function percentileNearestRank(values: ArrayLike<number>, percentile: number, work?: Float64Array): number {
  if (!(percentile > 0 && percentile <= 100)) throw new RangeError(`percentile: ${percentile} is not allowed (0 < p <= 100)`);
  const rank = Math.max(1, Math.ceil((percentile / 100) * values.length * (1 - 1e-15)));
  return nthHighest(values, values.length - rank + 1, work);
}

/** The percentile 100 (1 - n / N) matching a standard's allowed exceedances [%]. */
export function percentileForStandard(standard: AirQualityStandard): number {
  const periodsPerYear = periodsPerYearOf(standard);
  return 100 * (1 - standard.allowedExceedances / periodsPerYear);
}

/** Days in the year the standards count [d]. */
export const DAYS_PER_YEAR = 365;

/** Averaging periods a year for a standard: 8760 / averaging_h; 1 for the period mean; 365 days for running means. */
export function periodsPerYearOf(standard: AirQualityStandard): number {
  checkAveraging(standard);
  if (standard.runningMean === true) return DAYS_PER_YEAR;
  return standard.averaging_h >= HOURS_PER_YEAR ? 1 : HOURS_PER_YEAR / standard.averaging_h;
}

function checkAveraging(standard: Pick<AirQualityStandard, 'name' | 'averaging_h' | 'runningMean'>): void {
  const h = standard.averaging_h;
  if (standard.runningMean === true) {
    if (!(Number.isInteger(h) && h >= 2 && h <= 24)) {
      throw new RangeError(
        `assessment.standards["${standard.name}"].averaging_h: ${h} is not allowed for running means ` +
          '(a whole number of hours from 2 to 24; 8 for the CO standard)',
      );
    }
    return;
  }
  const ok = h >= HOURS_PER_YEAR || (Number.isInteger(h) && h >= 1 && 24 % h === 0);
  if (!ok) {
    throw new RangeError(
      `assessment.standards["${standard.name}"].averaging_h: ${h} is not allowed ` +
        '(1, a divisor of 24 such as 8 or 24, or 8760 and more for the period mean; runningMean for running means)',
    );
  }
}

/**
 * How the hours of a series group into a standard's averaging periods: built once per series and
 * standard, then applied to any number of receptors or grid cells.
 */
export interface AveragingPlan {
  averaging_h: number;
  /**
   * daily maxima of running means (a standard with runningMean): for each hour present, the index of the
   * first hour present in its window, or -1 when the window has too few hours; null for block means
   */
  running: { windowStart: Int32Array; dayOfHour: Int32Array } | null;
  /** for each hour present, the index of its averaging period, or -1 when that period is incomplete */
  periodOfHour: Int32Array;
  /** hours present in each complete period */
  hoursInPeriod: Int32Array;
  periodCount: number;
  /** periods left out for having fewer than 75 % of their hours */
  incompletePeriods: number;
}

/**
 * Group hours into calendar-aligned averaging periods in the series' own offset.
 *
 * @param hourStarts_ms hour starts present [ms since epoch], increasing
 * @param offsetMinutes the series' time-zone offset [min east of UTC]
 * @param averaging_h the standard's averaging period [h]: 1, a divisor of 24, or >= 8760
 */
export function averagingPlan(
  hourStarts_ms: ArrayLike<number>,
  offsetMinutes: number,
  averaging_h: number,
  runningMean = false,
): AveragingPlan {
  const count = hourStarts_ms.length;
  const periodOfHour = new Int32Array(count);
  if (runningMean) return runningMeanPlan(hourStarts_ms, offsetMinutes, averaging_h);
  if (averaging_h === 1) {
    for (let h = 0; h < count; h++) periodOfHour[h] = h;
    return { averaging_h, running: null, periodOfHour, hoursInPeriod: new Int32Array(count).fill(1), periodCount: count, incompletePeriods: 0 };
  }
  if (averaging_h >= HOURS_PER_YEAR) {
    return { averaging_h, running: null, periodOfHour, hoursInPeriod: Int32Array.of(count), periodCount: count > 0 ? 1 : 0, incompletePeriods: 0 };
  }
  checkAveraging({ name: 'averaging', averaging_h });
  // Block number in local time: whole local days since the epoch times blocks a day, plus the block
  // within the day. Consecutive hours of one block share the number.
  const blockKeys: number[] = [];
  const counts: number[] = [];
  let previousKey = Number.NaN;
  for (let h = 0; h < count; h++) {
    const local_h = Math.floor((hourStarts_ms[h] + offsetMinutes * 60_000) / HOUR_MS);
    const key = Math.floor(local_h / averaging_h);
    if (key !== previousKey) {
      blockKeys.push(key);
      counts.push(0);
      previousKey = key;
    }
    counts[counts.length - 1]++;
    periodOfHour[h] = blockKeys.length - 1;
  }
  const minimumHours = Math.ceil(MINIMUM_PERIOD_CAPTURE * averaging_h);
  const renumbered = new Int32Array(blockKeys.length).fill(-1);
  const hoursInPeriod: number[] = [];
  let incompletePeriods = 0;
  for (let b = 0; b < blockKeys.length; b++) {
    if (counts[b] >= minimumHours) {
      renumbered[b] = hoursInPeriod.length;
      hoursInPeriod.push(counts[b]);
    } else {
      incompletePeriods++;
    }
  }
  for (let h = 0; h < count; h++) periodOfHour[h] = renumbered[periodOfHour[h]];
  return {
    averaging_h,
    running: null,
    periodOfHour,
    hoursInPeriod: Int32Array.from(hoursInPeriod),
    periodCount: hoursInPeriod.length,
    incompletePeriods,
  };
}

/**
 * The plan of daily maxima of running means (file comment): each hour's window, and the day each
 * window's mean belongs to (-1 for a day with fewer than 75 % of its running means).
 */
function runningMeanPlan(hourStarts_ms: ArrayLike<number>, offsetMinutes: number, averaging_h: number): AveragingPlan {
  checkAveraging({ name: 'averaging', averaging_h, runningMean: true });
  const count = hourStarts_ms.length;
  const windowStart = new Int32Array(count);
  const minimumHours = Math.ceil(MINIMUM_PERIOD_CAPTURE * averaging_h);
  let first = 0;
  for (let h = 0; h < count; h++) {
    // hours whose start lies within (averaging_h - 1) h before this hour's start
    const earliest_ms = hourStarts_ms[h] - (averaging_h - 1) * HOUR_MS;
    while (hourStarts_ms[first] < earliest_ms) first++;
    windowStart[h] = h - first + 1 >= minimumHours ? first : -1;
  }
  // Days in the series' offset; a running mean belongs to the day its last hour is in.
  const dayKeys: number[] = [];
  const keptPerDay: number[] = [];
  const dayOfHour = new Int32Array(count);
  for (let h = 0; h < count; h++) {
    const day = Math.floor((hourStarts_ms[h] + offsetMinutes * 60_000) / (24 * HOUR_MS));
    if (dayKeys.length === 0 || dayKeys[dayKeys.length - 1] !== day) {
      dayKeys.push(day);
      keptPerDay.push(0);
    }
    dayOfHour[h] = dayKeys.length - 1;
    if (windowStart[h] >= 0) keptPerDay[keptPerDay.length - 1]++;
  }
  const minimumMeans = Math.ceil(MINIMUM_PERIOD_CAPTURE * 24);
  const renumbered = new Int32Array(dayKeys.length).fill(-1);
  let periodCount = 0;
  for (let d = 0; d < dayKeys.length; d++) if (keptPerDay[d] >= minimumMeans) renumbered[d] = periodCount++;
  for (let h = 0; h < count; h++) dayOfHour[h] = renumbered[dayOfHour[h]];
  return {
    averaging_h,
    running: { windowStart, dayOfHour },
    periodOfHour: dayOfHour,
    hoursInPeriod: new Int32Array(periodCount).fill(24),
    periodCount,
    incompletePeriods: dayKeys.length - periodCount,
  };
}

/**
 * Period means of one hourly series under a plan.
 *
 * @param hourly values of the hours present [any unit]
 * @param out optional output of at least plan.periodCount values
 */
export function periodMeans(hourly: ArrayLike<number>, plan: AveragingPlan, out?: Float64Array): Float64Array {
  const means = out && out.length >= plan.periodCount ? out.subarray(0, plan.periodCount) : new Float64Array(plan.periodCount);
  if (plan.running !== null) {
    // Each day's largest running mean; the running sums slide along the hours present.
    const { windowStart, dayOfHour } = plan.running;
    means.fill(Number.NEGATIVE_INFINITY);
    let sum = 0;
    let first = 0;
    for (let h = 0; h < hourly.length; h++) {
      sum += hourly[h];
      const start = windowStart[h];
      if (start < 0) continue;
      while (first < start) sum -= hourly[first++];
      const day = dayOfHour[h];
      if (day < 0) continue;
      const value = sum / (h - start + 1);
      if (value > means[day]) means[day] = value;
    }
    return means;
  }
  if (plan.averaging_h === 1) {
    for (let h = 0; h < hourly.length; h++) means[h] = hourly[h];
    return means;
  }
  means.fill(0);
  for (let h = 0; h < hourly.length; h++) {
    const period = plan.periodOfHour[h];
    if (period >= 0) means[period] += hourly[h];
  }
  for (let p = 0; p < plan.periodCount; p++) means[p] /= plan.hoursInPeriod[p];
  return means;
}

/** One standard's figures for one series of process contributions. */
export interface StandardFigures {
  /** "percentile" for short-term standards, "mean" for the period mean */
  statistic: 'percentile' | 'mean';
  /** percentile used [%], absent for the period mean */
  percentile?: number;
  /** the process contribution's statistic [ug/m3] */
  value_ug_m3: number;
  /** periods whose process contribution plus background exceeds the limit */
  exceedances: number;
  /** complete averaging periods in the series */
  periods: number;
}

/**
 * A standard's figures for one hourly series of process contributions (PC).
 *
 * @param hourly PC of each hour present [ug/m3]
 * @param plan the standard's averaging plan for this series
 * @param standard the standard
 * @param background_ug_m3 background added before counting exceedances [ug/m3] (a constant background
 *   shifts every percentile by itself exactly, so the value reported stays the PC)
 * @param work scratch of at least hourly.length values (optional)
 */
export function standardFigures(
  hourly: ArrayLike<number>,
  plan: AveragingPlan,
  standard: AirQualityStandard,
  background_ug_m3: number,
  work?: Float64Array,
): StandardFigures {
  const periodsPerYear = periodsPerYearOf(standard);
  if (standard.averaging_h >= HOURS_PER_YEAR) {
    const value = mean(hourly);
    return { statistic: 'mean', value_ug_m3: value, exceedances: value + background_ug_m3 > standard.limit_ug_m3 ? 1 : 0, periods: 1 };
  }
  const scratch = work && work.length >= hourly.length ? work : new Float64Array(hourly.length);
  const means = periodMeans(hourly, plan, scratch);
  if (means.length === 0) {
    return { statistic: 'percentile', percentile: percentileForStandard(standard), value_ug_m3: Number.NaN, exceedances: 0, periods: 0 };
  }
  const exceedances = exceedanceCount(means, standard.limit_ug_m3 - background_ug_m3);
  const rank = nearestRankForAllowedExceedances(means.length, standard.allowedExceedances, periodsPerYear);
  // select in place on the period means (they are scratch)
  const value = selectKthSmallest(means, rank - 1);
  return { statistic: 'percentile', percentile: percentileForStandard(standard), value_ug_m3: value, exceedances, periods: means.length };
}

/** The calendar day (series offset) of each hour present, "YYYY-MM-DD": for reports. */
export function calendarDays(hourStarts_ms: ArrayLike<number>, offsetMinutes: number): string[] {
  const days: string[] = [];
  for (let h = 0; h < hourStarts_ms.length; h++) days.push(calendarDay(hourStarts_ms[h], offsetMinutes));
  return days;
}

/**
 * A column key for a standard's statistic, derived from the standard's name: lower case, runs of other
 * characters as "_", then the statistic, e.g. "1-hour mean" with 18 allowed -> "1_hour_mean_p99_79_ug_m3".
 */
export function standardColumnKey(standard: AirQualityStandard): string {
  const slug = standard.name.toLowerCase().replace(/[^a-z0-9]+/g, '_').replace(/^_+|_+$/g, '') || 'standard';
  if (standard.averaging_h >= HOURS_PER_YEAR) return `${slug}_period_mean_ug_m3`;
  const percentile = percentileForStandard(standard);
  return `${slug}_p${percentile.toFixed(2).replace('.', '_')}_ug_m3`;
}

/** The exceedance-count column key for a standard, e.g. "1_hour_mean_exceedances". */
export function standardExceedanceKey(standard: AirQualityStandard): string {
  const slug = standard.name.toLowerCase().replace(/[^a-z0-9]+/g, '_').replace(/^_+|_+$/g, '') || 'standard';
  return `${slug}_exceedances`;
}

/**
 * Percentile of a frequency distribution (a wind rose's cells): the smallest value whose cumulative
 * frequency reaches p / 100 (the nearest-rank definition with weights; a cell of frequency f counts as
 * f of the time). Frequencies need not sum to 1; they are normalised.
 *
 * @param values one value per cell
 * @param frequencies one frequency per cell, >= 0
 * @param percentile p in (0, 100]
 */
export function weightedPercentile(values: ArrayLike<number>, frequencies: ArrayLike<number>, percentile: number): number {
  if (values.length !== frequencies.length || values.length === 0) {
    throw new RangeError(`values (${values.length}) and frequencies (${frequencies.length}) must be non-empty and of one length`);
  }
  if (!(percentile > 0 && percentile <= 100)) throw new RangeError(`percentile: ${percentile} is not allowed (0 < p <= 100)`);
  const order = Array.from({ length: values.length }, (_, i) => i).sort((a, b) => values[a] - values[b]);
  let total = 0;
  for (let i = 0; i < frequencies.length; i++) total += frequencies[i];
  const target = (percentile / 100) * total * (1 - 1e-12);
  let cumulative = 0;
  for (const i of order) {
    cumulative += frequencies[i];
    if (cumulative >= target && frequencies[i] > 0) return values[i];
  }
  return values[order[order.length - 1]];
}
