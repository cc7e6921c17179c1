/**
 * Shared pieces of the server tests: a small scenario (the demo on a coarse 50 x 50 x 10 grid, so a
 * run takes a moment), a data folder per test, the app over real storage, and a hand-driven executor
 * for tests that must decide when a run starts, progresses and ends.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { pino } from 'pino';
import { createApp } from '../../server/http/app.ts';
import type { ExecutorActivity, RunEvent, RunExecutor, RunJob } from '../../server/jobs/runExecutor.ts';
import type { RunLimits } from '../../server/jobs/runManager.ts';
import { openServices, type Services } from '../../server/services.ts';

const DEMO = new URL('../../scenarios/merrowdene-heat-plant/scenario.json', import.meta.url);

/** The demo heat plant on a coarse grid (50 x 50 x 10 cells at 100 m), as JSON ready to send. */
export function smallScenario(overrides: Record<string, unknown> = {}): Record<string, unknown> {
  const demo = JSON.parse(readFileSync(DEMO, 'utf8')) as Record<string, unknown>;
  delete demo.$schema;
  return {
    ...demo,
    name: 'Merrowdene heat plant on a coarse test grid (invented)',
    domain: { halfWidth_m: 2500, spacing_m: 100, height_m: 1000, layers: 10 },
    ...overrides,
  };
}

/** An executor the test drives: it records jobs and emits the events the test asks for. */
export class ManualExecutor implements RunExecutor {
  readonly jobs = new Map<string, { job: RunJob; onEvent: (event: RunEvent) => void; ended: boolean }>();
  closed = false;

  submit(job: RunJob, onEvent: (event: RunEvent) => void): void {
    this.jobs.set(job.id, { job, onEvent, ended: false });
  }

  cancel(id: string): boolean {
    const entry = this.jobs.get(id);
    if (entry === undefined || entry.ended) return false;
    this.emit(id, { type: 'cancelled' });
    return true;
  }

  activity(): ExecutorActivity {
    const open = [...this.jobs.values()].filter((entry) => !entry.ended).length;
    return { running: open, queued: 0, capacity: 1 };
  }

  async close(): Promise<void> {
    this.closed = true;
  }

  /** Send an event to a job's listener, as a real executor would. */
  emit(id: string, event: RunEvent): void {
    const entry = this.jobs.get(id);
    if (entry === undefined) throw new Error(`no job ${id}`);
    if (event.type === 'done' || event.type === 'failed' || event.type === 'cancelled') entry.ended = true;
    entry.onEvent(event);
  }
}

export interface TestServer {
  services: Services;
  app: ReturnType<typeof createApp>;
  dataDir: string;
  close(): Promise<void>;
}

/**
 * Open services over a fresh data folder and build the app.
 * @param options executor (default: real worker threads, one at a time), limits, token, web root
 */
export async function startTestServer(
  options: { executor?: RunExecutor; limits?: Partial<RunLimits>; token?: string; webRoot?: string; dataDir?: string; bodyLimit_bytes?: number } = {},
): Promise<TestServer> {
  const dataDir = options.dataDir ?? mkdtempSync(path.join(tmpdir(), 'plumeplan-server-'));
  const logger = pino({ level: 'silent' });
  const { WorkerPoolExecutor } = await import('../../server/jobs/workerPoolExecutor.ts');
  const services = await openServices({
    dataDir,
    logger,
    executor: options.executor ?? new WorkerPoolExecutor({ capacity: 1 }),
    limits: options.limits,
  });
  const app = createApp({
    ...services,
    token: options.token,
    webRoot: options.webRoot ?? path.join(dataDir, 'no-web-dist'),
    bodyLimit_bytes: options.bodyLimit_bytes,
  });
  return {
    services,
    app,
    dataDir,
    async close() {
      await services.close();
      if (options.dataDir === undefined) rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

/** Poll a condition (no timing assertions: the test's own timeout is the only limit). */
export async function waitFor<T>(probe: () => Promise<T | undefined> | T | undefined, interval_ms = 50): Promise<T> {
  for (;;) {
    const value = await probe();
    if (value !== undefined) return value;
    await new Promise((resolve) => setTimeout(resolve, interval_ms));
  }
}
