/**
 * Resolve the weather of one steady period: every field the solver needs, stability derived where it
 * was not given, the calms rule applied, the mixing height defaulted.
 *
 * Order of precedence for the stability class, stated once:
 * 1. `stability` given directly;
 * 2. else `temperatureDifference` (a measurement of the atmosphere's state beats an inference from
 *    the sky): the potential-temperature gradient, see stabilityClass.ts;
 * 3. else `cloudCover_oktas` with `time`: the Pasquill-Turner table from wind and sky;
 * 4. else a RangeError naming what is missing.
 */
import type { StabilityClass, WeatherFields } from '../../scenarios/format/types.ts';
import type { ResolvedWeather } from '../drivers/types.ts';
import { solarElevation_deg } from './solarElevation.ts';
import { stabilityFromSky, stabilityFromTemperatureDifference, type SkyState } from './stabilityClass.ts';
import { HOUR_MS, parseIsoTime } from './time.ts';

/**
 * Calms rule (common practice for screening): a wind below this speed is treated as this speed and the
 * hour is flagged calm, since the steady plume formulas and the steady grid solution both grow without
 * bound as the wind goes to zero [m/s].
 */
export const CALM_THRESHOLD_m_s = 1;

/**
 * plumeplan's own screening defaults for the mixing height when none is given [m]: round figures of
 * the order of the daytime convective boundary layer (A-C), a windy neutral layer (D) and a nocturnal
 * stable layer (E, F). They are defaults, not measurements; give mixingHeight_m when it is known.
 */
export const DEFAULT_MIXING_HEIGHT_m: Readonly<Record<StabilityClass, number>> = {
  A: 1500,
  B: 1200,
  C: 1000,
  D: 800,
  E: 400,
  F: 200,
};

/** How the stability class of a resolved period was obtained. */
export type StabilitySource = 'given' | 'temperatureDifference' | 'sky';

/** The resolved weather together with the way its class was obtained (for reports). */
export interface WeatherResolution {
  weather: ResolvedWeather;
  stabilitySource: StabilitySource;
  /** solar elevation at the middle of the hour when the sky rule was used [deg] */
  solarElevation_deg?: number;
}

function checkFinite(value: number, path: string, allowed: string, ok: (v: number) => boolean): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || !ok(value)) {
    throw new RangeError(`${path}: ${String(value)} is not allowed (${allowed})`);
  }
}

/**
 * The sky state of the hour starting at `epoch_ms`: solar elevation at the hour's middle, and whether
 * the hour before or after is night (sun at or below the horizon at its middle).
 */
export function skyStateOfHour(
  epoch_ms: number,
  cloudCover_oktas: number,
  site: { lat: number; lon: number },
): SkyState {
  const elevationAt = (start_ms: number) => solarElevation_deg(start_ms + HOUR_MS / 2, site.lat, site.lon);
  const elevation_deg = elevationAt(epoch_ms);
  const nextToNight = elevation_deg > 0 && (elevationAt(epoch_ms - HOUR_MS) <= 0 || elevationAt(epoch_ms + HOUR_MS) <= 0);
  return { solarElevation_deg: elevation_deg, nextToNight, cloudCover_oktas };
}

/**
 * Resolve one period's weather and say how its stability class was obtained.
 *
 * @param fields the weather as given (a steady state or one hour; `time` is the START of the hour)
 * @param site the site position [deg], for the solar elevation
 * @param path field path used in error messages, e.g. "weather.hours[12]"
 */
