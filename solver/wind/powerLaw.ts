/**
 * Wind speed with height: the power law u(z) = u_ref (z / z_ref)^p with an exponent chosen by stability
 * class and land use, or a uniform profile (the same speed at every height) for verification runs.
 *
 * Exponents: Irwin (1979), Atmospheric Environment 13:191, from memory (see ../shared/REFERENCES.md).
 */
import type { LandUse, StabilityClass, WindProfile } from '../../scenarios/format/types.ts';
import type { ResolvedWeather } from '../drivers/types.ts';

/** Power-law exponents p [-] by stability class, open country (Irwin 1979, from memory). */
const RURAL_EXPONENTS: Readonly<Record<StabilityClass, number>> = {
  A: 0.07,
  B: 0.07,
  C: 0.1,
  D: 0.15,
  E: 0.35,
  F: 0.55,
};

/** Power-law exponents p [-] by stability class, urban (Irwin 1979, from memory). */
const URBAN_EXPONENTS: Readonly<Record<StabilityClass, number>> = {
  A: 0.15,
  B: 0.15,
  C: 0.2,
  D: 0.25,
  E: 0.3,
  F: 0.3,
};

/**
 * Lowest height the power law is evaluated at [m]. The law goes to zero speed at the ground, which would
 * make a ground-level release's plume infinitely concentrated; below 1 m the speed at 1 m is used
 * (plumeplan's choice, stated here once).
 */
export const WIND_PROFILE_FLOOR_M = 1;

/**
 * Highest height the power law is followed to [m]: the mixing height (never below the anemometer).
 * The law describes the wind in the boundary layer; carried above it, a stable exponent gives winds of
 * 40-60 m/s at 1 km, which nothing in the weather says and which would set a continuous run's time
 * step. Above the mixing height the speed at the mixing height is used (plumeplan's choice, stated here
 * once; it applies to both solver modes alike).
 */
export function windProfileTop_m(weather: Pick<ResolvedWeather, 'mixingHeight_m' | 'anemometerHeight_m'>): number {
  return Math.max(weather.mixingHeight_m, weather.anemometerHeight_m);
}

/**
 * The power-law exponent for a stability class and land use (Irwin 1979, from memory).
 *
 * @param stability Pasquill class A..F
 * @param landUse "rural" or "urban"
 * @returns exponent p [-]
 * @example powerLawExponent('D', 'rural') // 0.15
 */
export function powerLawExponent(stability: StabilityClass, landUse: LandUse): number {
  const table = landUse === 'urban' ? URBAN_EXPONENTS : landUse === 'rural' ? RURAL_EXPONENTS : undefined;
  if (table === undefined) {
    throw new RangeError(`landUse is ${JSON.stringify(landUse)}; allowed: "rural" or "urban"`);
  }
  const exponent = table[stability];
  if (exponent === undefined) {
    throw new RangeError(`stability is ${JSON.stringify(stability)}; allowed: one of A, B, C, D, E, F`);
  }
  return exponent;
}

/**
 * Wind speed at a height above ground.
 *
 * - `profile = "uniform"`: the measured speed at every height.
 * - `profile = "powerLaw"`: u(z) = u_ref (z' / z_ref)^p with z' = z held between 1 m and the mixing height
 *   (see {@link windProfileTop_m}), p from {@link powerLawExponent}.
 *
 * @param weather resolved weather: windSpeed_m_s [m/s] at anemometerHeight_m [m], stability class
 * @param height_m height above ground [m], >= 0
 * @param landUse "rural" or "urban"
 * @param profile "powerLaw" or "uniform"
 * @returns wind speed at height_m [m/s]
 * @example windSpeedAtHeight_m_s(weather, 100, 'rural', 'powerLaw') // 5 * (100/10)^0.15 = 7.06 for D, 5 m/s at 10 m
 */
export function windSpeedAtHeight_m_s(
  weather: ResolvedWeather,
  height_m: number,
  landUse: LandUse,
  profile: WindProfile,
): number {
  const { windSpeed_m_s, anemometerHeight_m } = weather;
  if (!Number.isFinite(windSpeed_m_s) || windSpeed_m_s <= 0) {
    throw new RangeError(`weather.windSpeed_m_s is ${windSpeed_m_s}; allowed: a finite speed > 0 m/s`);
  }
  if (!Number.isFinite(height_m) || height_m < 0) {
    throw new RangeError(`height_m is ${height_m}; allowed: a finite height >= 0 m`);
  }
  if (profile === 'uniform') return windSpeed_m_s;
  if (profile !== 'powerLaw') {
    throw new RangeError(`windProfile is ${JSON.stringify(profile)}; allowed: "powerLaw" or "uniform"`);
  }
  if (!Number.isFinite(anemometerHeight_m) || anemometerHeight_m <= 0) {
    throw new RangeError(`weather.anemometerHeight_m is ${anemometerHeight_m}; allowed: a finite height > 0 m`);
  }
  const exponent = powerLawExponent(weather.stability, landUse);
  const evaluatedHeight_m = Math.min(Math.max(height_m, WIND_PROFILE_FLOOR_M), windProfileTop_m(weather));
  const referenceHeight_m = Math.max(anemometerHeight_m, WIND_PROFILE_FLOOR_M);
  return windSpeed_m_s * Math.pow(evaluatedHeight_m / referenceHeight_m, exponent);
}
