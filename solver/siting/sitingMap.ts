/**
 * The siting map: for each sensitive receptor, its process contribution (PC) [ug/m3] if the stack stood at
 * each grid column centre, and their combination (the highest over the receptors, or a weighted sum).
 *
 * - Grid mode: one steady adjoint solve per receptor and weather state (./adjointSolve.ts), read the way
 *   the forward run releases the stack: through its near-field plan (the sub-grid plume's hand-over cells
 *   and rates, plus the sub-grid plume's own value at the receptor; ./nearFieldAdjoint.ts).
 * - Gaussian mode: the same plume (../reference/sourcePlumes.ts pointSourcePlume) evaluated directly
 *   from every column centre to every receptor.
 * - Weather: one steady state, or several with weights (a wind rose's cells and frequencies: the map is
 *   then the frequency-weighted mean PC, the long-term mean).
 *
 * Where it holds (said in every output): flat terrain; the same stack (height, diameter, exit conditions,
 * emission) at every position; effective heights that do not depend on position (plume rise depends on
 * the weather only); no building downwash; the other sources of the scenario are not included.
 */
import { DEFAULT_NEAR_FIELD, gridModelParts, MICROGRAMS_PER_GRAM, releaseHeights_m } from '../drivers/gridSteady.ts';
import { pointSourcePlume } from '../reference/sourcePlumes.ts';
import type { PlacedPointSource, PlacedReceptor, ResolvedWeather, RunControl, SteadyRunInput } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import type { SolverMode } from '../../scenarios/format/types.ts';
import type { NearFieldTreatment } from '../sources/nearField.ts';
import { partOfProgress, solveReceptorAdjoint } from './adjointSolve.ts';
import { addNearFieldMaps, type ReceptorAdjointField } from './nearFieldAdjoint.ts';

/** A weather state and its weight in the map (1 for a steady state; a rose cell's frequency). */
export interface WeightedWeather {
  weather: ResolvedWeather;
  weight: number;
}

/** How the receptors' maps combine into one. */
export type ReceptorCombination = { kind: 'highest' } | { kind: 'weightedSum'; weights: readonly number[] };

/** What the map is computed from: everything a steady run takes, less the weather and the sources. */
export type SitingBase = Omit<SteadyRunInput, 'weather' | 'sources'>;

export interface SitingMapOptions {
  /** how receptors combine (default the highest) */
  combination?: ReceptorCombination;
  /** relative tolerance of the adjoint solves (default the forward steady solve's, 1e-6) */
  tolerance?: number;
  control?: RunControl;
  /**
   * Grid mode: how the stack reaches the grid, as in the forward runs the map stands for (default the
   * forward solve's, DEFAULT_NEAR_FIELD: the sub-grid plume). ./nearFieldAdjoint.ts says how it enters.
   */
  nearField?: NearFieldTreatment;
  /** Grid mode: positions (candidates) whose receptor values are wanted exactly, each with its own near-field plan */
  exactAt?: readonly { x_m: number; y_m: number }[];
}

/** The limits of the map, stated in every output. */
export const SITING_LIMITS: readonly string[] = Object.freeze([
  'flat terrain: no hills, valleys or buildings (no downwash) anywhere in the domain',
  'the same stack at every position: height, diameter, exit velocity and temperature, and emission rate',
  'effective heights that do not depend on position (plume rise depends on the weather only)',
  "the stack's process contribution only: the scenario's other sources and the background are not in the map",
]);

export interface SitingMap {
  mode: SolverMode;
  grid: LocalGrid;
  stackId: string;
  emission_g_s: number;
  /** effective height of the stack in each weather state [m] */
  effectiveHeights_m: number[];
  /** weight of each weather state (sums to 1) */
  weights: number[];
  receptorIds: string[];
  /** per receptor: PC [ug/m3] with the stack at each column centre, index i + nx * j */
  perReceptor_ug_m3: Float64Array[];
  /** the receptors combined, index i + nx * j [ug/m3] */
  combined_ug_m3: Float64Array;
  /** plain words for the combination, e.g. "highest of 3 receptors" */
  combination: string;
  /** the receptors' weights of a weighted-sum combination (null: the highest) */
  receptorWeights: number[] | null;
  /** adjoint solves made (grid) or plume evaluations (Gaussian) */
  solves: number;
  /** steady sweeps of the adjoint solves in all (grid mode; 0 in Gaussian mode) */
  sweeps: number;
  /** exact near-field plans made for the map and the exact positions (grid mode; 0 in Gaussian mode) */
  nearFieldPlans: number;
  wallSeconds: number;
  notes: string[];
}

