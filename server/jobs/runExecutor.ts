/**
 * The one interface between the server's routes and whatever computes runs. Today an in-process pool
 * of worker threads implements it (`workerPoolExecutor.ts`); a distributed job engine could replace
 * it later without touching the routes or the storage: it takes a job, reports events, and cancels.
 */
import type { ResultFileContent } from '../storage/resultFiles.ts';
import type { RunError } from '../storage/runStore.ts';

/**
 * Kinds of run the executor knows: one run of a scenario; a comparison of two runs; a sweep of one
 * parameter; the stack-height search; siting a stack (./computeAnalysis.ts computes the last four).
 */
export const RUN_KINDS = ['scenario', 'compare', 'sweep', 'stack-height', 'site'] as const;
export type RunKind = (typeof RUN_KINDS)[number];

/** Which consultation pack a scenario run makes: none, all but the rendered files (map.png, report.pdf), or all. */
export const PACK_CHOICES = ['none', 'quick', 'full'] as const;
export type PackChoice = (typeof PACK_CHOICES)[number];

/** One run to compute. Everything in it is plain JSON, so it can travel to a thread or a machine. */
export interface RunJob {
  id: string;
  kind: RunKind;
  /** the scenario revision as stored (checked again where it runs); a comparison's side A */
  scenario: unknown;
  /** a comparison's side B, as stored */
  secondScenario?: unknown;
  /** the run's options, e.g. `{ mode: 'gaussian' }` */
  options: Record<string, unknown>;
}

/** What the executor reports about a job, in order: started, progress..., then exactly one ending. */
export type RunEvent =
  | { type: 'started' }
  | { type: 'progress'; fraction: number; message: string }
  | { type: 'done'; files: ResultFileContent[] }
  | { type: 'failed'; error: RunError }
  | { type: 'cancelled' };

export interface ExecutorActivity {
  /** jobs computing now */
  running: number;
  /** jobs waiting for a free slot */
  queued: number;
  /** jobs that compute at once */
  capacity: number;
}

export interface RunExecutor {
  /** Take a job; `onEvent` hears about it until its ending event. */
  submit(job: RunJob, onEvent: (event: RunEvent) => void): void;
  /** Stop a queued or running job (its ending event is `cancelled`). @returns whether it was known */
  cancel(id: string): boolean;
  activity(): ExecutorActivity;
  /** Stop every job without further events (the server is shutting down). */
  close(): Promise<void>;
}
