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
import type {
  Assessment,
  AirQualityStandard,
  HourlyMethod,
  SolverMode,
  StabilityClass,
  WeatherHour,
} from '../../scenario/types.ts';
import {
  averagingPlan,
  HOURS_PER_YEAR,
  seriesCoverage,
  standardColumnKey,
  standardExceedanceKey,
  standardFigures,
  type AveragingPlan,
  type SeriesCoverage,
} from '../diagnostics/statistics.ts';
import { CALM_THRESHOLD_m_s, resolveWeatherWithSource, type StabilitySource } from '../meteorology/resolveWeather.ts';
import { parseIsoTime } from '../meteorology/time.ts';
import { windRoseFromHours, type WindRoseTable } from '../meteorology/windRoseTable.ts';
import { windRoseSvg } from '../../results/windRoseSvg.ts';
import { releaseHeights_m } from './gridSteady.ts';
import { createSeriesSteadySolver, type SteadySolver } from './solveSteady.ts';
import type {
  MassBudget,
  ReceptorColumn,
  ResolvedWeather,
  RunControl,
  ScenarioRunResult,
  SourceReport,
  SteadyFieldResult,
  SteadyRunInput,
} from './types.ts';

/** Everything a steady solve needs except the weather. */
export type SeriesBaseInput = Omit<SteadyRunInput, 'weather'>;

/** Options shared by hourly series and wind roses. */
export interface SeriesRunOptions {
  mode: SolverMode;
  /** site position [deg], for the solar elevation when stability is derived from the sky */
  site: { lat: number; lon: number };
  assessment?: Assessment;
  control?: RunControl;
  /**
   * the steady solver; default for an hourly series: createSeriesSteadySolver() (in process, grid solves
   * warm-started at the series tolerance 1e-4); for a wind rose: solveSteady. An array gives one solver
   * per lane (see solveWithReuse).
   */
  solve?: SteadySolver | readonly SteadySolver[];
  /** extra summary entries from the caller (e.g. the domain), merged first */
  extraSummary?: Record<string, unknown>;
  /** reuse a solve across wind speeds where that is exact (default true) */
  speedScaling?: boolean;
  /** caption of the wind-rose picture (default: the basis of the table) */
  windRoseCaption?: string;
  /** distinct solves in flight at once (default 1; more only helps a worker-backed solver) */
  concurrency?: number;
}

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

/** Which weather fields a solve's result does not depend on, and whether it scales with 1 / u. */
export interface ReuseRules {
  /** the pollutant has no washout, so rain changes nothing */
  ignoresRain: boolean;
  /** no source has plume rise, so air temperature changes nothing */
  ignoresTemperature: boolean;
  /** the field scales exactly as 1 / u in hours without washout (see the file comment) */
  speedScaling: boolean;
  /** plain-language reason, for the summary */
  explanation: string;
}

/**
 * When reusing one solve for another hour is exact, for these inputs.
 *
 * @param base everything but the weather
 * @param allowSpeedScaling false turns speed scaling off whatever the inputs
 */
export function reuseRules(base: SeriesBaseInput, allowSpeedScaling = true): ReuseRules {
  const ignoresRain = base.pollutant.washout === null;
  const plumeRise = base.sources.some((source) => source.kind === 'point' && source.plumeRise);
  const ignoresTemperature = !plumeRise;
  const blockers: string[] = [];
  if (!allowSpeedScaling) blockers.push('turned off');
  if (base.pollutant.halfLife_h !== null) blockers.push('first-order decay acts over the travel time');
  if (base.pollutant.depositionVelocity_m_s > 0) blockers.push('dry deposition does not scale with the wind');
  if (plumeRise) blockers.push('plume rise depends on the wind speed');
  if (base.dispersion.kind !== 'stability') blockers.push('constant diffusivities do not scale with the wind');
  const speedScaling = blockers.length === 0;
  const explanation =
    'solves are reused for hours with identical resolved weather' +
    (ignoresRain ? '; rain is ignored in the comparison (no washout)' : '') +
    (ignoresTemperature ? '; air temperature is ignored in the comparison (no plume rise)' : '') +
    (speedScaling
      ? '; across wind speeds by the exact scaling field(u) = field(u0) u0 / u (no decay, deposition or plume rise, and no washout in the hour)'
      : `; no reuse across wind speeds (${blockers.join('; ')})`);
  return { ignoresRain, ignoresTemperature, speedScaling, explanation };
}

