/**
 * Constant eddy diffusivities: the verification closure (dispersion kind "constant"), for which the
 * advection-diffusion equation has exact solutions (../shared/REFERENCES.md).
 */
import type { LocalGrid } from '../grid/types.ts';
import type { DiffusivityClosure } from './types.ts';

/**
 * A closure with the same horizontal diffusivity at every layer and the same vertical diffusivity at
 * every face. Zero diffusivities are allowed: `ConstantDiffusivity(0, 0)` is the closure of pure advection.
 *
 * @param horizontal_m2_s horizontal eddy diffusivity Kx = Ky [m2/s], >= 0
 * @param vertical_m2_s vertical eddy diffusivity Kz [m2/s], >= 0
 * @example new ConstantDiffusivity(10, 5)
 */
export class ConstantDiffusivity implements DiffusivityClosure {
  readonly name: string;
  constructor(
    /** horizontal eddy diffusivity [m2/s] */
    readonly horizontalValue_m2_s: number,
    /** vertical eddy diffusivity [m2/s] */
    readonly verticalValue_m2_s: number,
  ) {
    if (!Number.isFinite(horizontalValue_m2_s) || horizontalValue_m2_s < 0) {
      throw new RangeError(`dispersion.horizontal_m2_s is ${horizontalValue_m2_s}; allowed: a finite diffusivity >= 0 m2/s`);
    }
    if (!Number.isFinite(verticalValue_m2_s) || verticalValue_m2_s < 0) {
      throw new RangeError(`dispersion.vertical_m2_s is ${verticalValue_m2_s}; allowed: a finite diffusivity >= 0 m2/s`);
    }
    this.name = `ConstantDiffusivity(${horizontalValue_m2_s}, ${verticalValue_m2_s})`;
  }

  horizontal_m2_s(grid: LocalGrid): Float64Array {
    return new Float64Array(grid.nz).fill(this.horizontalValue_m2_s);
  }

  vertical_m2_s(grid: LocalGrid): Float64Array {
    return new Float64Array(grid.nz + 1).fill(this.verticalValue_m2_s);
  }
}
