/**
 * The server as a process (server/main.ts in a child process; demo loading is tested in-process in
 * services.test.ts): it prints its URL and serves; killed
 * with SIGKILL during a save or during a run, it restarts with every acknowledged save intact (revision
 * count and content), the run marked interrupted and the database passing `PRAGMA integrity_check`;
 * SIGTERM stops it gracefully.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { smallScenario, waitFor } from './serverFixture.ts';

const MAIN = new URL('../../server/main.ts', import.meta.url).pathname;
const REPOSITORY = new URL('../../', import.meta.url).pathname;

interface Child {
  process: ChildProcess;
  url: string;
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

async function startServer(dataDir: string, env: Record<string, string> = {}): Promise<Child> {
  const child = spawn(process.execPath, ['--import', 'tsx', MAIN], {
    cwd: REPOSITORY,
    env: { ...process.env, PORT: '0', HOST: '127.0.0.1', PLUMEPLAN_DATA: dataDir, PLUMEPLAN_DEMOS: 'off', PLUMEPLAN_LOG_LEVEL: 'warn', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.on('exit', (code, signal) => resolve({ code, signal })));
  let output = '';
  const url = await new Promise<string>((resolve, reject) => {
    child.stdout?.setEncoding('utf8');
    child.stdout?.on('data', (chunk: string) => {
      output += chunk;
      const match = /plumeplan server: (http:\/\/\S+\/)/.exec(output);
      if (match) resolve(match[1]);
    });
    child.stderr?.on('data', (chunk: Buffer) => (output += chunk.toString()));
    void exited.then(() => reject(new Error(`server exited before listening:\n${output}`)));
  });
  return { process: child, url, exited };
}

async function api(child: Child, method: string, route: string, body?: unknown): Promise<{ status: number; body: any }> {
  const response = await fetch(new URL(route, child.url), {
    method,
    headers: body === undefined ? {} : { 'Content-Type': 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  return { status: response.status, body: await response.json() };
}

function integrityCheck(dataDir: string): string {
  const db = new Database(path.join(dataDir, 'plumeplan.sqlite'));
  try {
    return db.pragma('integrity_check', { simple: true }) as string;
  } finally {
    db.close();
  }
}

let dataDir: string;
let children: Child[] = [];
beforeEach(() => {
  dataDir = mkdtempSync(path.join(tmpdir(), 'plumeplan-main-'));
  children = [];
});
afterEach(async () => {
  for (const child of children) if (child.process.exitCode === null && child.process.signalCode === null) child.process.kill('SIGKILL');
  await Promise.all(children.map((child) => child.exited));
  rmSync(dataDir, { recursive: true, force: true });
});

async function started(env: Record<string, string> = {}): Promise<Child> {
  const child = await startServer(dataDir, env);
  children.push(child);
  return child;
}

describe('server/main.ts', () => {
  it('keeps every acknowledged save and marks the run interrupted through a SIGKILL during a save and a run; stops gracefully on SIGTERM', async () => {
    const first = await started();
    expect(first.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
    // A run that computes for a while, so the kill finds it running.
    const slow = smallScenario({ name: 'fine grid (invented)', domain: { halfWidth_m: 2500, spacing_m: 25, height_m: 1000, layers: 30 } });
    const running = await api(first, 'POST', '/api/scenarios', { scenario: slow });
    const accepted = await api(first, 'POST', '/api/runs', { scenarioId: running.body.id });
    expect(accepted.status).toBe(202);
    await waitFor(async () => ((await api(first, 'GET', `/api/runs/${accepted.body.id}`)).body.status === 'running' ? true : undefined));

    const created = await api(first, 'POST', '/api/scenarios', { scenario: smallScenario({ name: 'save 1' }) });
    expect(created.status).toBe(201);
    const id = created.body.id as string;
    const acknowledged = new Map<number, string>([[1, 'save 1']]);
    let revision = 1;
    // Save after save, each based on the last acknowledged one; the last is in flight when the kill comes.
    for (let save = 2; save <= 12; save++) {
      const response = await api(first, 'PUT', `/api/scenarios/${id}`, { scenario: smallScenario({ name: `save ${save}` }), revision });
      expect(response.status).toBe(200);
      revision = response.body.revision;
      acknowledged.set(revision, `save ${save}`);
    }
    const inFlight = api(first, 'PUT', `/api/scenarios/${id}`, { scenario: smallScenario({ name: 'in flight' }), revision }).catch(() => null);
    first.process.kill('SIGKILL');
    expect((await first.exited).signal).toBe('SIGKILL');
    await inFlight;

    expect(integrityCheck(dataDir)).toBe('ok');
    const second = await started();
    const revisions = await api(second, 'GET', `/api/scenarios/${id}/revisions`);
    const numbers = (revisions.body.items as { revision: number }[]).map((item) => item.revision);
    // Every acknowledged revision is there; the one in flight may or may not have committed.
    expect(numbers.length === acknowledged.size || numbers.length === acknowledged.size + 1).toBe(true);
    for (const [number, name] of acknowledged) {
      const read = await api(second, 'GET', `/api/scenarios/${id}/revisions/${number}`);
      expect(read.status).toBe(200);
      expect(read.body.scenario).toEqual(smallScenario({ name }));
    }
    const killedRun = await api(second, 'GET', `/api/runs/${accepted.body.id}`);
    expect(killedRun.body).toMatchObject({ status: 'interrupted', results: [] });
    expect(killedRun.body.finishedAt).not.toBeNull();

    // An interrupted run is not reused: submitting again queues a new one. SIGTERM then stops the
    // server gracefully and marks that run interrupted too.
    const again = await api(second, 'POST', '/api/runs', { scenarioId: running.body.id });
    expect(again.status).toBe(202);
    expect(again.body.id).not.toBe(accepted.body.id);
    await waitFor(async () => ((await api(second, 'GET', `/api/runs/${again.body.id}`)).body.status === 'running' ? true : undefined));
    second.process.kill('SIGTERM');
    expect(await second.exited).toEqual({ code: 0, signal: null });
    expect(integrityCheck(dataDir)).toBe('ok');
    const db = new Database(path.join(dataDir, 'plumeplan.sqlite'), { readonly: true });
    const row = db.prepare('SELECT status FROM runs WHERE id = ?').get(again.body.id) as { status: string };
    db.close();
    expect(row.status).toBe('interrupted');
  });
});