function checkWeights(weathers: readonly WeightedWeather[]): void {
  if (weathers.length === 0) throw new RangeError('weather: no weather states for the siting map (at least one is needed)');
  let sum = 0;
  weathers.forEach(({ weight }, n) => {
    if (!(weight >= 0) || !Number.isFinite(weight)) throw new RangeError(`weather state ${n}: weight ${weight}; allowed: a finite fraction >= 0`);
    sum += weight;
  });
  if (!(Math.abs(sum - 1) <= 1e-3)) throw new RangeError(`weather: the weights sum to ${sum}; allowed: 1 (within 0.001)`);
}

/** Combine per-receptor maps [ug/m3]; also checks the combination against the receptors. */
export function combineReceptors(perReceptor: readonly Float64Array[], combination: ReceptorCombination): { combined: Float64Array; label: string } {
  if (perReceptor.length === 0) throw new RangeError('receptors: the siting map needs at least one sensitive receptor');
  const combined = new Float64Array(perReceptor[0].length);
  if (combination.kind === 'highest') {
    for (const map of perReceptor) for (let n = 0; n < combined.length; n++) if (map[n] > combined[n]) combined[n] = map[n];
    return { combined, label: `highest of ${perReceptor.length} receptor${perReceptor.length === 1 ? '' : 's'}` };
  }
  const { weights } = combination;
  if (weights.length !== perReceptor.length) {
    throw new RangeError(`receptor weights: ${weights.length} given for ${perReceptor.length} receptors; allowed: one per receptor`);
  }
  weights.forEach((weight, r) => {
    if (!(weight >= 0) || !Number.isFinite(weight)) throw new RangeError(`receptor weights[${r}] is ${weight}; allowed: a finite weight >= 0`);
  });
  perReceptor.forEach((map, r) => {
    for (let n = 0; n < combined.length; n++) combined[n] += weights[r] * map[n];
  });
  return { combined, label: `weighted sum of ${perReceptor.length} receptors (weights ${weights.join(', ')})` };
}

function receptorWeightsOf(combination: ReceptorCombination | undefined): number[] | null {
  return combination?.kind === 'weightedSum' ? [...combination.weights] : null;
}

/** Receptor values a map offers at any stack position (not only column centres) [ug/m3]. */
export type PcAt = (receptorIndex: number, x_m: number, y_m: number) => number;

/**
 * Bilinear reading of a column-centre map at (x, y) [m]. With a direct release this is exactly the
 * receptor's PC from a stack at (x, y) (the same horizontal weights as a point release,
 * ../sources/gridEmission.ts); with the sub-grid plume it interpolates between the positions the map
 * holds, so the positions wanted exactly (candidates) are passed as exactAt instead.
 */
export function bilinearAt(grid: LocalGrid, map: Float64Array, x_m: number, y_m: number): number {
  const bracket = (fractional: number, count: number): [number, number] => {
    if (count === 1 || fractional <= 0) return [0, 0];
    if (fractional >= count - 1) return [count - 1, 0];
    const lower = Math.floor(fractional);
    return [lower, fractional - lower];
  };
  const [i0, wx] = bracket((x_m - grid.xWest_m) / grid.spacing_m - 0.5, grid.nx);
  const [j0, wy] = bracket((y_m - grid.ySouth_m) / grid.spacing_m - 0.5, grid.ny);
  const i1 = Math.min(i0 + 1, grid.nx - 1);
  const j1 = Math.min(j0 + 1, grid.ny - 1);
  const at = (i: number, j: number): number => map[i + grid.nx * j];
  return (1 - wy) * ((1 - wx) * at(i0, j0) + wx * at(i1, j0)) + wy * ((1 - wx) * at(i0, j1) + wx * at(i1, j1));
}