/**
 * The reuse key of a resolved weather state and whether the hour may be speed-scaled.
 */
export function reuseKey(weather: ResolvedWeather, rules: ReuseRules, hasWashout: boolean): { key: string; scaled: boolean } {
  const washoutActs = hasWashout && weather.rain_mm_h > 0;
  const scaled = rules.speedScaling && !washoutActs;
  const parts = [
    weather.windFrom_deg,
    weather.stability,
    weather.mixingHeight_m,
    weather.anemometerHeight_m,
    scaled ? 'scaled' : weather.windSpeed_m_s,
    rules.ignoresRain ? '-' : weather.rain_mm_h,
    rules.ignoresTemperature ? '-' : weather.airTemperature_K,
  ];
  return { key: parts.join('|'), scaled };
}

/** A distinct solve kept for reuse: receptor values (float64) and the ground field (float32). */
export interface StoredSolve {
  receptors_ug_m3: Float64Array;
  ground_ug_m3: Float32Array;
  /** wind speed the solve was run at [m/s] (the scaling reference) */
  windSpeed_m_s: number;
  sources: SourceReport[];
  massBudget_g: MassBudget | null;
  steps: number;
  wallSeconds: number;
  notes: string[];
}

/** The fields of a series as references into stored solves: hour h = solves[index[h]] * scale[h]. */
export interface SeriesFields {
  solves: StoredSolve[];
  solveOfHour: Int32Array;
  scaleOfHour: Float64Array;
  /** hours that reused a solve of identical weather */
  identicalReuses: number;
  /** hours that reused a solve by speed scaling */
  scaledReuses: number;
}

function storeSolve(result: SteadyFieldResult, windSpeed_m_s: number): StoredSolve {
  return {
    receptors_ug_m3: Float64Array.from(result.receptors_ug_m3),
    ground_ug_m3: Float32Array.from(result.groundLevel_ug_m3),
    windSpeed_m_s,
    sources: result.sources,
    massBudget_g: result.massBudget_g,
    steps: result.steps,
    wallSeconds: result.wallSeconds,
    notes: result.notes,
  };
}

/**
 * Solve a list of weather states with exact reuse (shared by hourly series and wind roses).
 * The distinct states are found first, sorted so that neighbouring weather follows each other (same
 * wind direction and class together; mixing height, rain, the sources' effective heights, speed and
 * temperature ascending), cut into
 * runs of one direction and class, and solved run by run in `lanes`: each lane takes the next whole run
 * and solves it in order, so a warm-starting solver always starts from the state just before. With an
 * array of solvers (a pool, one per worker thread) lane t uses solvers[t]; with one solver,
 * `concurrency` lanes share it (useful when it hands solves to threads itself).
 *
 * @returns the stored solves and, for each state, which solve and what scale gives its field
 */
