/**
 * `npm run bench`: plumeplan's speed figures, one JSON object per line on stdout, each with a `name`.
 *
 * - transport-step: one full transport step (advection x/y, horizontal diffusion, implicit vertical
 *   diffusion with deposition, loss, budget) on 100x100x20, 200x200x30 and 400x400x30, 1 and 2 threads,
 *   best and median of several timed repeats, each side by side with the numpy peer
 *   (../shared/bench/numpy_peer.py) on the same grid in the same run, and the ratio ours / peer;
 * - memory-bandwidth: an in-process triad a = b + s c over Float64Arrays, and the fraction of it the
 *   transport step reaches given its bytes moved per cell-step;
 * - steady-solve: the demo scenario's steady grid solve (scenarios/merrowdene-heat-plant), wall time,
 *   sweeps and budget imbalance; and the same state by plain time stepping for comparison.
 * Figures are what this machine measured in this run; nothing here fails for being slow.
 */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { loadScenarioFile } from '../../server/scenarioFiles/load.ts';
import { ConstantDiffusivity } from '../../solver/closures/constantDiffusivity.ts';
import { DEFAULT_NEAR_FIELD, gridModelParts, releaseHeights_m, solveGridSteadyDetailed } from '../../solver/drivers/gridSteady.ts';
import { DirectRelease } from '../../solver/sources/nearField.ts';
import type { SteadyFieldResult, SteadyRunInput } from '../../solver/drivers/types.ts';
import { fieldAtHeight, sampleField } from '../../solver/diagnostics/receptorSampling.ts';
import { createDispersionModel, setInitialField } from '../../solver/drivers/model.ts';
import { steadyInput } from '../../solver/drivers/runScenario.ts';
import { paddedToGridOrder } from '../../solver/fields/paddedLayout.ts';
import { prepareScenarioGeometry } from '../../solver/grid/scenarioGeometry.ts';
import { FirstOrderDecay } from '../../solver/losses/firstOrderLosses.ts';
import { resolveWeather } from '../../solver/meteorology/resolveWeather.ts';
import { SlabPoolExecutor } from '../../solver/parallel/slabPool.ts';
import { advanceOneStep, SerialStepExecutor, type StepExecutor } from '../../solver/timestepping/timeStepper.ts';
import { uniformColumnWind } from '../../solver/wind/columnWind.ts';
import { testGrid } from '../solver/verification/testGrid.ts';
import { sitingBenchmarks } from './siting.ts';
import { benchSections, wantsAssessment, wantsServer } from './benchSections.ts';

/** Main-memory bytes a transport step moves per cell: read + write in the pass up, read + write in the pass down. */
const KERNEL_BYTES_PER_CELL_STEP = 32;
const PEER = new URL('../../../shared/bench/numpy_peer.py', import.meta.url).pathname;
const DEMO = new URL('../../scenarios/merrowdene-heat-plant/scenario.json', import.meta.url).pathname;

function print(record: Record<string, unknown>): void {
  process.stdout.write(`${JSON.stringify(record)}\n`);
}

function numpyPeer(nx: number, ny: number, nz: number): number | null {
  try {
    const output = execFileSync('/usr/bin/python3', [PEER, String(nx), String(ny), String(nz)], { encoding: 'utf8', timeout: 300_000 });
    const match = /numpy peer: ([0-9.]+) M cell-steps\/s/.exec(output);
    return match ? Number(match[1]) * 1e6 : null;
  } catch {
    return null;
  }
}

function seededRandom(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 4294967296;
  };
}

/** Cell-steps per second of the transport step: best and median of `repeats` timings of `steps` steps. */
async function transportStep(nx: number, ny: number, nz: number, threads: number, verticalVelocity_m_s = 0): Promise<{ best: number; median: number; timeStep_s: number }> {
  // The peer's settings: wind (4, 1.5) m/s, 50 m cells, 20 m layers, K = 10 m2/s horizontal, 5 vertical,
  // loss 1e-4 1/s, a random field in [0, 1).
  const grid = testGrid({ nx, ny, nz, height_m: 20 * nz, spacing_m: 50 });
  const speed = Math.hypot(4, 1.5);
  const from_deg = (Math.atan2(-4, -1.5) * 180) / Math.PI;
  const model = createDispersionModel({
    grid,
    wind: uniformColumnWind(grid, speed, from_deg, { verticalVelocity_m_s }),
    closure: new ConstantDiffusivity(10, 5),
    losses: [FirstOrderDecay(1e-4)],
    sharedMemory: threads > 1,
  });
  const random = seededRandom(12345);
  setInitialField(model, Float64Array.from({ length: nx * ny * nz }, random));
  let executor: StepExecutor = new SerialStepExecutor();
  if (threads > 1) {
    const pool = await SlabPoolExecutor.create(threads);
    await pool.prepare(model);
    executor = pool;
  }
  const cells = nx * ny * nz;
  const steps = Math.max(3, Math.round(6e7 / cells / 4));
  for (let n = 0; n < 3; n++) advanceOneStep(model, model.timeStep_s, executor);
  const rates: number[] = [];
  for (let repeat = 0; repeat < 7; repeat++) {
    const started = performance.now();
    for (let n = 0; n < steps; n++) advanceOneStep(model, model.timeStep_s, executor);
    rates.push((cells * steps) / ((performance.now() - started) / 1000));
  }
  await executor.close();
  rates.sort((a, b) => a - b);
  return { best: rates[rates.length - 1], median: rates[rates.length >> 1], timeStep_s: model.timeStep_s };
}

