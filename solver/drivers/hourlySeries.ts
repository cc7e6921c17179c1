/**
 * An hourly weather series: receptor and ground-grid statistics against the assessment's standards.
 *
 * Two methods (scenario `solver.hourlyMethod`):
 * - "independentHours" (the usual screening treatment): each hour is its own steady field. A solve is
 *   reused only where that is exact (see `reuseRules`): identical resolved weather gives an identical
 *   field; rain is left out of the comparison only when the pollutant has no washout (rain enters
 *   nothing else); air temperature only when no source has plume rise (it enters nothing else); and the
 *   wind speed only when the field scales exactly as 1 / u (no decay, no washout in that hour, no dry
 *   deposition, no plume rise, the stability closure or curves): then field(u) = field(u0) u0 / u.
 * - "continuous": one time-march over the whole series, the field carried over from hour to hour
 *   (solver/drivers/gridTransient.ts; grid mode only). Each hour's value is its mean over the hour.
 *
 * Conventions: an hour's `time` marks the START of the hour (ISO 8601 with offset); calendar-day means
 * use the offset of the first hour. Hours must be strictly increasing; gaps are allowed, counted and
 * reported (never filled in), and every statistic is over the hours present.
 */
import type { HourlyMethod, WeatherHour } from '../../scenarios/format/types.ts';
import { HOURS_PER_YEAR, percentileForStandard, seriesCoverage } from '../diagnostics/statistics.ts';
import { CALM_THRESHOLD_m_s, resolveWeatherWithSource } from '../meteorology/resolveWeather.ts';
import { parseIsoTime } from '../meteorology/time.ts';
import { windRoseFromHours } from '../meteorology/windRoseTable.ts';
import { createSeriesSteadySolver } from './solveSteady.ts';
import type { MassBudget, ResolvedWeather, RunControl, ScenarioRunResult, SourceReport } from './types.ts';
import { type SeriesBaseInput, type SeriesRunOptions, reuseRules, solveWithReuse } from './seriesSolves.ts';
import {
  type HourlyValues,
  groundPeak,
  hourlyValuesFromArrays,
  hourlyValuesFromFields,
  seriesReceptorColumns,
  seriesStatistics,
} from './seriesStatistics.ts';
import { seriesGridChecks } from './seriesChecks.ts';
import { distinctNotes, meanSourceReports, seriesMassBudget, standardsSummary, weatherSummary } from './seriesSummaries.ts';

/** One continuous time-march over a series, supplied by the grid solver (see gridTransient.ts). */
export type ContinuousSeriesRunner = (
  base: SeriesBaseInput,
  hours: readonly ResolvedWeather[],
  hourStarts_ms: Float64Array,
  control: RunControl,
  onHour: (hourIndex: number, receptorMeans_ug_m3: Float64Array, groundMeans_ug_m3: Float64Array) => void,
) => Promise<{ steps: number; massBudget_g: MassBudget | null; sources: SourceReport[]; notes: string[] }>;

export interface HourlySeriesOptions extends SeriesRunOptions {
  method: HourlyMethod;
  /** the continuous time-march; required for method "continuous" */
  continuous?: ContinuousSeriesRunner;
}