export async function solveWithReuse(
  base: SeriesBaseInput,
  states: readonly ResolvedWeather[],
  mode: SolverMode,
  options: { solve: SteadySolver | readonly SteadySolver[]; rules: ReuseRules; control: RunControl; label: string; concurrency?: number },
): Promise<SeriesFields> {
  const { rules, control, label } = options;
  const solvers = Array.isArray(options.solve) ? (options.solve as readonly SteadySolver[]) : null;
  if (solvers !== null && solvers.length === 0) throw new RangeError('solveWithReuse: the solver list is empty');
  const hasWashout = base.pollutant.washout !== null;
  const byKey = new Map<string, number>();
  const solveOfHour = new Int32Array(states.length);
  const scaleOfHour = new Float64Array(states.length);
  const firstStateOfSolve: number[] = [];
  const scaledHour = new Uint8Array(states.length);
  for (let h = 0; h < states.length; h++) {
    const { key, scaled } = reuseKey(states[h], rules, hasWashout);
    let index = byKey.get(key);
    if (index === undefined) {
      index = firstStateOfSolve.length;
      byKey.set(key, index);
      firstStateOfSolve.push(h);
    }
    solveOfHour[h] = index;
    scaledHour[h] = scaled ? 1 : 0;
  }

  const solves: StoredSolve[] = new Array(firstStateOfSolve.length);
  const stateOfSolve = (index: number): ResolvedWeather => states[firstStateOfSolve[index]];
  // Within one direction, class, mixing height and rain, the solves differ in the wind speed and the
  // plume rise it gives: order them by the sources' effective heights, so that a warm-starting solver
  // can extrapolate from the two solves before (../drivers/gridSteady.ts).
  const heightsOfSolve = firstStateOfSolve.map((h) => releaseHeights_m(base, states[h]));
  const solveOrder = Array.from(firstStateOfSolve.keys()).sort(
    (a, b) =>
      compareWeatherOperator(stateOfSolve(a), stateOfSolve(b)) ||
      compareHeights(heightsOfSolve[a], heightsOfSolve[b]) ||
      compareWeatherWithinOperator(stateOfSolve(a), stateOfSolve(b)),
  );
  const runs: number[][] = [];
  for (const index of solveOrder) {
    const last = runs.length > 0 ? runs[runs.length - 1] : null;
    const previous = last === null ? null : stateOfSolve(last[last.length - 1]);
    const weather = stateOfSolve(index);
    if (last !== null && previous !== null && previous.windFrom_deg === weather.windFrom_deg && previous.stability === weather.stability) last.push(index);
    else runs.push([index]);
  }
  const innerControl: RunControl = control.signal ? { signal: control.signal } : {};
  const lanes = Math.min(solvers !== null ? solvers.length : Math.max(1, Math.floor(options.concurrency ?? 1)), runs.length);
  let nextRun = 0;
  let done = 0;
  const lane = async (laneIndex: number) => {
    const solve = solvers !== null ? solvers[laneIndex] : (options.solve as SteadySolver);
    while (nextRun < runs.length) {
      const run = runs[nextRun++];
      for (const index of run) {
        control.signal?.throwIfAborted();
        const weather = stateOfSolve(index);
        const result = await solve({ ...base, weather }, mode, innerControl);
        checkShapes(base, result);
        solves[index] = storeSolve(result, weather.windSpeed_m_s);
        done++;
        if (done % 8 === 0 || done === firstStateOfSolve.length) {
          control.onProgress?.(
            done / firstStateOfSolve.length,
            `${label}s: ${done} of ${firstStateOfSolve.length} distinct solves (${states.length} ${label}s)`,
          );
        }
      }
    }
  };
  await Promise.all(Array.from({ length: lanes }, (_, t) => lane(t)));

  let identicalReuses = 0;
  let scaledReuses = 0;
  for (let h = 0; h < states.length; h++) {
    const index = solveOfHour[h];
    if (firstStateOfSolve[index] === h) {
      scaleOfHour[h] = 1;
      continue;
    }
    const stored = solves[index];
    if (scaledHour[h] === 1 && stored.windSpeed_m_s !== states[h].windSpeed_m_s) {
      scaleOfHour[h] = stored.windSpeed_m_s / states[h].windSpeed_m_s;
      scaledReuses++;
    } else {
      scaleOfHour[h] = 1;
      identicalReuses++;
    }
  }
  return { solves, solveOfHour, scaleOfHour, identicalReuses, scaledReuses };
}

const STABILITY_ORDER = 'ABCDEF';

/** Order of weather states by what sets the steady equations at unit speed: direction, class, mixing height, rain. */
function compareWeatherOperator(a: ResolvedWeather, b: ResolvedWeather): number {
  return (
    a.windFrom_deg - b.windFrom_deg ||
    STABILITY_ORDER.indexOf(a.stability) - STABILITY_ORDER.indexOf(b.stability) ||
    a.mixingHeight_m - b.mixingHeight_m ||
    a.rain_mm_h - b.rain_mm_h
  );
}

/** Order of weather states of one operator: speed, temperature, anemometer height. */
function compareWeatherWithinOperator(a: ResolvedWeather, b: ResolvedWeather): number {
  return a.windSpeed_m_s - b.windSpeed_m_s || a.airTemperature_K - b.airTemperature_K || a.anemometerHeight_m - b.anemometerHeight_m;
}

