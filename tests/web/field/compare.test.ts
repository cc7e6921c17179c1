/**
 * Comparing two runs: the difference field and the receptor changes, checked on small hand-made cases.
 */
import { describe, expect, it } from 'vitest';
import { differenceField, gridMismatch, largestDifference, receptorDeltas } from '../../../web/field/compare.ts';
import type { GroundField } from '../../../web/field/groundField.ts';

const grid = { nx: 2, ny: 1, spacing_m: 50, xWest_m: -50, ySouth_m: -25 };
const field = (values: number[], g = grid): GroundField => ({ grid: g, values: Float32Array.from(values), statistic: 'concentration', origin: 'x', height_m: 1.5 });

describe('differenceField', () => {
  it('subtracts B from A column by column', () => {
    const difference = differenceField(field([5, 1]), field([2, 3]), 'A - B');
    expect(Array.from(difference.values)).toEqual([3, -2]);
    expect(largestDifference(difference)).toBe(3);
    expect(difference.statistic).toBe('difference of concentration');
  });

  it('refuses grids that differ, saying how', () => {
    expect(() => differenceField(field([1, 2]), field([1, 2], { ...grid, spacing_m: 100 }), 'x')).toThrow(/spacing_m 50 vs 100/);
    expect(gridMismatch(grid, { ...grid })).toBeNull();
  });
});

describe('receptorDeltas', () => {
  it('matches receptors by id and reports the ones only in one run', () => {
    const a = [
      { id: 'school', name: 'School', concentration_ug_m3: 4 },
      { id: 'new', name: 'New houses', concentration_ug_m3: 1 },
    ];
    const b = [
      { id: 'care', name: 'Care home', concentration_ug_m3: 0.5 },
      { id: 'school', name: 'School', concentration_ug_m3: 5.5 },
    ];
    expect(receptorDeltas(a, b, 'concentration_ug_m3')).toEqual([
      { id: 'school', name: 'School', a_ug_m3: 4, b_ug_m3: 5.5, delta_ug_m3: -1.5 },
      { id: 'new', name: 'New houses', a_ug_m3: 1, b_ug_m3: null, delta_ug_m3: null },
      { id: 'care', name: 'Care home', a_ug_m3: null, b_ug_m3: 0.5, delta_ug_m3: null },
    ]);
  });
});
