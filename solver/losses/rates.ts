/**
 * First-order loss rates [1/s] shared by the grid solver and the Gaussian reference: radioactive-style or
 * chemical decay from a half-life, and below-cloud washout from the rain rate. Both act on the airborne
 * mass as dC/dt = -(k + Lambda) C, so over a travel time t the mass falls by exp(-(k + Lambda) t).
 */
import type { Washout } from '../../scenarios/format/types.ts';

/** Seconds in an hour [s/h]. */
const SECONDS_PER_HOUR = 3600;

/**
 * Decay rate from a half-life: k = ln 2 / T_half (exact: mass after t is M0 2^(-t / T_half),
 * ../shared/REFERENCES.md "Losses").
 *
 * @param halfLife_h half-life [h], > 0; null = conserved pollutant
 * @returns k [1/s]; 0 when halfLife_h is null
 * @example decayRate_per_s(1) // 1.9254e-4 1/s
 */
export function decayRate_per_s(halfLife_h: number | null): number {
  if (halfLife_h === null) return 0;
  if (typeof halfLife_h !== 'number' || !Number.isFinite(halfLife_h) || halfLife_h <= 0) {
    throw new RangeError(
      `pollutant.halfLife_h is ${String(halfLife_h)}; allowed: a finite half-life > 0 h, or null for a conserved pollutant`,
    );
  }
  return Math.LN2 / (SECONDS_PER_HOUR * halfLife_h);
}

/**
 * Below-cloud washout coefficient Lambda = a R^b with R the rain rate in mm/h (the usual power-law form,
 * ../shared/REFERENCES.md "Losses").
 *
 * @param washout coefficients { a_per_s [1/s], b [-] }; null = the pollutant is not washed out
 * @param rain_mm_h rain rate [mm/h], >= 0
 * @returns Lambda [1/s]; 0 when there is no rain or no washout
 * @example washoutRate_per_s({ a_per_s: 7e-5, b: 0.8 }, 2) // 1.2188e-4 1/s
 */
export function washoutRate_per_s(washout: Washout | null, rain_mm_h: number): number {
  if (!Number.isFinite(rain_mm_h) || rain_mm_h < 0) {
    throw new RangeError(`weather.rain_mm_h is ${rain_mm_h}; allowed: a finite rain rate >= 0 mm/h`);
  }
  if (washout === null) return 0;
  if (!Number.isFinite(washout.a_per_s) || washout.a_per_s < 0) {
    throw new RangeError(`pollutant.washout.a_per_s is ${washout.a_per_s}; allowed: a finite coefficient >= 0 1/s`);
  }
  if (!Number.isFinite(washout.b) || washout.b < 0) {
    throw new RangeError(`pollutant.washout.b is ${washout.b}; allowed: a finite exponent >= 0`);
  }
  // No rain, no washout, whatever b is (0^0 would otherwise give a).
  if (rain_mm_h === 0) return 0;
  return washout.a_per_s * Math.pow(rain_mm_h, washout.b);
}
