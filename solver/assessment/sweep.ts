/**
 * Sweeps: one parameter of a scenario over a list of values, and the figures a decision needs at each:
 * the highest PC on the ground and the PC at each receptor (and, with an assessment, each standard's
 * highest PC). Members are independent runs, solved in parallel on the lanes given (a pool of worker
 * threads, one lane each); every member runs on the base scenario's grid, so their fields compare cell
 * by cell.
 *
 * Linearity (solver/drivers/types.ts: every figure is linear in the emission rates): an emission-rate
 * sweep needs one run. Scaling every source by a factor scales every field, every percentile and every
 * mean by it; so does the rate of a source that is the only one emitting. Other emission sweeps (one of
 * several emitting sources) are run member by member, since a percentile or a maximum of a sum is not the
 * sum of the parts.
 */
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import { prepareScenarioGeometry } from '../grid/scenarioGeometry.ts';
import { sitePeak } from '../grid/siteBoundary.ts';
import type { RunControl, ScenarioRunResult } from '../drivers/types.ts';

/** The parameters a sweep can vary, with their units. */
export const SWEEP_PARAMETERS = {
  stackHeight_m: { unit: 'm', perSource: true, description: "a point source's stack height" },
  exitVelocity_m_s: { unit: 'm/s', perSource: true, description: "a point source's exit velocity" },
  emission_g_s: { unit: 'g/s', perSource: true, description: "a source's emission rate" },
  emissionScale: { unit: '-', perSource: false, description: 'a factor on every emission rate' },
  washoutA_per_s: { unit: '1/s', perSource: false, description: 'washout coefficient a of Lambda = a R^b' },
  washoutB: { unit: '-', perSource: false, description: 'washout exponent b of Lambda = a R^b' },
  halfLife_h: { unit: 'h', perSource: false, description: 'first-order decay half-life' },
  rain_mm_h: { unit: 'mm/h', perSource: false, description: 'rain rate (steady weather, wind rose or screening set)' },
  depositionVelocity_m_s: { unit: 'm/s', perSource: false, description: 'dry deposition velocity' },
} as const;

export type SweepParameter = keyof typeof SWEEP_PARAMETERS;

export interface SweepSpec {
  parameter: SweepParameter;
  /** the values, each a valid value of the parameter */
  values: readonly number[];
  /** the source, for a per-source parameter (default: the only point source, or the only source) */
  sourceId?: string;
}

/** One member's figures. */
export interface SweepMember {
  value: number;
  /** the highest value of the run's ground field (its footprint statistic), off the site when a boundary is given [ug/m3] */
  groundMax_ug_m3: number;
  groundMaxAt: { x_m: number; y_m: number };
  /** the run's first receptor figure at each receptor [ug/m3] */
  receptors_ug_m3: number[];
  /** each assessed standard's highest PC of the assessed pollutant (ground, else receptors) [ug/m3] */
  standards: { name: string; max_ug_m3: number; receptors_ug_m3: number[] }[];
  /** the member's run result, when it was run (not derived by linearity) */
  result?: ScenarioRunResult;
}

export interface SweepResult {
  parameter: SweepParameter;
  unit: string;
  description: string;
  sourceId: string | null;
  /** what the ground figure is: steady concentration, mean, or the highest hourly value */
  statistic: ScenarioRunResult['footprintStatistic'];
  /** the receptor figure's column, e.g. concentration_ug_m3 */
  receptorColumn: string | null;
  receptorIds: string[];
  members: SweepMember[];
  /** "linear": one run scaled; "members": each member run */
  method: 'linear' | 'members';
  runs: number;
  notes: string[];
}

/** How a sweep runs one member: a scenario on a lane (a worker thread of a pool, say). */
export type MemberRunner = (scenario: Scenario, lane: number, control: RunControl) => Promise<ScenarioRunResult>;

export interface SweepOptions {
  mode?: SolverMode;
  /** runs one member; default: runScenario in process (../drivers/runScenario.ts) */
  runMember: MemberRunner;
  /** members run at once (one per lane); default 1 */
  lanes?: number;
  control?: RunControl;
  /** keep each member's run result (default false: only the figures) */
  keepResults?: boolean;
}

/**
 * The scenario with one parameter set to a value, on the base scenario's grid.
 *
 * @throws RangeError naming the parameter, the source and the value when it cannot be applied
 */
