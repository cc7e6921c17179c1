/**
 * `RunExecutor` on this machine: each run computes in its own worker thread (./runWorker.ts), at most
 * `capacity` at once (default: one per core), the rest waiting in a first-come queue. A cancelled run
 * stops at once: its thread is terminated. The main thread only passes messages, so the server keeps
 * answering requests while runs compute.
 */
import { availableParallelism } from 'node:os';
import type { Worker } from 'node:worker_threads';
import { createTypeScriptWorker } from '../../solver/parallel/typescriptWorker.ts';
import type { ExecutorActivity, RunEvent, RunExecutor, RunJob } from './runExecutor.ts';
import type { RunWorkerReply } from './runWorker.ts';

interface Entry {
  job: RunJob;
  onEvent: (event: RunEvent) => void;
  worker: Worker | null;
  ended: boolean;
}

export interface WorkerPoolExecutorOptions {
  /** runs computing at once (default: the number of cores) */
  capacity?: number;
}

export class WorkerPoolExecutor implements RunExecutor {
  readonly capacity: number;
  private readonly queue: Entry[] = [];
  private readonly running = new Map<string, Entry>();
  private closed = false;

  constructor(options: WorkerPoolExecutorOptions = {}) {
    this.capacity = options.capacity ?? Math.max(1, availableParallelism());
    if (!Number.isInteger(this.capacity) || this.capacity < 1) {
      throw new RangeError(`capacity: got ${this.capacity}; allowed: an integer >= 1`);
    }
  }

  submit(job: RunJob, onEvent: (event: RunEvent) => void): void {
    if (this.closed) throw new Error('the run executor is closed');
    this.queue.push({ job, onEvent, worker: null, ended: false });
    this.startWaiting();
  }

  cancel(id: string): boolean {
    const queuedIndex = this.queue.findIndex((entry) => entry.job.id === id);
    if (queuedIndex >= 0) {
      const [entry] = this.queue.splice(queuedIndex, 1);
      this.end(entry, { type: 'cancelled' });
      return true;
    }
    const entry = this.running.get(id);
    if (entry === undefined) return false;
    this.end(entry, { type: 'cancelled' });
    return true;
  }

  activity(): ExecutorActivity {
    return { running: this.running.size, queued: this.queue.length, capacity: this.capacity };
  }

  async close(): Promise<void> {
    this.closed = true;
    const entries = [...this.running.values()];
    this.queue.length = 0;
    this.running.clear();
    for (const entry of entries) entry.ended = true;
    await Promise.all(entries.map((entry) => entry.worker?.terminate()));
  }

  private startWaiting(): void {
    while (!this.closed && this.running.size < this.capacity && this.queue.length > 0) {
      this.start(this.queue.shift() as Entry);
    }
  }

  private start(entry: Entry): void {
    this.running.set(entry.job.id, entry);
    const worker = createTypeScriptWorker(new URL('./runWorker.ts', import.meta.url), { job: entry.job });
    entry.worker = worker;
    entry.onEvent({ type: 'started' });
    worker.on('message', (reply: RunWorkerReply) => {
      if (entry.ended) return;
      if (reply.type === 'progress') entry.onEvent({ type: 'progress', fraction: reply.fraction, message: reply.message });
      else if (reply.type === 'done') this.end(entry, { type: 'done', files: reply.files });
      else this.end(entry, { type: 'failed', error: reply.error });
    });
    worker.on('error', (error) => {
      this.end(entry, { type: 'failed', error: { error: `internal failure: ${error.message}`, field: null } });
    });
    worker.on('exit', (code) => {
      this.end(entry, { type: 'failed', error: { error: `internal failure: the run's thread stopped (exit code ${code}) before giving a result`, field: null } });
    });
  }

  /** Give a job its ending event once, free its slot and start the next. */
  private end(entry: Entry, event: RunEvent): void {
    if (entry.ended) return;
    entry.ended = true;
    this.running.delete(entry.job.id);
    if (entry.worker !== null) void entry.worker.terminate();
    entry.onEvent(event);
    this.startWaiting();
  }
}
