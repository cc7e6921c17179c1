/**
 * Behaviour checks of compare, sweep and stack-height in process: help (exit 0), usage errors naming the
 * option (exit 2), and small Gaussian runs writing their folders with the caution; run's --percent-of.
 * comparison.json's receptors follow the contract {id, a_ug_m3, b_ug_m3, delta_ug_m3, change_pct}.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { CommandIO } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';

const DEMO = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');
const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-assess-cli-'));
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

function smallDemo(change: (scenario: Record<string, any>) => void = () => {}): string {
  const scenario = JSON.parse(readFileSync(DEMO, 'utf8'));
  delete scenario.$schema;
  scenario.domain = { halfWidth_m: 3000, spacing_m: 200, height_m: 1000, layers: 10 };
  scenario.solver = { mode: 'gaussian' };
  scenario.assessment = { background_ug_m3: 14, libraryPollutant: 'NOx', standardSets: ['eu-2008-50-ec'] };
  change(scenario);
  const file = path.join(scratch, `scenario-${Math.random().toString(36).slice(2)}.json`);
  writeFileSync(file, JSON.stringify(scenario));
  return file;
}

describe('plumeplan compare, sweep, stack-height', () => {
  it('answers --help for each command and lists them at the top', async () => {
    for (const command of ['compare', 'sweep', 'stack-height']) {
      const c = capture();
      expect(await main([command, '--help'], c.io)).toBe(0);
      expect(c.stdout()).toMatch(new RegExp(`^usage: plumeplan ${command}`));
    }
    const top = capture();
    expect(await main(['--help'], top.io)).toBe(0);
    expect(top.stdout()).toMatch(/compare[\s\S]*sweep[\s\S]*stack-height/);
  });

  it('exits 2 naming the option for bad input', async () => {
    const cases: [string[], RegExp][] = [
      [['compare', 'a.json', '--out', 'x'], /two scenario files/],
      [['sweep', smallDemo(), '--parameter', 'nope', '--values', '1', '--out', 'x'], /--parameter: "nope"/],
      [['sweep', smallDemo(), '--parameter', 'stackHeight_m', '--values', '10,x', '--out', 'x'], /--values: entry 2/],
      [['stack-height', smallDemo(), '--out', 'x'], /--target UG_M3 or --target-percent/],
      [['stack-height', smallDemo(), '--out', path.join(scratch, 'sh-x'), '--target-percent', '1', '--standard', 'nothing'], /--standard: "nothing" is not an assessed standard/],
      [['sweep', smallDemo(), '--parameter', 'emission_g_s', '--values', '1', '--out', path.join(scratch, 'sw-x')], /name the source/],
      [['run', smallDemo(), '--out', path.join(scratch, 'r-x'), '--percent-of', 'nothing'], /--percent-of: "nothing"/],
    ];
    for (const [argv, message] of cases) {
      const c = capture();
      expect(await main(argv, c.io)).toBe(2);
      expect(c.stderr()).toMatch(message);
    }
  });

  it('compares a scenario with itself: identical, receptors with zero change, files with the caution', async () => {
    const file = smallDemo();
    const out = path.join(scratch, 'compare-self');
    const c = capture();
    expect(await main(['compare', file, file, '--out', out], c.io, {})).toBe(0);
    expect(c.stdout()).toMatch(/identical to A/);
    const json = JSON.parse(readFileSync(path.join(out, 'comparison.json'), 'utf8'));
    expect(json.identical).toBe(true);
    expect(json.caution).toBe(SCREENING_CAUTION);
    expect(Object.keys(json.receptors[0])).toEqual(['id', 'a_ug_m3', 'b_ug_m3', 'delta_ug_m3', 'change_pct']);
    expect(json.receptors.map((r: { delta_ug_m3: number }) => r.delta_ug_m3)).toEqual([0, 0, 0]);
    const difference = JSON.parse(readFileSync(path.join(out, 'difference.geojson'), 'utf8'));
    expect(difference.features).toEqual([]);
    expect(JSON.parse(readFileSync(path.join(out, 'a', 'summary.json'), 'utf8')).caution).toBe(SCREENING_CAUTION);
  });

  it('writes a difference footprint that GDAL reads (RFC 7946; Debian gdal-bin ogrinfo) when the stack rises', async () => {
    const out = path.join(scratch, 'compare-taller');
    const c = capture();
    const a = smallDemo();
    const b = smallDemo((s) => (s.sources[0].height_m = 50));
    expect(await main(['compare', a, b, '--out', out, '--levels', '0.5,1,2'], c.io, {})).toBe(0);
    const json = JSON.parse(readFileSync(path.join(out, 'comparison.json'), 'utf8'));
    expect(json.identical).toBe(false);
    expect(json.levels.areas.map((l: { level_ug_m3: number }) => l.level_ug_m3)).toEqual([0.5, 1, 2]);
    const difference = JSON.parse(readFileSync(path.join(out, 'difference.geojson'), 'utf8'));
    expect(difference.properties.caution).toBe(SCREENING_CAUTION);
    expect(difference.features.some((f: { properties: { change: string } }) => f.properties.change === 'decrease')).toBe(true);
    const ogr = execFileSync('ogrinfo', ['-ro', '-al', '-so', path.join(out, 'difference.geojson')], { encoding: 'utf8' });
    expect(ogr).toMatch(/using driver `GeoJSON' successful/);
    // Polygon and MultiPolygon bands together: GDAL reports the layer's geometry as "Unknown (any)"
    expect(ogr).toMatch(/Geometry: (Multi )?Polygon|Geometry: Unknown \(any\)/);
    expect(ogr).toMatch(/change: String/);
    expect(ogr).toMatch(/Feature Count: [1-9]/);
  });

  it('writes a sweep table, chart and JSON, and a stack height with its curve', async () => {
    const stack = smallDemo((s) => (s.sources = s.sources.slice(0, 1)));
    const sweepOut = path.join(scratch, 'sweep');
    const sweep = capture();
    expect(await main(['sweep', stack, '--parameter', 'stackHeight_m', '--values', '20,40', '--out', sweepOut], sweep.io)).toBe(0);
    const table = readFileSync(path.join(sweepOut, 'sweep.csv'), 'utf8').split('\r\n');
    expect(table[0]).toMatch(/^stackHeight_m,ground_max_ug_m3,fennick-row_ug_m3,school_ug_m3,care-home_ug_m3/);
    expect(table).toHaveLength(4);
    expect(readFileSync(path.join(sweepOut, 'sweep.svg'), 'utf8')).toContain('Screening estimate only');
    const shOut = path.join(scratch, 'stack-height');
    const sh = capture();
    expect(await main(['stack-height', stack, '--out', shOut, '--target', '5', '--min', '20', '--max', '80', '--tolerance', '2'], sh.io)).toBe(0);
    const result = JSON.parse(readFileSync(path.join(shOut, 'stack-height.json'), 'utf8'));
    expect(result.found).toBe(true);
    expect(result.bracket_m[1] - result.bracket_m[0]).toBeLessThanOrEqual(2);
    expect(result.caution).toBe(SCREENING_CAUTION);
    expect(sh.stdout()).toMatch(/^.*stack boiler-stack, target given: 5 ug\/m3/);
  });
});
