/**
 * The run store: status changes only along allowed paths (a late "done" cannot revive a cancelled
 * run), result rows commit with the status, and a restart marks unfinished runs interrupted.
 */
import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../../server/storage/database.ts';
import { RunStore } from '../../../server/storage/runStore.ts';
import { ScenarioStore } from '../../../server/storage/scenarioStore.ts';

function setUp(): { runs: RunStore; newRun: () => string } {
  const db = openDatabase(':memory:');
  const scenarios = new ScenarioStore(db);
  const runs = new RunStore(db);
  const scenario = scenarios.create({ v: 1 }, 'one');
  const revision = scenarios.revision(scenario.id);
  const newRun = (): string =>
    runs.insert({ scenarioId: scenario.id, revision: 1, checksum: revision.checksum, kind: 'scenario', options: { mode: 'grid' }, dedupeKey: 'k', client: 'c' }).id;
  return { runs, newRun };
}

const FILE = { name: 'summary.json', contentType: 'application/json', bytes: 2, sha256: 'ab' };

describe('RunStore', () => {
  it('moves queued -> running -> done with its result files', () => {
    const { runs, newRun } = setUp();
    const id = newRun();
    expect(runs.get(id)?.status).toBe('queued');
    expect(runs.markRunning(id)).toBe(true);
    runs.updateProgress(id, 0.5, 'half');
    expect(runs.get(id)).toMatchObject({ status: 'running', progress: 0.5, message: 'half' });
    expect(runs.markDone(id, [FILE])).toBe(true);
    expect(runs.get(id)).toMatchObject({ status: 'done', progress: 1, results: [FILE] });
    expect(runs.findReusable('k')?.id).toBe(id);
  });

  it('does not let a late ending revive a cancelled run, nor record its files', () => {
    const { runs, newRun } = setUp();
    const id = newRun();
    runs.markRunning(id);
    expect(runs.markCancelled(id)).toBe(true);
    expect(runs.markDone(id, [FILE])).toBe(false);
    expect(runs.markFailed(id, { error: 'late', field: null })).toBe(false);
    expect(runs.get(id)).toMatchObject({ status: 'cancelled', results: [] });
    expect(runs.findReusable('k')).toBeUndefined();
  });

  it('marks queued and running runs interrupted, and leaves finished ones alone', () => {
    const { runs, newRun } = setUp();
    const queued = newRun();
    const running = newRun();
    const done = newRun();
    runs.markRunning(running);
    runs.markRunning(done);
    runs.markDone(done, []);
    expect(runs.countActive('c')).toBe(2);
    expect(runs.interruptUnfinished().sort()).toEqual([queued, running].sort());
    expect(runs.get(queued)?.status).toBe('interrupted');
    expect(runs.get(running)?.status).toBe('interrupted');
    expect(runs.get(done)?.status).toBe('done');
    expect(runs.countActive('c')).toBe(0);
  });
});
