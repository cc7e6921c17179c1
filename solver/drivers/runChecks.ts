/**
 * Checks a grid run makes on itself, for the user: how far its figures are from the Gaussian mode's
 * (mode check) and how much they would change at half the cell size (resolution check). Each compares
 * two steady fields of the same scenario and weather, receptor by receptor and at the ground-level peak,
 * and writes a plain note when a difference exceeds its stated threshold. Series and wind roses make
 * the same comparisons at a few of their weathers (./seriesChecks.ts).
 */
import type { SteadyFieldResult } from './types.ts';

/**
 * The grid and Gaussian modes are noted as differing when one is more than this factor of the other [-]:
 * 1.25. Plumeplan's choice: the two carry the same curves near the sources (docs/near-field.md), so a
 * larger difference comes from what only the grid does (the lid, the sheared wind, the closure far out)
 * or from the Gaussian mode's wind at 1 m for ground-level releases, and the user should know which.
 */
export const MODE_DIFFERENCE_FACTOR = 1.25;

/**
 * A figure is noted as resolution-dependent when halving the cell size changes it by more than this
 * share [-]: 10 %, the yardstick of the grid-convergence check (docs/near-field.md).
 */
export const RESOLUTION_CHANGE_LIMIT = 0.1;

/**
 * Half-size grids of at most this many cells are solved for every steady grid run without being asked
 * [-]: 1.5 million, about a second or two of steady solve on this machine; larger ones on request.
 */
export const AUTOMATIC_RESOLUTION_CHECK_CELLS = 1_500_000;

/** Receptors below this share of the largest receptor figure are not noted (their ratios mean little) [-]. */
const NEGLIGIBLE_SHARE = 1e-3;

export interface FigurePair {
  id: string;
  /** the run's figure [ug/m3] */
  value_ug_m3: number;
  /** the other solve's figure [ug/m3] */
  other_ug_m3: number;
  /** value / other [-]; null when the other is 0 */
  ratio: number | null;
  /** the weather both figures are of, for a series or a wind rose (an hour or a rose cell) */
  weather?: string;
}

export interface FieldComparison {
  /** what was compared with what */
  basis: string;
  threshold: string;
  receptors: FigurePair[];
  /** the ground-level peak of each field, wherever each lies */
  peak: FigurePair;
  /** plain notes for the figures beyond the threshold (empty when none is) */
  notes: string[];
}

/** The id of the peak's pair. */
export const PEAK_ID = 'ground-level peak';

function peakOf(field: ArrayLike<number>): number {
  let peak = 0;
  for (let n = 0; n < field.length; n++) if (field[n] > peak) peak = field[n];
  return peak;
}

/** A pair of figures, run first. */
export function pair(id: string, value: number, other: number, weather?: string): FigurePair {
  const made: FigurePair = { id, value_ug_m3: value, other_ug_m3: other, ratio: other > 0 ? value / other : null };
  if (weather !== undefined) made.weather = weather;
  return made;
}

function figure(value: number): string {
  return Number(value.toPrecision(3)).toString();
}

function place(item: FigurePair): string {
  const where = item.id === PEAK_ID ? 'the ground-level peak' : `receptor ${item.id}`;
  return item.weather === undefined ? where : `${where} in ${item.weather}`;
}

/**
 * The mode check's notes and table from figure pairs (grid first, Gaussian second): a note for each
 * pair more than MODE_DIFFERENCE_FACTOR apart, unless both are negligible.
 */
