/**
 * Behaviour checks of `plumeplan site`, in process: help, a grid-mode siting of a coarse demo with a
 * candidate file and a site polygon (exit 0, the four files and the figure and report, what stdout says), an
 * hourly series with --quick (no PNG, no PDF), and input
 * errors (exit 2, the option or field named) and a capability not built (exit 1). Ctrl-C: siteInterrupt.test.ts.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { CommandIO } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import { solveSteady } from '../../../solver/drivers/solveSteady.ts';

const DEMO = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');
const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-site-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

function capture(): { io: CommandIO; stdout: () => string; stderr: () => string } {
  const out: string[] = [];
  const err: string[] = [];
  let time_ms = 0;
  return {
    io: { stdout: { write: (text: string) => out.push(text) }, stderr: { write: (text: string) => err.push(text), isTTY: false }, env: {}, now: () => (time_ms += 400) },
    stdout: () => out.join(''),
    stderr: () => err.join(''),
  };
}

function file(name: string, content: unknown): string {
  const where = path.join(scratch, name);
  writeFileSync(where, typeof content === 'string' ? content : JSON.stringify(content));
  return where;
}

/** The demo on a coarse grid (30 x 30 x 10 at 200 m): quick in grid mode. */
function coarseDemo(change: (scenario: Record<string, any>) => void = () => {}): string {
  const scenario = JSON.parse(readFileSync(DEMO, 'utf8'));
  delete scenario.$schema;
  scenario.domain = { halfWidth_m: 3000, spacing_m: 200, height_m: 1000, layers: 10 };
  change(scenario);
  return file(`scenario-${Math.random().toString(36).slice(2)}.json`, scenario);
}

const candidates = file('candidates.geojson', {
  type: 'FeatureCollection',
  features: [
    { type: 'Feature', id: 'yard-north', geometry: { type: 'Point', coordinates: [-2.2841, 54.063] }, properties: {} },
    { type: 'Feature', geometry: { type: 'Point', coordinates: [-2.29, 54.06] }, properties: { id: 'west-field' } },
  ],
});
const sitePolygon = file('site.geojson', {
  type: 'Feature',
  properties: {},
  geometry: { type: 'Polygon', coordinates: [[[-2.292, 54.058], [-2.278, 54.058], [-2.278, 54.065], [-2.292, 54.065], [-2.292, 54.058]]] },
});
const inProcess = { solve: solveSteady };

