/**
 * Server benchmarks (part of `npm run bench`; alone: `node --import tsx tests/bench/server.ts`), bounded
 * and on loopback only:
 *
 * - server-reads-during-runs: 200 API reads sent at once (scenario list, a scenario, a run's status)
 *   while two grid runs of the demo (1 M cells each) compute in the worker threads; latency p50, p99
 *   and the largest, in ms, and whether both runs were still computing when the last read came back;
 * - server-event-loop: the main thread's event loop while those two runs go from submission to done
 *   (worker start, solve, result files written and committed): its longest stall and its p99 delay,
 *   from perf_hooks.monitorEventLoopDelay (10 ms resolution).
 * Figures are what this machine measured in this run; nothing here fails for being slow.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { loadavg, tmpdir } from 'node:os';
import path from 'node:path';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { pino } from 'pino';
import { createApp } from '../../server/http/app.ts';
import { openServices } from '../../server/services.ts';

const DEMO = new URL('../../scenarios/merrowdene-heat-plant/scenario.json', import.meta.url);
const READS = 200;

function print(record: Record<string, unknown>): void {
  process.stdout.write(`${JSON.stringify(record)}\n`);
}

function percentile(sorted: readonly number[], fraction: number): number {
  return sorted[Math.min(sorted.length - 1, Math.ceil(fraction * sorted.length) - 1)];
}

/** READS requests sent at once, cycling through `routes`: latency p50, p99 and largest [ms], and failures. */
async function timedReads(base: string, routes: readonly string[]): Promise<{ p50_ms: number; p99_ms: number; max_ms: number; failures: number }> {
  let failures = 0;
  const latencies_ms = await Promise.all(
    Array.from({ length: READS }, async (_, index) => {
      const started = process.hrtime.bigint();
      const response = await fetch(base + routes[index % routes.length]);
      await response.arrayBuffer();
      if (!response.ok) failures++;
      return Number(process.hrtime.bigint() - started) / 1e6;
    }),
  );
  latencies_ms.sort((a, b) => a - b);
  return {
    p50_ms: Number(percentile(latencies_ms, 0.5).toFixed(1)),
    p99_ms: Number(percentile(latencies_ms, 0.99).toFixed(1)),
    max_ms: Number(latencies_ms[latencies_ms.length - 1].toFixed(1)),
    failures,
  };
}

async function main(): Promise<void> {
  const dataDir = mkdtempSync(path.join(tmpdir(), 'plumeplan-bench-'));
  const services = await openServices({ dataDir, logger: pino({ level: 'silent' }) });
  const app = createApp({ ...services, webRoot: path.join(dataDir, 'none') });
  const server = app.listen(0, '127.0.0.1');
  await new Promise((resolve) => server.once('listening', resolve));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const send = async (method: string, route: string, body?: unknown): Promise<any> => {
    const response = await fetch(base + route, { method, headers: { 'Content-Type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) });
    return response.json();
  };

  try {
    const demo = JSON.parse(readFileSync(DEMO, 'utf8')) as Record<string, unknown>;
    const ids: string[] = [];
    for (const name of ['bench run A (invented demo)', 'bench run B (invented demo)']) {
      ids.push((await send('POST', '/api/scenarios', { scenario: { ...demo, name } })).id);
    }

    // The same reads with nothing computing, for comparison.
    const idleRoutes = [`/api/scenarios`, `/api/scenarios/${ids[0]}`, `/api/scenarios/${ids[1]}`, `/api/scenarios/${ids[0]}/revisions`];
    const idle = await timedReads(base, idleRoutes);
    print({ name: 'server-reads-idle', reads: READS, sentAtOnce: true, runsComputing: 0, ...idle, loadAverage1min: Number(loadavg()[0].toFixed(1)) });

    const loop = monitorEventLoopDelay({ resolution: 10 });
    loop.enable();
    const submitted = process.hrtime.bigint();
    const runs: string[] = [];
    for (const id of ids) runs.push((await send('POST', '/api/runs', { scenarioId: id, mode: 'grid' })).id);
    const status = async (run: string): Promise<{ status: string; progress: number }> => send('GET', `/api/runs/${run}`);

    // Wait until both runs are solving (progress past the start), then read.
    for (;;) {
      const states = await Promise.all(runs.map(status));
      if (states.every((state) => state.status === 'running' && state.progress > 0)) break;
      if (states.some((state) => state.status !== 'running' && state.status !== 'queued')) throw new Error(`a run ended early: ${JSON.stringify(states)}`);
      await new Promise((resolve) => setTimeout(resolve, 50));
    }
    const routes = [`/api/scenarios`, `/api/scenarios/${ids[0]}`, `/api/runs/${runs[0]}`, `/api/runs/${runs[1]}`];
    const reads = await timedReads(base, routes);
    const afterReads = await Promise.all(runs.map(status));
    print({
      name: 'server-reads-during-runs',
      reads: READS,
      sentAtOnce: true,
      routes,
      runsComputing: 2,
      runsStillComputingAfterReads: afterReads.filter((state) => state.status === 'running').length,
      grid: '200x200x25 (demo, grid mode), each run',
      ...reads,
      loadAverage1min: Number(loadavg()[0].toFixed(1)),
    });

    for (;;) {
      const states = await Promise.all(runs.map(status));
      if (states.every((state) => state.status !== 'running' && state.status !== 'queued')) {
        if (states.some((state) => state.status !== 'done')) throw new Error(`a run did not finish: ${JSON.stringify(states)}`);
        break;
      }
      await new Promise((resolve) => setTimeout(resolve, 100));
    }
    loop.disable();
    print({
      name: 'server-event-loop',
      during: 'two grid runs of the demo from submission to done (worker start, solve, result files written), plus the reads above',
      wallSeconds: Number((Number(process.hrtime.bigint() - submitted) / 1e9).toFixed(1)),
      longestStall_ms: Number((loop.max / 1e6).toFixed(1)),
      p99Delay_ms: Number((loop.percentile(99) / 1e6).toFixed(1)),
      meanDelay_ms: Number((loop.mean / 1e6).toFixed(1)),
      resolution_ms: 10,
      loadAverage1min: Number(loadavg()[0].toFixed(1)),
    });
  } finally {
    server.closeAllConnections();
    server.close();
    await services.close();
    rmSync(dataDir, { recursive: true, force: true });
  }
}

await main();
