/**
 * Running a grid steady solve in a worker thread, so a server or the command line stays responsive: the
 * input goes over as a structured clone (the grid's projection functions stay behind), progress comes
 * back as messages, the result's typed arrays are transferred (not copied), and aborting the signal
 * terminates the thread at once and rejects with an AbortError.
 */
import type { RunControl, SteadyFieldResult, SteadyRunInput } from '../../solver/drivers/types.ts';
import { createTypeScriptWorker } from '../../solver/parallel/typescriptWorker.ts';
import type { WorkerReply } from './messages.ts';

function abortError(): Error {
  const error = new Error('grid run aborted');
  error.name = 'AbortError';
  return error;
}

/**
 * @param input the steady run input (as for solveGridSteady)
 * @param control onProgress (called on this thread) and an AbortSignal
 * @returns the same SteadyFieldResult solveGridSteady gives, with the caller's grid projection untouched
 * @example const result = await solveGridSteadyInWorker(input, { onProgress: (f, m) => console.error(m) });
 */
export function solveGridSteadyInWorker(input: SteadyRunInput, control: RunControl = {}): Promise<SteadyFieldResult> {
  if (control.signal?.aborted) return Promise.reject(abortError());
  const { projection, ...gridWithoutProjection } = input.grid;
  const worker = createTypeScriptWorker(new URL('./gridSteadyWorker.ts', import.meta.url), {
    input: { ...input, grid: gridWithoutProjection },
    projectionDefinition: projection.definition,
  });
  return new Promise<SteadyFieldResult>((resolve, reject) => {
    let settled = false;
    const finish = (action: () => void): void => {
      if (settled) return;
      settled = true;
      control.signal?.removeEventListener('abort', onAbort);
      action();
      void worker.terminate();
    };
    const onAbort = (): void => finish(() => reject(abortError()));
    control.signal?.addEventListener('abort', onAbort, { once: true });
    worker.on('message', (reply: WorkerReply) => {
      if (reply.type === 'progress') control.onProgress?.(reply.fractionDone, reply.message);
      else if (reply.type === 'result') finish(() => resolve(reply.result));
      else {
        const error = reply.name === 'RangeError' ? new RangeError(reply.message) : new Error(reply.message);
        if (reply.name !== 'RangeError') error.name = reply.name;
        finish(() => reject(error));
      }
    });
    worker.on('error', (error) => finish(() => reject(error)));
    worker.on('exit', (code) => finish(() => reject(new Error(`grid solver worker stopped (exit code ${code}) before giving a result`))));
  });
}
