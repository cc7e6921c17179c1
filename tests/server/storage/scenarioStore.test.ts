/**
 * The scenario store: revisions accumulate, stale saves are refused and change nothing, deletes are
 * recoverable, checksums ignore key order.
 */
import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../../server/storage/database.ts';
import { NotFoundError, ScenarioStore, StaleRevisionError } from '../../../server/storage/scenarioStore.ts';

function store(): ScenarioStore {
  return new ScenarioStore(openDatabase(':memory:'));
}

describe('ScenarioStore', () => {
  it('adds a revision per save and keeps the earlier ones', () => {
    const scenarios = store();
    const { id } = scenarios.create({ v: 1 }, 'one');
    scenarios.save(id, { v: 2 }, 'two', 1);
    scenarios.save(id, { v: 3 }, 'three', 2);
    expect(scenarios.get(id)).toMatchObject({ revision: 3, name: 'three' });
    expect(scenarios.revisions(id).map((revision) => revision.revision)).toEqual([3, 2, 1]);
    expect(scenarios.revision(id, 1).scenario).toEqual({ v: 1 });
  });

  it('refuses a save based on a stale revision and changes nothing', () => {
    const scenarios = store();
    const { id } = scenarios.create({ v: 1 }, 'one');
    scenarios.save(id, { v: 2 }, 'two', 1);
    expect(() => scenarios.save(id, { v: 'lost?' }, 'stale', 1)).toThrow(StaleRevisionError);
    expect(scenarios.revisions(id)).toHaveLength(2);
    expect(scenarios.revision(id).scenario).toEqual({ v: 2 });
  });

  it('gives the same checksum whatever the key order, another for other content', () => {
    const scenarios = store();
    const a = scenarios.revision(scenarios.create({ x: 1, y: { b: 2, a: 1 } }, 'a').id);
    const b = scenarios.revision(scenarios.create({ y: { a: 1, b: 2 }, x: 1 }, 'b').id);
    const c = scenarios.revision(scenarios.create({ y: { a: 1, b: 3 }, x: 1 }, 'c').id);
    expect(a.checksum).toBe(b.checksum);
    expect(a.checksum).not.toBe(c.checksum);
  });

  it('deletes recoverably', () => {
    const scenarios = store();
    const { id } = scenarios.create({ v: 1 }, 'one');
    scenarios.delete(id);
    expect(() => scenarios.get(id)).toThrow(NotFoundError);
    expect(() => scenarios.save(id, { v: 2 }, 'two', 1)).toThrow(NotFoundError);
    expect(scenarios.list({ limit: 10, offset: 0 }).total).toBe(0);
    expect(scenarios.list({ limit: 10, offset: 0, deleted: true }).total).toBe(1);
    scenarios.restore(id);
    expect(scenarios.get(id).revision).toBe(1);
  });
});
