/** Replies of a solver worker thread to the thread that started it. */
import type { SteadyFieldResult } from '../solver/drivers/types.ts';

export type WorkerReply =
  | { type: 'progress'; fractionDone: number; message: string }
  | { type: 'result'; result: SteadyFieldResult }
  | { type: 'error'; name: string; message: string };