function compareHeights(a: number[], b: number[]): number {
  for (let n = 0; n < a.length; n++) if (a[n] !== b[n]) return a[n] - b[n];
  return 0;
}

function checkShapes(base: SeriesBaseInput, result: SteadyFieldResult): void {
  const columns = base.grid.nx * base.grid.ny;
  if (result.groundLevel_ug_m3.length !== columns) {
    throw new Error(`steady solve: ground-level field has ${result.groundLevel_ug_m3.length} values for ${columns} columns`);
  }
  if (result.receptors_ug_m3.length !== base.receptors.length) {
    throw new Error(`steady solve: ${result.receptors_ug_m3.length} receptor values for ${base.receptors.length} receptors`);
  }
}

/** Access to hour h's value at receptor r and column c, whichever way the fields are stored. */
export interface HourlyValues {
  hours: number;
  receptorValue(h: number, r: number): number;
  groundValue(h: number, column: number): number;
}

function hourlyValuesFromFields(fields: SeriesFields): HourlyValues {
  const { solves, solveOfHour, scaleOfHour } = fields;
  const grounds = solves.map((s) => s.ground_ug_m3);
  const receptors = solves.map((s) => s.receptors_ug_m3);
  return {
    hours: solveOfHour.length,
    receptorValue: (h, r) => receptors[solveOfHour[h]][r] * scaleOfHour[h],
    groundValue: (h, column) => grounds[solveOfHour[h]][column] * scaleOfHour[h],
  };
}

/** Hour-by-hour fields stored one Float32Array per hour (continuous runs). */
function hourlyValuesFromArrays(receptors: Float64Array[], grounds: Float32Array[]): HourlyValues {
  return {
    hours: receptors.length,
    receptorValue: (h, r) => receptors[h][r],
    groundValue: (h, column) => grounds[h][column],
  };
}

/** One standard's result at the receptors and on the ground grid. */
interface StandardResult {
  standard: AirQualityStandard;
  plan: AveragingPlan;
  receptorValues: Float64Array;
  receptorExceedances: Float64Array;
  groundValues: Float64Array;
}

/** Statistics of a series of fields at the receptors and on the ground grid. */
export interface SeriesStatistics {
  receptorMean: Float64Array;
  receptorMax: Float64Array;
  groundMean: Float64Array;
  groundMax: Float64Array;
  standards: StandardResult[];
}

/**
 * Mean, maximum and each standard's statistic at every receptor and ground column.
 */
export function seriesStatistics(
  values: HourlyValues,
  receptorCount: number,
  columns: number,
  hourStarts_ms: Float64Array,
  offsetMinutes: number,
  assessment: Assessment | undefined,
): SeriesStatistics {
  const hours = values.hours;
  const standards = (assessment?.standards ?? []).map((standard) => ({
    standard,
    plan: averagingPlan(hourStarts_ms, offsetMinutes, standard.averaging_h),
  }));
  const background = assessment?.background_ug_m3 ?? 0;
  const series = new Float64Array(hours);
  const work = new Float64Array(hours);
  const summarise = (fill: (series: Float64Array) => void) => {
    fill(series);
    let sum = 0;
    let largest = Number.NEGATIVE_INFINITY;
    for (let h = 0; h < hours; h++) {
      sum += series[h];
      if (series[h] > largest) largest = series[h];
    }
    const figures = standards.map(({ standard, plan }) => standardFigures(series, plan, standard, background, work));
    return { mean: sum / hours, max: largest, figures };
  };
  const receptorMean = new Float64Array(receptorCount);
  const receptorMax = new Float64Array(receptorCount);
  const results: StandardResult[] = standards.map(({ standard, plan }) => ({
    standard,
    plan,
    receptorValues: new Float64Array(receptorCount),
    receptorExceedances: new Float64Array(receptorCount),
    groundValues: new Float64Array(columns),
  }));
  for (let r = 0; r < receptorCount; r++) {
    const s = summarise((out) => {
      for (let h = 0; h < hours; h++) out[h] = values.receptorValue(h, r);
    });
    receptorMean[r] = s.mean;
    receptorMax[r] = s.max;
    s.figures.forEach((f, i) => {
      results[i].receptorValues[r] = f.value_ug_m3;
      results[i].receptorExceedances[r] = f.exceedances;
    });
  }
  const groundMean = new Float64Array(columns);
  const groundMax = new Float64Array(columns);
  for (let c = 0; c < columns; c++) {
    const s = summarise((out) => {
      for (let h = 0; h < hours; h++) out[h] = values.groundValue(h, c);
    });
    groundMean[c] = s.mean;
    groundMax[c] = s.max;
    s.figures.forEach((f, i) => {
      results[i].groundValues[c] = f.value_ug_m3;
    });
  }
  return { receptorMean, receptorMax, groundMean, groundMax, standards: results };
}