describe('plumeplan site', () => {
  it('--help prints the usage and exits 0; the top-level help names the command', async () => {
    const run = capture();
    expect(await main(['site', '--help'], run.io, inProcess)).toBe(0);
    expect(run.stdout()).toContain('usage: plumeplan site SCENARIO --out DIR');
    expect(run.stdout()).toMatch(/--quick +leave out the slow rendered files \(siting-map\.png, siting-report\.pdf\)/);
    const top = capture();
    expect(await main(['--help'], top.io)).toBe(0);
    expect(top.stdout()).toContain('plumeplan site SCENARIO');
  });

  it('sites the demo stack in grid mode: the four files, the best position, the candidates, the limits and the caution', async () => {
    const run = capture();
    const out = path.join(scratch, 'out-grid');
    const scenarioFile = coarseDemo();
    const code = await main(['site', scenarioFile, '--out', out, '--candidates', candidates, '--site-polygon', sitePolygon, '--spacing', '400', '--forward-runs', '3'], run.io, inProcess);
    expect(run.stderr()).not.toMatch(/invalid|failure/);
    expect(code).toBe(0);
    const written = ['siting.json', 'candidates.csv', 'siting-map.tif', 'siting.geojson', 'siting-map.svg', 'siting-map.png', 'siting-report.html', 'siting-report.pdf'];
    for (const name of written) expect(existsSync(path.join(out, name)), name).toBe(true);
    expect(readFileSync(path.join(out, 'siting-report.pdf')).subarray(0, 5).toString('ascii')).toBe('%PDF-');
    // the report's reproducibility block holds the command as typed
    expect(readFileSync(path.join(out, 'siting-report.html'), 'utf8')).toContain(`plumeplan site ${scenarioFile} --out ${out}`);
    const text = run.stdout();
    expect(text).toContain('siting-map.svg, siting-map.png, siting-report.html, siting-report.pdf');
    expect(text).toMatch(/grid mode, 3 adjoint solves/);
    expect(text).toMatch(/Best position \(site polygon/);
    expect(text).toMatch(/yard-north|west-field/);
    expect(text).toMatch(/Check: forward runs at 3 candidates agree with the map within [\d.]+ % of the largest PC/);
    expect(text).toMatch(/Holds only for: flat terrain/);
    expect(text).toMatch(/Caution: Screening estimate only/);
    const json = JSON.parse(readFileSync(path.join(out, 'siting.json'), 'utf8'));
    expect(json.candidates.some((candidate: { id: string }) => candidate.id === 'yard-north')).toBe(true);
    expect(json.agreement.forwardRuns).toBe(3);
    // Map and forward runs both carry the stack as a sub-grid plume first (docs/siting.md, The near field);
    // what is left is the limited scheme's discretisation error, larger on these coarse 200 m cells than
    // on the solver tests' 25 m: measured 1.7 % of the largest PC (0.58 while the map released the stack
    // straight into the grid). Asserted below 5 %.
    expect(json.agreement.largestDifferenceFractionOfPeak).toBeLessThan(0.05);
  });

  it.each([
    [['site'], /site needs a SCENARIO file/],
    [['site', DEMO], /--out DIR is required/],
    [['site', DEMO, '--out', scratch, '--spacing=-5'], /--spacing: "-5" is not allowed/],
    [['site', DEMO, '--out', scratch, '--weights', '1,x'], /--weights: entry 2 \("x"\)/],
  ])('%j is a usage error: exit 2 with the message', async (argv, message) => {
    const run = capture();
    expect(await main(argv, run.io, inProcess)).toBe(2);
    expect(run.stderr()).toMatch(message);
  });

  it('a candidates file that is not points, a missing file, an unknown stack and a bad site polygon exit 2, each named', async () => {
    const notPoints = file('lines.geojson', { type: 'FeatureCollection', features: [{ type: 'Feature', geometry: { type: 'LineString', coordinates: [[0, 0], [1, 1]] }, properties: {} }] });
    const cases: [string[], RegExp][] = [
      [['--candidates', notPoints], /--candidates: feature 1 is not a Point/],
      [['--candidates', path.join(scratch, 'missing.json')], /--candidates: cannot read .*missing\.json \(ENOENT\)/],
      [['--stack', 'chimney'], /invalid input: stack "chimney" is not a point source of the scenario; allowed: "boiler-stack"/],
      [['--site-polygon', file('tiny.geojson', { type: 'Polygon', coordinates: [[[-2.28408, 54.06122], [-2.28407, 54.06122], [-2.28407, 54.06123], [-2.28408, 54.06122]]] })], /site polygon: no point of a 200 m lattice falls inside it; use a smaller spacing/],
    ];
    for (const [extra, message] of cases) {
      const run = capture();
      expect(await main(['site', coarseDemo(), '--out', path.join(scratch, 'bad'), '--mode', 'gaussian', ...extra], run.io, inProcess), extra.join(' ')).toBe(2);
      expect(run.stderr(), run.stderr()).toMatch(message);
    }
    expect(existsSync(path.join(scratch, 'bad'))).toBe(false);
  });

  it('an hourly series is mapped as its mean (exit 0); a screening set is not built (exit 1, saying what to use)', async () => {
    const run = capture();
    const hourly = coarseDemo((scenario) => {
      const { kind: _kind, ...fields } = scenario.weather;
      scenario.weather = { kind: 'hourly', hours: [{ ...fields, time: '2026-01-05T10:00:00Z' }, { ...fields, time: '2026-01-05T11:00:00Z' }, { ...fields, windFrom_deg: 200, time: '2026-01-05T12:00:00Z' }] };
    });
    expect(await main(['site', hourly, '--out', path.join(scratch, 'hourly'), '--mode', 'gaussian', '--quick'], run.io, inProcess), run.stderr()).toBe(0);
    expect(run.stdout()).toMatch(/long-term mean PC/);
    // --quick: the figure's SVG and the report's HTML, not the rendered PNG and PDF
    expect(existsSync(path.join(scratch, 'hourly', 'siting-map.svg'))).toBe(true);
    expect(existsSync(path.join(scratch, 'hourly', 'siting-report.html'))).toBe(true);
    expect(existsSync(path.join(scratch, 'hourly', 'siting-map.png'))).toBe(false);
    expect(existsSync(path.join(scratch, 'hourly', 'siting-report.pdf'))).toBe(false);
    expect(readFileSync(path.join(scratch, 'hourly', 'siting-map.svg'), 'utf8')).toMatch(/long-term mean \(hourly series, period(<[^>]+>\s*)+mean\)/);
    const json = JSON.parse(readFileSync(path.join(scratch, 'hourly', 'siting.json'), 'utf8'));
    expect(json.weatherKind).toBe('hourly');
    expect(json.notes.join(' ')).toMatch(/hourly series of 3 hours, 2 distinct weather states/);
    const set = capture();
    const screening = coarseDemo((scenario) => {
      scenario.weather = { kind: 'screeningSet', sectors: 12, rain_mm_h: 0, airTemperature_K: 283, anemometerHeight_m: 10 };
    });
    expect(await main(['site', screening, '--out', path.join(scratch, 'set'), '--mode', 'gaussian'], set.io, inProcess)).toBe(1);
    expect(set.stderr()).toMatch(/weather of kind "screeningSet" is not built: give steady weather, a wind rose or an hourly series/);
  });
});
