/**
 * The lowest stack height at which the highest PC (on the ground, or at chosen receptors) falls below a
 * target, by a bracketing search over runs, with the curve of PC against height.
 *
 * The search: the lowest and highest allowed heights and evenly spaced ones between (two a lane) are run
 * first; the lowest height that meets the target and the highest failing one below it bracket the answer;
 * the bracket is then cut by `lanes` evenly spaced runs at a time (run in parallel) until it is no wider
 * than the tolerance. The answer is the bracket's upper end: a height that was run and meets the target.
 * The search assumes the PC falls as the stack rises; when a run above the answer fails the target (the
 * curve turns up again), the result says so. When even the highest allowed stack fails, it says no height
 * in the range meets the target rather than extrapolating.
 */
import type { Scenario, SolverMode } from '../../scenarios/format/types.ts';
import type { RunControl, ScenarioRunResult } from '../drivers/types.ts';
import { downwashFlags, type DownwashFlag } from './downwash.ts';
import { sitePeak } from '../grid/siteBoundary.ts';
import { applySweepValue, sweptSourceId, withFixedDomain, type MemberRunner } from './sweep.ts';

export interface StackHeightSpec {
  /** the stack (default: the only point source) */
  sourceId?: string;
  /** the PC the stack must bring the highest figure below [ug/m3] */
  target_ug_m3: number;
  /** where the highest PC is taken: "ground" (the ground-level field, off the site when a boundary is given) or receptor ids */
  at: 'ground' | readonly string[];
  /** compare this assessed standard's figure (the assessed pollutant) instead of the run's own field */
  standard?: string;
  minHeight_m: number;
  maxHeight_m: number;
  /** width of the final bracket [m] */
  tolerance_m: number;
}

export interface StackHeightPoint {
  height_m: number;
  /** the highest PC where asked [ug/m3] */
  pc_ug_m3: number;
  meetsTarget: boolean;
}

export interface StackHeightResult {
  found: boolean;
  /** the lowest height run that meets the target (within tolerance_m of the lowest that would) [m] */
  height_m: number | null;
  /** the bracket [highest failing, lowest meeting] when found above the lowest allowed height */
  bracket: [number, number] | null;
  target_ug_m3: number;
  tolerance_m: number;
  sourceId: string;
  at: 'ground' | string[];
  standard: string | null;
  /** every run, by height */
  curve: StackHeightPoint[];
  runs: number;
  /** false when a run above the answer fails the target again */
  monotone: boolean;
  /** the downwash check at the answer, when the stack names a building */
  downwash: DownwashFlag | null;
  message: string;
}

export interface StackHeightOptions {
  mode?: SolverMode;
  runMember: MemberRunner;
  /** runs at once; default 1 */
  lanes?: number;
  control?: RunControl;
}

/**
 * The highest PC of a run where the spec asks: ground or receptors, the run's own field or a standard's.
 *
 * @throws RangeError naming the standard or receptor that the run does not have
 */
export function highestPc(result: ScenarioRunResult, receptorIds: readonly string[], spec: Pick<StackHeightSpec, 'at' | 'standard'>): number {
  let ground: ArrayLike<number> | null = result.footprint_ug_m3;
  let receptors: ArrayLike<number> = result.receptorColumns[0]?.values ?? [];
  if (spec.standard !== undefined) {
    const field = (result.standardFields ?? []).find((f) => f.name === spec.standard);
    if (field === undefined) {
      const names = (result.standardFields ?? []).map((f) => JSON.stringify(f.name)).join(', ');
      throw new RangeError(`standard: ${JSON.stringify(spec.standard)} has no figure in this run; ${names === '' ? 'the run has no assessed standards with figures' : `use one of ${names}`}`);
    }
    ground = field.ground_ug_m3;
    receptors = field.receptors_ug_m3;
  }
  let highest = 0;
  if (spec.at === 'ground') {
    if (ground === null) throw new RangeError(`at: the standard ${JSON.stringify(spec.standard)} has no ground map for this weather; choose receptors`);
    // off the site when the scenario gives a boundary (../grid/siteBoundary.ts)
    return sitePeak(result.grid, ground, result.site ?? null).value_ug_m3;
  }
  for (const id of spec.at) {
    const r = receptorIds.indexOf(id);
    if (r < 0) throw new RangeError(`at: receptor "${id}" is not in the scenario; use one of ${receptorIds.join(', ')}`);
    if (receptors[r] > highest) highest = receptors[r];
  }
  return highest;
}

/**
 * Find the lowest stack height that meets a target.
 *
 * @param scenario the base scenario (its grid is pinned so every height runs on it)
 * @param spec target, where, range and tolerance
 * @param options how to run a member, lanes, progress and cancellation
 * @example await findStackHeight(scenario, { target_ug_m3: 0.4, at: 'ground', minHeight_m: 10, maxHeight_m: 80, tolerance_m: 1 }, { runMember })
 */
