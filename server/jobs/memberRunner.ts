/**
 * Runs the members of a sweep or a stack-height search in worker threads: for steady weather, members
 * in parallel, one a lane (grid solves each in its own worker thread at the single-run tolerance;
 * Gaussian solves on a pool thread); for a series, a wind rose or the screening set, one member at a
 * time with the series pool taking its many solves. Aborting the control's signal stops the member in
 * flight. close() ends the pool.
 */
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import type { MemberRunner } from '../../solver/assessment/sweep.ts';
import { runScenario } from '../../solver/drivers/runScenario.ts';
import { createSeriesSolverPool, defaultSeriesThreads } from './seriesSolverPool.ts';
import { solveGridSteadyInWorker } from './solveInWorker.ts';

export interface WorkerMemberRunner {
  runMember: MemberRunner;
  /** members that may run at once */
  lanes: number;
  close(): Promise<void>;
}

/**
 * @param scenario the base scenario (its weather kind decides how members run)
 * @param mode the solver mode of every member
 * @param threads worker threads (default: one per core, at most 8)
 * @example const runner = createWorkerMemberRunner(scenario, 'grid'); try { await runSweep(scenario, spec, runner) } finally { await runner.close() }
 */
export function createWorkerMemberRunner(scenario: Scenario, mode: SolverMode, threads = defaultSeriesThreads()): WorkerMemberRunner {
  let pool: ReturnType<typeof createSeriesSolverPool> | null = null;
  const solvers = () => (pool ??= createSeriesSolverPool(threads)).solvers;
  const steady = scenario.weather.kind === 'steady';
  const runMember: MemberRunner = async (member, lane, control) => {
    if (steady) {
      const solve =
        mode === 'grid'
          ? (input: Parameters<typeof solveGridSteadyInWorker>[0], _mode: SolverMode, inner = control) => solveGridSteadyInWorker(input, { signal: inner.signal ?? control.signal })
          : solvers()[lane % threads];
      return runScenario(member, { mode, solve, control: { signal: control.signal } });
    }
    return runScenario(member, { mode, seriesSolvers: solvers(), stepThreads: threads, control: { signal: control.signal } });
  };
  return { runMember, lanes: steady ? threads : 1, close: async () => pool?.close() };
}