export function applySweepValue(scenario: Scenario, parameter: SweepParameter, value: number, sourceId?: string): Scenario {
  if (!Number.isFinite(value)) throw new RangeError(`sweep value for ${parameter}: ${value} is not a finite number`);
  const member: Scenario = structuredClone(scenario);
  const id = SWEEP_PARAMETERS[parameter].perSource ? sweptSourceId(scenario, parameter, sourceId) : null;
  const source = id === null ? undefined : member.sources.find((s) => s.id === id)!;
  const needPoint = () => {
    if (source?.kind !== 'point') throw new RangeError(`sweep ${parameter}: source "${id}" is not a point source`);
    return source;
  };
  const atLeast = (minimum: number, strict = false) => {
    if (strict ? !(value > minimum) : !(value >= minimum)) throw new RangeError(`sweep ${parameter}: ${value} is not allowed (${strict ? '>' : '>='} ${minimum} ${SWEEP_PARAMETERS[parameter].unit})`);
  };
  switch (parameter) {
    case 'stackHeight_m':
      atLeast(0);
      needPoint().height_m = value;
      break;
    case 'exitVelocity_m_s':
      atLeast(0);
      needPoint().exitVelocity_m_s = value;
      break;
    case 'emission_g_s':
      atLeast(0);
      source!.emission_g_s = value;
      break;
    case 'emissionScale':
      atLeast(0);
      for (const s of member.sources) s.emission_g_s *= value;
      break;
    case 'washoutA_per_s':
      atLeast(0);
      member.pollutant.washout = { a_per_s: value, b: member.pollutant.washout?.b ?? 0.8 };
      break;
    case 'washoutB':
      atLeast(0);
      if (member.pollutant.washout === null) throw new RangeError('sweep washoutB: the pollutant has no washout; give pollutant.washout first');
      member.pollutant.washout = { ...member.pollutant.washout, b: value };
      break;
    case 'halfLife_h':
      atLeast(0, true);
      member.pollutant.halfLife_h = value;
      break;
    case 'rain_mm_h':
      atLeast(0);
      if (member.weather.kind === 'hourly') throw new RangeError('sweep rain_mm_h: an hourly series has its own rain each hour; sweep a steady state, a wind rose or the screening set');
      member.weather.rain_mm_h = value;
      break;
    case 'depositionVelocity_m_s':
      atLeast(0);
      member.pollutant.depositionVelocity_m_s = value;
      break;
    default:
      throw new RangeError(`sweep parameter: ${JSON.stringify(parameter)} is not one of ${Object.keys(SWEEP_PARAMETERS).join(', ')}`);
  }
  return member;
}

/** The source a per-source sweep varies: the one named, or the only candidate. */
export function sweptSourceId(scenario: Scenario, parameter: SweepParameter, sourceId?: string): string {
  const pointOnly = parameter === 'stackHeight_m' || parameter === 'exitVelocity_m_s';
  const candidates = scenario.sources.filter((s) => !pointOnly || s.kind === 'point');
  if (sourceId !== undefined) {
    if (!candidates.some((s) => s.id === sourceId)) {
      throw new RangeError(`sweep source: "${sourceId}" is not a ${pointOnly ? 'point ' : ''}source of the scenario; use one of ${candidates.map((s) => s.id).join(', ') || '(none)'}`);
    }
    return sourceId;
  }
  if (candidates.length !== 1) {
    throw new RangeError(`sweep ${parameter}: name the source (the scenario has ${candidates.length} ${pointOnly ? 'point ' : ''}sources: ${candidates.map((s) => s.id).join(', ')})`);
  }
  return candidates[0].id;
}

/**
 * Pin the scenario's domain to the grid it derives now, so that every member (a taller stack, say) runs
 * on the same grid.
 */
export function withFixedDomain(scenario: Scenario): Scenario {
  if (scenario.domain !== undefined) return scenario;
  const geometry = prepareScenarioGeometry(scenario);
  return { ...scenario, domain: { ...geometry.domain } };
}

/**
 * Run a sweep.
 *
 * @param scenario the base scenario
 * @param spec the parameter, its values and the source
 * @param options how to run a member, lanes, progress and cancellation
 * @returns each member's highest ground PC and receptor PCs (and standards' figures)
 * @example const sweep = await runSweep(scenario, { parameter: 'stackHeight_m', values: [20, 30, 40] }, { runMember: (s) => runScenario(s, { mode: 'gaussian' }) });
 */
