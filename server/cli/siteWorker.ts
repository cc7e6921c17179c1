/**
 * Worker-thread entry of `plumeplan site`: runs the whole siting (solver/siting/runSiting.ts: the
 * adjoint solves, the near-field plans, the forward runs) off the main thread, so that Ctrl-C reaches
 * the command at once and can stop it (./siteInWorker.ts terminates this thread). Posts progress and the
 * result; the grid's projection functions stay behind (the caller restores them).
 */
import { parentPort, workerData } from 'node:worker_threads';
import type { Scenario } from '../../scenarios/format/types.ts';
import { UnavailableError } from '../../solver/drivers/solveSteady.ts';
import { runSiting, type SitingOptions, type SitingResult } from '../../solver/siting/runSiting.ts';

export type SiteWorkerReply =
  | { type: 'progress'; fractionDone: number; message: string }
  | { type: 'result'; result: SitingResult }
  | { type: 'error'; name: string; message: string; alternativeMode: string | null };

const port = parentPort;
if (port === null) throw new Error('siteWorker must run in a worker thread');

const { scenario, options } = (workerData as { data: { scenario: Scenario; options: Omit<SitingOptions, 'solve' | 'control'> } }).data;

try {
  const result = await runSiting(scenario, {
    ...options,
    control: {
      onProgress(fractionDone, message) {
        const reply: SiteWorkerReply = { type: 'progress', fractionDone, message };
        port.postMessage(reply);
      },
    },
  });
  const { projection: _gridProjection, ...grid } = result.grid;
  const cloneable = { ...result, grid, map: { ...result.map, grid } } as unknown as SitingResult;
  const reply: SiteWorkerReply = { type: 'result', result: cloneable };
  port.postMessage(reply);
} catch (error) {
  const reply: SiteWorkerReply = {
    type: 'error',
    name: error instanceof Error ? error.name : 'Error',
    message: error instanceof Error ? error.message : String(error),
    alternativeMode: error instanceof UnavailableError ? error.alternativeMode : null,
  };
  port.postMessage(reply);
}
