/**
 * Weather benchmarks (npm run bench): one JSON object per line on stdout, each with a `name`.
 * - weather-year-hourly: the invented demo met year (8760 hours) of
 *   scenarios/merrowdene-heat-plant-year on its 100x100x20 grid, hour by hour, in grid mode
 *   (target under 2 minutes on this machine) and, for scale, in Gaussian mode;
 * - weather-week-continuous: the first week (168 hours) of the same year as one continuous time-march.
 * Progress goes to stderr during the long runs. Figures are what this machine measured; nothing here
 * fails for being slow.
 */
import { loadScenarioFile } from '../../scenario/load.ts';
import type { Scenario, SolverMode } from '../../scenario/types.ts';
import { runScenario } from '../../solver/drivers/runScenario.ts';
import type { ScenarioRunResult } from '../../solver/drivers/types.ts';

const YEAR_SCENARIO = new URL('../../scenarios/merrowdene-heat-plant-year/scenario.json', import.meta.url).pathname;

function progressPrinter(label: string): (fraction: number, message: string) => void {
  let last = 0;
  return (fraction, message) => {
    const now = performance.now();
    if (now - last < 2000 && fraction < 1) return;
    last = now;
    process.stderr.write(`[${label}] ${(100 * fraction).toFixed(1)} % ${message}\n`);
  };
}

async function timed(label: string, scenario: Scenario, mode: SolverMode): Promise<{ result: ScenarioRunResult; wallSeconds: number } | { error: string }> {
  const started = performance.now();
  try {
    const result = await runScenario(scenario, { mode, control: { onProgress: progressPrinter(label) } });
    return { result, wallSeconds: (performance.now() - started) / 1000 };
  } catch (error) {
    return { error: error instanceof Error ? `${error.name}: ${error.message}` : String(error) };
  }
}

const loaded = await loadScenarioFile(YEAR_SCENARIO);
if (!loaded.ok) throw new Error(`cannot load ${YEAR_SCENARIO}: ${JSON.stringify(loaded.issues)}`);
const year = loaded.scenario;
if (year.weather.kind !== 'hourly') throw new Error('the year scenario must be an hourly series');
const grid = year.domain ? `${(2 * year.domain.halfWidth_m) / year.domain.spacing_m}x${(2 * year.domain.halfWidth_m) / year.domain.spacing_m}x${year.domain.layers}` : 'derived';

for (const mode of ['grid', 'gaussian'] as const) {
  const outcome = await timed(`year ${mode}`, year, mode);
  if ('error' in outcome) {
    console.log(JSON.stringify({ name: 'weather-year-hourly', mode, grid, hours: year.weather.hours.length, skipped: outcome.error }));
    continue;
  }
  const series = outcome.result.extraSummary.series as Record<string, number>;
  console.log(
    JSON.stringify({
      name: 'weather-year-hourly',
      mode,
      grid,
      hours: year.weather.hours.length,
      wallSeconds: Number(outcome.wallSeconds.toFixed(2)),
      targetSeconds: mode === 'grid' ? 120 : undefined,
      solves: series.solves,
      identicalReuses: series.identicalReuses,
      scaledReuses: series.scaledReuses,
      solveWallSeconds: Number(series.solveWallSeconds?.toFixed(2)),
      meanSolveMilliseconds: Number((1000 * series.meanSolveWallSeconds).toFixed(2)),
    }),
  );
}

const week: Scenario = {
  ...year,
  weather: { kind: 'hourly', hours: year.weather.hours.slice(0, 168) },
  solver: { ...year.solver, hourlyMethod: 'continuous' },
};
const outcome = await timed('week continuous', week, 'grid');
if ('error' in outcome) {
  console.log(JSON.stringify({ name: 'weather-week-continuous', grid, hours: 168, skipped: outcome.error }));
} else {
  console.log(
    JSON.stringify({
      name: 'weather-week-continuous',
      grid,
      hours: 168,
      wallSeconds: Number(outcome.wallSeconds.toFixed(2)),
      steps: outcome.result.steps,
      simulatedSecondsPerWallSecond: Number(((168 * 3600) / outcome.wallSeconds).toFixed(0)),
      massBudgetRelativeImbalance: outcome.result.massBudget_g?.relativeImbalance ?? null,
    }),
  );
}
