/**
 * Server benchmarks (part of `npm run bench`; alone: `node --import tsx tests/bench/server.ts`), bounded
 * and on loopback only:
 *
 * - server-reads-during-runs: 200 API reads sent at once (scenario list, a scenario, a run's status)
 *   while two grid runs of the demo (1 M cells each) compute in the worker threads; latency p50, p99
 *   and the largest, in ms, and whether both runs were still computing when the last read came back;
 * - server-event-loop: the main thread's event loop while those two runs go from submission to done
 *   (worker start, solve, result files written and committed): its longest stall and its p99 delay,
 *   from perf_hooks.monitorEventLoopDelay (10 ms resolution);
 * - server-pack: the demo in Gaussian mode through POST /api/runs without a pack, with `"pack": "quick"`
 *   and with `"pack": "full"` (each a fresh run: a smaller pack does not answer a larger one), submission
 *   to `done` as the client sees it and the run's own startedAt to finishedAt, and the pack's extra time
 *   (after an untimed warm-up run of a copy, since the first run loads the run's modules);
 * - server-cancel: a grid sweep of the demo's stack height (4 members) cancelled once the first member
 *   reports its own progress: POST /api/runs/:id/cancel's answer, the `cancelled` event on the run's
 *   progress stream, and the process's CPU going idle (process.cpuUsage over all threads, sampled every
 *   25 ms, idle = under 0.1 core over 100 ms), each in ms after the cancel was sent.
 * Sections: PLUMEPLAN_BENCH_SECTIONS=server-reads, server-pack or server-cancel runs only those
 * (tests/bench/benchSections.ts). Figures are what this machine measured in this run; nothing here fails
 * for being slow.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { loadavg, tmpdir } from 'node:os';
import path from 'node:path';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { pino } from 'pino';
import { createApp } from '../../server/http/app.ts';
import { openServices } from '../../server/services.ts';
import { benchSections, wantsServerSection } from './benchSections.ts';

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
    const sections = benchSections();
    if (wantsServerSection(sections, 'server-reads')) await readsDuringRuns(base, send);
    if (wantsServerSection(sections, 'server-pack')) await packTimes(base, send);
    if (wantsServerSection(sections, 'server-cancel')) await cancelLatency(base, send, () => services.manager.activity().running);
  } finally {
    server.closeAllConnections();
    server.close();
    await services.close();
    rmSync(dataDir, { recursive: true, force: true });
  }
}

type Send = (method: string, route: string, body?: unknown) => Promise<any>;
interface RunState {
  status: string;
  progress: number;
  message: string;
  startedAt: string | null;
  finishedAt: string | null;
  results: { name: string }[];
}
const FINAL = ['done', 'failed', 'cancelled', 'interrupted'];

/** Poll a run every 25 ms until it ends; its last state. */
async function untilEnded(send: Send, run: string): Promise<RunState> {
  for (;;) {
    const state = (await send('GET', `/api/runs/${run}`)) as RunState;
    if (FINAL.includes(state.status)) return state;
    await new Promise((resolve) => setTimeout(resolve, 25));
  }
}

async function packTimes(_base: string, send: Send): Promise<void> {
  const demo = JSON.parse(readFileSync(DEMO, 'utf8')) as Record<string, unknown>;
  const scenarioId = (await send('POST', '/api/scenarios', { scenario: { ...demo, name: 'bench pack run (invented demo)' } })).id as string;
  // A first run pays for loading the run's modules and warming the caches (about 4 s here), which would
  // otherwise be counted against whichever pack came first: a warm-up run of a copy, not timed.
  const warmId = (await send('POST', '/api/scenarios', { scenario: { ...demo, name: 'bench pack warm-up (invented demo)' } })).id as string;
  const warmStarted = performance.now();
  await untilEnded(send, (await send('POST', '/api/runs', { scenarioId: warmId, mode: 'gaussian', pack: 'none' })).id);
  const warmUpSeconds = (performance.now() - warmStarted) / 1000;
  const wall: Record<string, number> = {};
  const own: Record<string, number> = {};
  const files: Record<string, number> = {};
  // none first, then quick, then full: none of them answers the next (only a larger pack answers a smaller)
  for (const pack of ['none', 'quick', 'full'] as const) {
    const started = performance.now();
    const submitted = await send('POST', '/api/runs', { scenarioId, mode: 'gaussian', pack });
    if (submitted.reused) throw new Error(`the ${pack} run was answered by an earlier one`);
    const ended = await untilEnded(send, submitted.id);
    if (ended.status !== 'done') throw new Error(`the ${pack} run ended ${ended.status}: ${JSON.stringify(ended)}`);
    wall[pack] = (performance.now() - started) / 1000;
    own[pack] = (Date.parse(ended.finishedAt!) - Date.parse(ended.startedAt!)) / 1000;
    files[pack] = ended.results.length;
  }
  const seconds = (value: number): number => Number(value.toFixed(2));
  print({
    name: 'server-pack',
    scenario: 'merrowdene-heat-plant',
    mode: 'gaussian',
    grid: '200x200 ground (demo)',
    route: 'POST /api/runs { scenarioId, mode: "gaussian", pack } to status done, polled every 25 ms',
    submitToDoneSeconds: { none: seconds(wall.none), quick: seconds(wall.quick), full: seconds(wall.full) },
    runStartedToFinishedSeconds: { none: seconds(own.none), quick: seconds(own.quick), full: seconds(own.full) },
    packExtraSeconds: { quick: seconds(wall.quick - wall.none), full: seconds(wall.full - wall.none) },
    resultFiles: files,
    warmUpRunSeconds: seconds(warmUpSeconds),
    loadAverage1min: Number(loadavg()[0].toFixed(1)),
  });
}