/**
 * The grid-mode siting map from receptor adjoints.
 *
 * @param base grid, receptors, pollutant, dispersion, land use, wind profile
 * @param stack the stack being sited (its position is ignored; everything else is used)
 * @param weathers weather states with weights summing to 1
 * @returns the map and the receptors' PC at any position (exact at options.exactAt, else bilinear in the map)
 * @example const { map } = gridSitingMap(base, stack, [{ weather, weight: 1 }]);
 */
export function gridSitingMap(base: SitingBase, stack: PlacedPointSource, weathers: readonly WeightedWeather[], options: SitingMapOptions = {}): { map: SitingMap; pcAt: PcAt } {
  const started = performance.now();
  checkWeights(weathers);
  const { grid, receptors } = base;
  const control = options.control ?? {};
  const perReceptor = receptors.map(() => new Float64Array(grid.nx * grid.ny));
  const exactAt = options.exactAt ?? [];
  const exactValues = exactAt.map(() => new Array<number>(receptors.length).fill(0));
  const nearField = options.nearField ?? DEFAULT_NEAR_FIELD;
  const effectiveHeights_m: number[] = [];
  const handovers_m: number[] = [];
  let sweeps = 0;
  let solves = 0;
  let unconverged = 0;
  let plans = 0;
  const total = weathers.length * receptors.length;
  weathers.forEach(({ weather, weight }, w) => {
    const input = { ...base, sources: [stack], weather };
    const height_m = releaseHeights_m(input, weather)[0];
    effectiveHeights_m.push(height_m);
    if (weight === 0) return;
    const parts = gridModelParts(input, weather, [height_m]);
    const adjoints: ReceptorAdjointField[] = receptors.map((receptor: PlacedReceptor, r) => {
      const solveControl = partOfProgress(control, w * receptors.length + r, total, `adjoint of ${receptor.id}`);
      const { model, report } = solveReceptorAdjoint(parts, receptor, { tolerance: options.tolerance, control: solveControl });
      sweeps += report.sweeps;
      solves++;
      if (!report.converged) unconverged++;
      return { receptor, layout: model.layout, field: model.field };
    });
    control.signal?.throwIfAborted();
    const report = addNearFieldMaps({ treatment: nearField, context: { ...input, grid }, stack, height_m }, adjoints, MICROGRAMS_PER_GRAM * weight, perReceptor, exactAt, exactValues, control.signal);
    plans += report.plans;
    handovers_m.push(report.handover_m);
  });
  const { combined, label } = combineReceptors(perReceptor, options.combination ?? { kind: 'highest' });
  const notes = [
    `grid mode: one steady adjoint solve per receptor and weather state (${solves} solves, ${sweeps} sweeps): the wind reversed, the same diffusivities, losses, ground and lid, the receptor's sampling as the source, the transposed open sides`,
    `near field as in the forward runs (${nearField.name}): each position's hand-over cells and rates read from the adjoint, plus the sub-grid plume's own value at the receptor` +
      (handovers_m.some((value) => value > 0) ? ` (hand-over ${Math.round(Math.min(...handovers_m.filter((value) => value > 0)))} m downwind or nearer the downwind edge; ${plans} near-field plans made)` : ''),
    'agreement with forward runs: exact for first-order upwind advection; with the default limited scheme the adjoint differs from a forward run by the scheme\'s discretisation error (see docs/siting.md for the measured figures)',
  ];
  if (unconverged > 0) notes.push(`${unconverged} adjoint solves did NOT converge within the sweep limit: figures are approximate`);
  const map: SitingMap = {
    mode: 'grid',
    grid,
    stackId: stack.id,
    emission_g_s: stack.emission_g_s,
    effectiveHeights_m,
    weights: weathers.map(({ weight }) => weight),
    receptorIds: receptors.map((receptor) => receptor.id),
    perReceptor_ug_m3: perReceptor,
    combined_ug_m3: combined,
    combination: label,
    receptorWeights: receptorWeightsOf(options.combination),
    solves,
    sweeps,
    nearFieldPlans: plans,
    wallSeconds: (performance.now() - started) / 1000,
    notes,
  };
  const exactIndex = new Map(exactAt.map(({ x_m, y_m }, n) => [`${x_m},${y_m}`, n]));
  const pcAt: PcAt = (r, x_m, y_m) => {
    const n = exactIndex.get(`${x_m},${y_m}`);
    return n === undefined ? bilinearAt(grid, perReceptor[r], x_m, y_m) : exactValues[n][r];
  };
  return { map, pcAt };
}

