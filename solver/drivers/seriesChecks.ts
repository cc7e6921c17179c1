/**
 * The mode and resolution checks (./runChecks.ts) of an hourly series or a wind rose run in grid mode.
 *
 * A series has thousands of weathers; re-solving all of them twice would cost more than the run. The
 * checks re-solve a stated, representative few: the weather (hour or rose cell) that gives the highest
 * ground-level figure off the site, and for each receptor the weather that gives its highest figure, at
 * most MAX_CHECKED_WEATHERS distinct ones (the peak's first, then the receptors' by their figure). The
 * highest figures are where the short-term standards bite and where a difference matters most. A
 * receptor whose own weather did not make the cut is compared at the checked weather where its figure is
 * highest. Every pair in the tables names its weather, and a note says which weathers were checked.
 *
 * The run's figures (as the series computed them: its tolerance, its reuse of solves) are compared with a
 * steady Gaussian-mode solve and with a steady grid solve at half the cell size of the same weather.
 */
import type { Domain } from '../../scenarios/format/types.ts';
import type { ResolvedWeather, RunControl, SteadyRunInput } from './types.ts';
import type { SiteColumns } from '../grid/siteBoundary.ts';
import { sitePeak } from '../grid/siteBoundary.ts';
import { columnsPerSide } from '../grid/localGrid.ts';
import type { SeriesBaseInput, SeriesFields } from './seriesSolves.ts';
import { solveSteady, type SteadySolver } from './solveSteady.ts';
import { AUTOMATIC_RESOLUTION_CHECK_CELLS, modeComparison, pair, PEAK_ID, resolutionComparison, type FieldComparison } from './runChecks.ts';

/**
 * Most weathers a series' checks re-solve [-]: 6. With the half-size grid at most
 * AUTOMATIC_RESOLUTION_CHECK_CELLS, the automatic resolution check costs at most six steady solves of
 * that size (on the demo year, seconds against the run's minutes; docs/near-field.md has the figures).
 */
export const MAX_CHECKED_WEATHERS = 6;

/** How the caller lets the series checks run. */
export interface SeriesCheckOptions {
  /** the resolution check: 'auto' when the half-size grid is small (as for steady runs), 'always', 'never' */
  resolutionCheck: 'auto' | 'always' | 'never';
  /** cell size of the run [m] */
  spacing_m: number;
  /** the run's domain at half the cell size (grid, sources, receptors, site); may throw RangeError (too large) */
  halfSizeBase: () => SeriesBaseInput;
  /** cells of the half-size grid (for the automatic rule) */
  halfSizeCells: number;
  /** the steady solver for the checks' solves (cold, its own tolerance); default solveSteady */
  solve?: SteadySolver;
}

/** The weathers chosen for the checks, and why each. */
export interface CheckedWeathers {
  /** state indices of the checked weathers */
  states: number[];
  /** why each was chosen */
  reasons: string[][];
  /** for each receptor, the index into `states` it is compared at */
  receptorWeather: number[];
  /** the index into `states` the ground-level peak is compared at */
  peakWeather: number;
}

/** The figures of one state as the series computed them: a stored solve times its scale. */
function runFigures(base: SeriesBaseInput, fields: SeriesFields, state: number): { receptors: Float64Array; ground: Float64Array } {
  const solve = fields.solves[fields.solveOfHour[state]];
  const scale = fields.scaleOfHour[state];
  return {
    receptors: Float64Array.from(solve.receptors_ug_m3, (value) => value * scale),
    ground: Float64Array.from(solve.ground_ug_m3, (value) => value * scale),
  };
}

function peakOffSite(base: Pick<SeriesBaseInput, 'grid'>, ground: ArrayLike<number>, site: SiteColumns | null | undefined): number {
  return sitePeak(base.grid, ground, site ?? null).value_ug_m3;
}

/**
 * Choose the weathers to check: the highest ground-level figure off the site first, then each receptor's
 * highest figure (receptors with higher figures first), distinct, at most `limit`.
 */
