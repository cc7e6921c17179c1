/**
 * A stack-height search as the CLI (`plumeplan stack-height`) and the server's stack-height jobs both
 * run it: the request, the target (in ug/m3, or a percentage of an assessed standard's limit), the
 * search on the caller's member runner, and the files built in memory (stack-height.json, .csv, .svg).
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import { assessmentPlan } from '../../solver/assessment/standards.ts';
import { findStackHeight, type StackHeightResult } from '../../solver/assessment/stackHeight.ts';
import { ScenarioInputError } from '../../solver/drivers/runScenario.ts';
import type { RunControl } from '../../solver/drivers/types.ts';
import { stackHeightCsv, stackHeightJson, stackHeightSvg } from '../writers/sweepFiles.ts';
import type { MemberLanes } from './sweep.ts';

export const STACK_HEIGHT_JSON_FILE = 'stack-height.json';
export const STACK_HEIGHT_CSV_FILE = 'stack-height.csv';
export const STACK_HEIGHT_SVG_FILE = 'stack-height.svg';

/** Defaults of the search (the CLI's --min, --max, --tolerance). */
export const STACK_HEIGHT_DEFAULTS = { minHeight_m: 1, maxHeight_m: 200, tolerance_m: 1 } as const;

export interface StackHeightRequest {
  /** the target PC [ug/m3]; or targetPercent with standard */
  target_ug_m3?: number;
  /** the target as a percentage of the named standard's limit [%] */
  targetPercent?: number;
  standard?: string;
  /** "ground" or receptor ids */
  at: 'ground' | string[];
  minHeight_m: number;
  maxHeight_m: number;
  tolerance_m: number;
  /** the stack (default: the only point source) */
  sourceId?: string;
}

/** A target that cannot be set: the field at fault and what is wrong. */
export class TargetError extends Error {
  override name = 'TargetError';
  constructor(
    readonly field: 'standard' | 'target',
    message: string,
    readonly allowed: string,
  ) {
    super(message);
  }
}

/**
 * The target in ug/m3 and how it was set.
 * @throws TargetError when the standard is not assessed, or neither or both targets are given
 */
export function resolveStackHeightTarget(scenario: Scenario, request: StackHeightRequest): { target_ug_m3: number; basis: string } {
  if (request.targetPercent === undefined) {
    if (request.target_ug_m3 === undefined) throw new TargetError('target', 'give a target: target_ug_m3, or targetPercent with standard', 'target_ug_m3 > 0, or targetPercent > 0 with standard');
    return { target_ug_m3: request.target_ug_m3, basis: `given: ${request.target_ug_m3} ug/m3` };
  }
  const standards = scenario.assessment === undefined ? [] : assessmentPlan(scenario.assessment, scenario.pollutant.name).standards;
  const standard = standards.find((s) => s.name === request.standard);
  if (standard === undefined) {
    const names = standards.map((s) => JSON.stringify(s.name)).join(', ');
    throw new TargetError(
      'standard',
      `${JSON.stringify(request.standard)} is not an assessed standard of this scenario; ${names === '' ? 'the scenario has no assessment standards' : `use one of ${names}`}`,
      names === '' ? 'none: the scenario has no assessment standards' : `one of ${names}`,
    );
  }
  const target = Number(((request.targetPercent * standard.limit_ug_m3) / 100).toPrecision(12));
  return { target_ug_m3: target, basis: `${request.targetPercent} % of ${standard.name} (${standard.limit_ug_m3} ug/m3)` };
}

/**
 * Run the search.
 * @throws ScenarioInputError naming what cannot be used (range, tolerance, receptor, source)
 */
export async function computeStackHeight(
  scenario: Scenario,
  request: StackHeightRequest,
  target_ug_m3: number,
  runner: MemberLanes,
  control: RunControl,
): Promise<StackHeightResult> {
  return findStackHeight(
    scenario,
    {
      sourceId: request.sourceId,
      target_ug_m3,
      at: request.at,
      standard: request.targetPercent !== undefined ? request.standard : undefined,
      minHeight_m: request.minHeight_m,
      maxHeight_m: request.maxHeight_m,
      tolerance_m: request.tolerance_m,
    },
    { runMember: runner.runMember, lanes: runner.lanes, control },
  ).catch((error: unknown) => {
    throw error instanceof RangeError ? new ScenarioInputError(error.message, { cause: error }) : error;
  });
}

/** The search's files, in the order written: stack-height.json, stack-height.csv, stack-height.svg. */
export function buildStackHeightFiles(result: StackHeightResult, scenarioName: string, targetBasis: string): [string, string][] {
  return [
    [STACK_HEIGHT_JSON_FILE, `${JSON.stringify(stackHeightJson(result, scenarioName, targetBasis), null, 2)}\n`],
    [STACK_HEIGHT_CSV_FILE, stackHeightCsv(result)],
    [STACK_HEIGHT_SVG_FILE, stackHeightSvg(result, scenarioName)],
  ];
}