export function resolveWeatherWithSource(
  fields: WeatherFields & { time?: string },
  site: { lat: number; lon: number },
  path = 'weather',
): WeatherResolution {
  checkFinite(fields.windSpeed_m_s, `${path}.windSpeed_m_s`, 'a finite speed >= 0 m/s', (v) => v >= 0);
  checkFinite(fields.windFrom_deg, `${path}.windFrom_deg`, 'a direction in 0..360 degrees', (v) => v >= 0 && v <= 360);
  checkFinite(fields.rain_mm_h, `${path}.rain_mm_h`, 'a rain rate >= 0 mm/h', (v) => v >= 0);
  checkFinite(fields.airTemperature_K, `${path}.airTemperature_K`, 'a temperature in 180..340 K', (v) => v >= 180 && v <= 340);
  checkFinite(fields.anemometerHeight_m, `${path}.anemometerHeight_m`, 'a height > 0 m', (v) => v > 0);
  if (fields.mixingHeight_m !== undefined) {
    checkFinite(fields.mixingHeight_m, `${path}.mixingHeight_m`, 'a height > 0 m', (v) => v > 0);
  }

  let stability: StabilityClass;
  let stabilitySource: StabilitySource;
  let elevation_deg: number | undefined;
  if (fields.stability !== undefined) {
    if (!['A', 'B', 'C', 'D', 'E', 'F'].includes(fields.stability)) {
      throw new RangeError(`${path}.stability: ${JSON.stringify(fields.stability)} is not allowed (one of A, B, C, D, E, F)`);
    }
    stability = fields.stability;
    stabilitySource = 'given';
  } else if (fields.temperatureDifference !== undefined) {
    stability = stabilityFromTemperatureDifference(fields.temperatureDifference, `${path}.temperatureDifference`);
    stabilitySource = 'temperatureDifference';
  } else if (fields.cloudCover_oktas !== undefined) {
    checkFinite(fields.cloudCover_oktas, `${path}.cloudCover_oktas`, '0..8 oktas', (v) => v >= 0 && v <= 8);
    if (fields.time === undefined) {
      throw new RangeError(
        `${path}.time: missing; deriving stability from cloudCover_oktas needs the time (ISO 8601 with offset) for the solar elevation`,
      );
    }
    const { epoch_ms } = parseIsoTime(fields.time, `${path}.time`);
    const sky = skyStateOfHour(epoch_ms, fields.cloudCover_oktas, site);
    elevation_deg = sky.solarElevation_deg;
    stability = stabilityFromSky(fields.windSpeed_m_s, sky);
    stabilitySource = 'sky';
  } else {
    throw new RangeError(
      `${path}.stability: missing; give stability (A..F), or temperatureDifference, or cloudCover_oktas with time`,
    );
  }

  const calm = fields.windSpeed_m_s < CALM_THRESHOLD_m_s;
  const weather: ResolvedWeather = {
    windSpeed_m_s: calm ? CALM_THRESHOLD_m_s : fields.windSpeed_m_s,
    windFrom_deg: fields.windFrom_deg === 360 ? 0 : fields.windFrom_deg,
    stability,
    mixingHeight_m: fields.mixingHeight_m ?? DEFAULT_MIXING_HEIGHT_m[stability],
    rain_mm_h: fields.rain_mm_h,
    airTemperature_K: fields.airTemperature_K,
    anemometerHeight_m: fields.anemometerHeight_m,
    calm,
  };
  return elevation_deg === undefined
    ? { weather, stabilitySource }
    : { weather, stabilitySource, solarElevation_deg: elevation_deg };
}

/**
 * Resolve one period's weather: stability given or derived, calms rule applied, mixing height
 * defaulted per class when absent.
 *
 * @param fields the weather as given (steady state or one hour; `time` = START of the hour, ISO 8601 with offset)
 * @param site the site position [deg]
 * @returns every field resolved; `calm: true` when the speed was raised to CALM_THRESHOLD_m_s
 * @throws RangeError naming the field, the value and what is allowed
 * @example
 *   resolveWeather({ windSpeed_m_s: 0.4, windFrom_deg: 250, stability: 'F', rain_mm_h: 0,
 *                    airTemperature_K: 281, anemometerHeight_m: 10 }, { lat: 52, lon: 5 })
 *   // { windSpeed_m_s: 1, calm: true, mixingHeight_m: 200, ... }
 */
export function resolveWeather(
  fields: WeatherFields & { time?: string },
  site: { lat: number; lon: number },
  path = 'weather',
): ResolvedWeather {
  return resolveWeatherWithSource(fields, site, path).weather;
}
