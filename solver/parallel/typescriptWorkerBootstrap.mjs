// Entry of every plumeplan worker thread: registers tsx's loader in this thread, then loads the
// TypeScript entry named in workerData.entry. (Node 20 does not apply `--import tsx` from a worker's
// execArgv to the worker's own entry file, so the entry cannot be the .ts file itself.)
import { register } from 'tsx/esm/api';
import { workerData } from 'node:worker_threads';

register();
await import(workerData.entry);
