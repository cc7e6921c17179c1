/**
 * The Gaussian plume of one placed source under one weather state: the one place it is built, for the
 * Gaussian mode (../drivers/gaussianSteady.ts), the grid mode's sub-grid near field
 * (../sources/subGridPlume.ts) and the siting map (../siting/sitingMap.ts), so all of them carry the same
 * dispersion curves, plume rise, transport wind and first-order losses. The sub-grid plume may ask for
 * another transport speed (transportWind_m_s); curves and rise stay the same.
 *
 * - Point sources: Briggs plume rise with the wind at the stack top (../sources/plumeRise.ts); the
 *   centreline follows the gradual rise up to the distance of final rise; the transport speed is the
 *   profile wind at the effective height (stack height + final rise).
 * - Area sources: a 1 g/s element plume at the release height, integrated over the exact cell overlaps
 *   by GaussianAreaSource.
 * - Losses: decay and washout as exp(-(k + Lambda) x / u), dry deposition by source depletion.
 */
import type { PlacedAreaSource, PlacedPointSource, SteadyRunInput } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import { decayRate_per_s, washoutRate_per_s } from '../losses/rates.ts';
import { plumeRiseFor, type PlumeRise } from '../sources/plumeRise.ts';
import { windSpeedAtHeight_m_s } from '../wind/powerLaw.ts';
import { sigmasFor, type SigmaFunction } from './dispersionCurves.ts';
import { GaussianAreaSource } from './gaussianAreaSource.ts';
import { GaussianPlume } from './gaussianPlume.ts';

/** What a source's plume depends on besides the source. */
export type PlumeConditions = Pick<SteadyRunInput, 'weather' | 'pollutant' | 'dispersion' | 'landUse' | 'windProfile'>;

/** First-order loss rates of a pollutant under a weather state [1/s]. */
export function firstOrderRates_per_s(conditions: Pick<PlumeConditions, 'weather' | 'pollutant'>): { decay_per_s: number; washout_per_s: number } {
  return {
    decay_per_s: decayRate_per_s(conditions.pollutant.halfLife_h),
    washout_per_s: washoutRate_per_s(conditions.pollutant.washout, conditions.weather.rain_mm_h),
  };
}

export interface PointSourcePlume {
  plume: GaussianPlume;
  sigmas: SigmaFunction;
  /** stack height plus final rise [m] */
  effectiveHeight_m: number;
  /** the rise, or null when the source has plumeRise false */
  rise: PlumeRise | null;
}

/**
 * The plume of a point source.
 *
 * @param maxDistance_m farthest distance the depletion table must reach [m]
 * @param transportWind_m_s the plume's transport speed [m/s], default the profile wind at the effective
 *   height (the Gaussian mode's); the curves and the rise are the same either way
 * @example pointSourcePlume(stack, input, 20_000).plume.concentration_g_m3(1000, 0, 1.5)
 */
export function pointSourcePlume(point: PlacedPointSource, conditions: PlumeConditions, maxDistance_m: number, transportWind_m_s?: number): PointSourcePlume {
  const { weather, pollutant, dispersion, landUse, windProfile } = conditions;
  if (Number.isNaN(point.height_m) || !(Number.isFinite(point.height_m) && point.height_m >= 0)) {
    throw new RangeError(`source ${point.id}: height_m is ${point.height_m}; allowed: a finite height >= 0 m`);
  }
  const rise = point.plumeRise ? plumeRiseFor(point, weather, landUse, windProfile) : null;
  const effectiveHeight_m = point.height_m + (rise?.finalRise_m ?? 0);
  const windSpeed_m_s = windSpeedAtHeight_m_s(weather, effectiveHeight_m, landUse, windProfile);
  const sigmas = sigmasFor(dispersion, weather.stability, landUse, windSpeed_m_s);
  const { decay_per_s, washout_per_s } = firstOrderRates_per_s(conditions);
  const plume = new GaussianPlume({
    emission_g_s: point.emission_g_s,
    windSpeed_m_s: transportWind_m_s ?? windSpeed_m_s,
    releaseHeight_m: point.height_m,
    riseAt: rise?.riseAt,
    mixingHeight_m: weather.mixingHeight_m,
    sigmas,
    lossRate_per_s: decay_per_s + washout_per_s,
    depositionVelocity_m_s: pollutant.depositionVelocity_m_s,
    maxDistance_m,
  });
  return { plume, sigmas, effectiveHeight_m, rise };
}

export interface AreaSourcePlume {
  area: GaussianAreaSource;
  /** the 1 g/s element plume */
  plume: GaussianPlume;
  sigmas: SigmaFunction;
}

/** The plume of an area source (its exact cell overlaps on `grid`); transportWind_m_s as for a point. */
export function areaSourcePlume(area: PlacedAreaSource, grid: LocalGrid, conditions: PlumeConditions, maxDistance_m: number, transportWind_m_s?: number): AreaSourcePlume {
  const { weather, pollutant, dispersion, landUse, windProfile } = conditions;
  if (Number.isNaN(area.releaseHeight_m) || !(Number.isFinite(area.releaseHeight_m) && area.releaseHeight_m >= 0)) {
    throw new RangeError(`source ${area.id}: releaseHeight_m is ${area.releaseHeight_m}; allowed: a finite height >= 0 m`);
  }
  const windSpeed_m_s = windSpeedAtHeight_m_s(weather, area.releaseHeight_m, landUse, windProfile);
  const sigmas = sigmasFor(dispersion, weather.stability, landUse, windSpeed_m_s);
  const { decay_per_s, washout_per_s } = firstOrderRates_per_s(conditions);
  const plume = new GaussianPlume({
    emission_g_s: 1,
    windSpeed_m_s: transportWind_m_s ?? windSpeed_m_s,
    releaseHeight_m: area.releaseHeight_m,
    mixingHeight_m: weather.mixingHeight_m,
    sigmas,
    lossRate_per_s: decay_per_s + washout_per_s,
    depositionVelocity_m_s: pollutant.depositionVelocity_m_s,
    maxDistance_m,
  });
  return { area: new GaussianAreaSource(area, grid, plume, sigmas), plume, sigmas };
}
