/**
 * The checks a steady grid run makes on itself (solver/drivers/runChecks.ts): behaviour checks of the
 * thresholds (a factor of 1.25 between the modes, 10 % between cell sizes) on made-up fields, and one
 * small run of the demo through runScenario, where both checks are made and their tables land in the
 * summary; the same for a small hourly series and wind rose, where the checks are made at the weathers
 * of the highest figures and the Gaussian side is checked against that weather's own Gaussian run; and
 * for a small screening weather set, where a stand-in grid solver (the Gaussian field times a factor)
 * shows the note appears beyond the 1.25 factor and not within it.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario, ScreeningSetWeather } from '../../../scenarios/format/types.ts';
import { compareModes, compareResolutions, MODE_DIFFERENCE_FACTOR, RESOLUTION_CHANGE_LIMIT, type FieldComparison } from '../../../solver/drivers/runChecks.ts';
import { runScenario } from '../../../solver/drivers/runScenario.ts';
import { MAX_CHECKED_WEATHERS } from '../../../solver/drivers/seriesChecks.ts';
import { buildSummary } from '../../../server/writers/summary.ts';
import type { SteadyFieldResult } from '../../../solver/drivers/types.ts';
import { screeningWeatherStates } from '../../../solver/assessment/screeningWeather.ts';
import { solveSteady, type SteadySolver } from '../../../solver/drivers/solveSteady.ts';

function field(receptors: number[], ground: number[]): SteadyFieldResult {
  return {
    mode: 'grid',
    groundLevel_ug_m3: Float64Array.from(ground),
    receptors_ug_m3: Float64Array.from(receptors),
    sources: [],
    massBudget_g: null,
    steps: 0,
    wallSeconds: 0,
    notes: [],
  };
}

describe('mode check', () => {
  it('notes a receptor and a peak more than 1.25 times apart, and not those within it', () => {
    expect(MODE_DIFFERENCE_FACTOR).toBe(1.25);
    const grid = field([10, 10, 10], [0, 40, 5]);
    const gaussian = field([12.4, 12.6, 7.9], [0, 40, 60]);
    const check = compareModes(grid, gaussian, ['a', 'b', 'c']);
    expect(check.receptors.map((r) => r.ratio)).toEqual([10 / 12.4, 10 / 12.6, 10 / 7.9]);
    expect(check.peak).toMatchObject({ value_ug_m3: 40, other_ug_m3: 60 });
    expect(check.notes).toHaveLength(3);
    expect(check.notes[0]).toMatch(/^mode check: at receptor b the grid mode gives 10 ug\/m3 and the Gaussian mode 12\.6 ug\/m3, a factor of 1\.26/);
    expect(check.notes[1]).toMatch(/^mode check: at receptor c .* a factor of 1\.27/);
    expect(check.notes[2]).toMatch(/^mode check: at the ground-level peak .* 40 ug\/m3 and the Gaussian mode 60 ug\/m3, a factor of 1\.50/);
  });

  it('says nothing about receptors a thousand times below the largest figure', () => {
    const check = compareModes(field([10, 1e-3], [10]), field([10, 5e-3], [10]), ['near', 'far']);
    expect(check.notes).toEqual([]);
  });
});

describe('resolution check', () => {
  it('notes a figure that moves by more than 10 % at half the cell size', () => {
    expect(RESOLUTION_CHANGE_LIMIT).toBe(0.1);
    const check = compareResolutions(field([10, 10], [20]), field([10.9, 11.2], [21]), ['a', 'b'], 50);
    expect(check.notes).toHaveLength(1);
    expect(check.notes[0]).toMatch(/^resolution check: at receptor b the figure changes from 10 to 11\.2 ug\/m3 \(\+12 %\) at half the cell size \(25 m instead of 50 m/);
  });
});

describe('checks of a steady grid run through runScenario', () => {
  const demo = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');
  function smallDemo(): Scenario {
    const raw = JSON.parse(readFileSync(demo, 'utf8'));
    raw.domain = { halfWidth_m: 3000, spacing_m: 150, height_m: 1000, layers: 10 };
    const outcome = parseScenario(raw);
    if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
    return outcome.scenario;
  }

  it('puts the mode check and (a small grid) the resolution check into the summary, and only asked-for checks when told', async () => {
    const scenario = smallDemo();
    const result = await runScenario(scenario, { mode: 'grid' });
    const modeCheck = result.extraSummary.modeCheck as FieldComparison;
    expect(modeCheck.receptors.map((r) => r.id)).toEqual(['fennick-row', 'school', 'care-home']);
    modeCheck.receptors.forEach((r, n) => expect(r.value_ug_m3).toBe(result.receptorColumns[0].values[n]));
    const resolutionCheck = result.extraSummary.resolutionCheck as { made: boolean } & FieldComparison;
    expect(resolutionCheck.made).toBe(true);
    expect(resolutionCheck.basis).toBe('cells of 150 m against 75 m, same domain');
    for (const note of [...modeCheck.notes, ...resolutionCheck.notes]) expect(result.notes).toContain(note);
    const never = await runScenario(scenario, { mode: 'grid', resolutionCheck: 'never' });
    expect(never.extraSummary.resolutionCheck).toEqual({ made: false, reason: 'not asked for' });
    const gaussian = await runScenario(scenario, { mode: 'gaussian' });
    expect(gaussian.extraSummary.modeCheck).toBeUndefined();
  });
});

describe('checks of a grid-mode hourly series and wind rose (solver/drivers/seriesChecks.ts)', () => {
  const demo = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');
  /** The demo on a small grid with the given weather (hours or a rose). */
  function smallDemoWith(weather: unknown, hourlyMethod = 'independentHours'): Scenario {
    const raw = JSON.parse(readFileSync(demo, 'utf8'));
    raw.domain = { halfWidth_m: 3000, spacing_m: 150, height_m: 1000, layers: 10 };
    raw.weather = weather;
    raw.solver = { mode: 'grid', hourlyMethod };
    const outcome = parseScenario(raw);
    if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
    return outcome.scenario;
  }
  const hour = (time: string, windFrom_deg: number, windSpeed_m_s: number, stability: string) => ({
    time, windSpeed_m_s, windFrom_deg, stability, mixingHeight_m: 800, rain_mm_h: 0, airTemperature_K: 283.15, anemometerHeight_m: 10,
  });
  const hours = [
    hour('2026-03-02T10:00:00Z', 250, 5, 'D'),
    hour('2026-03-02T11:00:00Z', 200, 3, 'C'),
    hour('2026-03-02T12:00:00Z', 300, 7, 'D'),
    hour('2026-03-02T13:00:00Z', 90, 2, 'E'),
  ];

  it('hourly series: checks the hours of the highest figures, names them, and compares with the Gaussian mode of that hour', async () => {
    const scenario = smallDemoWith({ kind: 'hourly', hours });
    const result = await runScenario(scenario, { mode: 'grid' });
    type SeriesCheck = FieldComparison & { weathers: { weather: string; chosenFor: string[] }[] };
    const modeCheck = result.extraSummary.modeCheck as SeriesCheck;
    const resolutionCheck = result.extraSummary.resolutionCheck as { made: boolean } & SeriesCheck;
    expect(modeCheck.weathers.length).toBeGreaterThanOrEqual(1);
    expect(modeCheck.weathers.length).toBeLessThanOrEqual(Math.min(MAX_CHECKED_WEATHERS, hours.length));
    expect(modeCheck.weathers[0].chosenFor[0]).toBe('the highest ground-level figure off the site');
    expect(modeCheck.basis).toContain(`at ${modeCheck.weathers.length} of the 4 weathers of the series`);
    // Each receptor is compared in the hour of its own highest figure: the run's figure is its max_ug_m3.
    const max = result.receptorColumns.find((c) => c.key === 'max_ug_m3')!.values;
    for (const [r, item] of modeCheck.receptors.entries()) {
      expect(item.value_ug_m3).toBeCloseTo(max[r], 9);
      // The Gaussian figure is that hour's steady Gaussian run, made here afresh through runScenario.
      const time = /hour (\S+)/.exec(item.weather ?? '')![1];
      const steady = await runScenario(smallDemoWith({ kind: 'steady', ...hours.find((h) => h.time === time)!, time: undefined }), { mode: 'gaussian' });
      expect(item.other_ug_m3).toBeCloseTo(steady.receptorColumns[0].values[r], 9);
    }
    expect(resolutionCheck.made).toBe(true);
    expect(resolutionCheck.basis).toMatch(/^cells of 150 m \(the series' own figures\) against steady solves at 75 m, same domain, at \d of the 4 weathers/);
    expect(resolutionCheck.receptors.map((r) => r.weather)).toEqual(modeCheck.receptors.map((r) => r.weather));
    expect(result.notes.some((note) => note.startsWith('mode check: for a series, made at'))).toBe(true);
    for (const note of [...modeCheck.notes, ...resolutionCheck.notes]) expect(result.notes).toContain(note);
    // summary.json carries both tables and the notes (server/writers/summary.ts)
    const summary = buildSummary(scenario, result) as unknown as Record<string, unknown> & { notes: string[] };
    expect(summary.modeCheck).toBe(modeCheck);
    expect(summary.resolutionCheck).toBe(resolutionCheck);
    for (const note of [...modeCheck.notes, ...resolutionCheck.notes]) expect(summary.notes).toContain(note);
    const never = await runScenario(scenario, { mode: 'grid', resolutionCheck: 'never' });
    expect(never.extraSummary.resolutionCheck).toEqual({ made: false, reason: 'not asked for' });
  });

  it('continuous method: says the checks are not made and why', async () => {
    const result = await runScenario(smallDemoWith({ kind: 'hourly', hours: hours.slice(0, 2) }, 'continuous'), { mode: 'grid', resolutionCheck: 'never' });
    expect((result.extraSummary.resolutionCheck as { made: boolean; reason: string }).reason).toMatch(/^not made: the continuous method/);
    expect(result.extraSummary.modeCheck).toBeUndefined();
  });

  it('wind rose: a cell that never occurs is not checked, however high its figures', async () => {
    const rose = {
      kind: 'windRose',
      sectorWidth_deg: 30,
      rain_mm_h: 0,
      airTemperature_K: 283.15,
      anemometerHeight_m: 10,
      cells: [
        { windFrom_deg: 250, windSpeed_m_s: 5, stability: 'D', mixingHeight_m: 800, frequency: 0.6 },
        { windFrom_deg: 60, windSpeed_m_s: 8, stability: 'D', mixingHeight_m: 800, frequency: 0.4 },
        // light stable wind: the highest figures of the three, but frequency 0
        { windFrom_deg: 250, windSpeed_m_s: 1, stability: 'F', mixingHeight_m: 800, frequency: 0 },
      ],
    };
    const result = await runScenario(smallDemoWith(rose), { mode: 'grid', resolutionCheck: 'never' });
    const modeCheck = result.extraSummary.modeCheck as FieldComparison & { weathers: { weather: string }[] };
    expect(modeCheck.weathers.length).toBeGreaterThanOrEqual(1);
    for (const w of modeCheck.weathers) expect(w.weather).not.toMatch(/^wind-rose cell 2 /);
    expect(modeCheck.basis).toContain('of the 3 weathers of the series');
  });
});

