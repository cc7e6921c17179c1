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

describe('downwashFlags', () => {
  it('flags a stack below H + 1.5 L within 5 L of the building, and no other', () => {
    const building = { height_m: 30, width_m: 50, distance_m: 40 };
    const [low] = downwashFlags([stack(60, building)]);
    expect(low).toMatchObject({ flagged: true, belowGoodEngineeringPractice: true, withinWake: true, goodEngineeringPracticeHeight_m: 75 });
    expect(low.message).toMatch(/downwash is likely/);
    expect(downwashFlags([stack(75, building)])[0].flagged).toBe(false);
    expect(downwashFlags([stack(60, { ...building, distance_m: 200 })])[0].flagged).toBe(false);
    expect(downwashFlags([stack(60)])).toEqual([]);
    // a searched stack height replaces the source's own
    expect(downwashFlags([stack(60, building)], new Map([['stack', 80]]))[0].flagged).toBe(false);
  });
});
