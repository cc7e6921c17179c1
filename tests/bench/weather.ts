/**
 * Weather benchmarks (npm run bench): one JSON object per line on stdout, each with a `name`.
 * - weather-year-hourly (Gaussian): the invented demo met year (8760 hours) of
 *   scenarios/merrowdene-heat-plant-year on its 100x100x20 grid, hour by hour, in full, in the thread
 *   pool as the command line runs it;
 * - weather-year-hourly (grid): the same year in grid mode (target under 2 minutes here), in full,
 *   solved as `plumeplan run` solves a series: a pool of worker threads (one per core), each lane taking
 *   runs of one wind direction and class in sorted order and warm-starting from the solve before, at the
 *   series tolerance SERIES_STEADY_TOLERANCE, sweeping the layers below the lid and the columns the
 *   plume reaches. PLUMEPLAN_BENCH_SAMPLE_DAYS=n runs only the first n days instead;
 * - weather-week-continuous: the first week (168 hours) of the same year as one continuous time-march,
 *   each step split over the same threads by rows (as the command line runs it).
 * Progress goes to stderr during the long runs. Figures are what this machine measured; nothing here
 * fails for being slow.
 */
import { createSeriesSolverPool, defaultSeriesThreads } from '../../server/jobs/seriesSolverPool.ts';
import { loadScenarioFile } from '../../server/scenarioFiles/load.ts';
import type { Scenario, SolverMode, WeatherHour } from '../../scenarios/format/types.ts';
import { prepareScenarioGeometry } from '../../solver/grid/scenarioGeometry.ts';
import { SERIES_ANDERSON_DEPTH, SERIES_STEADY_TOLERANCE } from '../../solver/drivers/gridSteady.ts';
import { reuseKey, reuseRules } from '../../solver/drivers/seriesSolves.ts';
import { runScenario, seriesBaseInput } from '../../solver/drivers/runScenario.ts';
import type { ScenarioRunResult } from '../../solver/drivers/types.ts';
import { resolveWeather } from '../../solver/meteorology/resolveWeather.ts';

const YEAR_SCENARIO = new URL('../../scenarios/merrowdene-heat-plant-year/scenario.json', import.meta.url).pathname;
const SAMPLE_DAYS = Number(process.env.PLUMEPLAN_BENCH_SAMPLE_DAYS ?? 0);
const FULL_YEAR = !(SAMPLE_DAYS > 0);
const THREADS = defaultSeriesThreads();

function progressPrinter(label: string): (fraction: number, message: string) => void {
  let last = 0;
  return (fraction, message) => {
    const now = performance.now();
    if (now - last < 5000 && fraction < 1) return;
    last = now;
    process.stderr.write(`[bench ${label}] ${(100 * fraction).toFixed(1)} % ${message}\n`);
  };
}

/** A run as the command line makes it: series solves in a pool of worker threads (started inside the timing). */
async function timed(label: string, scenario: Scenario, mode: SolverMode): Promise<{ result: ScenarioRunResult; wallSeconds: number } | { error: string }> {
  const started = performance.now();
  const pooled = scenario.weather.kind === 'hourly' && scenario.solver.hourlyMethod === 'independentHours';
  const pool = pooled ? createSeriesSolverPool(THREADS) : null;
  try {
    const result = await runScenario(scenario, { mode, seriesSolvers: pool?.solvers, stepThreads: THREADS, control: { onProgress: progressPrinter(label) } });
    return { result, wallSeconds: (performance.now() - started) / 1000 };
  } catch (error) {
    return { error: error instanceof Error ? `${error.name}: ${error.message}` : String(error) };
  } finally {
    await pool?.close();
  }
}

const round = (value: number | undefined, digits = 2) => (value === undefined ? undefined : Number(value.toFixed(digits)));

const loaded = await loadScenarioFile(YEAR_SCENARIO);
if (!loaded.ok) throw new Error(`cannot load ${YEAR_SCENARIO}: ${JSON.stringify(loaded.issues)}`);
const year = loaded.scenario;
if (year.weather.kind !== 'hourly') throw new Error('the year scenario must be an hourly series');
const yearHours: WeatherHour[] = year.weather.hours;
const withHours = (hours: WeatherHour[], method: 'independentHours' | 'continuous'): Scenario => ({
  ...year,
  weather: { kind: 'hourly', hours },
  solver: { ...year.solver, hourlyMethod: method },
});
const geometry = prepareScenarioGeometry(year);
const gridLabel = `${geometry.grid.nx}x${geometry.grid.ny}x${geometry.grid.nz}`;