/** The receptor columns of a series: mean, max, then each standard's statistic and exceedance count. */
export function seriesReceptorColumns(
  receptorMean: Float64Array,
  receptorMax: Float64Array,
  standards: { standard: AirQualityStandard; receptorValues: Float64Array; receptorExceedances: Float64Array }[],
): ReceptorColumn[] {
  const columns: ReceptorColumn[] = [
    { key: 'mean_ug_m3', values: receptorMean },
    { key: 'max_ug_m3', values: receptorMax },
  ];
  const used = new Set(columns.map((c) => c.key));
  for (const { standard, receptorValues, receptorExceedances } of standards) {
    for (const [key, values] of [
      [standardColumnKey(standard), receptorValues],
      [standardExceedanceKey(standard), receptorExceedances],
    ] as const) {
      let unique = key;
      for (let n = 2; used.has(unique); n++) unique = `${key}_${n}`;
      used.add(unique);
      columns.push({ key: unique, values });
    }
  }
  return columns;
}

/** Peak of a ground field: value and position of the column centre [m]. */
export function groundPeak(base: SeriesBaseInput, field: ArrayLike<number>): { value_ug_m3: number; x_m: number; y_m: number } {
  let best = 0;
  for (let c = 1; c < field.length; c++) if (field[c] > field[best]) best = c;
  const { grid } = base;
  const i = best % grid.nx;
  const j = (best - i) / grid.nx;
  return {
    value_ug_m3: field[best],
    x_m: grid.xWest_m + (i + 0.5) * grid.spacing_m,
    y_m: grid.ySouth_m + (j + 0.5) * grid.spacing_m,
  };
}

/** The standards' part of summary.json for a series (or a wind rose). */
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
      'screening of the PC: below 10 % of a short-term or 1 % of a long-term limit is commonly treated as insignificant ' +
      '(gov.uk permit guidance, thresholds from memory)',
    standards: standards.map((s) => {
      const longTerm = s.standard.averaging_h >= HOURS_PER_YEAR;
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
            pcPercentOfLimit: (100 * pc) / s.standard.limit_ug_m3,
            exceedances: s.receptorExceedances[r],
            meetsStandard: longTerm ? pec <= s.standard.limit_ug_m3 : s.receptorExceedances[r] <= s.standard.allowedExceedances,
            pcInsignificant: pc < (longTerm ? 0.01 : 0.1) * s.standard.limit_ug_m3,
          };
        }),
        ...(s.groundValues ? { groundPeak: groundPeak(base, s.groundValues) } : {}),
      };
    }),
  };
}

/** Weather figures of a series for summary.json. */
function weatherSummary(
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
        statistic: s.standard.averaging_h >= HOURS_PER_YEAR ? 'period mean' : `percentile of ${s.standard.averaging_h}-hour means`,
        percentile: s.standard.averaging_h >= HOURS_PER_YEAR ? undefined : 100 * (1 - s.standard.allowedExceedances / (HOURS_PER_YEAR / s.standard.averaging_h)),
        periods: s.plan.periodCount,
        incompletePeriods: s.plan.incompletePeriods,
        receptorValues: s.receptorValues,
        receptorExceedances: s.receptorExceedances,
        groundValues: s.groundValues,
        exceedanceBasis: s.standard.averaging_h >= HOURS_PER_YEAR ? 'the period mean (1 if above the limit)' : 'periods in the series',
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
    notes,
    extraSummary,
    extraFiles: [
      {
        name: 'windrose.svg',
        content: windRoseSvg(rose, {
          caption: options.windRoseCaption ?? `Hourly weather ${hours[0].time} to ${hours[hours.length - 1].time}`,
        }),
      },
    ],
  };
}

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
