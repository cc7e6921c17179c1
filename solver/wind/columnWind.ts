/**
 * A column wind: horizontal wind components that vary with height but not across the grid, plus a
 * vertical velocity at the layer faces (zero for flat terrain; negative for gravitational settling).
 *
 * Conventions: u toward +x (east), v toward +y (north), w toward +z (up), all [m/s]. The weather gives the
 * direction the wind blows FROM, degrees clockwise from grid north, so the wind blows toward
 * (from + 180 deg): u = -speed sin(from), v = -speed cos(from).
 */
import type { LandUse, WindProfile } from '../../scenarios/format/types.ts';
import type { ResolvedWeather } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import { windSpeedAtHeight_m_s } from './powerLaw.ts';

export interface ColumnWind {
  readonly name: string;
  /** eastward component at each layer centre [m/s], length nz */
  readonly u_m_s: Float64Array;
  /** northward component at each layer centre [m/s], length nz */
  readonly v_m_s: Float64Array;
  /** upward velocity at each layer face [m/s], length nz + 1; faces 0 (ground) and nz (top) carry no flux */
  readonly w_m_s: Float64Array;
}

const DEGREES_TO_RADIANS = Math.PI / 180;

/** Wind-vector components [u, v] [m/s] of a speed blowing from a direction (deg clockwise from north). */
export function windComponents_m_s(speed_m_s: number, windFrom_deg: number): [number, number] {
  if (!Number.isFinite(speed_m_s) || speed_m_s < 0) {
    throw new RangeError(`wind speed is ${speed_m_s}; allowed: a finite speed >= 0 m/s`);
  }
  if (!Number.isFinite(windFrom_deg)) {
    throw new RangeError(`windFrom_deg is ${windFrom_deg}; allowed: a finite direction in degrees`);
  }
  const from = windFrom_deg * DEGREES_TO_RADIANS;
  // Clean zeros for the four cardinal directions so a wind "from 270" has exactly v = 0.
  const sinFrom = Math.abs(Math.sin(from)) < 1e-15 ? 0 : Math.sin(from);
  const cosFrom = Math.abs(Math.cos(from)) < 1e-15 ? 0 : Math.cos(from);
  return [-speed_m_s * sinFrom + 0, -speed_m_s * cosFrom + 0];
}

/**
 * The same wind at every height.
 *
 * @param grid the local grid (nz layers)
 * @param speed_m_s horizontal speed [m/s]
 * @param windFrom_deg direction the wind blows from, clockwise from north [deg]
 * @param options.verticalVelocity_m_s uniform vertical velocity at interior faces [m/s], default 0
 * @example uniformColumnWind(grid, 5, 270) // 5 m/s toward the east at every layer
 */
export function uniformColumnWind(
  grid: LocalGrid,
  speed_m_s: number,
  windFrom_deg: number,
  options: { verticalVelocity_m_s?: number } = {},
): ColumnWind {
  const [u, v] = windComponents_m_s(speed_m_s, windFrom_deg);
  const w = options.verticalVelocity_m_s ?? 0;
  if (!Number.isFinite(w)) throw new RangeError(`verticalVelocity_m_s is ${w}; allowed: a finite velocity [m/s]`);
  const wFaces = new Float64Array(grid.nz + 1).fill(w);
  wFaces[0] = 0;
  wFaces[grid.nz] = 0;
  return {
    name: 'UniformColumnWind',
    u_m_s: new Float64Array(grid.nz).fill(u),
    v_m_s: new Float64Array(grid.nz).fill(v),
    w_m_s: wFaces,
  };
}

/**
 * The wind of a resolved weather state on the grid's layers: the measured speed carried to each layer
 * centre by the wind profile (power law or uniform, `./powerLaw.ts`), one direction at every height.
 *
 * @param grid the local grid
 * @param weather resolved weather (speed at anemometerHeight_m, direction, stability)
 * @param landUse selects the power-law exponents
 * @param profile "powerLaw" or "uniform"
 */
export function columnWindFromWeather(
  grid: LocalGrid,
  weather: ResolvedWeather,
  landUse: LandUse,
  profile: WindProfile,
): ColumnWind {
  const u = new Float64Array(grid.nz);
  const v = new Float64Array(grid.nz);
  for (let k = 0; k < grid.nz; k++) {
    const speed = windSpeedAtHeight_m_s(weather, grid.zCentres_m[k], landUse, profile);
    const [uk, vk] = windComponents_m_s(speed, weather.windFrom_deg);
    u[k] = uk;
    v[k] = vk;
  }
  return { name: `ColumnWind(${profile})`, u_m_s: u, v_m_s: v, w_m_s: new Float64Array(grid.nz + 1) };
}

/** Horizontal speed at each layer centre [m/s]. */
export function layerSpeeds_m_s(wind: ColumnWind): Float64Array {
  const speeds = new Float64Array(wind.u_m_s.length);
  for (let k = 0; k < speeds.length; k++) speeds[k] = Math.hypot(wind.u_m_s[k], wind.v_m_s[k]);
  return speeds;
}