/**
 * The Gaussian-mode siting map by direct evaluation: the stack's plume from every column centre to
 * every receptor, in every weather state.
 *
 * @returns the map and the receptors' PC at any position (evaluated directly)
 */
export function gaussianSitingMap(base: SitingBase, stack: PlacedPointSource, weathers: readonly WeightedWeather[], options: SitingMapOptions = {}): { map: SitingMap; pcAt: PcAt } {
  const started = performance.now();
  checkWeights(weathers);
  const { grid, receptors } = base;
  const control = options.control ?? {};
  const diagonal_m = Math.hypot(grid.nx * grid.spacing_m, grid.ny * grid.spacing_m);
  const prepared = weathers.map(({ weather, weight }) => {
    const { plume, effectiveHeight_m } = pointSourcePlume(stack, { ...base, weather }, 2 * diagonal_m + 1000);
    const theta = (weather.windFrom_deg * Math.PI) / 180;
    return { plume, effectiveHeight_m, weight, downwindX: -Math.sin(theta), downwindY: -Math.cos(theta) };
  });
  const pcAt: PcAt = (r, x_m, y_m) => {
    const receptor = receptors[r];
    const rx = receptor.x_m - x_m;
    const ry = receptor.y_m - y_m;
    let sum = 0;
    for (const { plume, weight, downwindX, downwindY } of prepared) {
      if (weight === 0) continue;
      sum += weight * plume.concentration_g_m3(rx * downwindX + ry * downwindY, -rx * downwindY + ry * downwindX, receptor.height_m);
    }
    return sum * MICROGRAMS_PER_GRAM;
  };
  const perReceptor = receptors.map(() => new Float64Array(grid.nx * grid.ny));
  for (let j = 0; j < grid.ny; j++) {
    if (control.signal?.aborted) throw new DOMException('siting map aborted', 'AbortError');
    control.onProgress?.(j / grid.ny, `Gaussian siting map: row ${j + 1} of ${grid.ny}`);
    const y = grid.ySouth_m + (j + 0.5) * grid.spacing_m;
    for (let i = 0; i < grid.nx; i++) {
      const x = grid.xWest_m + (i + 0.5) * grid.spacing_m;
      for (let r = 0; r < receptors.length; r++) perReceptor[r][i + grid.nx * j] = pcAt(r, x, y);
    }
  }
  const { combined, label } = combineReceptors(perReceptor, options.combination ?? { kind: 'highest' });
  const map: SitingMap = {
    mode: 'gaussian',
    grid,
    stackId: stack.id,
    emission_g_s: stack.emission_g_s,
    effectiveHeights_m: prepared.map(({ effectiveHeight_m }) => effectiveHeight_m),
    weights: weathers.map(({ weight }) => weight),
    receptorIds: receptors.map((receptor) => receptor.id),
    perReceptor_ug_m3: perReceptor,
    combined_ug_m3: combined,
    combination: label,
    receptorWeights: receptorWeightsOf(options.combination),
    solves: grid.nx * grid.ny * receptors.length * weathers.length,
    sweeps: 0,
    nearFieldPlans: 0,
    wallSeconds: (performance.now() - started) / 1000,
    notes: [`Gaussian mode: the stack's steady plume evaluated directly from every column centre to every receptor (${weathers.length} weather state${weathers.length === 1 ? '' : 's'})`],
  };
  return { map, pcAt };
}
