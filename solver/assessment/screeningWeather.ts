/**
 * The screening weather set: the usual first screen when no met year is at hand. Every stability class
 * with the wind speeds that class occurs with, from every direction sector, each solved as a steady
 * state; the result is the highest hourly process contribution at each receptor and on the ground, with
 * the weather that caused it.
 *
 * Where the set comes from. The class-speed pairs are read off the table that assigns stability classes
 * from the 10 m wind speed and the sky (Pasquill 1961; Turner 1970, Workbook of Atmospheric Dispersion
 * Estimates, Table 1; [read in Boubel, Fox, Turner & Stern, Fundamentals of Air Pollution, 3rd ed., 1994,
 * Table 19-3], as in ../../../shared/REFERENCES.md): a class is paired with every speed band in which
 * the table gives it by day or by night, an intermediate class (A-B, B-C, C-D) counting for both its
 * neighbours, and D for every speed (the table's overcast rule). The table leaves the night cells below
 * 2 m/s blank; plumeplan fills them with both E and F, the choices some services make (stated, not
 * hidden). Each band is represented by round speeds inside it (plumeplan's choice):
 *   below 2 m/s: 1, 1.5; 2-3: 2, 2.5; 3-5: 3, 4; 5-6: 5; above 6: 7, 10, 15 m/s.
 * Mixing heights are plumeplan's screening defaults per class (../meteorology/resolveWeather.ts).
 *
 * Why the maximum is an upper bound: with constant emissions every hour of any year is one of the
 * weather states the set stands for (to the set's resolution in speed and direction), so no hourly value,
 * no percentile of hourly or daily means and no annual mean can exceed the highest hourly PC of the set.
 */
import type { ScreeningSetWeather, StabilityClass } from '../../scenarios/format/types.ts';
import { DEFAULT_MIXING_HEIGHT_m, resolveWeather } from '../meteorology/resolveWeather.ts';
import { reuseRules, solveWithReuse, type SeriesBaseInput, type SeriesRunOptions } from '../drivers/seriesSolves.ts';
import { distinctNotes, meanSourceReports } from '../drivers/seriesSummaries.ts';
import { groundPeak } from '../drivers/seriesStatistics.ts';
import { solveSteady } from '../drivers/solveSteady.ts';
import { seriesGridChecks } from '../drivers/seriesChecks.ts';
import type { ResolvedWeather, ScenarioRunResult, StandardField } from '../drivers/types.ts';
import { isComputable, pcFactorOf } from './standards.ts';

/** Speeds at 10 m representing each band of the stability table [m/s] (plumeplan's choice, see above). */
const BAND_SPEEDS_m_s = {
  below2: [1, 1.5],
  from2to3: [2, 2.5],
  from3to5: [3, 4],
  from5to6: [5],
  above6: [7, 10, 15],
} as const;

type Band = keyof typeof BAND_SPEEDS_m_s;

/**
 * The bands in which the stability table gives each class (Turner 1970 Table 1, read in Boubel et al.
 * 1994 Table 19-3): day A < 2 and A-B 2-3; B also 3-5; C 2-3 to > 6; D 3-5 at night and from 5 up by day,
 * and any speed when overcast; E 2-5 at night; F 2-3 at night; E and F below 2 m/s fill the blank cells.
 */
export const SCREENING_CLASS_BANDS: Readonly<Record<StabilityClass, readonly Band[]>> = {
  A: ['below2', 'from2to3'],
  B: ['below2', 'from2to3', 'from3to5'],
  C: ['from2to3', 'from3to5', 'from5to6', 'above6'],
  D: ['below2', 'from2to3', 'from3to5', 'from5to6', 'above6'],
  E: ['below2', 'from2to3', 'from3to5'],
  F: ['below2', 'from2to3'],
};

/** Where the set comes from, for every result that uses it. */
export const SCREENING_SET_ORIGIN =
  'every stability class paired with the 10 m wind speeds at which the Pasquill-Turner table gives it ' +
  '(Turner 1970 Table 1, read in Boubel et al. 1994 Table 19-3; D at every speed, the overcast rule; the blank night cells ' +
  'below 2 m/s filled with E and F), speeds 1, 1.5, 2, 2.5, 3, 4, 5, 7, 10, 15 m/s standing for the table\'s bands, ' +
  'mixing heights plumeplan\'s defaults per class, from every direction sector';

