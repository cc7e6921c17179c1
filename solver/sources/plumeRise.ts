/**
 * Briggs plume rise (Briggs 1969, 1975) for a stack: how far above the stack top a hot or fast plume
 * levels off, and how it gets there.
 *
 * Formulas and their sources (../shared/REFERENCES.md unless said otherwise):
 * - buoyancy flux F = g v d^2 (Ts - Ta) / (4 Ts) [m4/s3]; momentum flux Fm = v^2 d^2 Ta / (4 Ts) [m4/s2]
 *   (Fm from memory);
 * - transitional (gradual) buoyant rise dh(x) = 1.6 F^(1/3) x^(2/3) / u [read: Beni-Suef Univ. J. Basic
 *   Appl. Sci. 2021, doi 10.1186/s43088-021-00153-4], used up to the distance of final rise;
 * - neutral or unstable air (classes A-D), split at F = 55 m4/s3 [read]:
 *   F < 55: dh = 21.425 F^(3/4) / u reached at x_f = 49 F^(5/8);
 *   F >= 55: dh = 38.71 F^(3/5) / u reached at x_f = 119 F^(2/5) [memory; both equal the 2/3 law at x_f];
 * - stable air (classes E, F): s = (g / Ta) dtheta/dz with dtheta/dz 0.020 K/m (E) and 0.035 K/m (F)
 *   by default [memory]; dh = 2.6 (F / (u s))^(1/3), and the calm-air rise 5.0 F^(1/4) s^(-3/8) [memory]
 *   bounds it: the smaller of the two is used, so the windy formula cannot run away as u -> 0 (the
 *   lesser-of-the-two rule as commonly applied to Briggs 1975, from memory). The distance of final rise is
 *   where the 2/3 law reaches that rise: x_f = (1.625)^(3/2) u / sqrt(s) = 2.0715 u / sqrt(s) for the
 *   windy formula [derived];
 * - momentum rise: neutral dh = 3 d v / u [memory]; stable the smaller of that and
 *   1.5 (Fm / (u sqrt(s)))^(1/3) (Briggs 1975, from memory). It is used when it exceeds the buoyant rise,
 *   and always for a plume no warmer than the air (F <= 0). Its gradual form is the bent-over jet law
 *   dh(x) = (3 Fm x / (beta_j^2 u^2))^(1/3) with beta_j = 1/3 + u / v (Briggs 1975, from memory), up to
 *   the distance where it reaches the final momentum rise.
 *
 * Every regime's gradual law reaches its final rise exactly at distanceToFinalRise_m, so riseAt is
 * continuous.
 */
import type { LandUse, StabilityClass, WindProfile } from '../../scenarios/format/types.ts';
import type { PlacedPointSource, ResolvedWeather } from '../drivers/types.ts';
import { windSpeedAtHeight_m_s } from '../wind/powerLaw.ts';

/** Standard gravity [m/s2] (common practice). */
export const GRAVITY_M_S2 = 9.80665;

/** Buoyancy flux splitting the two neutral final-rise formulas [m4/s3] (Briggs, REFERENCES.md [read]). */
export const BUOYANCY_FLUX_SPLIT_M4_S3 = 55;

/** Default potential-temperature gradients for stable classes [K/m] (REFERENCES.md [memory]). */
export const DEFAULT_POTENTIAL_TEMPERATURE_GRADIENT_K_M: Readonly<Record<'E' | 'F', number>> = { E: 0.02, F: 0.035 };

export type PlumeRiseRegime =
  /** no rise: no exit velocity and no buoyancy */
  | 'none'
  /** buoyant, neutral or unstable air, F < 55 m4/s3 */
  | 'buoyant-neutral-low-flux'
  /** buoyant, neutral or unstable air, F >= 55 m4/s3 */
  | 'buoyant-neutral-high-flux'
  /** buoyant, stable air, windy formula */
  | 'buoyant-stable'
  /** buoyant, stable air, limited by the calm-air formula */
  | 'buoyant-stable-calm'
  /** momentum-dominated (or cold) plume, neutral or unstable air */
  | 'momentum-neutral'
  /** momentum-dominated (or cold) plume, stable air */
  | 'momentum-stable';

export interface PlumeRise {
  /** final rise above the stack top [m] */
  finalRise_m: number;
  /** downwind distance at which the final rise is reached [m] */
  distanceToFinalRise_m: number;
  regime: PlumeRiseRegime;
  /** F [m4/s3]; negative for a plume colder than the air (then no buoyant rise) */
  buoyancyFlux_m4_s3: number;
  /** Fm [m4/s2] */
  momentumFlux_m4_s2: number;
  /** wind speed the rise was computed with [m/s] */
  windSpeed_m_s: number;
  /** rise above the stack top at downwind distance x_m [m]: 0 for x <= 0, final rise from x_f on */
  riseAt(x_m: number): number;
}

