/**
 * Assessment benchmarks (npm run bench; alone: node --import tsx tests/bench/assessment.ts): one JSON
 * object per line on stdout, each with a `name`.
 * - screening-set: the demo (scenarios/merrowdene-heat-plant) under the screening weather set, as
 *   `plumeplan run` solves it (a pool of worker threads, one per core): Gaussian mode with 36 sectors,
 *   grid mode with PLUMEPLAN_BENCH_SCREENING_SECTORS sectors (default 12);
 * - stack-height-sweep: a 10-member sweep of the demo stack's height (20 to 65 m) as `plumeplan sweep`
 *   runs it (members in parallel, one a worker thread), in grid and in Gaussian mode; each with all the
 *   demo's sources and with the stack alone (the fuel yard removed). With all sources the highest ground
 *   figure lies by the low fuel yard, whose release does not change with the stack, so the line also gives
 *   where each maximum lies (distance from the stack and from the yard's centre), the highest receptor
 *   figure, and the stack-only sweep the stack's own contribution.
 * Sections: PLUMEPLAN_BENCH_SECTIONS=screening-set or stack-height-sweep runs one of the two
 * (tests/bench/benchSections.ts). Figures are what this machine measured in this run; nothing here fails
 * for being slow.
 */
import { loadScenarioFile } from '../../server/scenarioFiles/load.ts';
import { createSeriesSolverPool, defaultSeriesThreads } from '../../server/jobs/seriesSolverPool.ts';
import { createWorkerMemberRunner } from '../../server/jobs/memberRunner.ts';
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import { runSweep } from '../../solver/assessment/sweep.ts';
import { runScenario } from '../../solver/drivers/runScenario.ts';
import { prepareScenarioGeometry } from '../../solver/grid/scenarioGeometry.ts';
import { benchSections, wantsAssessmentSection } from './benchSections.ts';

const DEMO = new URL('../../scenarios/merrowdene-heat-plant/scenario.json', import.meta.url).pathname;
const GRID_SECTORS = Number(process.env.PLUMEPLAN_BENCH_SCREENING_SECTORS ?? 12);
const THREADS = defaultSeriesThreads();

function print(record: Record<string, unknown>): void {
  process.stdout.write(`${JSON.stringify(record)}\n`);
}

async function demo(): Promise<Scenario> {
  const loaded = await loadScenarioFile(DEMO);
  if (!loaded.ok) throw new Error(`demo scenario: ${JSON.stringify(loaded.issues)}`);
  return loaded.scenario;
}

async function screeningSet(mode: SolverMode, sectors: number): Promise<void> {
  const scenario = { ...(await demo()), weather: { kind: 'screeningSet' as const, sectors, rain_mm_h: 0, airTemperature_K: 283.15, anemometerHeight_m: 10 } };
  const pool = createSeriesSolverPool(THREADS);
  const started = performance.now();
  try {
    const result = await runScenario(scenario, { mode, seriesSolvers: pool.solvers });
    const series = result.extraSummary.series as { solves: number };
    let peak = 0;
    for (const value of result.footprint_ug_m3) if (value > peak) peak = value;
    print({
      name: 'screening-set',
      scenario: 'merrowdene-heat-plant',
      mode,
      grid: `${result.grid.nx}x${result.grid.ny}x${result.grid.nz}`,
      sectors,
      states: (result.extraSummary.weather as { states: number }).states,
      solves: series.solves,
      threads: THREADS,
      wallSeconds: Number(((performance.now() - started) / 1000).toFixed(2)),
      highestHourlyGround_ug_m3: Number(peak.toPrecision(3)),
    });
  } finally {
    await pool.close();
  }
}

/** A figure to 3 significant figures, for the lines. */
function three(value: number): number {
  return Number(value.toPrecision(3));
}

async function stackHeightSweep(mode: SolverMode, sources: 'all' | 'stackOnly'): Promise<void> {
  const full = await demo();
  const scenario = sources === 'all' ? full : { ...full, sources: full.sources.filter((source) => source.id === 'boiler-stack') };
  const placed = prepareScenarioGeometry(full).sources;
  const stack = placed.find((source) => source.id === 'boiler-stack')!;
  const yard = placed.find((source) => source.id === 'fuel-yard')!;
  const values = Array.from({ length: 10 }, (_, k) => 20 + 5 * k);
  const runner = createWorkerMemberRunner(scenario, mode, THREADS);
  const started = performance.now();
  try {
    const sweep = await runSweep(scenario, { parameter: 'stackHeight_m', values, sourceId: 'boiler-stack' }, { runMember: runner.runMember, lanes: runner.lanes });
    const highestReceptor = sweep.members.map((m) => m.receptors_ug_m3.reduce((best, value, r) => (value > m.receptors_ug_m3[best] ? r : best), 0));
    print({
      name: 'stack-height-sweep',
      scenario: 'merrowdene-heat-plant',
      mode,
      sources: sources === 'all' ? 'all (boiler-stack and fuel-yard)' : 'boiler-stack only (fuel-yard removed)',
      members: values.length,
      heights_m: values,
      lanes: runner.lanes,
      wallSeconds: Number(((performance.now() - started) / 1000).toFixed(2)),
      groundMax_ug_m3: sweep.members.map((m) => three(m.groundMax_ug_m3)),
      groundMaxFromStack_m: sweep.members.map((m) => Math.round(Math.hypot(m.groundMaxAt.x_m - stack.x_m, m.groundMaxAt.y_m - stack.y_m))),
      groundMaxFromFuelYardCentre_m: sweep.members.map((m) => Math.round(Math.hypot(m.groundMaxAt.x_m - yard.x_m, m.groundMaxAt.y_m - yard.y_m))),
      highestReceptor_ug_m3: sweep.members.map((m, k) => three(m.receptors_ug_m3[highestReceptor[k]] ?? 0)),
      highestReceptorId: sweep.members.map((_, k) => sweep.receptorIds[highestReceptor[k]]),
      receptorColumn: sweep.receptorColumn,
    });
  } finally {
    await runner.close();
  }
}

const SECTIONS = benchSections();
if (wantsAssessmentSection(SECTIONS, 'screening-set')) {
  await screeningSet('gaussian', 36);
  await screeningSet('grid', GRID_SECTORS);
}
if (wantsAssessmentSection(SECTIONS, 'stack-height-sweep')) {
  for (const mode of ['grid', 'gaussian'] as const) {
    await stackHeightSweep(mode, 'all');
    await stackHeightSweep(mode, 'stackOnly');
  }
}
