/**
 * Which values the legend names, where the colour scale starts, and the default isopleth levels.
 *
 * - The colour range: by default from the field's peak down a fixed number of decades (3: a thousandth of
 *   the peak), never below the smallest positive value in the field; what is lower is not drawn.
 * - Legend ticks on a log scale: the round numbers of the 1-2-5 series (..., 0.1, 0.2, 0.5, 1, 2, 5, ...)
 *   inside the range; when that gives more than `maximumTicks`, only the powers of ten (then every second
 *   one, and so on). On a linear scale: steps of 1, 2 or 5 times a power of ten.
 * - Isopleth levels: the rule the command line uses for footprint.geojson (server/writers/footprint.ts,
 *   `defaultFootprintLevels`): the 1-2-5 numbers strictly between the field's minimum and its peak, the
 *   highest seven of them. The page and the exported files then draw the same lines.
 */
import type { ScaleKind } from './colourScale.ts';

/** Decades below the peak the log colour scale shows by default. */
export const DEFAULT_LOG_DECADES = 3;

/** Most ticks the legend shows. */
export const DEFAULT_MAXIMUM_TICKS = 8;

/** Most default isopleth levels (the command line's number). */
export const DEFAULT_ISOPLETH_LEVELS = 7;

const ROUND_MANTISSAS = [1, 2, 5] as const;

/** Smallest value, smallest positive value and largest value of a field. */
export function fieldRange(field: ArrayLike<number>): { minimum: number; minimumPositive: number; peak: number } {
  let minimum = Infinity;
  let minimumPositive = Infinity;
  let peak = -Infinity;
  for (let n = 0; n < field.length; n++) {
    const value = field[n];
    if (value < minimum) minimum = value;
    if (value > 0 && value < minimumPositive) minimumPositive = value;
    if (value > peak) peak = value;
  }
  return { minimum, minimumPositive, peak };
}

/**
 * The default colour range of a field.
 *
 * @param field_ug_m3 the ground-level field [ug/m3]
 * @param kind "log" or "linear"
 * @param decades decades below the peak on a log scale (default 3)
 * @returns floor and ceiling [ug/m3], or null when nothing in the field is above zero
 * @example defaultColourRange([0, 0.001, 5, 40], 'log') // { floor: 0.04, ceiling: 40 }
 */
export function defaultColourRange(
  field_ug_m3: ArrayLike<number>,
  kind: ScaleKind,
  decades = DEFAULT_LOG_DECADES,
): { floor: number; ceiling: number } | null {
  const { minimumPositive, peak } = fieldRange(field_ug_m3);
  if (!(peak > 0) || !Number.isFinite(peak)) return null;
  if (kind === 'linear') return { floor: 0, ceiling: peak };
  const floor = Math.max(minimumPositive, peak / 10 ** decades);
  // A field with one positive value (or a flat one) still gets a range a decade deep.
  return { floor: floor < peak ? floor : peak / 10, ceiling: peak };
}

/** The 1-2-5 series from `low` to `high` inclusive, ascending. */
function roundSeries(low: number, high: number): number[] {
  const values: number[] = [];
  for (let exponent = Math.floor(Math.log10(low)) - 1; exponent <= Math.ceil(Math.log10(high)); exponent++) {
    for (const mantissa of ROUND_MANTISSAS) {
      const value = Number((mantissa * 10 ** exponent).toPrecision(1));
      if (value >= low * (1 - 1e-12) && value <= high * (1 + 1e-12)) values.push(value);
    }
  }
  return values;
}

/**
 * The values the legend labels.
 *
 * @param floor bottom of the colour range [ug/m3]
 * @param ceiling top of the colour range [ug/m3]
 * @param kind "log" or "linear"
 * @param maximumTicks most ticks (default 8)
 * @returns ascending tick values inside [floor, ceiling]
 * @example legendTicks(0.04, 40, 'log') // [0.1, 1, 10] (the 1-2-5 series would give 9 ticks)
 */
export function legendTicks(floor: number, ceiling: number, kind: ScaleKind, maximumTicks = DEFAULT_MAXIMUM_TICKS): number[] {
  if (!(ceiling > floor) || !Number.isFinite(ceiling)) return [];
  if (kind === 'log') {
    if (!(floor > 0)) throw new RangeError(`legend floor: ${floor} is not allowed on a log scale; give a value > 0`);
    const series = roundSeries(floor, ceiling);
    if (series.length <= maximumTicks) return series;
    const decades = series.filter((value) => Math.abs(Math.log10(value) - Math.round(Math.log10(value))) < 1e-9);
    let stride = 1;
    while (Math.ceil(decades.length / stride) > maximumTicks) stride++;
    return decades.filter((_, n) => n % stride === 0);
  }
  // Linear: the smallest 1-2-5 step that keeps the ticks within the maximum.
  const span = ceiling - floor;
  for (let exponent = Math.floor(Math.log10(span / maximumTicks)); ; exponent++) {
    for (const mantissa of ROUND_MANTISSAS) {
      const step = mantissa * 10 ** exponent;
      const first = Math.ceil(floor / step - 1e-9);
      const last = Math.floor(ceiling / step + 1e-9);
      if (last - first + 1 <= maximumTicks) {
        const ticks: number[] = [];
        for (let n = first; n <= last; n++) ticks.push(Number((n * step).toPrecision(12)));
        return ticks;
      }
    }
  }
}

/**
 * Default isopleth levels: the 1-2-5 numbers strictly between the field's minimum and its peak, the
 * highest `maximumLevels` of them, ascending (the command line's rule; see the module comment).
 *
 * @example isoplethLevels([0, 37]) // [0.2, 0.5, 1, 2, 5, 10, 20]
 */
export function isoplethLevels(field_ug_m3: ArrayLike<number>, maximumLevels = DEFAULT_ISOPLETH_LEVELS): number[] {
  const { minimum, peak } = fieldRange(field_ug_m3);
  if (!(peak > 0) || !Number.isFinite(peak)) return [];
  const candidates = roundSeries(Math.max(minimum, peak * 1e-30), peak).filter((value) => value > minimum && value < peak);
  return candidates.slice(-maximumLevels);
}

/**
 * A concentration for display: three significant figures at most (the project's rounding for
 * concentrations), no exponent between 0.001 and 100000.
 *
 * @example formatConcentration(12.345) // "12.3"; formatConcentration(0.0004567) // "4.57e-4"
 */
export function formatConcentration(value_ug_m3: number): string {
  if (!Number.isFinite(value_ug_m3)) return '–';
  if (value_ug_m3 === 0) return '0';
  const magnitude = Math.abs(value_ug_m3);
  if (magnitude >= 1e-3 && magnitude < 1e5) return String(Number(value_ug_m3.toPrecision(3)));
  const [mantissa, exponent] = value_ug_m3.toExponential(2).split('e');
  return `${Number(mantissa)}e${Number(exponent)}`;
}
