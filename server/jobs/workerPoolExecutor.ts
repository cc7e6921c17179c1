/**
 * `RunExecutor` on this machine: runs compute in worker threads (./runWorker.ts), at most `capacity`
 * at once (default: one per core), the rest waiting in a first-come queue. Threads stay up between
 * runs, since starting one costs seconds of module loading. A cancelled run stops at once: its thread
 * is terminated (and replaced when the next run needs one). The main thread only passes messages, so
 * the server keeps answering requests while runs compute.
 */
import { availableParallelism } from 'node:os';
import type { Worker } from 'node:worker_threads';
import { createTypeScriptWorker } from '../../solver/parallel/typescriptWorker.ts';
import type { ExecutorActivity, RunEvent, RunExecutor, RunJob } from './runExecutor.ts';
import type { RunWorkerReply, RunWorkerRequest } from './runWorker.ts';

interface Entry {
  job: RunJob;
  onEvent: (event: RunEvent) => void;
  thread: Thread | null;
  ended: boolean;
}

/** One worker thread and the run it computes, if any. */
interface Thread {
  worker: Worker;
  entry: Entry | null;
}

export interface WorkerPoolExecutorOptions {
  /** runs computing at once (default: the number of cores) */
  capacity?: number;
}

export class WorkerPoolExecutor implements RunExecutor {
  readonly capacity: number;
  private readonly queue: Entry[] = [];
  private readonly running = new Map<string, Entry>();
  private readonly threads = new Set<Thread>();
  private closed = false;

  constructor(options: WorkerPoolExecutorOptions = {}) {
    this.capacity = options.capacity ?? Math.max(1, availableParallelism());
    if (!Number.isInteger(this.capacity) || this.capacity < 1) {
      throw new RangeError(`capacity: got ${this.capacity}; allowed: an integer >= 1`);
    }
  }

  submit(job: RunJob, onEvent: (event: RunEvent) => void): void {
    if (this.closed) throw new Error('the run executor is closed');
    this.queue.push({ job, onEvent, thread: null, ended: false });
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
    for (const entry of [...this.queue, ...this.running.values()]) entry.ended = true;
    this.queue.length = 0;
    this.running.clear();
    const threads = [...this.threads];
    this.threads.clear();
    await Promise.all(threads.map((thread) => thread.worker.terminate()));
  }

  private startWaiting(): void {
    while (!this.closed && this.running.size < this.capacity && this.queue.length > 0) {
      this.start(this.queue.shift() as Entry);
    }
  }

  private start(entry: Entry): void {
    const thread = [...this.threads].find((candidate) => candidate.entry === null) ?? this.newThread();
    thread.entry = entry;
    entry.thread = thread;
    this.running.set(entry.job.id, entry);
    entry.onEvent({ type: 'started' });
    const request: RunWorkerRequest = { type: 'run', job: entry.job };
    thread.worker.postMessage(request);
  }

  private newThread(): Thread {
    const worker = createTypeScriptWorker(new URL('./runWorker.ts', import.meta.url));
    const thread: Thread = { worker, entry: null };
    this.threads.add(thread);
    worker.on('message', (reply: RunWorkerReply) => {
      const entry = thread.entry;
      if (reply.type === 'ready' || entry === null || entry.ended || reply.id !== entry.job.id) return;
      if (reply.type === 'progress') entry.onEvent({ type: 'progress', fraction: reply.fraction, message: reply.message });
      else if (reply.type === 'done') this.end(entry, { type: 'done', files: reply.files });
      else this.end(entry, { type: 'failed', error: reply.error });
    });
    const lost = (reason: string): void => {
      this.threads.delete(thread);
      const entry = thread.entry;
      thread.entry = null;
      if (entry !== null) this.end(entry, { type: 'failed', error: { error: `internal failure: ${reason}`, field: null } });
    };
    worker.on('error', (error) => lost(`the run's thread failed: ${error.message}`));
    worker.on('exit', (code) => lost(`the run's thread stopped (exit code ${code}) before giving a result`));
    return thread;
  }

  /** Give a job its ending event once, free its slot (ending its thread if it was cut short) and start the next. */
  private end(entry: Entry, event: RunEvent): void {
    if (entry.ended) return;
    entry.ended = true;
    this.running.delete(entry.job.id);
    const thread = entry.thread;
    if (thread !== null) {
      thread.entry = null;
      if (event.type !== 'done' && event.type !== 'failed') {
        // Cut short: the thread may be mid-solve; end it rather than wait.
        this.threads.delete(thread);
        void thread.worker.terminate();
      }
    }
    entry.onEvent(event);
    this.startWaiting();
  }
}
