/**
 * Messages between the slab pool (../parallel/slabPool.ts) and its workers (./slabWorker.ts).
 */
import type { LateralBoundaries } from '../boundaries/boundaryConditions.ts';
import type { PaddedLayout } from '../fields/paddedLayout.ts';
import type { StepPlan } from '../timestepping/stepPlan.ts';
import type { KernelMemory } from '../timestepping/simd/transportRowModule.ts';

export interface SlabSetup {
  type: 'setup';
  /** where the model's two fields live: shared buffers and byte offsets (one buffer for both with the SIMD kernel) */
  fields: [SharedArrayBuffer, SharedArrayBuffer];
  fieldOffsets: [number, number];
  /** the model's kernel memory when it uses the SIMD kernel (a shared WebAssembly memory), else null */
  kernelMemory: KernelMemory | null;
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
