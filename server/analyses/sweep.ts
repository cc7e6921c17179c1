/**
 * A sweep as the CLI (`plumeplan sweep`) and the server's sweep jobs both run it: the request, the run
 * (members on whatever runner the caller gives: worker threads for the CLI, the job's own thread on the
 * server), and the files built in memory (sweep.csv, sweep.svg, sweep.json), so both write the same bytes.
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import { runSweep, SWEEP_PARAMETERS, type MemberRunner, type SweepParameter, type SweepResult } from '../../solver/assessment/sweep.ts';
import { ScenarioInputError } from '../../solver/drivers/runScenario.ts';
import type { RunControl } from '../../solver/drivers/types.ts';
import { sweepCsv, sweepJson, sweepSvg } from '../writers/sweepFiles.ts';

export const SWEEP_CSV_FILE = 'sweep.csv';
export const SWEEP_SVG_FILE = 'sweep.svg';
export const SWEEP_JSON_FILE = 'sweep.json';

/** Most values one sweep may have (each is a run unless the sweep is linear). */
export const MAX_SWEEP_VALUES = 50;

export interface SweepRequest {
  parameter: SweepParameter;
  values: number[];
  /** the source, for a per-source parameter */
  sourceId?: string;
}

/** How members run: one at a time per lane. */
export interface MemberLanes {
  runMember: MemberRunner;
  lanes: number;
}

/**
 * Run a sweep.
 * @throws ScenarioInputError naming the parameter, source or value that cannot be used
 */
export async function computeSweep(scenario: Scenario, request: SweepRequest, runner: MemberLanes, control: RunControl): Promise<SweepResult> {
  if (!(request.parameter in SWEEP_PARAMETERS)) {
    throw new ScenarioInputError(`parameter: ${JSON.stringify(request.parameter)} is not one of ${Object.keys(SWEEP_PARAMETERS).join(', ')}`);
  }
  return runSweep(scenario, { parameter: request.parameter, values: request.values, sourceId: request.sourceId }, { runMember: runner.runMember, lanes: runner.lanes, control }).catch(
    (error: unknown) => {
      throw error instanceof RangeError ? new ScenarioInputError(error.message, { cause: error }) : error;
    },
  );
}

/** The sweep's files, in the order written: sweep.csv, sweep.svg, sweep.json. */
export function buildSweepFiles(sweep: SweepResult, scenarioName: string): [string, string][] {
  return [
    [SWEEP_CSV_FILE, sweepCsv(sweep)],
    [SWEEP_SVG_FILE, sweepSvg(sweep, scenarioName)],
    [SWEEP_JSON_FILE, `${JSON.stringify(sweepJson(sweep, scenarioName), null, 2)}\n`],
  ];
}
