/**
 * The summary parts of a weather series: the standards' figures, the weather it was run with, the
 * sources' mean effective heights, the frequency-weighted mass budget and the solves' notes.
 */
import type { Assessment, AirQualityStandard, StabilityClass } from '../../scenarios/format/types.ts';
import { standardColumnKey, standardExceedanceKey, type SeriesCoverage } from '../diagnostics/statistics.ts';
import { CALM_THRESHOLD_m_s, type StabilitySource } from '../meteorology/resolveWeather.ts';
import type { WindRoseTable } from '../meteorology/windRoseTable.ts';
import type { MassBudget, ResolvedWeather, SourceReport } from './types.ts';
import type { SeriesBaseInput, SeriesFields, StoredSolve } from './seriesSolves.ts';
import { groundPeak } from './seriesStatistics.ts';
import { runHourlySeries } from './hourlySeries.ts';

export function standardsSummary(
  base: SeriesBaseInput,
  assessment: Assessment | undefined,
  standards: {
    standard: AirQualityStandard;
    statistic: string;
    percentile?: number;
    periods?: number;
    incompletePeriods?: number;
    receptorValues: Float64Array;
    receptorExceedances: Float64Array;
    groundValues: Float64Array | null;
    exceedanceBasis: string;
  }[],
): Record<string, unknown> {
  const background = assessment?.background_ug_m3 ?? 0;
  return {
    background_ug_m3: background,
    definitions:
      'values are process contributions (PC) [ug/m3]; PEC = PC + background; exceedances count periods whose PEC is above ' +
      'the limit; short-term percentiles are 100 (1 - allowed / periods a year) by the nearest-rank method; ' +
      'values are of the assessed pollutant (NO2 from NOx by the stated ratio where the library standard needs it); ' +
      'the screen of each figure is in "verdicts"',
    standards: standards.map((s) => {
      return {
        name: s.standard.name,
        limit_ug_m3: s.standard.limit_ug_m3,
        averaging_h: s.standard.averaging_h,
        allowedExceedances: s.standard.allowedExceedances,
        statistic: s.statistic,
        ...(s.percentile !== undefined ? { percentile: Number(s.percentile.toFixed(4)) } : {}),
        ...(s.periods !== undefined ? { periods: s.periods } : {}),
        ...(s.incompletePeriods !== undefined ? { incompletePeriods: s.incompletePeriods } : {}),
        columnKey: standardColumnKey(s.standard),
        exceedanceKey: standardExceedanceKey(s.standard),
        exceedanceBasis: s.exceedanceBasis,
        receptors: base.receptors.map((receptor, r) => {
          const pc = s.receptorValues[r];
          const pec = pc + background;
          return {
            id: receptor.id,
            pc_ug_m3: pc,
            pec_ug_m3: pec,
            exceedances: s.receptorExceedances[r],
          };
        }),
        ...(s.groundValues ? { groundPeak: groundPeak(base, s.groundValues) } : {}),
      };
    }),
  };
}

/** Weather figures of a series for summary.json. */
export function weatherSummary(
  resolved: readonly ResolvedWeather[],
  sources: readonly StabilitySource[],
  coverage: SeriesCoverage,
  first: string,
  last: string,
  rose: WindRoseTable,
): Record<string, unknown> {
  const hours = resolved.length;
  let speed = 0;
  let calms = 0;
  let rainHours = 0;
  let rain = 0;
  let temperature = 0;
  let mixing = 0;
  for (const w of resolved) {
    speed += w.windSpeed_m_s;
    if (w.calm) calms++;
    if (w.rain_mm_h > 0) rainHours++;
    rain += w.rain_mm_h;
    temperature += w.airTemperature_K;
    mixing += w.mixingHeight_m;
  }
  const stabilitySources: Record<string, number> = {};
  for (const s of sources) stabilitySources[s] = (stabilitySources[s] ?? 0) + 1;
  const stabilityFrequency: Record<StabilityClass, number> = { ...rose.stabilityFrequency };
  return {
    kind: 'hourly',
    timeConvention: 'each time marks the START of its hour',
    first,
    last,
    coverage,
    hours,
    calmHours: calms,
    calmsRule: `speeds below ${CALM_THRESHOLD_m_s} m/s raised to ${CALM_THRESHOLD_m_s} m/s and flagged calm`,
    meanWindSpeed_m_s: speed / hours,
    rainHours,
    totalRain_mm: rain,
    meanAirTemperature_K: temperature / hours,
    meanMixingHeight_m: mixing / hours,
    stabilityFrequency,
    stabilitySources,
    windRose: rose,
  };
}

