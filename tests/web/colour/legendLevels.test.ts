/**
 * Legend ticks, colour range and isopleth levels, checked against their definitions and against the
 * command line's own choice of footprint levels (server/writers/footprint.ts), so the page and the
 * exported files draw the same lines.
 */
import { describe, expect, it } from 'vitest';
import { defaultFootprintLevels } from '../../../server/writers/footprint.ts';
import { defaultColourRange, fieldRange, formatConcentration, isoplethLevels, legendTicks } from '../../../web/colour/legendLevels.ts';

describe('defaultColourRange', () => {
  it('log: three decades below the peak, not below the smallest positive value', () => {
    expect(defaultColourRange([0, 0.001, 5, 40], 'log')).toEqual({ floor: 0.04, ceiling: 40 });
    expect(defaultColourRange([0, 1, 5, 40], 'log')).toEqual({ floor: 1, ceiling: 40 });
    expect(defaultColourRange([0, 0.001, 5, 40], 'log', 1)).toEqual({ floor: 4, ceiling: 40 });
  });

  it('linear: from zero to the peak; an empty field has no range', () => {
    expect(defaultColourRange([0, 3, 7], 'linear')).toEqual({ floor: 0, ceiling: 7 });
    expect(defaultColourRange([0, 0, 0], 'log')).toBeNull();
    expect(defaultColourRange([], 'log')).toBeNull();
  });

  it('a flat positive field still gets a decade', () => {
    expect(defaultColourRange([2, 2, 2], 'log')).toEqual({ floor: 0.2, ceiling: 2 });
  });
});

describe('legendTicks', () => {
  it('log: the 1-2-5 series inside the range when it fits', () => {
    expect(legendTicks(0.3, 12, 'log')).toEqual([0.5, 1, 2, 5, 10]);
  });

  it('log: only powers of ten when the 1-2-5 series has too many', () => {
    // 0.04..40 holds 0.05, 0.1, 0.2, 0.5, 1, 2, 5, 10, 20: nine, more than eight.
    expect(legendTicks(0.04, 40, 'log')).toEqual([0.1, 1, 10]);
    expect(legendTicks(1e-6, 1e6, 'log')).toEqual([1e-6, 1e-4, 0.01, 1, 100, 1e4, 1e6]);
  });

  it('linear: round steps from the 1-2-5 series', () => {
    expect(legendTicks(0, 37, 'linear')).toEqual([0, 5, 10, 15, 20, 25, 30, 35]);
    expect(legendTicks(0, 1, 'linear', 6)).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
  });

  it('every tick lies inside the range', () => {
    for (const [lo, hi] of [[0.0123, 456], [3e-5, 0.07], [17, 18]] as const) {
      for (const tick of legendTicks(lo, hi, 'log')) {
        expect(tick).toBeGreaterThanOrEqual(lo);
        expect(tick).toBeLessThanOrEqual(hi);
      }
    }
  });
});

describe('isoplethLevels', () => {
  it('follows the documented example: a field from 0 to 37 gives 0.2 ... 20', () => {
    expect(isoplethLevels([0, 37])).toEqual([0.2, 0.5, 1, 2, 5, 10, 20]);
  });

  it('agrees with the command line footprint levels on varied fields', () => {
    const fields = [
      [0, 37],
      [0.004, 0.9],
      [1.2, 3.4, 500],
      [0, 1e-5, 2e-3],
      [5, 5.5],
      [0, 10],
      Array.from({ length: 50 }, (_, n) => Math.exp(-n / 5) * 123),
    ];
    for (const field of fields) expect(isoplethLevels(field), JSON.stringify(field)).toEqual(defaultFootprintLevels(field));
  });

  it('gives no levels for an empty or zero field', () => {
    expect(isoplethLevels([0, 0])).toEqual([]);
  });
});

describe('formatting', () => {
  it('three significant figures, exponent only for very small or large values', () => {
    expect(formatConcentration(12.345)).toBe('12.3');
    expect(formatConcentration(0.0004567)).toBe('4.57e-4');
    expect(formatConcentration(0)).toBe('0');
    expect(formatConcentration(123456)).toBe('1.23e5');
    expect(formatConcentration(Number.NaN)).toBe('–');
  });

  it('fieldRange finds minimum, smallest positive and peak', () => {
    expect(fieldRange([0, 3, 0.5, 9])).toEqual({ minimum: 0, minimumPositive: 0.5, peak: 9 });
  });
});