export async function runHourlySeries(
  base: SeriesBaseInput,
  hours: readonly WeatherHour[],
  options: HourlySeriesOptions,
): Promise<ScenarioRunResult> {
  const started = performance.now();
  const control = options.control ?? {};
  if (hours.length === 0) throw new RangeError('weather.hours: the series is empty (at least one hour is needed)');
  const parsed = hours.map((hour, h) => parseIsoTime(hour.time, `weather.hours[${h}].time`));
  const hourStarts_ms = Float64Array.from(parsed, (p) => p.epoch_ms);
  const coverage = seriesCoverage(hourStarts_ms, 'weather.hours');
  const offsetMinutes = parsed[0].offsetMinutes;
  const resolutions = hours.map((hour, h) => resolveWeatherWithSource(hour, options.site, `weather.hours[${h}]`));
  const resolved = resolutions.map((r) => r.weather);
  const columns = base.grid.nx * base.grid.ny;

  let values: HourlyValues;
  let steps = 0;
  let massBudget: MassBudget | null = null;
  let sources: SourceReport[];
  const notes: string[] = [];
  let reuseSummary: Record<string, unknown>;
  const checkSummary: Record<string, unknown> = {};

  if (options.method === 'independentHours') {
    const rules = reuseRules(base, options.speedScaling ?? true);
    const fields = await solveWithReuse(base, resolved, options.mode, {
      solve: options.solve ?? createSeriesSteadySolver(),
      rules,
      control,
      label: 'hour',
      concurrency: options.concurrency,
    });
    values = hourlyValuesFromFields(fields);
    steps = fields.solves.reduce((sum, s) => sum + s.steps, 0);
    const solveSeconds = fields.solves.reduce((sum, s) => sum + s.wallSeconds, 0);
    sources = meanSourceReports(fields);
    massBudget = seriesMassBudget(fields);
    notes.push(
      `hour-by-hour steady fields: ${fields.solves.length} solves for ${resolved.length} hours ` +
        `(${fields.identicalReuses} reused for identical weather, ${fields.scaledReuses} by exact wind-speed scaling)`,
      ...distinctNotes(fields.solves),
    );
    if (options.mode === 'grid' && options.checks !== undefined) {
      const checks = await seriesGridChecks(base, resolved, fields, (h) => `hour ${hours[h].time}`, options.checks, control);
      checkSummary.modeCheck = checks.modeCheck;
      checkSummary.resolutionCheck = checks.resolutionCheck;
      notes.push(...checks.notes);
    }
    reuseSummary = {
      method: 'independentHours',
      rules: rules.explanation,
      solves: fields.solves.length,
      identicalReuses: fields.identicalReuses,
      scaledReuses: fields.scaledReuses,
      solveWallSeconds: solveSeconds,
      meanSolveWallSeconds: solveSeconds / fields.solves.length,
    };
  } else if (options.method === 'continuous') {
    if (options.mode !== 'grid' || options.continuous === undefined) {
      throw new RangeError(
        `solver.hourlyMethod: "continuous" needs grid mode (a time-march of the grid solver); mode is "${options.mode}"` +
          (options.mode === 'grid' ? ' and no time-march was supplied' : ''),
      );
    }
    const receptorHours: Float64Array[] = [];
    const groundHours: Float32Array[] = [];
    const march = await options.continuous(base, resolved, hourStarts_ms, control, (h, receptors, ground) => {
      receptorHours[h] = Float64Array.from(receptors);
      groundHours[h] = Float32Array.from(ground);
    });
    for (let h = 0; h < resolved.length; h++) {
      if (receptorHours[h] === undefined) throw new Error(`continuous run: no values for hour ${h}`);
    }
    values = hourlyValuesFromArrays(receptorHours, groundHours);
    steps = march.steps;
    massBudget = march.massBudget_g;
    sources = march.sources;
    notes.push(
      'continuous time-march: the field is carried over from hour to hour; each hour\'s value is its mean over the hour',
      ...march.notes,
    );
    reuseSummary = { method: 'continuous', steps: march.steps };
    if (options.checks !== undefined) {
      // The checks compare steady solves of one weather; a march's hour carries the hours before it.
      const reason = 'not made: the continuous method carries the field from hour to hour, and the checks compare steady solves of one weather (run the series with hourlyMethod "independentHours" for them)';
      checkSummary.resolutionCheck = { made: false, reason };
      notes.push(`mode check: ${reason}`);
    }
  } else {
    throw new RangeError(
      `solver.hourlyMethod: ${JSON.stringify(options.method)} is not allowed ("independentHours" or "continuous")`,
    );
  }

  control.onProgress?.(1, 'statistics of the series');
  const statistics = seriesStatistics(values, base.receptors.length, columns, hourStarts_ms, offsetMinutes, options.assessment);
  const rose = windRoseFromHours(resolved);
  if (coverage.gapCount > 0) {
    notes.push(
      `the series has ${coverage.gapCount} gaps (${coverage.missingHours} missing hours of ${coverage.hoursExpected}); ` +
        'statistics are over the hours present, none are filled in',
    );
  }
  const calmHours = resolved.filter((w) => w.calm).length;
  if (calmHours > 0) notes.push(`${calmHours} calm hours: wind raised to ${CALM_THRESHOLD_m_s} m/s (calms rule)`);

  const extraSummary: Record<string, unknown> = {
    ...(options.extraSummary ?? {}),
    weather: weatherSummary(resolved, resolutions.map((r) => r.stabilitySource), coverage, hours[0].time, hours[hours.length - 1].time, rose),
    series: reuseSummary,
    ...checkSummary,
    groundGrid: {
      meanPeak: groundPeak(base, statistics.groundMean),
      hourlyMaxPeak: groundPeak(base, statistics.groundMax),
    },
  };
  if (options.assessment !== undefined) {
    extraSummary.assessment = standardsSummary(
      base,
      options.assessment,
      statistics.standards.map((s) => ({
        standard: s.standard,
        statistic: s.standard.runningMean
          ? `percentile of the daily maxima of running ${s.standard.averaging_h}-hour means`
          : s.standard.averaging_h >= HOURS_PER_YEAR
            ? 'period mean'
            : `percentile of ${s.standard.averaging_h}-hour means`,
        percentile: s.standard.averaging_h >= HOURS_PER_YEAR && !s.standard.runningMean ? undefined : percentileForStandard(s.standard),
        periods: s.plan.periodCount,
        incompletePeriods: s.plan.incompletePeriods,
        receptorValues: s.receptorValues,
        receptorExceedances: s.receptorExceedances,
        groundValues: s.groundValues,
        exceedanceBasis: s.standard.runningMean ? 'days in the series' : s.standard.averaging_h >= HOURS_PER_YEAR ? 'the period mean (1 if above the limit)' : 'periods in the series',
      })),
    );
  }
  return {
    mode: options.mode,
    weatherKind: 'hourly',
    grid: base.grid,
    sources,
    massBudget_g: massBudget,
    steps,
    wallSeconds: (performance.now() - started) / 1000,
    footprint_ug_m3: statistics.groundMean,
    footprintStatistic: 'mean',
    receptorColumns: seriesReceptorColumns(statistics.receptorMean, statistics.receptorMax, statistics.standards),
    standardFields: statistics.standards.map((s) => ({
      name: s.standard.name,
      basis: 'statistic' as const,
      receptors_ug_m3: s.receptorValues,
      ground_ug_m3: s.groundValues,
    })),
    notes,
    extraSummary,
    windRose: {
      table: rose,
      caption: options.windRoseCaption ?? `Hourly weather ${hours[0].time} to ${hours[hours.length - 1].time}`,
    },
  };
}