export async function runSweep(scenario: Scenario, spec: SweepSpec, options: SweepOptions): Promise<SweepResult> {
  if (spec.values.length === 0) throw new RangeError('sweep values: none given; give one or more values');
  const base = withFixedDomain(scenario);
  const definition = SWEEP_PARAMETERS[spec.parameter];
  const sourceId = definition.perSource ? sweptSourceId(base, spec.parameter, spec.sourceId) : null;
  // check every value before any run
  for (const value of spec.values) applySweepValue(base, spec.parameter, value, sourceId ?? undefined);
  const control = options.control ?? {};
  const notes: string[] = [];
  const linear = isLinearSweep(base, spec.parameter, sourceId);
  let members: SweepMember[];
  let runs: number;
  // what the figures are (the same for every member of one scenario)
  let shape: { statistic: ScenarioRunResult['footprintStatistic']; column: string | null } | undefined;
  const note = (result: ScenarioRunResult) => (shape ??= { statistic: result.footprintStatistic, column: result.receptorColumns[0]?.key ?? null });
  if (linear) {
    // one run at unit value; every figure scales with the value (see the file comment)
    const unit = applySweepValue(base, spec.parameter, 1, sourceId ?? undefined);
    const result = await options.runMember(unit, 0, control);
    note(result);
    members = spec.values.map((value) => ({ ...figuresOf(result, value), value }));
    runs = 1;
    notes.push(`emission sweep from one run at ${spec.parameter} = 1, every figure scaled by the value (exact: the runs are linear in the emissions)`);
  } else {
    const lanes = Math.max(1, Math.min(Math.floor(options.lanes ?? 1), spec.values.length));
    members = new Array(spec.values.length);
    let next = 0;
    let done = 0;
    const lane = async (laneIndex: number) => {
      while (next < spec.values.length) {
        const index = next++;
        control.signal?.throwIfAborted();
        const value = spec.values[index];
        const result = await options.runMember(applySweepValue(base, spec.parameter, value, sourceId ?? undefined), laneIndex, { signal: control.signal });
        note(result);
        members[index] = { ...figuresOf(result, 1), value, ...(options.keepResults ? { result } : {}) };
        done++;
        control.onProgress?.(done / spec.values.length, `sweep: ${done} of ${spec.values.length} members`);
      }
    };
    await Promise.all(Array.from({ length: lanes }, (_, t) => lane(t)));
    runs = spec.values.length;
  }
  return {
    parameter: spec.parameter,
    unit: definition.unit,
    description: definition.description,
    sourceId,
    statistic: shape!.statistic,
    receptorColumn: shape!.column,
    receptorIds: base.receptors.map((r) => r.id),
    members,
    method: linear ? 'linear' : 'members',
    runs,
    notes,
  };
}

/** Whether an emission sweep can be done from one run (see the file comment). */
export function isLinearSweep(scenario: Scenario, parameter: SweepParameter, sourceId: string | null): boolean {
  if (parameter === 'emissionScale') return true;
  if (parameter !== 'emission_g_s') return false;
  return scenario.sources.every((s) => s.id === sourceId || s.emission_g_s === 0);
}

/** A run's figures, scaled by a factor. */
function figuresOf(result: ScenarioRunResult, scale: number): Omit<SweepMember, 'value'> {
  // off the site when the scenario gives a boundary (../grid/siteBoundary.ts)
  const peak = sitePeak(result.grid, result.footprint_ug_m3, result.site ?? null);
  const column = result.receptorColumns[0]?.values ?? new Float64Array(0);
  return {
    groundMax_ug_m3: scale * peak.value_ug_m3,
    groundMaxAt: { x_m: peak.x_m, y_m: peak.y_m },
    receptors_ug_m3: Array.from(column, (value) => scale * value),
    standards: (result.standardFields ?? []).map((standard) => {
      let max = 0;
      if (standard.ground_ug_m3 !== null) max = sitePeak(result.grid, standard.ground_ug_m3, result.site ?? null).value_ug_m3;
      else for (const value of standard.receptors_ug_m3) if (value > max) max = value;
      return { name: standard.name, max_ug_m3: scale * max, receptors_ug_m3: Array.from(standard.receptors_ug_m3, (value) => scale * value) };
    }),
  };
}
