/**
 * Sweeps and the stack-height search, in Gaussian mode on a coarse grid (quick): an emission sweep from
 * one run equals member-by-member runs (linearity, solver/drivers/types.ts); the search agrees with a
 * dense sweep of the same heights (the lowest dense height meeting the target lies within the tolerance
 * below the answer); no height in range is reported as such.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { findStackHeight } from '../../../solver/assessment/stackHeight.ts';
import { applySweepValue, runSweep, type MemberRunner } from '../../../solver/assessment/sweep.ts';
import { runScenario } from '../../../solver/drivers/runScenario.ts';

const DEMO = path.join(import.meta.dirname, '..', '..', '..', 'scenarios', 'merrowdene-heat-plant', 'scenario.json');

/** The demo's stack alone (the yard's ground release would dominate the ground maximum), coarse grid. */
function stackOnly(change: (raw: Record<string, any>) => void = () => {}): Scenario {
  const raw = JSON.parse(readFileSync(DEMO, 'utf8'));
  raw.domain = { halfWidth_m: 3000, spacing_m: 100, height_m: 1000, layers: 10 };
  raw.solver = { mode: 'gaussian' };
  raw.sources = raw.sources.slice(0, 1);
  change(raw);
  const outcome = parseScenario(raw);
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  return outcome.scenario;
}

const runMember: MemberRunner = (scenario, _lane, control) => runScenario(scenario, { control });

describe('runSweep', () => {
  it('does an emission sweep of the only emitting source from one run, equal to running each member', async () => {
    const scenario = stackOnly();
    const values = [0.5, 1.6, 4];
    const linear = await runSweep(scenario, { parameter: 'emission_g_s', values }, { runMember });
    expect([linear.method, linear.runs]).toEqual(['linear', 1]);
    for (const [k, value] of values.entries()) {
      const direct = await runScenario(applySweepValue(scenario, 'emission_g_s', value), {});
      const peak = Math.max(...direct.footprint_ug_m3);
      expect(linear.members[k].groundMax_ug_m3 / peak).toBeCloseTo(1, 12);
      direct.receptorColumns[0].values.forEach((v, r) => expect(linear.members[k].receptors_ug_m3[r] / v).toBeCloseTo(1, 12));
    }
  });

  it('runs a stack-height sweep member by member on two lanes, keeping the order of the values', async () => {
    const sweep = await runSweep(stackOnly(), { parameter: 'stackHeight_m', values: [20, 40, 60] }, { runMember, lanes: 2 });
    expect([sweep.method, sweep.runs, sweep.sourceId]).toEqual(['members', 3, 'boiler-stack']);
    expect(sweep.members.map((m) => m.value)).toEqual([20, 40, 60]);
    // a taller stack lowers the ground maximum (same emission, same weather)
    expect(sweep.members[0].groundMax_ug_m3).toBeGreaterThan(sweep.members[1].groundMax_ug_m3);
    expect(sweep.members[1].groundMax_ug_m3).toBeGreaterThan(sweep.members[2].groundMax_ug_m3);
    expect(() => applySweepValue(stackOnly(), 'stackHeight_m', -1)).toThrow(/stackHeight_m: -1 is not allowed/);
  });
});

describe('findStackHeight', () => {
  it('agrees with a dense sweep: the lowest dense height below the target is within the tolerance under the answer', async () => {
    const scenario = stackOnly();
    const dense = await runSweep(scenario, { parameter: 'stackHeight_m', values: Array.from({ length: 31 }, (_, k) => 20 + 2 * k) }, { runMember, lanes: 2 });
    const target = 0.5 * (dense.members[0].groundMax_ug_m3 + dense.members[30].groundMax_ug_m3) * 0.6;
    const firstDense = dense.members.find((m) => m.groundMax_ug_m3 < target)!.value;
    const found = await findStackHeight(scenario, { target_ug_m3: target, at: 'ground', minHeight_m: 20, maxHeight_m: 80, tolerance_m: 1 }, { runMember, lanes: 2 });
    expect(found.found).toBe(true);
    expect(found.monotone).toBe(true);
    expect(found.bracket![1] - found.bracket![0]).toBeLessThanOrEqual(1);
    // the answer meets the target; the dense grid's first pass is at or above it and within 2 m (its step)
    expect(found.curve.find((p) => p.height_m === found.height_m)!.pc_ug_m3).toBeLessThan(target);
    expect(firstDense).toBeGreaterThanOrEqual(found.height_m! - 1e-9);
    expect(firstDense - found.height_m!).toBeLessThanOrEqual(2 + 1);
    expect(found.runs).toBeLessThan(20);
  });

  it('says when no height in the allowed range meets the target', async () => {
    const found = await findStackHeight(stackOnly(), { target_ug_m3: 1e-6, at: ['school'], minHeight_m: 20, maxHeight_m: 40, tolerance_m: 1 }, { runMember });
    expect(found.found).toBe(false);
    expect(found.height_m).toBeNull();
    expect(found.message).toMatch(/no stack height from 20 to 40 m/);
  });
});
