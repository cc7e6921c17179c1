/**
 * `runSiting` in a worker thread (./siteWorker.ts) for the command line: the adjoint solves run for
 * seconds to minutes without returning to the event loop, so in process Ctrl-C could only kill Node
 * outright. Here the main thread stays free: aborting the signal terminates the thread at once and
 * rejects with an AbortError; errors come back as the same classes (ScenarioInputError, UnavailableError,
 * RangeError) so the command's exit codes do not change.
 */
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import { ScenarioInputError } from '../../solver/drivers/runScenario.ts';
import { UnavailableError } from '../../solver/drivers/solveSteady.ts';
import { createLocalProjection } from '../../solver/grid/projection.ts';
import type { SitingOptions, SitingResult } from '../../solver/siting/runSiting.ts';
import { createTypeScriptWorker } from '../../solver/parallel/typescriptWorker.ts';
import type { SiteWorkerReply } from './siteWorker.ts';

function abortError(): Error {
  const error = new Error('siting interrupted');
  error.name = 'AbortError';
  return error;
}

function errorOf(reply: Extract<SiteWorkerReply, { type: 'error' }>): Error {
  if (reply.name === 'ScenarioInputError') return new ScenarioInputError(reply.message);
  if (reply.name === 'UnavailableError') return new UnavailableError(reply.message, reply.alternativeMode as SolverMode | null);
  if (reply.name === 'RangeError') return new RangeError(reply.message);
  const error = new Error(reply.message);
  error.name = reply.name;
  return error;
}

/**
 * @param scenario the parsed scenario
 * @param options as runSiting's; `solve` is not used (the forward runs are made in the worker), `control`
 *   gives progress (called on this thread) and the AbortSignal
 * @returns runSiting's result, the grid's projection restored
 */
export function runSitingInWorker(scenario: Scenario, options: SitingOptions = {}): Promise<SitingResult> {
  const { control, solve: _solve, ...rest } = options;
  if (control?.signal?.aborted) return Promise.reject(abortError());
  const worker = createTypeScriptWorker(new URL('./siteWorker.ts', import.meta.url), { scenario, options: rest });
  return new Promise<SitingResult>((resolve, reject) => {
    let settled = false;
    const finish = (action: () => void): void => {
      if (settled) return;
      settled = true;
      control?.signal?.removeEventListener('abort', onAbort);
      action();
      void worker.terminate();
    };
    const onAbort = (): void => finish(() => reject(abortError()));
    control?.signal?.addEventListener('abort', onAbort, { once: true });
    worker.on('message', (reply: SiteWorkerReply) => {
      if (settled) return; // a message already on its way when the thread was stopped
      if (reply.type === 'progress') control?.onProgress?.(reply.fractionDone, reply.message);
      else if (reply.type === 'result') {
        const projection = createLocalProjection(scenario.site);
        const grid = { ...reply.result.grid, projection };
        finish(() => resolve({ ...reply.result, grid, map: { ...reply.result.map, grid } }));
      } else finish(() => reject(errorOf(reply)));
    });
    worker.on('error', (error) => finish(() => reject(error)));
    worker.on('exit', (code) => finish(() => reject(new Error(`siting worker stopped (exit code ${code}) before giving a result`))));
  });
}
