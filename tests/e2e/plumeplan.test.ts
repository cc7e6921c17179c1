/**
 * End to end: the installed command (`node bin/plumeplan.mjs`, what `npx plumeplan` runs) on the demo
 * scenario in Gaussian and grid mode, on two days of the demo year (solved in the thread pool) and
 * interrupted during the year, and its exit codes for help, bad options and a scenario with an error.
 */
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../server/writers/caution.ts';

const ROOT = path.join(import.meta.dirname, '..', '..');
const BIN = path.join(ROOT, 'bin', 'plumeplan.mjs');
const DEMO = path.join(ROOT, 'scenarios', 'merrowdene-heat-plant', 'scenario.json');
const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-e2e-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

function plumeplan(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(process.execPath, [BIN, ...args], {
    cwd: ROOT,
    encoding: 'utf8',
    env: { ...process.env, PLUMEPLAN_DEBUG: '' },
  });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

/** A minimal RFC 4180 line split; the demo's names hold no quotes or line breaks. */
function csvRows(text: string): string[][] {
  return text
    .split('\r\n')
    .filter((line) => line !== '')
    .map((line) => line.split(','));
}

describe('plumeplan run on the demo scenario, Gaussian mode', () => {
  const out = path.join(scratch, 'merrowdene');
  const scenario = JSON.parse(readFileSync(DEMO, 'utf8'));
  let run: ReturnType<typeof plumeplan>;
  beforeAll(() => {
    run = plumeplan('run', DEMO, '--out', out, '--mode', 'gaussian');
  }, 300_000);

  it('exits 0 and says where the results went and what the peak is', () => {
    // stderr carries nothing but progress lines (shown only when a run takes over a second, which
    // depends on the machine's load, so their presence is not asserted either way)
    const otherLines = run.stderr.split(/[\r\n]+/).filter((line) => line.trim() !== '' && !/^\s*\d+%\s/.test(line));
    expect(otherLines).toEqual([]);
    expect(run.status).toBe(0);
    expect(run.stdout).toContain(`Results written to ${out}: summary.json, receptors.csv, footprint.geojson`);
    // The demo gives a site boundary: the headline peak is the one off the site.
    expect(run.stdout).toMatch(/Peak ground-level concentration off the site: \d/);
  });

  it('writes the three files, each parsing, summary and footprint carrying the caution', () => {
    for (const name of ['summary.json', 'receptors.csv', 'footprint.geojson']) expect(existsSync(path.join(out, name)), name).toBe(true);
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    const footprint = JSON.parse(readFileSync(path.join(out, 'footprint.geojson'), 'utf8'));
    expect(summary.format).toBe('plumeplan.result/1');
    expect(summary.mode).toBe('gaussian');
    expect(summary.caution).toBe(SCREENING_CAUTION);
    expect(footprint.type).toBe('FeatureCollection');
    expect(footprint.properties.caution).toBe(SCREENING_CAUTION);
    expect(footprint.features.length).toBeGreaterThan(0);
    expect(summary.grid).toMatchObject({ nx: 200, ny: 200, nz: 25, spacing_m: 50 });
    expect(summary.peak.concentration_ug_m3).toBeGreaterThan(0);
    // The top band's lower level lies below the field's maximum (on the site, in the demo: the footprint
    // covers the whole ground), so that maximum sits in the footprint; the headline peak is off the site.
    const top = footprint.features[footprint.features.length - 1];
    expect(top.properties.upper_ug_m3).toBeNull();
    expect(summary.peak.onSite.concentration_ug_m3).toBeGreaterThan(summary.peak.concentration_ug_m3);
    expect(top.properties.lower_ug_m3).toBeLessThan(summary.peak.onSite.concentration_ug_m3);
    expect(footprint.properties.peak_ug_m3).toBe(summary.peak.concentration_ug_m3);
    // Every source reports its effective height, the stack above its 32 m (plume rise on).
    const stack = summary.sources.find((source: { id: string }) => source.id === 'boiler-stack');
    expect(stack.effectiveHeight_m).toBeGreaterThan(32);
  });

  it('has one receptor row per scenario receptor, in order, with positive concentrations', () => {
    const rows = csvRows(readFileSync(path.join(out, 'receptors.csv'), 'utf8'));
    expect(rows[0]).toEqual(['id', 'name', 'lat', 'lon', 'x_m', 'y_m', 'height_m', 'concentration_ug_m3']);
    const receptors = scenario.receptors as { id: string; name: string; lat: number; lon: number }[];
    expect(rows.slice(1).map((row) => [row[0], row[1], Number(row[2]), Number(row[3])])).toEqual(
      receptors.map((receptor) => [receptor.id, receptor.name, receptor.lat, receptor.lon]),
    );
    for (const row of rows.slice(1)) expect(Number(row[7])).toBeGreaterThan(0);
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    expect(summary.receptors.map((receptor: { id: string }) => receptor.id)).toEqual(receptors.map((receptor) => receptor.id));
    // summary.json and receptors.csv give the same figure for each receptor.
    expect(summary.receptors.map((receptor: { concentration_ug_m3: number }) => receptor.concentration_ug_m3)).toEqual(
      rows.slice(1).map((row) => Number(row[7])),
    );
  });
});

describe('plumeplan run without --mode: grid mode by default', () => {
  it('solves on the grid and writes a mass budget (a smaller copy of the demo, 40 x 40 x 10 cells)', { timeout: 300_000 }, () => {
    const scenario = JSON.parse(readFileSync(DEMO, 'utf8'));
    delete scenario.$schema;
    scenario.domain = { halfWidth_m: 3000, spacing_m: 150, height_m: 1000, layers: 10 };
    const file = path.join(scratch, 'small.scenario.json');
    writeFileSync(file, JSON.stringify(scenario, null, 2));
    const out = path.join(scratch, 'small-grid');
    const run = plumeplan('run', file, '--out', out);
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('grid mode, steady weather, grid 40 x 40 x 10 at 150 m');
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    expect(summary.mode).toBe('grid');
    expect(Object.keys(summary.massBudget_g).sort()).toEqual(
      ['basis', 'decayed', 'dryDeposited', 'emitted', 'inDomain', 'outflow', 'relativeImbalance', 'washedOut'],
    );
    expect(summary.run.steps).toBeGreaterThan(0);
    expect(summary.peak.concentration_ug_m3).toBeGreaterThan(0);
  });
});

describe('plumeplan run on an hourly series in grid mode (the solver thread pool)', () => {
  const YEAR = path.join(ROOT, 'scenarios', 'merrowdene-heat-plant-year', 'scenario.json');

  it('solves the first two days of the demo year hour by hour and gives the in-process statistics', async () => {
    const scenario = JSON.parse(readFileSync(YEAR, 'utf8'));
    delete scenario.$schema;
    const csv = readFileSync(path.join(path.dirname(YEAR), scenario.weather.csv), 'utf8').split('\n');
    writeFileSync(path.join(scratch, 'two-days.csv'), csv.slice(0, 1 + 48).join('\n') + '\n');
    scenario.weather = { kind: 'hourly', csv: 'two-days.csv' };
    scenario.domain = { halfWidth_m: 3000, spacing_m: 150, height_m: 1000, layers: 12 };
    const file = path.join(scratch, 'two-days.scenario.json');
    writeFileSync(file, JSON.stringify(scenario, null, 2));
    const out = path.join(scratch, 'two-days');
    const run = plumeplan('run', file, '--out', out);
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toContain('grid mode, hourly series, grid 40 x 40 x 12 at 150 m');
    expect(existsSync(path.join(out, 'windrose.svg'))).toBe(true);
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    expect(summary.series.solves).toBeGreaterThan(10);
    // The same series in process, one solver: the statistics agree to the series tolerance.
    const { loadScenarioFile } = await import('../../server/scenarioFiles/load.ts');
    const { runScenario } = await import('../../solver/drivers/runScenario.ts');
    const loaded = await loadScenarioFile(file);
    if (!loaded.ok) throw new Error('the two-day scenario does not load');
    const direct = await runScenario(loaded.scenario);
    const rows = csvRows(readFileSync(path.join(out, 'receptors.csv'), 'utf8'));
    const meanColumn = rows[0].indexOf('mean_ug_m3');
    const directMeans = direct.receptorColumns.find((c) => c.key === 'mean_ug_m3')!.values;
    expect(rows.length - 1).toBe(directMeans.length);
    for (let r = 0; r < directMeans.length; r++) {
      // receptors.csv rounds to 3 significant figures
      expect(Math.abs(Number(rows[r + 1][meanColumn]) - directMeans[r]) / directMeans[r]).toBeLessThan(5e-3);
    }
    // The run writes the consultation pack too (GeoTIFF, figures, report, zip). It took 60.5 s and 67 s on
    // a loaded machine: the limit is generous (a slow machine slows the test, never fails it).
  }, 600_000);

  it('Ctrl-C (SIGINT) during the demo year stops the pool at once: exit 130, nothing written', async () => {
    const out = path.join(scratch, 'interrupted-year');
    const child = spawn(process.execPath, [BIN, 'run', YEAR, '--out', out], { cwd: ROOT, env: { ...process.env, PLUMEPLAN_DEBUG: '' } });
    let stderr = '';
    child.stderr.setEncoding('utf8');
    // interrupt once the solves are under way (the first progress line about distinct solves)
    child.stderr.on('data', (chunk: string) => {
      stderr += chunk;
      if (/distinct solves/.test(stderr) && child.exitCode === null && !child.killed) child.kill('SIGINT');
    });
    const code = await new Promise<number | null>((resolve) => child.on('exit', (status) => resolve(status)));
    expect(code, stderr).toBe(130);
    expect(stderr).toContain('interrupted; no results written');
    expect(existsSync(path.join(out, 'summary.json'))).toBe(false);
  }, 300_000);
});

describe('plumeplan exit codes', () => {
  it.each([[['--help']], [['run', '--help']], [['validate', '--help']], [['run', '-h']], [['validate', '-h']]])(
    '%j exits 0 with a usage',
    (argv) => {
      const run = plumeplan(...argv);
      expect(run.status).toBe(0);
      expect(run.stdout).toMatch(/usage:/);
    },
  );

  it('a bad --levels exits 2 and names --levels', () => {
    const run = plumeplan('run', DEMO, '--out', path.join(scratch, 'never'), '--levels', '5,2');
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/--levels: 2 does not exceed 5/);
    expect(existsSync(path.join(scratch, 'never'))).toBe(false);
  });

  it('a scenario with an error exits 2 and names the field', () => {
    const scenario = JSON.parse(readFileSync(DEMO, 'utf8'));
    delete scenario.$schema;
    scenario.receptors[1].lat = 'north of the church';
    const file = path.join(scratch, 'bad.scenario.json');
    writeFileSync(file, JSON.stringify(scenario, null, 2));
    const run = plumeplan('run', file, '--out', path.join(scratch, 'bad-out'), '--mode', 'gaussian');
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/receptors\[1\]\.lat/);
    expect(existsSync(path.join(scratch, 'bad-out'))).toBe(false);
    const validate = plumeplan('validate', file);
    expect(validate.status).toBe(2);
    expect(validate.stderr).toMatch(/receptors\[1\]\.lat/);
  });

  it('validate accepts the demo', () => {
    const run = plumeplan('validate', DEMO);
    expect(run.status).toBe(0);
  });

  it('an unknown command exits 2 with the usage', () => {
    const run = plumeplan('simulate', DEMO);
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/unknown command "simulate"/);
  });
});
