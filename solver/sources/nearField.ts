/**
 * The near-field part of the grid model: how each source's emission reaches the grid, and what the grid
 * cannot hold near a source. A part passed to the grid solver like the closure or the advection scheme
 * (STYLE.md): `DirectRelease` puts every source straight into the cells around it; `SubGridPlume`
 * (./subGridPlume.ts) carries a source's young plume as a Gaussian plume until the grid can resolve it
 * and hands it over there (plume-in-grid). docs/near-field.md says why and what it changes.
 *
 * A treatment answers, for one weather state, with a plan: the emission the grid receives [g/s per
 * cell], the concentration the sub-grid part holds at any point (added to the grid's field wherever a
 * figure is reported), the mass it loses on the way (added to the budget) and notes for the run.
 */
import type { PlacedSource } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import type { PlumeConditions } from '../reference/sourcePlumes.ts';
import { gridEmissionFromSources, type GridEmission } from './gridEmission.ts';

/** Everything a near-field treatment reads for one weather state. */
export interface NearFieldContext extends PlumeConditions {
  grid: LocalGrid;
  sources: readonly PlacedSource[];
  /** each source's release height [m]: effective height (plume rise) for stacks, releaseHeight_m for areas */
  releaseHeights_m: readonly number[];
}

/** Where one source's emission enters the grid. */
export interface SourceHandover {
  id: string;
  /** downwind distance from the source (an area's centroid) at which the grid takes over [m]; 0 = at the source */
  handoverDistance_m: number;
  /** fraction of the emission that reaches the grid (the rest is lost on the way) [-] */
  handedOverFraction: number;
  /** speed the sub-grid plume travels at [m/s]; null when the source goes straight into the grid */
  transportWind_m_s: number | null;
}

/** Mass the sub-grid part loses before the grid takes over [g/s]. */
export interface SubGridLosses {
  decayed: number;
  washedOut: number;
  dryDeposited: number;
}

export interface NearFieldPlan {
  /** what the grid receives [g/s per cell] */
  readonly emission: GridEmission;
  /** emitted by the sources [g/s]: the grid's share plus what the sub-grid part loses */
  readonly emitted_g_s: number;
  readonly losses_g_s: SubGridLosses;
  /** mass held in the sub-grid plumes at steady state [g] */
  readonly heldMass_g: number;
  readonly handovers: readonly SourceHandover[];
  readonly notes: readonly string[];
  /** true when concentration_g_m3 can be non-zero somewhere */
  readonly holdsConcentration: boolean;
  /** concentration held by the sub-grid part at a point [g/m3] (the grid's field does not include it) */
  concentration_g_m3(x_m: number, y_m: number, z_m: number): number;
}

export interface NearFieldTreatment {
  readonly name: string;
  plan(context: NearFieldContext): NearFieldPlan;
}

const NO_LOSSES: SubGridLosses = Object.freeze({ decayed: 0, washedOut: 0, dryDeposited: 0 });

/** The sum of the sources' emission rates [g/s]. */
export function sourcesEmission_g_s(sources: readonly PlacedSource[]): number {
  let total = 0;
  for (const source of sources) total += source.emission_g_s;
  return total;
}

/**
 * Every source straight into the grid: a stack at its effective height shared among the eight cells
 * around it (trilinear weights), an area by its exact cell overlaps (./gridEmission.ts). Nothing is held
 * below the grid's resolution; a plume narrower than a cell is as wide as the cells it starts in.
 */
export const DirectRelease: NearFieldTreatment = Object.freeze({
  name: 'DirectRelease',
  plan(context: NearFieldContext): NearFieldPlan {
    return {
      emission: gridEmissionFromSources(context.grid, context.sources, context.releaseHeights_m),
      emitted_g_s: sourcesEmission_g_s(context.sources),
      losses_g_s: NO_LOSSES,
      heldMass_g: 0,
      handovers: context.sources.map((source) => ({ id: source.id, handoverDistance_m: 0, handedOverFraction: 1, transportWind_m_s: null })),
      notes: ['near field: every source released straight into the grid (point sources at their effective height, shared among the surrounding cells by trilinear weights; areas by their cell overlaps)'],
      holdsConcentration: false,
      concentration_g_m3: () => 0,
    };
  },
});
