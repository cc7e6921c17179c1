/**
 * `plumeplan compare` with finished run folders in place of scenario files: read back, not solved again.
 * Checks: a run folder compared with itself differs by exactly zero (issue 10: a comparison with itself is
 * exactly zero); comparing the folders of two runs gives the same footprint level areas (at the 2
 * significant figures written) and the same receptor figures (at the 3 written) as comparing their
 * scenario files, whose figures are solved afresh; a folder that is not a run folder exits 2 naming the file.
 * Doubling every emission doubles every PC (linearity of the concentration equation in its source term), so
 * B = 2 A at every receptor, within the rounding of summary.json (3 significant figures).
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CommandIO } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { makePackScenario } from '../writers/packFixture.ts';

const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-compare-folders-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

function capture(): { io: CommandIO; stdout: () => string; stderr: () => string } {
  const out: string[] = [];
  const err: string[] = [];
  return {
    io: { stdout: { write: (t: string) => out.push(t) }, stderr: { write: (t: string) => err.push(t), isTTY: false }, env: {}, now: () => 0 },
    stdout: () => out.join(''),
    stderr: () => err.join(''),
  };
}

interface ComparisonFile {
  identical: boolean;
  receptors: { id: string; a_ug_m3: number; b_ug_m3: number; delta_ug_m3: number }[];
  levels: { areas: { level_ug_m3: number; a_m2: number; b_m2: number }[] };
  notes: string[];
  caution: string;
}
const readComparison = (folder: string): ComparisonFile => JSON.parse(readFileSync(path.join(folder, 'comparison.json'), 'utf8'));

const scenarioA = makePackScenario();
const scenarioB = { ...scenarioA, name: 'Pack test, emissions doubled (invented)', sources: scenarioA.sources.map((s) => ({ ...s, emission_g_s: 2 * s.emission_g_s })) };
const fileA = path.join(scratch, 'a.json');
const fileB = path.join(scratch, 'b.json');
const runA = path.join(scratch, 'run-a');
const runB = path.join(scratch, 'run-b');

beforeAll(async () => {
  writeFileSync(fileA, JSON.stringify(scenarioA));
  writeFileSync(fileB, JSON.stringify(scenarioB));
  for (const [file, out] of [[fileA, runA], [fileB, runB]]) {
    const c = capture();
    expect(await main(['run', file, '--out', out, '--quick', '--levels', '0.5,1,2,5'], c.io), c.stderr()).toBe(0);
  }
});

describe('plumeplan compare with run folders', () => {
  it('says in the usage how it tells a run folder from a scenario file', async () => {
    const c = capture();
    expect(await main(['compare', '--help'], c.io)).toBe(0);
    expect(c.stdout()).toMatch(/a path that is\s+a folder is taken as a run folder, anything else as a scenario file/);
  });

  it('a run folder compared with itself differs by exactly zero, and no run is written again', async () => {
    const out = path.join(scratch, 'self');
    const c = capture();
    expect(await main(['compare', runA, runA, '--out', out, '--levels', '0.5,1,2,5'], c.io), c.stderr()).toBe(0);
    const comparison = readComparison(out);
    expect(comparison.identical).toBe(true);
    for (const receptor of comparison.receptors) expect(receptor.delta_ug_m3).toBe(0);
    for (const level of comparison.levels.areas) expect(level.b_m2).toBe(level.a_m2);
    expect(comparison.notes.some((note) => /read back from the run folder/.test(note))).toBe(true);
    expect(comparison.caution).toBe(SCREENING_CAUTION);
    expect(existsSync(path.join(out, 'a'))).toBe(false);
    expect(existsSync(path.join(out, 'comparison-report.html'))).toBe(true);
  });

  it('two run folders give the figures their scenario files give, without solving', async () => {
    const fromFolders = path.join(scratch, 'folders');
    const fromFiles = path.join(scratch, 'files');
    const c1 = capture();
    expect(await main(['compare', runA, runB, '--out', fromFolders, '--levels', '0.5,1,2,5'], c1.io), c1.stderr()).toBe(0);
    expect(c1.stderr()).not.toMatch(/solve/i);
    const c2 = capture();
    expect(await main(['compare', fileA, fileB, '--out', fromFiles, '--levels', '0.5,1,2,5', '--mode', 'gaussian'], c2.io), c2.stderr()).toBe(0);
    const folders = readComparison(fromFolders);
    const files = readComparison(fromFiles);
    expect(folders.levels.areas).toEqual(files.levels.areas.map((level) => ({ ...level, change_m2: expect.any(Number), change_pct: expect.anything() })));
    folders.receptors.forEach((receptor, r) => {
      expect([receptor.id, receptor.a_ug_m3, receptor.b_ug_m3]).toEqual([files.receptors[r].id, files.receptors[r].a_ug_m3, files.receptors[r].b_ug_m3]);
      // linearity: B = 2 A, within summary.json's 3 significant figures: half a unit in A's third figure,
      // doubled, plus half a unit in B's
      const unit = (value: number): number => 10 ** (Math.floor(Math.log10(value)) - 2);
      expect(Math.abs(receptor.b_ug_m3 - 2 * receptor.a_ug_m3)).toBeLessThanOrEqual(unit(receptor.a_ug_m3) + 0.5 * unit(receptor.b_ug_m3) + 1e-12);
    });
  });

  it('a folder that is not a run folder exits 2 naming the missing file', async () => {
    const empty = path.join(scratch, 'empty');
    mkdirSync(empty);
    const c = capture();
    expect(await main(['compare', empty, runA, '--out', path.join(scratch, 'never')], c.io)).toBe(2);
    expect(c.stderr()).toMatch(/run folder .*empty: no readable summary\.json; give a folder written by "plumeplan run"/);
  });
});
