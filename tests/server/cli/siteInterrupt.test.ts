/**
 * Ctrl-C during `plumeplan site`'s adjoint solves, in a child process (the real command line, bin/
 * plumeplan.mjs): the command exits with 130 (128 + SIGINT, the shell convention), says it was
 * interrupted, prints no stack trace, reports no further work after the signal, and leaves no siting
 * folder behind that could pass for a result.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const repoRoot = path.join(import.meta.dirname, '..', '..', '..');
const DEMO = path.join(repoRoot, 'scenarios', 'merrowdene-heat-plant', 'scenario.json');
const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-site-interrupt-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe('plumeplan site and Ctrl-C', () => {
  it('SIGINT during the adjoint solves: exit 130, "interrupted", no stack trace, no results written', async () => {
    // The demo on its own 50 m grid: each adjoint solve takes seconds, long enough to be caught in one.
    const scenario = JSON.parse(readFileSync(DEMO, 'utf8'));
    delete scenario.$schema;
    const scenarioFile = path.join(scratch, 'scenario.json');
    writeFileSync(scenarioFile, JSON.stringify(scenario));
    const out = path.join(scratch, 'out');
    const child = spawn(process.execPath, ['bin/plumeplan.mjs', 'site', scenarioFile, '--out', out, '--mode', 'grid', '--forward-runs', '0'], { cwd: repoRoot });
    let stderr = '';
    let stdout = '';
    let sent = false;
    let atSignal = 0;
    child.stdout.on('data', (chunk) => (stdout += chunk));
    child.stderr.on('data', (chunk) => {
      stderr += chunk;
      // progress lines name the solve under way; interrupt inside the first adjoint solve
      if (!sent && /adjoint of/.test(stderr)) {
        sent = true;
        atSignal = stderr.length;
        child.kill('SIGINT');
      }
    });
    const [code, signal] = await new Promise<[number | null, NodeJS.Signals | null]>((resolve) => child.on('exit', (c, s) => resolve([c, s])));
    expect(sent, `no adjoint progress seen; stderr: ${stderr}`).toBe(true);
    expect(signal).toBeNull(); // it exited by itself, not killed by the signal
    expect(code).toBe(130);
    expect(stderr).toMatch(/plumeplan site: interrupted; no results written/);
    expect(stderr).not.toMatch(/\n\s+at \S+/); // no stack trace
    expect(stdout).not.toMatch(/Results written/);
    // it stopped there: no more work reported after the signal (at most one progress line already on its
    // way), where an in-process solve would have gone on reporting its sweeps until it finished
    const after = stderr.slice(atSignal).split('\n').filter((line) => line.trim() !== '' && !/interrupted; no results written/.test(line));
    expect(after.length, after.join('\n')).toBeLessThanOrEqual(1);
    expect(existsSync(path.join(out, 'siting.json'))).toBe(false);
    expect(existsSync(out)).toBe(false);
  }, 240_000);
});
