/**
 * Worker-thread entry: runs one grid steady solve (solver/drivers/gridSteady.ts) and posts progress and
 * the result back. Started by ./solveInWorker.ts through the TypeScript worker bootstrap.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { solveGridSteady } from '../../solver/drivers/gridSteady.ts';
import type { SteadyRunInput } from '../../solver/drivers/types.ts';
import type { WorkerReply } from './messages.ts';
import { projectionStandIn } from './projectionStandIn.ts';

const port = parentPort;
if (port === null) throw new Error('gridSteadyWorker must run in a worker thread');

const { input, projectionDefinition } = (workerData as { data: { input: Omit<SteadyRunInput, 'grid'> & { grid: Omit<SteadyRunInput['grid'], 'projection'> }; projectionDefinition: string } }).data;

const projection = projectionStandIn(projectionDefinition);

try {
  const result = solveGridSteady(
    { ...input, grid: { ...input.grid, projection } },
    {
      onProgress(fractionDone, message) {
        const reply: WorkerReply = { type: 'progress', fractionDone, message };
        port.postMessage(reply);
      },
    },
  );
  const reply: WorkerReply = { type: 'result', result };
  port.postMessage(reply, [result.groundLevel_ug_m3.buffer as ArrayBuffer, result.receptors_ug_m3.buffer as ArrayBuffer]);
} catch (error) {
  const reply: WorkerReply = {
    type: 'error',
    name: error instanceof Error ? error.name : 'Error',
    message: error instanceof Error ? error.message : String(error),
  };
  port.postMessage(reply);
}
