/**
 * The distinct steady solves of a weather series (hourly or wind rose) and when one solve may stand in
 * for another hour exactly.
 *
 * A solve is reused only where that is exact (see `reuseRules`): identical resolved weather gives an
 * identical field; rain is left out of the comparison only when the pollutant has no washout (rain enters
 * nothing else); air temperature only when no source has plume rise (it enters nothing else); and the
 * wind speed only when the field scales exactly as 1 / u (no decay, no washout in that hour, no dry
 * deposition, no plume rise, the stability closure or curves): then field(u) = field(u0) u0 / u.
 * The distinct states are solved in an order that keeps neighbouring weather together, so a warm start
 * always begins from a near state.
 */
import type { Assessment, SolverMode } from '../../scenarios/format/types.ts';
import { releaseHeights_m } from './gridSteady.ts';
import { createSeriesSteadySolver, type SteadySolver } from './solveSteady.ts';
import type { SiteColumns } from '../grid/siteBoundary.ts';
import type { SeriesCheckOptions } from './seriesChecks.ts';
import type { MassBudget, ResolvedWeather, RunControl, SourceReport, SteadyFieldResult, SteadyRunInput } from './types.ts';

/**
 * Everything a steady solve needs except the weather, and the site's columns for the peaks the series
 * reports (not handed to the solves: they do not need it).
 */
export type SeriesBaseInput = Omit<SteadyRunInput, 'weather'> & { site?: SiteColumns | null };

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
  /** the grid run's checks on itself at a few of its weathers (./seriesChecks.ts); none when absent */
  checks?: SeriesCheckOptions;
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
  const { site: _siteForPeaks, ...solveBase } = base;
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
        const result = await solve({ ...solveBase, weather }, mode, innerControl);
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