export function chooseCheckedWeathers(
  base: SeriesBaseInput,
  fields: SeriesFields,
  receptorIds: readonly string[],
  frequencies?: ArrayLike<number>,
  limit = MAX_CHECKED_WEATHERS,
): CheckedWeathers {
  const all = Array.from(fields.solveOfHour.keys());
  if (all.length === 0) throw new RangeError('series checks: the series has no weathers');
  // A rose cell that never occurs gives no figure of the run (its frequency is 0).
  const occurring = frequencies === undefined ? all : all.filter((h) => frequencies[h] > 0);
  const candidates = occurring.length > 0 ? occurring : all;
  const solvePeaks = fields.solves.map((solve) => peakOffSite(base, solve.ground_ug_m3, base.site));
  const peakAt = (h: number): number => solvePeaks[fields.solveOfHour[h]] * fields.scaleOfHour[h];
  const figureAt = (h: number, r: number): number => fields.solves[fields.solveOfHour[h]].receptors_ug_m3[r] * fields.scaleOfHour[h];
  const highest = (value: (h: number) => number): number => candidates.reduce((best, h) => (value(h) > value(best) ? h : best), candidates[0]);
  const peakState = highest(peakAt);
  const receptorBest = receptorIds.map((_, r) => highest((h) => figureAt(h, r)));
  const chosen: number[] = [peakState];
  const reasons: string[][] = [['the highest ground-level figure' + (base.site ? ' off the site' : '')]];
  const byFigure = receptorIds.map((_, r) => r).sort((a, b) => figureAt(receptorBest[b], b) - figureAt(receptorBest[a], a));
  for (const r of byFigure) {
    const at = chosen.indexOf(receptorBest[r]);
    if (at >= 0) reasons[at].push(`receptor ${receptorIds[r]}'s highest figure`);
    else if (chosen.length < limit) {
      chosen.push(receptorBest[r]);
      reasons.push([`receptor ${receptorIds[r]}'s highest figure`]);
    }
  }
  const receptorWeather = receptorIds.map((_, r) => {
    const own = chosen.indexOf(receptorBest[r]);
    if (own >= 0) return own;
    let best = 0;
    for (let k = 1; k < chosen.length; k++) if (figureAt(chosen[k], r) > figureAt(chosen[best], r)) best = k;
    return best;
  });
  return { states: chosen, reasons, receptorWeather, peakWeather: 0 };
}

/** A weather in words, for the tables and notes. */
export function describeWeather(weather: ResolvedWeather): string {
  return `wind from ${weather.windFrom_deg} deg at ${weather.windSpeed_m_s} m/s, class ${weather.stability}, mixing height ${weather.mixingHeight_m} m`;
}

/**
 * The mode check (always) and the resolution check (when asked or small) of a grid-mode series.
 *
 * @param base the run's grid, sources, receptors and site
 * @param states the series' resolved weathers (hours or rose cells), in order
 * @param fields the series' solves and which state each uses
 * @param labelOf a state's name, e.g. "hour 2026-03-04T05:00Z" or "wind-rose cell 12"
 * @param frequencies a rose's cell frequencies: cells that never occur are not chosen
 * @param collection what the weathers are, in the basis and the notes (default "the series")
 * @returns the tables for the summary (modeCheck, resolutionCheck) and the notes for the run
 */
