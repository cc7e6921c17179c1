/**
 * Behaviour checks of the command line, in process: help and version, usage errors (exit 2), invalid
 * scenarios (exit 2, field named), capabilities not in the build and internal failures (exit 1),
 * progress on stderr. The spawned end-to-end runs are in tests/e2e.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { CommandIO } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import { ScenarioInputError } from '../../../solver/drivers/runScenario.ts';
import { solveSteady, UnavailableError, type SteadySolver } from '../../../solver/drivers/solveSteady.ts';

const DEMO = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');
const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-cli-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

interface Captured {
  io: CommandIO;
  stdout: () => string;
  stderr: () => string;
}

/** In-memory streams; the clock advances 400 ms at every reading, so anything slow shows progress. */
function capture(env: Record<string, string> = {}): Captured {
  const out: string[] = [];
  const err: string[] = [];
  let time_ms = 0;
  return {
    io: {
      stdout: { write: (text: string) => out.push(text) },
      stderr: { write: (text: string) => err.push(text), isTTY: false },
      env,
      now: () => (time_ms += 400),
    },
    stdout: () => out.join(''),
    stderr: () => err.join(''),
  };
}

/** A small, quick variant of the demo (coarse grid) for in-process runs. */
function smallDemo(change: (scenario: Record<string, any>) => void = () => {}): string {
  const scenario = JSON.parse(readFileSync(DEMO, 'utf8'));
  delete scenario.$schema;
  scenario.domain = { halfWidth_m: 3000, spacing_m: 200, height_m: 1000, layers: 10 };
  change(scenario);
  const file = path.join(scratch, `scenario-${Math.random().toString(36).slice(2)}.json`);
  writeFileSync(file, JSON.stringify(scenario));
  return file;
}

describe('help and version', () => {
  it.each([[['--help']], [['-h']], [['help']]])('%j prints the usage and exits 0', async (argv) => {
    const run = capture();
    expect(await main(argv, run.io)).toBe(0);
    expect(run.stdout()).toContain('plumeplan run SCENARIO --out DIR');
    expect(run.stdout()).toContain('plumeplan validate');
  });

  it.each([['run'], ['validate']])('%s --help and -h exit 0 with the command usage', async (command) => {
    for (const flag of ['--help', '-h']) {
      const run = capture();
      expect(await main([command, flag], run.io)).toBe(0);
      expect(run.stdout()).toMatch(new RegExp(`usage: plumeplan ${command}`));
    }
  });

  it('--version prints the package version', async () => {
    const run = capture();
    expect(await main(['--version'], run.io)).toBe(0);
    const { version } = JSON.parse(readFileSync(path.join(import.meta.dirname, '..', '..', '..', 'package.json'), 'utf8'));
    expect(run.stdout()).toBe(`plumeplan ${version}\n`);
  });
});

describe('usage errors exit 2 with a message and the usage', () => {
  it.each([
    [[], /no command given/],
    [['simulate'], /unknown command "simulate"/],
    [['--colour'], /unknown option --colour/],
    [['run', DEMO], /--out DIR is required/],
    [['run', '--out', 'x'], /run needs a SCENARIO file/],
    [['run', DEMO, 'second.json', '--out', 'x'], /run takes one SCENARIO file/],
    [['run', DEMO, '--out', 'x', '--fast'], /unknown option --fast/],
    [['run', DEMO, '--out', 'x', '--mode', 'puff'], /--mode: "puff" is not a mode/],
    [['run', DEMO, '--out', 'x', '--levels', '10,5'], /--levels: 5 does not exceed 10/],
    [['run', DEMO, '--out', 'x', '--levels=-1'], /--levels: entry 1 \("-1"\)/],
    [['run', DEMO, '--out', 'x', '--levels', '-1'], /--levels needs a value .*--levels=VALUE/],
  ])('%j', async (argv, message) => {
    const run = capture();
    expect(await main(argv, run.io)).toBe(2);
    expect(run.stderr()).toMatch(message);
    expect(run.stderr()).toMatch(/usage:/);
    expect(run.stdout()).toBe('');
  });
});