/**
 * Run an hourly weather series.
 *
 * @param base grid, placed sources and receptors, pollutant, dispersion, land use, wind profile
 * @param hours the hours as given (time = START of the hour, ISO 8601 with offset)
 * @param options mode, method, site, assessment, progress, solver
 * @returns receptor columns mean_ug_m3, max_ug_m3 and per standard its statistic and exceedances;
 *   footprint = the mean ground-level field; summary entries for the weather, the standards, the reuse
 * @throws RangeError naming the hour and field for bad rows, out-of-order or duplicated times
 * @example const result = await runHourlySeries(base, scenario.weather.hours, { mode: 'gaussian', method: 'independentHours', site });
 */
/** Each source's effective height averaged over the hours (the steady solves weighted by use). */
export function meanSourceReports(fields: SeriesFields): SourceReport[] {
  const first = fields.solves[0]?.sources ?? [];
  const sums = new Float64Array(first.length);
  for (let h = 0; h < fields.solveOfHour.length; h++) {
    const reports = fields.solves[fields.solveOfHour[h]].sources;
    for (let s = 0; s < first.length; s++) sums[s] += reports[s]?.effectiveHeight_m ?? 0;
  }
  return first.map((report, s) => ({ ...report, effectiveHeight_m: sums[s] / fields.solveOfHour.length }));
}

/**
 * The series' mass budget: each hour's steady budget added up (a reused hour counts its solve's budget;
 * a speed-scaled hour its solve's budget with the airborne mass scaled, the emission unchanged and the
 * difference leaving as outflow). With weights (a wind rose's frequencies) the sum is weighted: the
 * budget of the frequency-weighted mean hour. Null when the solves report none (Gaussian mode).
 */
export function seriesMassBudget(fields: SeriesFields, weights?: Float64Array): MassBudget | null {
  if (fields.solves.length === 0 || fields.solves.some((s) => s.massBudget_g === null)) return null;
  const total = { emitted: 0, inDomain: 0, decayed: 0, washedOut: 0, dryDeposited: 0, outflow: 0 };
  for (let h = 0; h < fields.solveOfHour.length; h++) {
    const budget = fields.solves[fields.solveOfHour[h]].massBudget_g as MassBudget;
    const scale = fields.scaleOfHour[h];
    const weight = weights ? weights[h] : 1;
    total.emitted += weight * budget.emitted;
    // A scaled hour has no losses (scaling requires none); what is airborne scales, the rest leaves.
    total.inDomain += weight * budget.inDomain * scale;
    total.decayed += weight * budget.decayed * scale;
    total.washedOut += weight * budget.washedOut * scale;
    total.dryDeposited += weight * budget.dryDeposited * scale;
    total.outflow += weight * (budget.outflow + budget.inDomain * (1 - scale));
  }
  const sum = total.inDomain + total.decayed + total.washedOut + total.dryDeposited + total.outflow;
  const basis = fields.solves[0].massBudget_g?.basis ?? '';
  return {
    basis: weights
      ? `frequency-weighted sum over ${fields.solveOfHour.length} wind-rose cells of each cell's steady budget (${basis})`
      : `sum over ${fields.solveOfHour.length} hours of each hour's steady budget (${basis})`,
    ...total,
    relativeImbalance: total.emitted > 0 ? (total.emitted - sum) / total.emitted : 0,
  };
}

/**
 * Notes of the solves for the series' notes: every note that all solves share, once; of the notes that
 * vary from solve to solve (sweep counts, plume-rise figures), how many there were and the first few
 * as examples, so a year of solves does not bury the result in thousands of near-identical lines.
 */
export function distinctNotes(solves: readonly StoredSolve[]): string[] {
  const counts = new Map<string, number>();
  for (const solve of solves) for (const note of new Set(solve.notes)) counts.set(note, (counts.get(note) ?? 0) + 1);
  const shared: string[] = [];
  const varying: string[] = [];
  for (const [note, count] of counts) (count === solves.length ? shared : varying).push(note);
  const EXAMPLES = 3;
  if (varying.length > 0) {
    shared.push(
      `${varying.length} further notes vary from solve to solve; for example: ` + varying.slice(0, EXAMPLES).map((n) => `"${n}"`).join('; '),
    );
  }
  return shared;
}
