/**
 * The worker-thread executor: runs beyond its capacity wait in order, a queued run cancelled never
 * starts, a run whose input cannot be used fails naming the field, and results come back as files.
 */
import { afterEach, describe, expect, it } from 'vitest';
import type { RunEvent, RunJob } from '../../../server/jobs/runExecutor.ts';
import { WorkerPoolExecutor } from '../../../server/jobs/workerPoolExecutor.ts';
import { smallScenario } from '../serverFixture.ts';

let executor: WorkerPoolExecutor | null = null;
afterEach(async () => {
  await executor?.close();
  executor = null;
});

function job(id: string, scenario: unknown = smallScenario(), mode = 'gaussian'): RunJob {
  return { id, kind: 'scenario', scenario, options: { mode } };
}

describe('WorkerPoolExecutor', () => {
  it('queues beyond its capacity, runs in order, and cancels a queued run without starting it', async () => {
    executor = new WorkerPoolExecutor({ capacity: 1 });
    const log: string[] = [];
    const endings = new Map<string, RunEvent>();
    const finished = (id: string): Promise<RunEvent> =>
      new Promise((resolve) => {
        const check = (): void => {
          const ending = endings.get(id);
          if (ending !== undefined) resolve(ending);
          else setTimeout(check, 20);
        };
        check();
      });
    const listen = (id: string) => (event: RunEvent): void => {
      if (event.type !== 'progress') log.push(`${id} ${event.type}`);
      if (event.type === 'done' || event.type === 'failed' || event.type === 'cancelled') endings.set(id, event);
    };
    executor.submit(job('a'), listen('a'));
    executor.submit(job('b'), listen('b'));
    executor.submit(job('c'), listen('c'));
    expect(executor.activity()).toEqual({ running: 1, queued: 2, capacity: 1 });
    expect(executor.cancel('c')).toBe(true);
    expect(endings.get('c')).toEqual({ type: 'cancelled' });

    const a = await finished('a');
    const b = await finished('b');
    expect(a.type).toBe('done');
    expect(b.type).toBe('done');
    expect(log).toEqual(['a started', 'c cancelled', 'a done', 'b started', 'b done']);
    const names = (a as Extract<RunEvent, { type: 'done' }>).files.map((file) => file.name).sort();
    expect(names).toEqual(['footprint.geojson', 'ground-field.bin', 'receptors.csv', 'summary.json']);
    expect(executor.cancel('a')).toBe(false);
  });

  it('fails a run whose scenario does not pass the format, naming the field', async () => {
    executor = new WorkerPoolExecutor({ capacity: 1 });
    const bad = smallScenario();
    (bad.sources as { emission_g_s: number }[])[0].emission_g_s = -5;
    const ending = await new Promise<RunEvent>((resolve) =>
      executor!.submit(job('bad', bad), (event) => {
        if (event.type === 'failed' || event.type === 'done') resolve(event);
      }),
    );
    expect(ending).toMatchObject({ type: 'failed', error: { field: 'scenario.sources[0].emission_g_s' } });
  });
});