/** Distinct solves the hour-by-hour method needs for some hours (the same rule the run uses). */
function distinctSolves(hours: WeatherHour[]): number {
  const base = seriesBaseInput(year, geometry);
  const rules = reuseRules(base);
  const keys = new Set<string>();
  hours.forEach((hour, h) => keys.add(reuseKey(resolveWeather(hour, year.site, `weather.hours[${h}]`), rules, base.pollutant.washout !== null).key));
  return keys.size;
}

function seriesLine(name: string, mode: SolverMode, hours: number, outcome: { result: ScenarioRunResult; wallSeconds: number }): Record<string, unknown> {
  const series = outcome.result.extraSummary.series as Record<string, number>;
  return {
    name,
    mode,
    grid: gridLabel,
    hours,
    threads: THREADS,
    wallSeconds: round(outcome.wallSeconds),
    solves: series.solves,
    identicalReuses: series.identicalReuses,
    scaledReuses: series.scaledReuses,
    solveWallSeconds: round(series.solveWallSeconds),
    meanSolveMilliseconds: round(1000 * series.meanSolveWallSeconds),
    ...(mode === 'grid'
      ? { meanSweepsPerSolve: round(outcome.result.steps / series.solves, 1), seriesTolerance: SERIES_STEADY_TOLERANCE, warmStart: true, andersonDepth: SERIES_ANDERSON_DEPTH }
      : {}),
  };
}

// Gaussian mode, the whole year.
{
  const outcome = await timed('year gaussian', year, 'gaussian');
  console.log(JSON.stringify('error' in outcome ? { name: 'weather-year-hourly', mode: 'gaussian', skipped: outcome.error } : seriesLine('weather-year-hourly', 'gaussian', yearHours.length, outcome)));
}

// Grid mode: the whole year, or a measured sample with the year's solve count.
{
  const yearSolves = distinctSolves(yearHours);
  const hours = FULL_YEAR ? yearHours : yearHours.slice(0, 24 * SAMPLE_DAYS);
  const outcome = await timed(FULL_YEAR ? 'year grid' : `first ${SAMPLE_DAYS} days grid`, withHours(hours, 'independentHours'), 'grid');
  if ('error' in outcome) {
    console.log(JSON.stringify({ name: 'weather-year-hourly', mode: 'grid', skipped: outcome.error }));
  } else {
    const line = seriesLine('weather-year-hourly', 'grid', hours.length, outcome);
    const meanSolve_s = (line.meanSolveMilliseconds as number) / 1000;
    console.log(
      JSON.stringify({
        ...line,
        measured: FULL_YEAR ? 'the whole year' : `the first ${SAMPLE_DAYS} days (${hours.length} hours)`,
        yearHours: yearHours.length,
        yearDistinctSolves: yearSolves,
        targetSeconds: 120,
        ...(FULL_YEAR ? {} : { projectedYearSeconds: round((meanSolve_s * yearSolves) / THREADS, 0), projection: 'measured mean solve time x the year\'s distinct solves / threads; not a measurement' }),
      }),
    );
  }
}

// Continuous time-march, the first week.
{
  const outcome = await timed('week continuous', withHours(yearHours.slice(0, 168), 'continuous'), 'grid');
  if ('error' in outcome) {
    console.log(JSON.stringify({ name: 'weather-week-continuous', grid: gridLabel, hours: 168, skipped: outcome.error }));
  } else {
    console.log(
      JSON.stringify({
        name: 'weather-week-continuous',
        mode: 'grid',
        grid: gridLabel,
        hours: 168,
        threads: THREADS,
        wallSeconds: round(outcome.wallSeconds),
        steps: outcome.result.steps,
        cellStepsPerSecond: round((outcome.result.steps * geometry.grid.nx * geometry.grid.ny * geometry.grid.nz) / outcome.wallSeconds, 0),
        simulatedSecondsPerWallSecond: round((168 * 3600) / outcome.wallSeconds, 0),
        massBudgetRelativeImbalance: outcome.result.massBudget_g?.relativeImbalance ?? null,
      }),
    );
  }
}
