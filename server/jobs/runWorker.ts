/**
 * Worker-thread entry of the run executor (started by ./workerPoolExecutor.ts through the TypeScript
 * worker bootstrap). The thread stays up between runs (starting one costs seconds of module loading)
 * and computes one run at a time: a `run` message in, progress (at most every 100 ms) out, then the
 * result files (their buffers transferred, not copied) or the error.
 */
import { parentPort } from 'node:worker_threads';
import type { ResultFileContent } from '../storage/resultFiles.ts';
import type { RunError } from '../storage/runStore.ts';
import { computeRun, RunInputError } from './computeRun.ts';
import type { RunJob } from './runExecutor.ts';

export type RunWorkerRequest = { type: 'run'; job: RunJob };

export type RunWorkerReply =
  | { type: 'ready' }
  | { type: 'progress'; id: string; fraction: number; message: string }
  | { type: 'done'; id: string; files: ResultFileContent[] }
  | { type: 'failed'; id: string; error: RunError };

/** Shortest time between two progress messages [ms]. */
const PROGRESS_INTERVAL_ms = 100;

const port = parentPort;
if (port !== null) {
  const post = (reply: RunWorkerReply, transfer: ArrayBuffer[] = []): void => port.postMessage(reply, transfer);
  port.on('message', (request: RunWorkerRequest) => {
    if (request.type === 'run') void run(request.job);
  });
  post({ type: 'ready' });

  async function run(job: RunJob): Promise<void> {
    let lastProgress_ms = -Infinity;
    try {
      const files = await computeRun(job, {
        onProgress(fraction, message) {
          const now = Date.now();
          if (now - lastProgress_ms < PROGRESS_INTERVAL_ms && fraction < 1) return;
          lastProgress_ms = now;
          post({ type: 'progress', id: job.id, fraction: Math.min(1, Math.max(0, fraction)), message });
        },
      });
      post({ type: 'done', id: job.id, files }, files.map((file) => file.content.buffer as ArrayBuffer));
    } catch (error) {
      const detail: RunError =
        error instanceof RunInputError
          ? error.detail
          : { error: `internal failure: ${error instanceof Error ? error.message : String(error)}`, field: null };
      post({ type: 'failed', id: job.id, error: detail });
    }
  }
}
