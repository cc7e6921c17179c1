/** Replies of a solver worker thread to the thread that started it. */
import type { SolverMode } from '../../scenarios/format/types.ts';
import type { SteadyFieldResult, SteadyRunInput } from '../../solver/drivers/types.ts';

export type WorkerReply =
  | { type: 'progress'; fractionDone: number; message: string }
  | { type: 'result'; result: SteadyFieldResult }
  | { type: 'error'; name: string; message: string };

/** A solve asked of a series pool worker (./seriesSolveWorker.ts); the grid goes without its projection functions. */
export interface SeriesSolveRequest {
  id: number;
  mode: SolverMode;
  input: Omit<SteadyRunInput, 'grid'> & { grid: Omit<SteadyRunInput['grid'], 'projection'> };
  projectionDefinition: string;
}

export type SeriesSolveReply =
  | { type: 'result'; id: number; result: SteadyFieldResult }
  | { type: 'error'; id: number; name: string; message: string };