/** The class-speed pairs of the set. */
export function screeningClassSpeeds(): { stability: StabilityClass; windSpeed_m_s: number }[] {
  const pairs: { stability: StabilityClass; windSpeed_m_s: number }[] = [];
  for (const stability of Object.keys(SCREENING_CLASS_BANDS) as StabilityClass[]) {
    for (const band of SCREENING_CLASS_BANDS[stability]) for (const speed of BAND_SPEEDS_m_s[band]) pairs.push({ stability, windSpeed_m_s: speed });
  }
  return pairs;
}

/**
 * Every weather state of the set, resolved.
 *
 * @param weather sectors, rain, air temperature, anemometer height
 * @returns states in the order sector, class, speed; wind from 0, 360/sectors, ... deg
 * @example screeningWeatherStates({ kind: 'screeningSet', sectors: 36, rain_mm_h: 0, airTemperature_K: 288.15, anemometerHeight_m: 10 }).length // 36 x 38
 */
export function screeningWeatherStates(weather: ScreeningSetWeather): ResolvedWeather[] {
  if (!(Number.isInteger(weather.sectors) && weather.sectors >= 1 && weather.sectors <= 360)) {
    throw new RangeError(`weather.sectors: ${weather.sectors} is not allowed (a whole number from 1 to 360)`);
  }
  const pairs = screeningClassSpeeds();
  const states: ResolvedWeather[] = [];
  for (let s = 0; s < weather.sectors; s++) {
    const windFrom_deg = (360 * s) / weather.sectors;
    for (const { stability, windSpeed_m_s } of pairs) {
      states.push(
        resolveWeather(
          {
            windSpeed_m_s,
            windFrom_deg,
            stability,
            mixingHeight_m: DEFAULT_MIXING_HEIGHT_m[stability],
            rain_mm_h: weather.rain_mm_h,
            airTemperature_K: weather.airTemperature_K,
            anemometerHeight_m: weather.anemometerHeight_m,
          },
          { lat: 0, lon: 0 },
          'weather',
        ),
      );
    }
  }
  return states;
}

/** The weather of one state, as reported beside a maximum. */
export interface WorstWeather {
  windFrom_deg: number;
  windSpeed_m_s: number;
  stability: StabilityClass;
  mixingHeight_m: number;
}

/**
 * Run the screening weather set: every state as a steady solve (exact reuse where it applies, on the
 * pool's lanes when given), then the highest hourly PC at each receptor and on the ground.
 *
 * @param base everything a steady solve needs but the weather
 * @param weather the set's options
 * @param options mode, assessment (for the standards' upper bounds), progress, solver(s), and in grid
 *   mode the checks (../drivers/seriesChecks.ts): the Gaussian mode and half the cell size at the states
 *   giving the highest figures, as for an hourly series or a wind rose
 * @returns receptor column max_hourly_ug_m3; footprint = the highest hourly ground-level PC; each
 *   computable standard's upper bound (basis "upperBound"); the worst weather at each receptor and at the
 *   ground maximum in the summary; modeCheck and resolutionCheck in the summary for a checked grid run
 */