/** What plume rise needs to know about a stack exit. */
export interface StackExit {
  /** inner diameter at the exit [m] */
  diameter_m: number;
  /** exit velocity [m/s] */
  exitVelocity_m_s: number;
  /** exit temperature [K] */
  exitTemperature_K: number;
}

export interface PlumeRiseOptions {
  /**
   * potential-temperature gradient dtheta/dz for stable classes [K/m]; default 0.020 (E), 0.035 (F);
   * ignored for A-D
   */
  potentialTemperatureGradient_K_m?: number;
}

function requireFinite(name: string, value: number, allowed: string, ok: boolean): void {
  if (!Number.isFinite(value) || !ok) throw new RangeError(`${name} is ${value}; allowed: ${allowed}`);
}

/**
 * Briggs plume rise for one stack in one weather state.
 *
 * @param stack exit diameter [m], velocity [m/s], temperature [K]
 * @param windSpeed_m_s wind speed at the stack top [m/s], > 0
 * @param stability Pasquill class A..F (A-D neutral/unstable formulas, E-F stable)
 * @param airTemperature_K ambient air temperature [K], > 0
 * @param options potentialTemperatureGradient_K_m for stable classes (default 0.020 E, 0.035 F)
 * @returns final rise, distance to it, regime, fluxes and the gradual rise riseAt(x)
 * @example briggsPlumeRise({ diameter_m: 1, exitVelocity_m_s: 12, exitTemperature_K: 420 }, 6, 'D', 288).finalRise_m
 */