describe('run', () => {
  it('writes the result folder and reports where it went, the peak and the caution', async () => {
    const out = path.join(scratch, 'out-ok');
    const run = capture();
    expect(await main(['run', smallDemo(), '--out', out, '--mode', 'gaussian', '--levels', '1,2,5'], run.io)).toBe(0);
    expect(run.stdout()).toContain(`Results written to ${out}: summary.json, receptors.csv, footprint.geojson`);
    // The demo gives a site boundary: the peak is reported off the site, the on-site one beside it.
    expect(run.stdout()).toMatch(/Peak ground-level concentration off the site: [0-9.e-]+ ug\/m3 at lat /);
    expect(run.stdout()).toMatch(/on the site \(not where the public is; for reference\): [0-9.e-]+ ug\/m3/);
    expect(run.stdout()).toContain('Caution: Screening estimate only.');
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    expect(summary.mode).toBe('gaussian');
    expect(summary.footprint.levels_ug_m3).toEqual([1, 2, 5]);
  });

  it('writes ground.tif in the CRS named by --crs, and leaves map.png and report.pdf out with --quick', async () => {
    const out = path.join(scratch, 'out-crs');
    const run = capture();
    expect(await main(['run', smallDemo(), '--out', out, '--mode', 'gaussian', '--crs', 'EPSG:27700', '--quick'], run.io)).toBe(0);
    expect(run.stdout()).toContain('footprint.geojson, receptors-with-caution.csv, ground.tif, map.svg, report.html, plumeplan-run.zip\n');
    expect(existsSync(path.join(out, 'report.pdf'))).toBe(false);
    expect(existsSync(path.join(out, 'map.png'))).toBe(false);
    expect(readFileSync(path.join(out, 'map.svg'), 'utf8')).toContain('(EPSG:27700)');
  });

  it('refuses a CRS it does not know before running, naming --crs and what is allowed', async () => {
    const run = capture();
    expect(await main(['run', smallDemo(), '--out', path.join(scratch, 'out-bad-crs'), '--crs', 'EPSG:1234'], run.io)).toBe(2);
    expect(run.stderr()).toMatch(/--crs: EPSG:1234 is not one plumeplan knows; allowed: .*EPSG:27700/);
    expect(existsSync(path.join(scratch, 'out-bad-crs'))).toBe(false);
  });

  it('says so when no ground reaches the lowest level given', async () => {
    const run = capture();
    expect(await main(['run', smallDemo(), '--out', path.join(scratch, 'out-high'), '--mode', 'gaussian', '--levels', '1e6'], run.io)).toBe(0);
    expect(run.stdout()).toContain('Footprint: no ground reaches the lowest level, 1000000 ug/m3');
  });

  it('exits 2 naming the field for a scenario with an error', async () => {
    const file = smallDemo((scenario) => {
      scenario.sources[0].emission_g_s = -1;
    });
    const run = capture();
    expect(await main(['run', file, '--out', path.join(scratch, 'out-bad')], run.io)).toBe(2);
    expect(run.stderr()).toMatch(/is not a valid scenario \(1 issue\)/);
    expect(run.stderr()).toMatch(/sources\[0\]\.emission_g_s: got -1/);
  });

  it('exits 2 when --out names a file', async () => {
    const file = path.join(scratch, 'plain-file');
    writeFileSync(file, '');
    const run = capture();
    expect(await main(['run', smallDemo(), '--out', file, '--mode', 'gaussian'], run.io)).toBe(2);
    expect(run.stderr()).toMatch(/--out: .* exists and is not a folder/);
  });

  it('exits 2 for input the run itself refuses, with the field named', async () => {
    const refusing: SteadySolver = async () => {
      throw new ScenarioInputError('sources[0].height_m: 900 m reaches above the grid top');
    };
    const run = capture();
    expect(await main(['run', smallDemo(), '--out', path.join(scratch, 'out-refused')], run.io, { solve: refusing })).toBe(2);
    expect(run.stderr()).toBe('plumeplan run: invalid scenario: sources[0].height_m: 900 m reaches above the grid top\n');
  });

  it('exits 1 for a capability not in the build and suggests the mode that is', async () => {
    const unavailable: SteadySolver = async () => {
      throw new UnavailableError('grid mode arrives with the solver', 'gaussian');
    };
    const run = capture();
    expect(await main(['run', smallDemo(), '--out', path.join(scratch, 'out-grid')], run.io, { solve: unavailable })).toBe(1);
    expect(run.stderr()).toContain('grid mode arrives with the solver; use --mode gaussian meanwhile');
  });

  it('exits 130 when the run is interrupted (an AbortError from the solve), writing nothing', async () => {
    const interrupted: SteadySolver = async () => {
      const error = new Error('grid run aborted');
      error.name = 'AbortError';
      throw error;
    };
    const out = path.join(scratch, 'out-interrupted');
    const run = capture();
    expect(await main(['run', smallDemo(), '--out', out], run.io, { solve: interrupted })).toBe(130);
    expect(run.stderr()).toBe('plumeplan run: interrupted; no results written\n');
    expect(existsSync(out)).toBe(false);
  });

  it('exits 1 on an internal failure, without a stack unless PLUMEPLAN_DEBUG=1', async () => {
    const failing: SteadySolver = async () => {
      throw new Error('matrix went sideways');
    };
    const quiet = capture();
    expect(await main(['run', smallDemo(), '--out', path.join(scratch, 'out-fail')], quiet.io, { solve: failing })).toBe(1);
    expect(quiet.stderr()).toContain('plumeplan run: internal failure: matrix went sideways');
    expect(quiet.stderr()).not.toMatch(/\n\s+at /);
    const debug = capture({ PLUMEPLAN_DEBUG: '1' });
    expect(await main(['run', smallDemo(), '--out', path.join(scratch, 'out-fail')], debug.io, { solve: failing })).toBe(1);
    expect(debug.stderr()).toMatch(/\n\s+at /);
  });

  it('shows progress on stderr once the run has taken more than a second', async () => {
    // The clock of `capture` advances 400 ms per reading; a solver that reports ten steps runs "4 s".
    const slow: SteadySolver = async (input, mode, control) => {
      for (let step = 1; step <= 10; step += 1) control?.onProgress?.(step / 10, `sweep ${step} of 10`);
      return solveSteady(input, 'gaussian', {});
    };
    const run = capture();
    expect(await main(['run', smallDemo(), '--out', path.join(scratch, 'out-slow')], run.io, { solve: slow })).toBe(0);
    expect(run.stderr()).toMatch(/%  sweep \d+ of 10\n/);
    expect(run.stdout()).toContain('Results written to');
  });
});

