/**
 * Worker-thread entry of a series solver pool (./seriesSolverPool.ts): keeps one warm-starting grid
 * solver (solver/drivers/gridSteady.ts) for the thread's life and solves each weather state it is sent,
 * posting the result back with its typed arrays transferred. Gaussian solves are run here too, so the
 * pool serves either mode.
 */
import { parentPort } from 'node:worker_threads';
import { createSeriesSteadySolver } from '../../solver/drivers/solveSteady.ts';
import type { SteadyRunInput } from '../../solver/drivers/types.ts';
import type { SeriesSolveReply, SeriesSolveRequest } from './messages.ts';
import { projectionStandIn } from './projectionStandIn.ts';

const port = parentPort;
if (port === null) throw new Error('seriesSolveWorker must run in a worker thread');

const solve = createSeriesSteadySolver();

port.on('message', async (request: SeriesSolveRequest) => {
  try {
    const input: SteadyRunInput = { ...request.input, grid: { ...request.input.grid, projection: projectionStandIn(request.projectionDefinition) } };
    const result = await solve(input, request.mode);
    const reply: SeriesSolveReply = { type: 'result', id: request.id, result };
    port.postMessage(reply, [result.groundLevel_ug_m3.buffer as ArrayBuffer, result.receptors_ug_m3.buffer as ArrayBuffer]);
  } catch (error) {
    const reply: SeriesSolveReply = {
      type: 'error',
      id: request.id,
      name: error instanceof Error ? error.name : 'Error',
      message: error instanceof Error ? error.message : String(error),
    };
    port.postMessage(reply);
  }
});