export function briggsPlumeRise(
  stack: StackExit,
  windSpeed_m_s: number,
  stability: StabilityClass,
  airTemperature_K: number,
  options: PlumeRiseOptions = {},
): PlumeRise {
  const { diameter_m, exitVelocity_m_s, exitTemperature_K } = stack;
  requireFinite('source.diameter_m', diameter_m, 'a finite diameter >= 0 m', diameter_m >= 0);
  requireFinite('source.exitVelocity_m_s', exitVelocity_m_s, 'a finite speed >= 0 m/s', exitVelocity_m_s >= 0);
  requireFinite('source.exitTemperature_K', exitTemperature_K, 'a finite temperature > 0 K', exitTemperature_K > 0);
  requireFinite('windSpeed_m_s', windSpeed_m_s, 'a finite speed > 0 m/s', windSpeed_m_s > 0);
  requireFinite('weather.airTemperature_K', airTemperature_K, 'a finite temperature > 0 K', airTemperature_K > 0);
  const stable = stability === 'E' || stability === 'F';
  if (!stable && !['A', 'B', 'C', 'D'].includes(stability)) {
    throw new RangeError(`stability is ${JSON.stringify(stability)}; allowed: one of A..F`);
  }

  const u = windSpeed_m_s;
  const v = exitVelocity_m_s;
  const d = diameter_m;
  const ts = exitTemperature_K;
  const ta = airTemperature_K;
  const buoyancyFlux = (GRAVITY_M_S2 * v * d * d * (ts - ta)) / (4 * ts);
  const momentumFlux = (v * v * d * d * ta) / (4 * ts);

  let stabilityParameter_per_s2 = 0;
  if (stable) {
    const gradient = options.potentialTemperatureGradient_K_m ?? DEFAULT_POTENTIAL_TEMPERATURE_GRADIENT_K_M[stability];
    requireFinite(
      'potentialTemperatureGradient_K_m',
      gradient,
      'a finite gradient > 0 K/m for a stable class',
      gradient > 0,
    );
    stabilityParameter_per_s2 = (GRAVITY_M_S2 / ta) * gradient;
  }
  const s = stabilityParameter_per_s2;

  // Buoyant final rise and its distance.
  let buoyantRise_m = 0;
  let buoyantDistance_m = 0;
  let buoyantRegime: PlumeRiseRegime = 'none';
  if (buoyancyFlux > 0) {
    const f = buoyancyFlux;
    if (!stable) {
      if (f < BUOYANCY_FLUX_SPLIT_M4_S3) {
        buoyantRise_m = (21.425 * Math.pow(f, 0.75)) / u;
        buoyantDistance_m = 49 * Math.pow(f, 0.625);
        buoyantRegime = 'buoyant-neutral-low-flux';
      } else {
        buoyantRise_m = (38.71 * Math.pow(f, 0.6)) / u;
        buoyantDistance_m = 119 * Math.pow(f, 0.4);
        buoyantRegime = 'buoyant-neutral-high-flux';
      }
    } else {
      const windyRise_m = 2.6 * Math.cbrt(f / (u * s));
      const calmRise_m = 5.0 * Math.pow(f, 0.25) * Math.pow(s, -0.375);
      if (windyRise_m <= calmRise_m) {
        buoyantRise_m = windyRise_m;
        buoyantDistance_m = (2.0715 * u) / Math.sqrt(s);
        buoyantRegime = 'buoyant-stable';
      } else {
        buoyantRise_m = calmRise_m;
        // where 1.6 F^(1/3) x^(2/3) / u reaches the calm rise
        buoyantDistance_m = Math.pow((calmRise_m * u) / (1.6 * Math.cbrt(f)), 1.5);
        buoyantRegime = 'buoyant-stable-calm';
      }
    }
  }

  // Momentum final rise.
  let momentumRise_m = v > 0 ? (3 * d * v) / u : 0;
  if (stable && momentumFlux > 0) {
    momentumRise_m = Math.min(momentumRise_m, 1.5 * Math.cbrt(momentumFlux / (u * Math.sqrt(s))));
  }

  const useMomentum = momentumRise_m > buoyantRise_m;
  if (!useMomentum && buoyantRegime !== 'none') {
    const transitionCoefficient = (1.6 * Math.cbrt(buoyancyFlux)) / u;
    const finalRise_m = buoyantRise_m;
    const distance_m = buoyantDistance_m;
    return {
      finalRise_m,
      distanceToFinalRise_m: distance_m,
      regime: buoyantRegime,
      buoyancyFlux_m4_s3: buoyancyFlux,
      momentumFlux_m4_s2: momentumFlux,
      windSpeed_m_s: u,
      riseAt(x_m: number): number {
        if (!(x_m > 0)) return 0;
        if (x_m >= distance_m) return finalRise_m;
        return Math.min(transitionCoefficient * Math.pow(x_m, 2 / 3), finalRise_m);
      },
    };
  }
  if (momentumRise_m > 0 && momentumFlux > 0) {
    const jetBeta = 1 / 3 + u / v; // Briggs 1975 jet entrainment, from memory
    const jetCoefficient = (3 * momentumFlux) / (jetBeta * jetBeta * u * u); // dh^3 = jetCoefficient * x
    const finalRise_m = momentumRise_m;
    const distance_m = (finalRise_m * finalRise_m * finalRise_m) / jetCoefficient;
    return {
      finalRise_m,
      distanceToFinalRise_m: distance_m,
      regime: stable ? 'momentum-stable' : 'momentum-neutral',
      buoyancyFlux_m4_s3: buoyancyFlux,
      momentumFlux_m4_s2: momentumFlux,
      windSpeed_m_s: u,
      riseAt(x_m: number): number {
        if (!(x_m > 0)) return 0;
        if (x_m >= distance_m) return finalRise_m;
        return Math.min(Math.cbrt(jetCoefficient * x_m), finalRise_m);
      },
    };
  }
  return {
    finalRise_m: 0,
    distanceToFinalRise_m: 0,
    regime: 'none',
    buoyancyFlux_m4_s3: buoyancyFlux,
    momentumFlux_m4_s2: momentumFlux,
    windSpeed_m_s: u,
    riseAt: () => 0,
  };
}

/**
 * Briggs plume rise of a placed stack, with the wind evaluated at the stack top.
 *
 * @param source the stack (height [m], exit diameter, velocity, temperature)
 * @param weather resolved weather (wind, stability, air temperature)
 * @param landUse selects the wind-profile exponent
 * @param profile "powerLaw" or "uniform"
 * @param options potential-temperature gradient for stable classes
 */
export function plumeRiseFor(
  source: PlacedPointSource,
  weather: ResolvedWeather,
  landUse: LandUse,
  profile: WindProfile,
  options: PlumeRiseOptions = {},
): PlumeRise {
  requireFinite(`source ${source.id}: height_m`, source.height_m, 'a finite height >= 0 m', source.height_m >= 0);
  const windAtStackTop_m_s = windSpeedAtHeight_m_s(weather, source.height_m, landUse, profile);
  return briggsPlumeRise(source, windAtStackTop_m_s, weather.stability, weather.airTemperature_K, options);
}

/**
 * Effective release height: stack height plus Briggs final rise (wind at the stack top), or the stack
 * height itself when the source has plumeRise = false.
 *
 * @returns effective height above ground [m]
 * @example effectiveHeight_m(stack, weather, 'rural', 'powerLaw') // e.g. 30 m stack + 95 m rise = 125 m
 */
export function effectiveHeight_m(
  source: PlacedPointSource,
  weather: ResolvedWeather,
  landUse: LandUse,
  profile: WindProfile,
): number {
  if (!source.plumeRise) return source.height_m;
  return source.height_m + plumeRiseFor(source, weather, landUse, profile).finalRise_m;
}
