/**
 * Building downwash flag against the good-engineering-practice height of 40 CFR 51.100(ii) (REFERENCES.md
 * [read]): Hg = H + 1.5 L, L the lesser of building height and width.
 */
import { describe, expect, it } from 'vitest';
import type { PointSource } from '../../../scenarios/format/types.ts';
import { downwashFlags, goodEngineeringPracticeHeight } from '../../../solver/assessment/downwash.ts';

const stack = (height_m: number, building?: PointSource['building']): PointSource => ({
  kind: 'point', id: 'stack', name: 'stack', lat: 54, lon: -2, height_m, diameter_m: 1, exitVelocity_m_s: 10,
  exitTemperature_K: 400, emission_g_s: 1, plumeRise: true, building,
});

describe('good-engineering-practice height (40 CFR 51.100(ii))', () => {
  it('gives 75 m for a 30 m high, 50 m wide building (issue 10 worked case: 30 + 1.5 x 30)', () => {
    expect(goodEngineeringPracticeHeight({ height_m: 30, width_m: 50, distance_m: 0 })).toEqual({ height_m: 75, lesserDimension_m: 30, nearbyDistance_m: 150 });
  });
  it('takes the width when it is the lesser: 40 m high, 20 m wide gives 40 + 30 = 70 m', () => {
    expect(goodEngineeringPracticeHeight({ height_m: 40, width_m: 20, distance_m: 0 }).height_m).toBe(70);
  });
});

describe('downwashFlags: below H + 1.5 L or within 5 L (issue 10)', () => {
  // the worked building: 30 m high, 50 m wide -> Hg = 75 m, 5 L = 150 m (40 CFR 51.100(ii); 5 L as the issue states it)
  const near = { height_m: 30, width_m: 50, distance_m: 40 };
  const far = { ...near, distance_m: 200 };

  it('flags a stack that is both below Hg and within 5 L, naming both', () => {
    const [flag] = downwashFlags([stack(60, near)]);
    expect(flag).toMatchObject({ flagged: true, belowGoodEngineeringPractice: true, withinWake: true, goodEngineeringPracticeHeight_m: 75, nearbyDistance_m: 150 });
    expect(flag.message).toMatch(/lower than the good-engineering-practice height 75 m .* and within 5 L = 150 m of the building: building downwash is likely/);
  });

  it('flags a stack below Hg even when the building is beyond 5 L', () => {
    const [flag] = downwashFlags([stack(60, far)]);
    expect(flag).toMatchObject({ flagged: true, belowGoodEngineeringPractice: true, withinWake: false });
    expect(flag.message).toMatch(/lower than the good-engineering-practice height 75 m.*: building downwash is likely/);
    expect(flag.message).not.toMatch(/within 5 L/);
  });

  it('flags a stack at or above Hg when it stands within 5 L of the building', () => {
    for (const height of [75, 80]) {
      const [flag] = downwashFlags([stack(height, near)]);
      expect(flag).toMatchObject({ flagged: true, belowGoodEngineeringPractice: false, withinWake: true });
      expect(flag.message).toMatch(/within 5 L = 150 m of the building: building downwash is likely/);
    }
  });

  it('does not flag a stack at or above Hg beyond 5 L, nor a stack without a building', () => {
    for (const height of [75, 80]) {
      const [flag] = downwashFlags([stack(height, far)]);
      expect(flag).toMatchObject({ flagged: false, belowGoodEngineeringPractice: false, withinWake: false });
      expect(flag.message).toMatch(/reaches the good-engineering-practice height 75 m and stands 200 m from the building, beyond 5 L = 150 m: not flagged/);
    }
    // 5 L exactly is not within (the rule reads "within", a strict bound as written here)
    expect(downwashFlags([stack(80, { ...near, distance_m: 150 })])[0].flagged).toBe(false);
    expect(downwashFlags([stack(60)])).toEqual([]);
  });

  it('a searched stack height replaces the source\'s own', () => {
    expect(downwashFlags([stack(60, far)], new Map([['stack', 80]]))[0].flagged).toBe(false);
    expect(downwashFlags([stack(80, far)], new Map([['stack', 60]]))[0].flagged).toBe(true);
  });
});
