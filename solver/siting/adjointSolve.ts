/**
 * The steady adjoint problem of one receptor, solved by the same steady machinery as the forward solve
 * (../timestepping/steadySweep.ts) with three model parts swapped: the wind (reversed), the emission (the
 * receptor's sampling weights) and the lateral boundaries (their transpose). The diffusivities, losses,
 * ground, lid and advection scheme are the forward model's.
 *
 * Why it works. The forward steady equations on the grid, multiplied by each cell's volume, are a linear
 * system B c = q: q [g/s] the emission into each cell, c [g/m3] the field. A receptor reads
 * R = w . c, with w the receptor's sampling weights (../diagnostics/receptorSampling.ts: bilinear in the
 * plan, linear between layer centres; the same weights a point release gets in
 * ../sources/gridEmission.ts). Then R = w . B^-1 q = psi . q with B^T psi = w. With first-order upwind
 * advection B^T is exactly the operator of the reversed wind (a column wind is uniform across the plan,
 * so its flux divergence transposes to the reversed wind's), the same symmetric diffusion, the same
 * diagonal losses and deposition, the same no-flux ground and lid, and the transposed open sides
 * (AdjointOpenBoundaries). So psi is the steady field of the reversed-wind model with the receptor's
 * weights as its "emission", and psi sampled at a stack's release point with the release weights is the
 * receptor's concentration per g/s from a stack there: psi [s/m3] = (g/m3 at the receptor) / (g/s emitted).
 *
 * The continuous identity behind it (source-receptor reciprocity, e.g. Marchuk 1995, Adjoint Equations
 * and Analysis of Complex Systems, from memory): for the steady advection-diffusion operator L with
 * uniform wind u, C_u(receptor at r; source at s) = C_{-u}(receptor at s; source at r). For the exact
 * steady point source of ../../shared/REFERENCES.md, C = Q / (4 pi K d) exp((u . d - d sqrt(u^2 + 4 k K)) / (2 K))
 * with d = r - s; reversing u and swapping r and s leaves u . d and |d| unchanged, so the value is the same.
 *
 * Where it is exact and where not:
 * - First-order upwind (UpwindAdvection): exact to the solves' convergence tolerance.
 * - Limited upwind (the default): the van Leer limiter makes the forward operator nonlinear; the adjoint
 *   here is the reversed-wind limited solve, which differs from the forward by the scheme's
 *   discretisation error, not by a bounded round-off (measured in tests/solver/siting/).
 * - A vertical wind (settling, terrain) would need its own transpose: rejected here (flat terrain).
 * - Sources in the forward model other than the one being sited do not enter (the map is that stack's
 *   process contribution).
 */
import { AdjointOpenBoundaries, PeriodicBoundaries, type LateralBoundaries } from '../boundaries/boundaryConditions.ts';
import { createDispersionModel, type DispersionModel, type DispersionModelParts } from '../drivers/model.ts';
import { REFERENCE_WEATHER } from '../drivers/model.ts';
import type { PlacedReceptor, RunControl } from '../drivers/types.ts';
import { pointReleaseWeights, type GridEmission } from '../sources/gridEmission.ts';
import { solveSteadyState, type SteadySolveOptions, type SteadySolveReport } from '../timestepping/steadySweep.ts';
import { layerSpeeds_m_s, type ColumnWind } from '../wind/columnWind.ts';

/** The forward wind reversed: every component negated (the direction it blows from turned by 180 deg). */
export function reversedColumnWind(wind: ColumnWind): ColumnWind {
  for (let f = 0; f < wind.w_m_s.length; f++) {
    if (wind.w_m_s[f] !== 0) {
      throw new RangeError(`wind ${wind.name}: vertical velocity ${wind.w_m_s[f]} m/s at face ${f}; the adjoint solve allows only w = 0 (flat terrain, no settling)`);
    }
  }
  const negate = (values: Float64Array): Float64Array => Float64Array.from(values, (value) => (value === 0 ? 0 : -value));
  return { name: `Reversed(${wind.name})`, u_m_s: negate(wind.u_m_s), v_m_s: negate(wind.v_m_s), w_m_s: new Float64Array(wind.w_m_s.length) };
}

