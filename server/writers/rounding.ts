/**
 * Rounding for the result files. Concentrations are screening estimates, so they are written to a few
 * significant figures rather than to the last bit of a double; positions are written to fixed decimals.
 */

/** Significant figures of every concentration in summary.json and receptors.csv. */
export const CONCENTRATION_SIGNIFICANT_FIGURES = 3;

/** Decimals of longitude and latitude: 1e-7 degree is about 1 cm, finer than any grid here. */
export const LON_LAT_DECIMALS = 7;

/**
 * Round to a number of significant figures.
 *
 * @param value any finite number (non-finite values are returned unchanged)
 * @param digits significant figures, 1..17
 * @returns the rounded number, e.g. roundSignificant(12.3456, 3) === 12.3
 */
export function roundSignificant(value: number, digits: number): number {
  if (!Number.isFinite(value) || value === 0) return value;
  return Number(value.toPrecision(digits));
}

/**
 * Round to a number of decimals.
 *
 * @param value any finite number (non-finite values are returned unchanged)
 * @param decimals 0..15
 * @returns e.g. roundDecimals(5.123456789, 7) === 5.1234568
 */
export function roundDecimals(value: number, decimals: number): number {
  if (!Number.isFinite(value)) return value;
  const scale = 10 ** decimals;
  const rounded = Math.round(value * scale) / scale;
  // Avoid writing -0 into JSON.
  return rounded === 0 ? 0 : rounded;
}