export async function seriesGridChecks(
  base: SeriesBaseInput,
  states: readonly ResolvedWeather[],
  fields: SeriesFields,
  labelOf: (state: number) => string,
  options: SeriesCheckOptions,
  control: RunControl = {},
  frequencies?: ArrayLike<number>,
  collection = 'the series',
): Promise<{ modeCheck: FieldComparison & { weathers: { weather: string; chosenFor: string[] }[] }; resolutionCheck: Record<string, unknown>; notes: string[] }> {
  const ids = base.receptors.map((receptor) => receptor.id);
  const chosen = chooseCheckedWeathers(base, fields, ids, frequencies);
  const names = chosen.states.map((state) => `${labelOf(state)} (${describeWeather(states[state])})`);
  const weathers = chosen.states.map((_, k) => ({ weather: names[k], chosenFor: chosen.reasons[k] }));
  const run = chosen.states.map((state) => runFigures(base, fields, state));
  const { site: _siteForPeaks, ...solveBase } = base;
  const solve = options.solve ?? solveSteady;
  const inner: RunControl = control.signal ? { signal: control.signal } : {};
  const basisTail = `at ${chosen.states.length} of the ${states.length} weathers of ${collection} (the one giving the highest ground-level figure and each receptor's highest figure; listed in weathers), not every one`;

  const gaussian: { receptors: ArrayLike<number>; peak: number }[] = [];
  for (const state of chosen.states) {
    control.signal?.throwIfAborted();
    const result = await solveSteady({ ...solveBase, weather: states[state] } as SteadyRunInput, 'gaussian', inner);
    gaussian.push({ receptors: result.receptors_ug_m3, peak: peakOffSite(base, result.groundLevel_ug_m3, base.site) });
  }
  const runPeak = (k: number): number => peakOffSite(base, run[k].ground, base.site);
  const modeCheck = {
    ...modeComparison(
      ids.map((id, r) => pair(id, run[chosen.receptorWeather[r]].receptors[r], gaussian[chosen.receptorWeather[r]].receptors[r], names[chosen.receptorWeather[r]])),
      pair(PEAK_ID, runPeak(chosen.peakWeather), gaussian[chosen.peakWeather].peak, names[chosen.peakWeather]),
      `grid mode against the Gaussian mode, same input, ${basisTail}`,
    ),
    weathers,
  };
  const notes = [
    `mode check: for ${collection === 'the series' ? 'a series' : collection}, made ${basisTail}: ${weathers.map((w) => `${w.weather} for ${w.chosenFor.join(' and ')}`).join('; ')}` +
      '; the resolution check, when made, at the same weathers',
    ...modeCheck.notes,
  ];

  const wanted = options.resolutionCheck === 'always' || (options.resolutionCheck === 'auto' && options.halfSizeCells <= AUTOMATIC_RESOLUTION_CHECK_CELLS);
  if (!wanted) {
    const reason =
      options.resolutionCheck === 'never'
        ? 'not asked for'
        : `not made: the half-size grid would have ${options.halfSizeCells} cells, above the ${AUTOMATIC_RESOLUTION_CHECK_CELLS} made without asking (ask for it: plumeplan run --resolution-check)`;
    return { modeCheck, resolutionCheck: { made: false, reason }, notes };
  }
  let finerBase: SeriesBaseInput;
  try {
    finerBase = options.halfSizeBase();
  } catch (error) {
    if (!(error instanceof RangeError)) throw error;
    return { modeCheck, resolutionCheck: { made: false, reason: `not made: ${error.message}` }, notes };
  }
  const { site: finerSite, ...finerSolveBase } = finerBase;
  const finer: { receptors: ArrayLike<number>; peak: number }[] = [];
  for (let k = 0; k < chosen.states.length; k++) {
    control.signal?.throwIfAborted();
    control.onProgress?.(k / chosen.states.length, `resolution check: ${names[k]} at ${options.spacing_m / 2} m cells`);
    const result = await solve({ ...finerSolveBase, weather: states[chosen.states[k]] } as SteadyRunInput, 'grid', inner);
    finer.push({ receptors: result.receptors_ug_m3, peak: peakOffSite(finerBase, result.groundLevel_ug_m3, finerSite) });
  }
  const comparison = resolutionComparison(
    ids.map((id, r) => pair(id, run[chosen.receptorWeather[r]].receptors[r], finer[chosen.receptorWeather[r]].receptors[r], names[chosen.receptorWeather[r]])),
    pair(PEAK_ID, runPeak(chosen.peakWeather), finer[chosen.peakWeather].peak, names[chosen.peakWeather]),
    options.spacing_m,
    `cells of ${options.spacing_m} m (${collection === 'the series' ? "the series'" : "the run's"} own figures) against steady solves at ${options.spacing_m / 2} m, same domain, ${basisTail}`,
  );
  notes.push(...comparison.notes);
  return { modeCheck, resolutionCheck: { made: true, ...comparison, weathers }, notes };
}

/** Cells of a domain at half its cell size. */
export function halfSizeCells(domain: Domain): number {
  return columnsPerSide({ ...domain, spacing_m: domain.spacing_m / 2 }) ** 2 * domain.layers;
}
