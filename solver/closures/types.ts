/**
 * A diffusivity closure: the eddy diffusivities the grid solver uses, from the weather and the wind.
 * Horizontally uniform for now (one profile per column shape); spatially varying closures will return
 * per-cell arrays through a wider interface later.
 */
import type { ResolvedWeather } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';

export interface DiffusivityClosure {
  readonly name: string;
  /** horizontal eddy diffusivity at each layer centre [m2/s], length nz */
  horizontal_m2_s(grid: LocalGrid, weather: ResolvedWeather, windSpeedAtLayer_m_s: Float64Array): Float64Array;
  /**
   * vertical eddy diffusivity at each layer face [m2/s], length nz + 1; entries 0 (ground) and nz (lid)
   * are ignored, since the boundary conditions set the flux there
   */
  vertical_m2_s(grid: LocalGrid, weather: ResolvedWeather, windSpeedAtLayer_m_s: Float64Array): Float64Array;
}