function triadBandwidth_bytes_s(): number {
  const length = 8 * 1024 * 1024; // 64 MiB per array, well beyond the caches
  const a = new Float64Array(length);
  const b = new Float64Array(length).fill(1);
  const c = new Float64Array(length).fill(2);
  let best = 0;
  for (let repeat = 0; repeat < 8; repeat++) {
    const scale = 1 + repeat * 1e-3;
    const started = performance.now();
    for (let n = 0; n < length; n++) a[n] = b[n] + scale * c[n];
    const seconds = (performance.now() - started) / 1000;
    best = Math.max(best, (24 * length) / seconds); // two reads and one write of 8 bytes
  }
  if (a[length - 1] < 0) print({ name: 'never' });
  return best;
}

function groundDifference(a: Float64Array, b: Float64Array): number {
  let difference = 0;
  let size = 0;
  for (let n = 0; n < a.length; n++) {
    difference += Math.abs(a[n] - b[n]);
    size += Math.abs(b[n]);
  }
  return size > 0 ? difference / size : 0;
}

/**
 * The same steady state by plain time stepping (Courant step, one or two threads), from an empty domain until the
 * field changes by less than 1e-6 (relative L1) over 100 steps, for comparison with the steady solve: wall
 * time, and how far its answer is from the steady solve's (the march's steady state carries the time step's
 * slope weight (1 - C)/2, the steady solve the steady scheme's 1/2).
 */
async function steadyByTimeMarch(input: SteadyRunInput, steady: SteadyFieldResult, steadyWallSeconds: number, threads: number): Promise<Record<string, unknown>> {
  const steadyReceptors_ug_m3 = steady.receptors_ug_m3;
  const pool = await SlabPoolExecutor.create(threads);
  const parts = gridModelParts(input, input.weather, releaseHeights_m(input, input.weather));
  const model = createDispersionModel({ ...parts, sharedMemory: true });
  await pool.prepare(model);
  const started = performance.now();
  let reference = paddedToGridOrder(model.layout, model.field);
  let relativeChange = Infinity;
  const maxSteps = 6000;
  while (model.clock.iteration < maxSteps) {
    advanceOneStep(model, model.timeStep_s, pool);
    if (model.clock.iteration % 100 === 0) {
      const now = paddedToGridOrder(model.layout, model.field);
      let change = 0;
      let size = 0;
      for (let n = 0; n < now.length; n++) {
        change += Math.abs(now[n] - reference[n]);
        size += Math.abs(now[n]);
      }
      relativeChange = size > 0 ? change / size : Infinity;
      reference = now;
      if (relativeChange < 1e-6) break;
    }
  }
  const wallSeconds = (performance.now() - started) / 1000;
  await pool.close();
  const receptor = input.receptors.length > 0 ? sampleField(input.grid, model.layout, model.field, input.receptors[0].x_m, input.receptors[0].y_m, input.receptors[0].height_m) * 1e6 : null;
  return {
    name: 'steady-by-time-march',
    scenario: 'merrowdene-heat-plant',
    threads,
    steps: model.clock.iteration,
    simulatedSeconds: Number(model.clock.time_s.toFixed(0)),
    wallSeconds: Number(wallSeconds.toFixed(2)),
    stopRule: 'relative L1 change over 100 steps < 1e-6',
    groundLevelRelativeL1DifferenceToSteadySolve: Number(groundDifference(fieldAtHeight(input.grid, model.layout, model.field, input.groundLevelHeight_m, 1e6), steady.groundLevel_ug_m3).toExponential(3)),
    lastRelativeChangeOver100Steps: relativeChange,
    firstReceptorRatioToSteadySolve: receptor === null || steadyReceptors_ug_m3[0] === 0 ? null : Number((receptor / steadyReceptors_ug_m3[0]).toFixed(4)),
    steadySolveSpeedup: Number((wallSeconds / steadyWallSeconds).toFixed(1)),
  };
}

/**
 * Sections to run: PLUMEPLAN_BENCH_SECTIONS, a comma list of transport, bandwidth, steady, siting, weather,
 * server, mapPage, assessment (default all); parts of the assessment and server benchmarks also by
 * name: screening-set, stack-height-sweep, server-reads, server-pack, server-cancel (tests/bench/benchSections.ts).
 */
const SECTIONS = benchSections();