export async function findStackHeight(scenario: Scenario, spec: StackHeightSpec, options: StackHeightOptions): Promise<StackHeightResult> {
  const { minHeight_m: low, maxHeight_m: high, tolerance_m: tolerance, target_ug_m3: target } = spec;
  if (!(Number.isFinite(low) && low >= 0)) throw new RangeError(`minHeight_m: ${low} is not allowed (a height >= 0 m)`);
  if (!(Number.isFinite(high) && high > low)) throw new RangeError(`maxHeight_m: ${high} is not allowed (a height above minHeight_m, ${low} m)`);
  if (!(Number.isFinite(tolerance) && tolerance > 0)) throw new RangeError(`tolerance_m: ${tolerance} is not allowed (a length > 0 m)`);
  if (!(Number.isFinite(target) && target > 0)) throw new RangeError(`target_ug_m3: ${target} is not allowed (a concentration > 0 ug/m3)`);
  const base = withFixedDomain(scenario);
  const sourceId = sweptSourceId(base, 'stackHeight_m', spec.sourceId);
  if (base.domain !== undefined && high >= base.domain.height_m) {
    throw new RangeError(`maxHeight_m: ${high} m is not below the grid's top, domain.height_m = ${base.domain.height_m} m`);
  }
  const receptorIds = base.receptors.map((r) => r.id);
  if (spec.at !== 'ground') for (const id of spec.at) if (!receptorIds.includes(id)) throw new RangeError(`at: receptor "${id}" is not in the scenario; use one of ${receptorIds.join(', ')}`);
  const lanes = Math.max(1, Math.floor(options.lanes ?? 1));
  const control = options.control ?? {};
  const curve = new Map<number, StackHeightPoint>();
  let runs = 0;

  const evaluate = async (heights: number[]): Promise<void> => {
    const todo = heights.filter((h) => !curve.has(h));
    let next = 0;
    const lane = async (laneIndex: number) => {
      while (next < todo.length) {
        const height = todo[next++];
        control.signal?.throwIfAborted();
        const result = await options.runMember(applySweepValue(base, 'stackHeight_m', height, sourceId), laneIndex, { signal: control.signal });
        const pc = highestPc(result, receptorIds, spec);
        curve.set(height, { height_m: height, pc_ug_m3: pc, meetsTarget: pc < target });
        runs++;
        control.onProgress?.(Math.min(0.99, runs / (runs + 4)), `stack height: ${runs} runs, ${height} m gives ${pc.toPrecision(3)} ug/m3`);
      }
    };
    await Promise.all(Array.from({ length: Math.min(lanes, todo.length) }, (_, t) => lane(t)));
  };

  const firstCount = Math.max(2, 2 * lanes);
  await evaluate(Array.from({ length: firstCount }, (_, k) => round(low + ((high - low) * k) / (firstCount - 1))));
  const sorted = () => [...curve.values()].sort((a, b) => a.height_m - b.height_m);
  const bracketOf = (): [number | null, number | null] => {
    const points = sorted();
    const lowestPass = points.find((p) => p.meetsTarget);
    if (lowestPass === undefined) return [null, null];
    const failsBelow = points.filter((p) => !p.meetsTarget && p.height_m < lowestPass.height_m);
    return [failsBelow.length > 0 ? failsBelow[failsBelow.length - 1].height_m : null, lowestPass.height_m];
  };
  let [fail, pass] = bracketOf();
  while (pass !== null && fail !== null && pass - fail > tolerance) {
    const cuts = Array.from({ length: lanes }, (_, k) => round(fail! + ((pass! - fail!) * (k + 1)) / (lanes + 1))).filter((h) => h > fail! && h < pass!);
    if (cuts.length === 0) break;
    await evaluate(cuts);
    [fail, pass] = bracketOf();
  }
  const points = sorted();
  const monotone = pass === null || !points.some((p) => p.height_m > pass! && !p.meetsTarget);
  const where = spec.at === 'ground' ? 'on the ground' : `at ${spec.at.join(', ')}`;
  const what = spec.standard === undefined ? 'the highest PC' : `the highest figure of ${spec.standard}`;
  let message: string;
  if (pass === null) {
    const top = curve.get(high)!;
    message = `no stack height from ${low} to ${high} m brings ${what} ${where} below ${target} ug/m3: at ${high} m it is ${top.pc_ug_m3.toPrecision(3)} ug/m3`;
  } else if (fail === null) {
    message = `the lowest allowed height, ${low} m, already brings ${what} ${where} below ${target} ug/m3`;
  } else {
    message = `${pass} m is the lowest height run that brings ${what} ${where} below ${target} ug/m3 (${fail} m does not; tolerance ${tolerance} m)`;
  }
  if (!monotone) message += '; the PC rises again at some greater height run, so the curve is not monotone: check it';
  const flags = pass === null ? [] : downwashFlags(base.sources, new Map([[sourceId, pass]]));
  const downwash = flags.find((flag) => flag.sourceId === sourceId) ?? null;
  if (downwash?.flagged) {
    const why = [
      downwash.belowGoodEngineeringPractice ? `below the good-engineering-practice height ${downwash.goodEngineeringPracticeHeight_m} m` : null,
      downwash.withinWake ? `within 5 L = ${downwash.nearbyDistance_m} m of the building` : null,
    ].filter((reason) => reason !== null);
    message += `; at ${pass} m the stack is still flagged for building downwash (${why.join(' and ')})`;
  }
  control.onProgress?.(1, 'stack height: done');
  return {
    found: pass !== null,
    height_m: pass,
    bracket: pass !== null && fail !== null ? [fail, pass] : null,
    target_ug_m3: target,
    tolerance_m: tolerance,
    sourceId,
    at: spec.at === 'ground' ? 'ground' : [...spec.at],
    standard: spec.standard ?? null,
    curve: points,
    runs,
    monotone,
    downwash,
    message,
  };
}

/** Heights to 1 mm, so that cut points print plainly and repeat exactly. */
function round(height_m: number): number {
  return Math.round(height_m * 1000) / 1000;
}
