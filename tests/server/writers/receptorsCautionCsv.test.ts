/**
 * receptors-with-caution.csv: comment lines carrying the caution and the provenance, then exactly the
 * machine-clean receptors.csv; a reader that skips "#" lines gets the same table.
 */
import { describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { buildReceptorsCautionCsv } from '../../../server/writers/receptorsCautionCsv.ts';
import { buildReceptorsCsv } from '../../../server/writers/receptorsCsv.ts';
import { makeTestGrid, makeTestRunResult, makeTestScenario } from './helpers.ts';

const scenario = makeTestScenario(['Elm House,\nwest wing', 'Care home']);
const grid = makeTestGrid({ site: scenario.site, nx: 10, ny: 10, spacing_m: 100, xWest_m: -500, ySouth_m: -500 });
const provenance = { version: '0.1.0', scenarioSha256: 'ef'.repeat(32), runDate: '2026-12-02T03:00:00Z', command: 'plumeplan run s.json --out o' };

describe('receptors-with-caution.csv', () => {
  const text = buildReceptorsCautionCsv(scenario, makeTestRunResult(grid), provenance);
  const lines = text.split('\r\n');
  const comments = lines.filter((line) => line.startsWith('# '));

  it('starts with comment lines that hold the whole caution, the units and the provenance', () => {
    expect(lines[0].startsWith('# CAUTION: Screening estimate only.')).toBe(true);
    const joined = comments.map((line) => line.slice(2)).join(' ');
    expect(joined).toContain(`CAUTION: ${SCREENING_CAUTION}`);
    expect(joined).toContain('ug/m3');
    expect(joined).toContain('ef'.repeat(32));
    // The caution is wrapped for reading (about 100 characters a line).
    const cautionLines = comments.slice(0, comments.findIndex((line) => line.startsWith('# Scenario:')));
    expect(cautionLines.length).toBeGreaterThan(2);
    expect(Math.max(...cautionLines.map((line) => line.length))).toBeLessThanOrEqual(104);
  });

  it('is receptors.csv exactly once the comment lines are skipped', () => {
    const body = text.slice(comments.reduce((length, line) => length + line.length + 2, 0));
    expect(body).toBe(buildReceptorsCsv(scenario, makeTestRunResult(grid)));
    expect(body.startsWith('id,name,lat,lon')).toBe(true);
  });
});