async function main(): Promise<void> {
  const figures = new Map<string, number>();
  for (const [nx, ny, nz] of SECTIONS.has('transport') ? ([[100, 100, 20], [200, 200, 30], [400, 400, 30]] as const) : []) {
    const grid = `${nx}x${ny}x${nz}`;
    const peer = numpyPeer(nx, ny, nz);
    for (const threads of [1, 2]) {
      const { best, median, timeStep_s } = await transportStep(nx, ny, nz, threads);
      figures.set(`${grid}/${threads}`, best);
      print({
        name: 'transport-step',
        grid,
        threads,
        cellStepsPerSecond: Math.round(best),
        medianCellStepsPerSecond: Math.round(median),
        numpyPeerCellStepsPerSecond: peer === null ? null : Math.round(peer),
        ratioToNumpyPeer: peer === null ? null : Number((best / peer).toFixed(2)),
        timeStep_s: Number(timeStep_s.toFixed(3)),
        verticalAdvection: false,
      });
    }
  }
  if (SECTIONS.has('transport')) {
    const { best } = await transportStep(200, 200, 30, 2, -0.01);
    print({ name: 'transport-step', grid: '200x200x30', threads: 2, cellStepsPerSecond: Math.round(best), verticalAdvection: true, verticalVelocity_m_s: -0.01 });
  }

  if (SECTIONS.has('bandwidth')) await bandwidthSection(figures);
  if (SECTIONS.has('steady')) await steadySection();
  if (SECTIONS.has('siting')) await sitingBenchmarks(print); // the demo's siting map against the forward runs it replaces (tests/bench/siting.ts)
}

async function bandwidthSection(figures: Map<string, number>): Promise<void> {
  const bandwidth = triadBandwidth_bytes_s();
  const reference = figures.get('400x400x30/1') ?? (await transportStep(400, 400, 30, 1)).best;
  print({
    name: 'memory-bandwidth',
    triadBytesPerSecond: Math.round(bandwidth),
    kernelBytesPerCellStep: KERNEL_BYTES_PER_CELL_STEP,
    kernelGrid: '400x400x30',
    kernelThreads: 1,
    fractionOfTriad: Number(((reference * KERNEL_BYTES_PER_CELL_STEP) / bandwidth).toFixed(3)),
  });
}

async function steadySection(): Promise<void> {

  if (existsSync(DEMO)) {
    const loaded = await loadScenarioFile(DEMO);
    if (!loaded.ok) throw new Error(`demo scenario does not load: ${JSON.stringify(loaded.issues)}`);
    const scenario = loaded.scenario;
    const geometry = prepareScenarioGeometry(scenario);
    if (scenario.weather.kind !== 'steady') throw new Error('the demo scenario is expected to have steady weather');
    const weather = resolveWeather(scenario.weather, scenario.site);
    const input = steadyInput(scenario, geometry, weather);
    const started = performance.now();
    const { result, report, nearField } = solveGridSteadyDetailed(input);
    const wallSeconds = (performance.now() - started) / 1000;
    // The same solve with every source released straight into its cells: the near field's effect.
    const directStarted = performance.now();
    const direct = solveGridSteadyDetailed(input, {}, { nearField: DirectRelease });
    const directWallSeconds = (performance.now() - directStarted) / 1000;
    const { nx, ny, nz } = input.grid;
    print({
      name: 'steady-solve',
      scenario: 'merrowdene-heat-plant',
      method: 'downwind block Gauss-Seidel column sweeps with Anderson mixing',
      nearField: DEFAULT_NEAR_FIELD.name,
      handoverDistances_m: nearField.handovers.map((h) => Number(h.handoverDistance_m.toFixed(0))),
      threads: 1,
      grid: `${nx}x${ny}x${nz}`,
      cells: nx * ny * nz,
      wallSeconds: Number(wallSeconds.toFixed(2)),
      sweeps: report.sweeps,
      converged: report.converged,
      lastRelativeChange: report.lastChange,
      tolerance: report.tolerance,
      massBudgetRelativeImbalance: result.massBudget_g?.relativeImbalance ?? null,
      directReleaseWallSeconds: Number(directWallSeconds.toFixed(2)),
      directReleaseSweeps: direct.report.sweeps,
    });
    // The time march releases every source straight into its cells, so it is compared with that solve.
    for (const threads of [1, 2]) print(await steadyByTimeMarch(input, direct.result, directWallSeconds, threads));
  } else {
    print({ name: 'steady-solve', skipped: `no demo scenario at ${DEMO}` });
  }
}

await main();
if (SECTIONS.has('weather')) await import('./weather.ts'); // weather benchmarks: the demo met year hour by hour, a continuous week (tests/bench/weather.ts)
if (wantsServer(SECTIONS)) await import('./server.ts'); // server benchmarks: API reads while two runs compute, the event loop's longest stall (tests/bench/server.ts)
if (SECTIONS.has('mapPage')) await import('./mapPage.ts'); // map page benchmarks: run to overlay drawn, preview while dragging a stack (tests/bench/mapPage.ts)
if (wantsAssessment(SECTIONS)) await import('./assessment.ts'); // the screening weather set on the demo, a 10-member stack-height sweep (tests/bench/assessment.ts)
