/**
 * The diffusivity closure a scenario's dispersion setting asks for.
 */
import type { Dispersion, LandUse } from '../../scenarios/format/types.ts';
import { ConstantDiffusivity } from './constantDiffusivity.ts';
import { createStabilityDiffusivity } from './stabilityDiffusivity.ts';
import type { DiffusivityClosure } from './types.ts';

/**
 * @param dispersion scenario `dispersion`: "constant" (verification) or "stability" (from the class)
 * @param landUse "rural" or "urban" (used by the stability closure)
 * @returns the closure for the grid solver
 * @example closureFor({ kind: 'constant', horizontal_m2_s: 10, vertical_m2_s: 5 }, 'rural')
 */
export function closureFor(dispersion: Dispersion, landUse: LandUse): DiffusivityClosure {
  if (dispersion.kind === 'constant') {
    return new ConstantDiffusivity(dispersion.horizontal_m2_s, dispersion.vertical_m2_s);
  }
  if (dispersion.kind === 'stability') {
    return createStabilityDiffusivity(landUse);
  }
  throw new RangeError(
    `dispersion.kind is ${JSON.stringify((dispersion as { kind: unknown }).kind)}; allowed: "stability" or "constant"`,
  );
}
