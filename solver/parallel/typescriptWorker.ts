/**
 * Starting a worker thread whose code is TypeScript (no build step): the thread runs a small .mjs
 * bootstrap that registers tsx and imports the entry. The entry reads its own start-up data from
 * `workerData.data`.
 */
import { Worker } from 'node:worker_threads';

/**
 * @param entry URL of the TypeScript module the thread runs
 * @param data structured-cloneable start-up data (SharedArrayBuffers are shared, not copied)
 * @example createTypeScriptWorker(new URL('./slabWorker.ts', import.meta.url))
 */
export function createTypeScriptWorker(entry: URL, data: unknown = null): Worker {
  return new Worker(new URL('./typescriptWorkerBootstrap.mjs', import.meta.url), {
    workerData: { entry: entry.href, data },
  });
}
