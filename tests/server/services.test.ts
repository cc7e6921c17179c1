/**
 * The demo scenarios go into an empty database only, self-contained (the year's CSV put inline), and
 * each passes the format as stored.
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../scenarios/format/schema.ts';
import { openDatabase } from '../../server/storage/database.ts';
import { ScenarioStore } from '../../server/storage/scenarioStore.ts';
import { loadDemoScenarios } from '../../server/services.ts';

describe('loadDemoScenarios', () => {
  it('loads every demo into an empty database, inline, and nothing into one that has scenarios', async () => {
    const scenarios = new ScenarioStore(openDatabase(':memory:'));
    const loaded = await loadDemoScenarios(scenarios);
    expect(loaded.length).toBeGreaterThanOrEqual(2);
    const page = scenarios.list({ limit: 20, offset: 0 });
    for (const item of page.items) {
      const stored = scenarios.revision(item.id).scenario as { weather: { csv?: string; hours?: unknown[] }; $schema?: string };
      expect(stored.$schema).toBeUndefined();
      expect(stored.weather.csv).toBeUndefined();
      expect(parseScenario(stored).ok).toBe(true);
    }
    const year = page.items.find((item) => item.name.includes('year'));
    expect((scenarios.revision(year!.id).scenario as { weather: { hours: unknown[] } }).weather.hours).toHaveLength(8760);
    expect(await loadDemoScenarios(scenarios)).toEqual([]);
    expect(scenarios.count()).toBe(loaded.length);
  });
});