/** The run's progress stream, read as it arrives: each event's data and when it came [performance.now() ms]. */
function openEvents(url: string): { events: { data: any; at_ms: number }[]; waitFor: (test: (data: any) => boolean) => Promise<{ data: any; at_ms: number }>; close: () => void } {
  const events: { data: any; at_ms: number }[] = [];
  const waiters: { test: (data: any) => boolean; resolve: (event: { data: any; at_ms: number }) => void }[] = [];
  const controller = new AbortController();
  void (async () => {
    try {
      const response = await fetch(url, { signal: controller.signal });
      const decoder = new TextDecoder();
      let text = '';
      for await (const chunk of response.body as unknown as AsyncIterable<Uint8Array>) {
        text += decoder.decode(chunk, { stream: true });
        let end: number;
        while ((end = text.indexOf('\n\n')) >= 0) {
          const block = text.slice(0, end);
          text = text.slice(end + 2);
          const line = block.split('\n').find((l) => l.startsWith('data: '));
          if (line === undefined) continue;
          const event = { data: JSON.parse(line.slice(6)), at_ms: performance.now() };
          events.push(event);
          for (const waiter of [...waiters]) {
            if (waiter.test(event.data)) {
              waiters.splice(waiters.indexOf(waiter), 1);
              waiter.resolve(event);
            }
          }
        }
      }
    } catch {
      // aborted at the end
    }
  })();
  return {
    events,
    waitFor: (test) => {
      const seen = events.find((event) => test(event.data));
      return seen ? Promise.resolve(seen) : new Promise((resolve) => waiters.push({ test, resolve }));
    },
    close: () => controller.abort(),
  };
}

async function cancelLatency(base: string, send: Send, running: () => number): Promise<void> {
  const demo = JSON.parse(readFileSync(DEMO, 'utf8')) as Record<string, unknown>;
  const scenarioId = (await send('POST', '/api/scenarios', { scenario: { ...demo, name: 'bench sweep to cancel (invented demo)' } })).id as string;
  const values = [20, 30, 40, 50];
  const submitted = await send('POST', '/api/runs', { kind: 'sweep', scenarioId, mode: 'grid', parameter: 'stackHeight_m', values });
  const stream = openEvents(`${base}/api/runs/${submitted.id}/events`);
  try {
    await stream.waitFor((data) => /^member 1 of 4: /.test(data.message ?? ''));
    // the CPU the process uses while the sweep computes, over 500 ms before the cancel [cores]
    const busyStart = process.cpuUsage();
    const busyStarted = performance.now();
    await new Promise((resolve) => setTimeout(resolve, 500));
    const busyUsage = process.cpuUsage(busyStart);
    const busyCores = (busyUsage.user + busyUsage.system) / 1000 / (performance.now() - busyStarted);

    const cancelSent = performance.now();
    const answer = await send('POST', `/api/runs/${submitted.id}/cancel`);
    const answered_ms = performance.now() - cancelSent;
    const eventPromise = stream.waitFor((data) => data.status === 'cancelled');
    // idle: under 0.1 core over the last 100 ms (four samples 25 ms apart), for at most 10 s
    const samples: { at_ms: number; cpu_us: number }[] = [];
    let idle_ms: number | null = null;
    while (performance.now() - cancelSent < 10_000) {
      const usage = process.cpuUsage();
      const now = performance.now();
      samples.push({ at_ms: now, cpu_us: usage.user + usage.system });
      const window = samples.find((sample) => now - sample.at_ms >= 100 && now - sample.at_ms < 150);
      if (window !== undefined && (samples[samples.length - 1].cpu_us - window.cpu_us) / 1000 / (now - window.at_ms) < 0.1) {
        idle_ms = window.at_ms - cancelSent;
        break;
      }
      await new Promise((resolve) => setTimeout(resolve, 25));
    }
    const cancelledEvent = await Promise.race([eventPromise, new Promise<null>((resolve) => setTimeout(() => resolve(null), 10_000))]);
    print({
      name: 'server-cancel',
      scenario: 'merrowdene-heat-plant',
      run: 'sweep of stackHeight_m over 20, 30, 40, 50 m, grid mode (200x200x25), cancelled during member 1',
      cpuCoresBeforeCancel: Number(busyCores.toFixed(2)),
      cancelAnswerStatus: answer.status,
      cancelAnswer_ms: Number(answered_ms.toFixed(1)),
      cancelledEvent_ms: cancelledEvent === null ? null : Number((cancelledEvent.at_ms - cancelSent).toFixed(1)),
      cpuIdle_ms: idle_ms === null ? null : Number(idle_ms.toFixed(1)),
      idleRule: 'process CPU (all threads) under 0.1 core over 100 ms, sampled every 25 ms; the time is the start of that window',
      runsRunningAfter: running(),
      loadAverage1min: Number(loadavg()[0].toFixed(1)),
    });
  } finally {
    stream.close();
  }
}

async function readsDuringRuns(base: string, send: Send): Promise<void> {
  {
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
  }
}

await main();