/**
 * The receptor's sampling as an emission: its interpolation weights (summing to 1) as the "rates" of the
 * cells it reads. Solved with the adjoint parts, the field is then in s/m3 (g/m3 at the receptor per g/s).
 */
export function receptorSamplingEmission(grid: DispersionModelParts['grid'], receptor: PlacedReceptor): GridEmission {
  let weights: [number, number][];
  try {
    weights = pointReleaseWeights(grid, receptor.x_m, receptor.y_m, receptor.height_m);
  } catch (error) {
    throw new RangeError(`receptor ${receptor.id}: ${(error as Error).message.replace('source position', 'position').replace('release height', 'height')}`);
  }
  weights.sort((a, b) => a[0] - b[0]);
  return {
    name: `ReceptorSampling(${receptor.id})`,
    cells: Int32Array.from(weights, ([cell]) => cell),
    rates_g_s: Float64Array.from(weights, ([, weight]) => weight),
  };
}

/** The transpose of the forward model's lateral boundaries (see AdjointOpenBoundaries). */
export function adjointLateralBoundaries(forward: DispersionModelParts): LateralBoundaries {
  const lateral = forward.boundaries?.lateral;
  if (lateral?.kind === 'periodic') return PeriodicBoundaries();
  if (lateral !== undefined && lateral.kind !== 'open') {
    throw new RangeError(`lateral boundaries ${lateral.name} have no adjoint here; allowed: open or periodic sides`);
  }
  if (lateral !== undefined && lateral.background_g_m3 !== 0) {
    throw new RangeError(`inflow background is ${lateral.background_g_m3} g/m3; the adjoint gives the process contribution only: allowed 0`);
  }
  const horizontal = forward.closure.horizontal_m2_s(forward.grid, forward.weather ?? REFERENCE_WEATHER, layerSpeeds_m_s(forward.wind));
  return AdjointOpenBoundaries(forward.grid.spacing_m, horizontal, forward.wind.u_m_s, forward.wind.v_m_s);
}

/**
 * The adjoint model's parts for one receptor: the forward parts with the wind reversed, the receptor's
 * sampling as the emission and the transposed sides; everything else the same part.
 */
export function adjointModelParts(forward: DispersionModelParts, receptor: PlacedReceptor): DispersionModelParts {
  return {
    ...forward,
    wind: reversedColumnWind(forward.wind),
    emission: receptorSamplingEmission(forward.grid, receptor),
    boundaries: { ...forward.boundaries, lateral: adjointLateralBoundaries(forward) },
    // The steady sweeps work in plain arrays (as the forward steady driver does).
    simd: false,
    sharedMemory: false,
  };
}

export interface ReceptorAdjoint {
  receptor: PlacedReceptor;
  /** the solved adjoint model; its field [s/m3] is in the padded layout */
  model: DispersionModel;
  report: SteadySolveReport;
}

/**
 * Solve one receptor's steady adjoint.
 *
 * @param forward the parts of the forward model (grid, wind, closure, weather, losses, boundaries,
 *   advection); its emission is ignored
 * @param receptor the receptor (local metres, height above ground)
 * @param options the steady solve's options (tolerance, sweeps, Anderson depth); control for progress and abort
 * @returns the adjoint model (field in s/m3: sample it at a release point to get the receptor's g/m3 per g/s) and the solve report
 * @example const { model } = solveReceptorAdjoint(gridModelParts(input, weather, heights), receptor);
 */
export function solveReceptorAdjoint(forward: DispersionModelParts, receptor: PlacedReceptor, options: SteadySolveOptions = {}): ReceptorAdjoint {
  const model = createDispersionModel(adjointModelParts(forward, receptor));
  const report = solveSteadyState(model, options);
  return { receptor, model, report };
}

/** Progress of several solves as one: solve n of count maps its fraction into [n / count, (n + 1) / count). */
export function partOfProgress(control: RunControl, n: number, count: number, label: string): RunControl {
  return {
    signal: control.signal,
    onProgress: control.onProgress ? (fraction, message) => control.onProgress?.((n + fraction) / count, `${label}: ${message}`) : undefined,
  };
}
