/**
 * Messages between the slab pool (../parallel/slabPool.ts) and its workers (./slabWorker.ts).
 */
import type { LateralBoundaries } from '../boundaries/boundaryConditions.ts';
import type { PaddedLayout } from '../fields/paddedLayout.ts';
import type { StepPlan } from '../timestepping/stepPlan.ts';

export interface SlabSetup {
  type: 'setup';
  /** the model's two field buffers (shared) */
  fields: [SharedArrayBuffer, SharedArrayBuffer];
  /** tally accumulators, TALLY_LENGTH per slab, and the completion counter */
  tally: SharedArrayBuffer;
  counter: SharedArrayBuffer;
  layout: PaddedLayout;
  /** this worker's rows [jFrom, jTo) and its slab number */
  jFrom: number;
  jTo: number;
  slab: number;
}

export interface SlabPlan {
  type: 'plan';
  planId: number;
  plan: StepPlan;
  lateral: LateralBoundaries;
  u_m_s: Float64Array;
  v_m_s: Float64Array;
}

export interface SlabStep {
  type: 'step';
  planId: number;
  /** which field buffer holds the previous field (0 or 1) */
  previous: 0 | 1;
}

export type SlabMessage = SlabSetup | SlabPlan | SlabStep | { type: 'close' };
