/**
 * Worker-thread entry of one run (started by ./workerPoolExecutor.ts through the TypeScript worker
 * bootstrap): computes the run and posts progress (at most every 100 ms), then the result files
 * (their buffers transferred, not copied) or the error.
 */
import { parentPort, workerData } from 'node:worker_threads';
import type { ResultFileContent } from '../storage/resultFiles.ts';
import type { RunError } from '../storage/runStore.ts';
import { computeRun, RunInputError } from './computeRun.ts';
import type { RunJob } from './runExecutor.ts';

export type RunWorkerReply =
  | { type: 'progress'; fraction: number; message: string }
  | { type: 'done'; files: ResultFileContent[] }
  | { type: 'failed'; error: RunError };

/** Shortest time between two progress messages [ms]. */
const PROGRESS_INTERVAL_ms = 100;

const port = parentPort;
if (port !== null && (workerData as { data?: { job?: RunJob } } | null)?.data?.job !== undefined) {
  const { job } = (workerData as { data: { job: RunJob } }).data;
  let lastProgress_ms = -Infinity;
  const post = (reply: RunWorkerReply, transfer: ArrayBuffer[] = []): void => port.postMessage(reply, transfer);
  try {
    const files = await computeRun(job, {
      onProgress(fraction, message) {
        const now = Date.now();
        if (now - lastProgress_ms < PROGRESS_INTERVAL_ms && fraction < 1) return;
        lastProgress_ms = now;
        post({ type: 'progress', fraction: Math.min(1, Math.max(0, fraction)), message });
      },
    });
    post({ type: 'done', files }, files.map((file) => file.content.buffer as ArrayBuffer));
  } catch (error) {
    const detail: RunError =
      error instanceof RunInputError
        ? error.detail
        : { error: `internal failure: ${error instanceof Error ? error.message : String(error)}`, field: null };
    post({ type: 'failed', error: detail });
  }
}
