/** The result folder: the three files (and extra ones) written where asked, consistent with each other. */
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { writeResultFolder } from '../../../server/writers/writeResultFolder.ts';
import { windRoseFromHours } from '../../../solver/meteorology/windRoseTable.ts';
import { makeTestGrid, makeTestRunResult, makeTestScenario } from './helpers.ts';

const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-results-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

const scenario = makeTestScenario();
const grid = makeTestGrid({ site: scenario.site, nx: 10, ny: 10, spacing_m: 100, xWest_m: -500, ySouth_m: -500 });

describe('writeResultFolder', () => {
  it('creates the folder and writes summary.json, receptors.csv, footprint.geojson and the wind rose it is given', async () => {
    const directory = path.join(scratch, 'nested', 'run-1');
    const rose = windRoseFromHours([{ windFrom_deg: 250, windSpeed_m_s: 4, stability: 'D' }] as never);
    const result = makeTestRunResult(grid, { windRose: { table: rose, caption: 'One test hour' } });
    const written = await writeResultFolder(directory, scenario, result, { levels_ug_m3: [1, 5, 10], outputs: 'core' });
    expect(written.files).toEqual(['summary.json', 'receptors.csv', 'footprint.geojson', 'windrose.svg']);
    const summary = JSON.parse(readFileSync(path.join(directory, 'summary.json'), 'utf8'));
    const footprint = JSON.parse(readFileSync(path.join(directory, 'footprint.geojson'), 'utf8'));
    expect(summary.caution).toBe(SCREENING_CAUTION);
    expect(footprint.properties.caution).toBe(SCREENING_CAUTION);
    expect(summary.footprint.levels_ug_m3).toEqual([1, 5, 10]);
    expect(footprint.features.map((feature: { properties: { lower_ug_m3: number } }) => feature.properties.lower_ug_m3)).toEqual([1, 5, 10]);
    expect(readFileSync(path.join(directory, 'receptors.csv'), 'utf8').split('\r\n')).toHaveLength(4);
    const svg = readFileSync(path.join(directory, 'windrose.svg'), 'utf8');
    expect(svg).toMatch(/^<svg/);
    expect(svg).toContain('One test hour');
  });

  it('records the default levels it chose in both summary.json and footprint.geojson', async () => {
    const directory = path.join(scratch, 'run-2');
    const written = await writeResultFolder(directory, scenario, makeTestRunResult(grid));
    expect(written.footprint.properties.levelsChosen).toBe('default');
    expect(written.summary.footprint.levels_ug_m3).toEqual(written.footprint.properties.levels_ug_m3);
    // Field from 0 to 12.3: the seven 1-2-5 levels below the peak.
    expect(written.footprint.properties.levels_ug_m3).toEqual([0.1, 0.2, 0.5, 1, 2, 5, 10]);
  });

  it('a reused folder holds only this run\'s files: an earlier run\'s picture goes, the user\'s own files stay', async () => {
    const directory = path.join(scratch, 'reused');
    const rose = windRoseFromHours([{ windFrom_deg: 250, windSpeed_m_s: 4, stability: 'D' }] as never);
    // Core files only here: the pack's files come and go by the same list.
    await writeResultFolder(directory, scenario, makeTestRunResult(grid, { windRose: { table: rose, caption: 'series' } }), { outputs: 'core' });
    // The user's own files: one with a name the runs never write, and a folder.
    writeFileSync(path.join(directory, 'my-notes.txt'), 'keep me');
    mkdirSync(path.join(directory, 'maps'));
    const written = await writeResultFolder(directory, scenario, makeTestRunResult(grid), { outputs: 'core' });
    expect(written.removed).toEqual(['windrose.svg']);
    expect(existsSync(path.join(directory, 'windrose.svg'))).toBe(false);
    expect(readdirSync(directory).sort()).toEqual(['.plumeplan-files.json', 'footprint.geojson', 'maps', 'my-notes.txt', 'receptors.csv', 'summary.json']);
    expect(JSON.parse(readFileSync(path.join(directory, '.plumeplan-files.json'), 'utf8')).files).toEqual(['summary.json', 'receptors.csv', 'footprint.geojson']);
    // A list naming anything outside the folder, or a user file, removes nothing of those.
    writeFileSync(
      path.join(directory, '.plumeplan-files.json'),
      JSON.stringify({ format: 'plumeplan.result-files/1', files: ['../outside.txt', 'maps', 'summary.json'] }),
    );
    writeFileSync(path.join(scratch, 'outside.txt'), 'not ours');
    const again = await writeResultFolder(directory, scenario, makeTestRunResult(grid), { outputs: 'core' });
    expect(again.removed).toEqual([]);
    expect(existsSync(path.join(scratch, 'outside.txt'))).toBe(true);
    expect(existsSync(path.join(directory, 'maps'))).toBe(true);
  });

  it('writes the consultation pack beside them by default, and leaves out map.png and report.pdf when quick', async () => {
    const full = await writeResultFolder(path.join(scratch, 'full'), scenario, makeTestRunResult(grid));
    expect(full.files).toEqual([
      'summary.json',
      'receptors.csv',
      'footprint.geojson',
      'receptors-with-caution.csv',
      'ground.tif',
      'map.svg',
      'map.png',
      'report.html',
      'report.pdf',
      'plumeplan-run.zip',
    ]);
    const tif = readFileSync(path.join(scratch, 'full', 'ground.tif'));
    expect(tif.subarray(0, 4)).toEqual(Buffer.from([0x4d, 0x4d, 0x00, 0x2a])); // big-endian TIFF
    const png = readFileSync(path.join(scratch, 'full', 'map.png'));
    expect(png.subarray(1, 4).toString('latin1')).toBe('PNG');
    expect(readFileSync(path.join(scratch, 'full', 'map.svg'), 'utf8')).toContain(SCREENING_CAUTION.slice(0, 40));
    // The same folder again, quick: the rendered files of the full run are removed by the folder's list.
    const quick = await writeResultFolder(path.join(scratch, 'full'), scenario, makeTestRunResult(grid), { outputs: 'quick' });
    expect(quick.files).toEqual(['summary.json', 'receptors.csv', 'footprint.geojson', 'receptors-with-caution.csv', 'ground.tif', 'map.svg', 'report.html', 'plumeplan-run.zip']);
    expect(quick.removed).toEqual(['map.png', 'report.pdf']);
  });

  it('refuses a path that is a file', async () => {
    const file = path.join(scratch, 'a-file');
    writeFileSync(file, 'x');
    await expect(writeResultFolder(file, scenario, makeTestRunResult(grid))).rejects.toThrow(/exists and is not a folder/);
  });
});