export async function runScreeningSet(base: SeriesBaseInput, weather: ScreeningSetWeather, options: SeriesRunOptions): Promise<ScenarioRunResult> {
  const started = performance.now();
  const control = options.control ?? {};
  const states = screeningWeatherStates(weather);
  const rules = reuseRules(base, options.speedScaling ?? true);
  const fields = await solveWithReuse(base, states, options.mode, {
    solve: options.solve ?? solveSteady,
    rules,
    control,
    label: 'weather state',
    concurrency: options.concurrency,
  });
  const receptorCount = base.receptors.length;
  const columns = base.grid.nx * base.grid.ny;
  const receptorMax = new Float64Array(receptorCount);
  const receptorWorst = new Int32Array(receptorCount);
  const groundMax = new Float64Array(columns);
  const groundWorst = new Int32Array(columns);
  for (let h = 0; h < states.length; h++) {
    const solve = fields.solves[fields.solveOfHour[h]];
    const scale = fields.scaleOfHour[h];
    for (let r = 0; r < receptorCount; r++) {
      const value = solve.receptors_ug_m3[r] * scale;
      if (value > receptorMax[r]) {
        receptorMax[r] = value;
        receptorWorst[r] = h;
      }
    }
    const ground = solve.ground_ug_m3;
    for (let c = 0; c < columns; c++) {
      const value = ground[c] * scale;
      if (value > groundMax[c]) {
        groundMax[c] = value;
        groundWorst[c] = h;
      }
    }
  }
  const worst = (h: number): WorstWeather => {
    const state = states[h];
    return { windFrom_deg: state.windFrom_deg, windSpeed_m_s: state.windSpeed_m_s, stability: state.stability, mixingHeight_m: state.mixingHeight_m };
  };
  const peak = groundPeak(base, groundMax);
  let peakColumn = 0;
  for (let c = 1; c < columns; c++) if (groundMax[c] > groundMax[peakColumn]) peakColumn = c;

  const standardFields: StandardField[] = (options.assessment?.standards ?? []).filter(isComputable).map((standard) => {
    const factor = pcFactorOf(standard);
    return {
      name: standard.name,
      basis: 'upperBound',
      receptors_ug_m3: receptorMax.map((value) => factor * value),
      ground_ug_m3: groundMax.map((value) => factor * value),
    };
  });
  const solveSeconds = fields.solves.reduce((sum, s) => sum + s.wallSeconds, 0);
  // The set's figures are maxima over its states, so the states of the highest figures are the ones whose
  // difference between modes or cell sizes reaches the result: the same choice as a series' checks.
  const checkSummary: Record<string, unknown> = {};
  const checkNotes: string[] = [];
  if (options.mode === 'grid' && options.checks !== undefined) {
    const checks = await seriesGridChecks(base, states, fields, (h) => `screening state ${h}`, options.checks, control, undefined, 'the screening weather set');
    checkSummary.modeCheck = checks.modeCheck;
    checkSummary.resolutionCheck = checks.resolutionCheck;
    checkNotes.push(...checks.notes);
  }
  return {
    mode: options.mode,
    weatherKind: 'screeningSet',
    grid: base.grid,
    sources: meanSourceReports(fields),
    massBudget_g: null,
    steps: fields.solves.reduce((sum, s) => sum + s.steps, 0),
    wallSeconds: (performance.now() - started) / 1000,
    footprint_ug_m3: groundMax,
    footprintStatistic: 'maximum',
    receptorColumns: [{ key: 'max_hourly_ug_m3', values: receptorMax }],
    notes: [
      `screening weather set: ${states.length} weather states (${weather.sectors} sectors x ${states.length / weather.sectors} class-speed pairs), ` +
        `${fields.solves.length} steady solves (${fields.identicalReuses} identical states reused, ${fields.scaledReuses} by exact wind-speed scaling)`,
      'figures are the highest hourly process contribution over the set: an upper bound of every percentile and mean, not a statistic of a year',
      ...distinctNotes(fields.solves),
      ...checkNotes,
    ],
    extraSummary: {
      ...(options.extraSummary ?? {}),
      ...checkSummary,
      weather: {
        kind: 'screeningSet',
        origin: SCREENING_SET_ORIGIN,
        sectors: weather.sectors,
        states: states.length,
        classSpeeds: screeningClassSpeeds(),
        rain_mm_h: weather.rain_mm_h,
        airTemperature_K: weather.airTemperature_K,
        anemometerHeight_m: weather.anemometerHeight_m,
      },
      series: { method: 'highest hourly value over the screening weather set', rules: rules.explanation, solves: fields.solves.length, solveWallSeconds: solveSeconds },
      worstWeather: {
        groundMaximum: { ...peak, weather: worst(groundWorst[peakColumn]) },
        receptors: base.receptors.map((receptor, r) => ({ id: receptor.id, max_hourly_ug_m3: receptorMax[r], weather: worst(receptorWorst[r]) })),
      },
    },
    standardFields,
  };
}