describe('checks of a grid-mode screening weather set (solver/assessment/screeningWeather.ts)', () => {
  const demo = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');
  function smallSet(sectors: number): Scenario {
    const raw = JSON.parse(readFileSync(demo, 'utf8'));
    raw.domain = { halfWidth_m: 3000, spacing_m: 300, height_m: 1000, layers: 10 };
    raw.weather = { kind: 'screeningSet', sectors };
    raw.solver = { mode: 'grid' };
    const outcome = parseScenario(raw);
    if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
    return outcome.scenario;
  }
  type SeriesCheck = FieldComparison & { weathers: { weather: string; chosenFor: string[] }[] };

  it('checks the states of the highest figures against that state\'s own Gaussian run and at half the cell size, into summary.json', async () => {
    const scenario = smallSet(1);
    const result = await runScenario(scenario, { mode: 'grid' });
    const modeCheck = result.extraSummary.modeCheck as SeriesCheck;
    const resolutionCheck = result.extraSummary.resolutionCheck as { made: boolean } & SeriesCheck;
    expect(modeCheck.weathers.length).toBeGreaterThanOrEqual(1);
    expect(modeCheck.weathers.length).toBeLessThanOrEqual(MAX_CHECKED_WEATHERS);
    expect(modeCheck.weathers[0].chosenFor[0]).toBe('the highest ground-level figure off the site');
    expect(modeCheck.basis).toContain(`of the 38 weathers of the screening weather set`);
    // each receptor at the state of its own highest figure: the run's figure is the set's maximum there
    const max = result.receptorColumns.find((c) => c.key === 'max_hourly_ug_m3')!.values;
    const states = screeningWeatherStates(scenario.weather as ScreeningSetWeather);
    for (const [r, item] of modeCheck.receptors.entries()) {
      expect(item.value_ug_m3).toBeCloseTo(max[r], 9);
      const state = states[Number(/^screening state (\d+) /.exec(item.weather ?? '')![1])];
      const steady = await runScenario(
        (() => {
          const raw = JSON.parse(readFileSync(demo, 'utf8'));
          raw.domain = { halfWidth_m: 3000, spacing_m: 300, height_m: 1000, layers: 10 };
          const { windSpeed_m_s, windFrom_deg, stability, mixingHeight_m, rain_mm_h, airTemperature_K, anemometerHeight_m } = state;
          raw.weather = { kind: 'steady', windSpeed_m_s, windFrom_deg, stability, mixingHeight_m, rain_mm_h, airTemperature_K, anemometerHeight_m };
          const outcome = parseScenario(raw);
          if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
          return outcome.scenario;
        })(),
        { mode: 'gaussian' },
      );
      expect(item.other_ug_m3).toBeCloseTo(steady.receptorColumns[0].values[r], 9);
    }
    expect(resolutionCheck.made).toBe(true);
    expect(resolutionCheck.basis).toMatch(/^cells of 300 m \(the run's own figures\) against steady solves at 150 m, same domain, at \d of the 38 weathers of the screening weather set/);
    expect(result.notes.some((note) => note.startsWith('mode check: for the screening weather set, made at'))).toBe(true);
    const summary = buildSummary(scenario, result) as unknown as Record<string, unknown> & { notes: string[] };
    expect(summary.modeCheck).toBe(modeCheck);
    expect(summary.resolutionCheck).toBe(resolutionCheck);
    for (const note of [...modeCheck.notes, ...resolutionCheck.notes]) expect(summary.notes).toContain(note);
    const gaussian = await runScenario(scenario, { mode: 'gaussian' });
    expect(gaussian.extraSummary.modeCheck).toBeUndefined();
  });

  it('notes a receptor only when the grid figure is more than 1.25 times the Gaussian one', async () => {
    // A stand-in grid solver that gives the Gaussian field times a factor: every ratio is that factor.
    const scaledGaussian = (factor: number): SteadySolver => async (input, mode, control) => {
      const field = await solveSteady(input, 'gaussian', control);
      if (mode !== 'grid') return field;
      return { ...field, mode: 'grid', receptors_ug_m3: field.receptors_ug_m3.map((v) => v * factor), groundLevel_ug_m3: field.groundLevel_ug_m3.map((v) => v * factor) };
    };
    // four sectors: the wind from 270 deg carries both sources towards the receptors (east-north-east)
    const figureNote = /^mode check: at (receptor \S+|the ground-level peak) in screening state \d+ /;
    const within = await runScenario(smallSet(4), { mode: 'grid', solve: scaledGaussian(1.2), resolutionCheck: 'never' });
    const withinCheck = within.extraSummary.modeCheck as SeriesCheck;
    for (const item of withinCheck.receptors) expect(item.ratio).toBeCloseTo(1.2, 9);
    expect(within.notes.filter((note) => figureNote.test(note))).toEqual([]);
    const beyond = await runScenario(smallSet(4), { mode: 'grid', solve: scaledGaussian(1.5), resolutionCheck: 'never' });
    const beyondCheck = beyond.extraSummary.modeCheck as SeriesCheck;
    for (const item of beyondCheck.receptors) expect(item.ratio).toBeCloseTo(1.5, 9);
    const notes = beyond.notes.filter((note) => figureNote.test(note));
    expect(notes).toHaveLength(4); // three receptors and the ground-level peak
    for (const note of notes) expect(note).toMatch(/a factor of 1\.50/);
  });
});
