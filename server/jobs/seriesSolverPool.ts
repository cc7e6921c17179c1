/**
 * A pool of worker threads for the many steady solves of an hourly series or a wind rose: each thread
 * keeps its own warm-starting solver, so neighbouring weather states (the series solves them in a
 * sorted order, in runs of one direction and class) start from each other's fields within a thread.
 * Aborting a solve's signal terminates the pool (the run is over); close() ends it after a run.
 */
import { availableParallelism } from 'node:os';
import type { Worker } from 'node:worker_threads';
import type { SteadySolver } from '../../solver/drivers/solveSteady.ts';
import type { SteadyFieldResult } from '../../solver/drivers/types.ts';
import { createTypeScriptWorker } from '../../solver/parallel/typescriptWorker.ts';
import type { SeriesSolveReply, SeriesSolveRequest } from './messages.ts';

export interface SeriesSolverPool {
  /** one solver per worker thread, each keeping its own warm starts (hand the array to solveWithReuse) */
  solvers: SteadySolver[];
  close(): Promise<void>;
}

/** Threads a series pool uses by default: one per core, at most 8. */
export function defaultSeriesThreads(): number {
  return Math.max(1, Math.min(8, availableParallelism()));
}

function abortError(): Error {
  const error = new Error('series solve aborted');
  error.name = 'AbortError';
  return error;
}

interface Pending {
  resolve: (result: SteadyFieldResult) => void;
  reject: (error: Error) => void;
}

/**
 * @param threads worker threads (default: defaultSeriesThreads())
 * @example const pool = createSeriesSolverPool(2); try { await solveWithReuse(base, states, 'grid', { solve: pool.solvers, ... }) } finally { await pool.close() }
 */
export function createSeriesSolverPool(threads = defaultSeriesThreads()): SeriesSolverPool {
  if (!Number.isInteger(threads) || threads < 1) throw new RangeError(`threads is ${threads}; allowed: an integer >= 1`);
  const workers: Worker[] = [];
  const pending = new Map<number, Pending>();
  let nextId = 0;
  let closed = false;

  const failAll = (error: Error): void => {
    for (const entry of pending.values()) entry.reject(error);
    pending.clear();
  };
  const close = async (): Promise<void> => {
    if (closed) return;
    closed = true;
    failAll(abortError());
    await Promise.all(workers.map((worker) => worker.terminate()));
  };

  const solverFor = (worker: Worker): SteadySolver => async (input, mode, control = {}) => {
    if (closed) throw new Error('the series solver pool is closed');
    control.signal?.throwIfAborted();
    const id = nextId++;
    const { projection, ...grid } = input.grid;
    const request: SeriesSolveRequest = { id, mode, input: { ...input, grid }, projectionDefinition: projection.definition };
    return new Promise<SteadyFieldResult>((resolve, reject) => {
      const onAbort = (): void => {
        reject(abortError());
        void close();
      };
      control.signal?.addEventListener('abort', onAbort, { once: true });
      const settle = (): void => control.signal?.removeEventListener('abort', onAbort);
      pending.set(id, {
        resolve: (result) => {
          settle();
          resolve(result);
        },
        reject: (error) => {
          settle();
          reject(error);
        },
      });
      worker.postMessage(request);
    });
  };

  const solvers: SteadySolver[] = [];
  for (let t = 0; t < threads; t++) {
    const worker = createTypeScriptWorker(new URL('./seriesSolveWorker.ts', import.meta.url));
    worker.on('message', (reply: SeriesSolveReply) => {
      const entry = pending.get(reply.id);
      if (entry === undefined) return;
      pending.delete(reply.id);
      if (reply.type === 'result') entry.resolve(reply.result);
      else {
        const error = reply.name === 'RangeError' ? new RangeError(reply.message) : new Error(reply.message);
        if (reply.name !== 'RangeError') error.name = reply.name;
        entry.reject(error);
      }
    });
    worker.on('error', (error) => failAll(error));
    worker.on('exit', (code) => {
      if (!closed) failAll(new Error(`series solver worker stopped (exit code ${code}) before giving a result`));
    });
    workers.push(worker);
    solvers.push(solverFor(worker));
  }
  return { solvers, close };
}