export function modeComparison(receptors: FigurePair[], peak: FigurePair, basis = 'grid mode against the Gaussian mode, same input'): FieldComparison {
  const largest = Math.max(peak.value_ug_m3, peak.other_ug_m3, ...receptors.map((r) => Math.max(r.value_ug_m3, r.other_ug_m3)));
  const notes: string[] = [];
  for (const item of [...receptors, peak]) {
    if (Math.max(item.value_ug_m3, item.other_ug_m3) < NEGLIGIBLE_SHARE * largest) continue;
    const factor = item.value_ug_m3 > 0 && item.other_ug_m3 > 0 ? Math.max(item.value_ug_m3 / item.other_ug_m3, item.other_ug_m3 / item.value_ug_m3) : Infinity;
    if (factor > MODE_DIFFERENCE_FACTOR) {
      notes.push(
        `mode check: at ${place(item)} the grid mode gives ${figure(item.value_ug_m3)} ug/m3 ` +
          `and the Gaussian mode ${figure(item.other_ug_m3)} ug/m3, ${Number.isFinite(factor) ? `a factor of ${factor.toFixed(2)}` : 'one of them zero'} ` +
          `(noted above a factor of ${MODE_DIFFERENCE_FACTOR}). Common reasons: a ground-level release (the Gaussian mode carries it at the wind at 1 m, ` +
          'the grid at the wind over the plume\'s depth), the mixing lid, or the grid\'s diffusivities far from the sources; both are screening estimates',
      );
    }
  }
  return {
    basis,
    threshold: `noted when one is more than ${MODE_DIFFERENCE_FACTOR} times the other`,
    receptors,
    peak,
    notes,
  };
}

/**
 * The resolution check's notes and table from figure pairs (the run first, half the cell size second):
 * a note for each figure that moves by more than RESOLUTION_CHANGE_LIMIT, unless negligible.
 */
export function resolutionComparison(receptors: FigurePair[], peak: FigurePair, spacing_m: number, basis = `cells of ${spacing_m} m against ${spacing_m / 2} m, same domain`): FieldComparison {
  const largest = Math.max(peak.value_ug_m3, ...receptors.map((r) => r.value_ug_m3));
  const notes: string[] = [];
  for (const item of [...receptors, peak]) {
    if (Math.max(item.value_ug_m3, item.other_ug_m3) < NEGLIGIBLE_SHARE * largest) continue;
    const change = item.value_ug_m3 > 0 ? item.other_ug_m3 / item.value_ug_m3 - 1 : Infinity;
    if (Math.abs(change) > RESOLUTION_CHANGE_LIMIT) {
      notes.push(
        `resolution check: at ${place(item)} the figure changes from ` +
          `${figure(item.value_ug_m3)} to ${figure(item.other_ug_m3)} ug/m3 (${change > 0 ? '+' : ''}${(100 * change).toFixed(0)} %) at half the cell size ` +
          `(${spacing_m / 2} m instead of ${spacing_m} m; noted above ${100 * RESOLUTION_CHANGE_LIMIT} %): give a finer domain spacing_m, or read this figure as uncertain by that much`,
      );
    }
  }
  return {
    basis,
    threshold: `noted when a figure changes by more than ${100 * RESOLUTION_CHANGE_LIMIT} %`,
    receptors,
    peak,
    notes,
  };
}

/**
 * Compare a grid run with the Gaussian mode's run of the same input.
 *
 * @param grid the grid run's steady field
 * @param gaussian the Gaussian mode's steady field of the same input
 * @param receptorIds the receptors' ids, in order
 */
export function compareModes(grid: SteadyFieldResult, gaussian: SteadyFieldResult, receptorIds: readonly string[]): FieldComparison {
  const receptors = receptorIds.map((id, n) => pair(id, grid.receptors_ug_m3[n], gaussian.receptors_ug_m3[n]));
  return modeComparison(receptors, pair(PEAK_ID, peakOf(grid.groundLevel_ug_m3), peakOf(gaussian.groundLevel_ug_m3)));
}

/**
 * Compare a grid run with the same run at half the cell size.
 *
 * @param run the run's steady field
 * @param finer the steady field at half the cell size (same domain)
 * @param spacing_m the run's cell size [m]
 */
export function compareResolutions(run: SteadyFieldResult, finer: SteadyFieldResult, receptorIds: readonly string[], spacing_m: number): FieldComparison {
  const receptors = receptorIds.map((id, n) => pair(id, run.receptors_ug_m3[n], finer.receptors_ug_m3[n]));
  return resolutionComparison(receptors, pair(PEAK_ID, peakOf(run.groundLevel_ug_m3), peakOf(finer.groundLevel_ug_m3)), spacing_m);
}