describe('validate and run agree on the plausibility warnings (one function)', () => {
  it('cold flue gas, a mixing height below the stack and a receptor on the site: validate prints them, run records them', async () => {
    const file = smallDemo((scenario) => {
      scenario.sources[0].exitTemperature_K = 275; // colder than the 283.15 K air
      scenario.weather.mixingHeight_m = 25; // below the 32 m stack
      scenario.receptors.push({ id: 'gatehouse', name: 'Gatehouse', lat: 54.0610, lon: -2.2845, height_m: 1.5 });
    });
    const validate = capture();
    expect(await main(['validate', file], validate.io)).toBe(0);
    const printed = validate.stdout().split('\n').filter((line) => line.startsWith('  warning: ')).map((line) => line.slice('  warning: '.length));
    expect(printed.map((line) => line.split(' ')[0])).toEqual(['sources[0].exitTemperature_K', 'sources[0].height_m', 'receptors[3]']);
    const out = path.join(scratch, 'warned');
    const run = capture();
    expect(await main(['run', file, '--out', out, '--mode', 'gaussian'], run.io)).toBe(0);
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    const recorded = (summary.notes as string[]).filter((note) => note.startsWith('input warning: ')).map((note) => note.slice('input warning: '.length));
    expect(recorded).toEqual(printed);
    expect(summary.inputWarnings.map((warning: { path: string }) => warning.path)).toEqual(['sources[0].exitTemperature_K', 'sources[0].height_m', 'receptors[3]']);
    expect(run.stdout()).toContain('Input warnings (also in summary.json):');
  });

  it('an averaging period the statistics cannot compute is refused by validate, as by run', async () => {
    const file = smallDemo((scenario) => {
      scenario.assessment.standards[0].averaging_h = 5;
    });
    const validate = capture();
    expect(await main(['validate', file], validate.io)).toBe(2);
    expect(validate.stderr()).toMatch(/assessment\.standards\[0\]\.averaging_h: got 5; is not a supported averaging period/);
    const run = capture();
    expect(await main(['run', file, '--out', path.join(scratch, 'refused'), '--mode', 'gaussian'], run.io)).toBe(2);
    expect(run.stderr()).toMatch(/assessment\.standards\[0\]\.averaging_h/);
  });
});
