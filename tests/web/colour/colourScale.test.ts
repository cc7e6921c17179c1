/**
 * The overlay's colour scale: the ramp against published viridis values, its lightness order (what
 * makes it readable without full colour vision), and the log and linear mappings against their
 * definitions.
 */
import { describe, expect, it } from 'vitest';
import { ColourScale, DifferenceScale, DIVERGING_CONTROL_POINTS, divergingColour, hexToRgb, lightness, paintField, rampColour, RAMP_CONTROL_POINTS } from '../../../web/colour/colourScale.ts';

/**
 * viridis at t = 0, 0.25, 0.5, 0.75, 1 as commonly published with matplotlib's colour map (van der Walt
 * and Smith 2015; from memory). The ramp is built from a different, ten-point list, so agreeing with
 * these checks both the list and the interpolation.
 */
const PUBLISHED_FIVE_STOPS: [number, string][] = [
  [0, '#440154'],
  [0.25, '#3b528b'],
  [0.5, '#21918c'],
  [0.75, '#5ec962'],
  [1, '#fde725'],
];

describe('the colour ramp', () => {
  it('matches the published five-stop viridis values within 3 units in 255 per channel', () => {
    for (const [t, hex] of PUBLISHED_FIVE_STOPS) {
      const expected = hexToRgb(hex);
      const got = rampColour(t);
      for (let c = 0; c < 3; c++) expect(Math.abs(got[c] - expected[c]), `t=${t} channel ${c}`).toBeLessThanOrEqual(3);
    }
  });

  it('rises in lightness (CIE L*) at every step, so order reads without hue', () => {
    let previous = -Infinity;
    for (let n = 0; n <= 255; n++) {
      const l = lightness(rampColour(n / 255));
      expect(l).toBeGreaterThan(previous);
      previous = l;
    }
    // From near-black violet to near-white yellow: a wide lightness span.
    expect(lightness(rampColour(1)) - lightness(rampColour(0))).toBeGreaterThan(70);
  });

  it('computes CIE L* as published: white 100, black 0, sRGB grey 119 is L* 50.0 (common practice, from memory)', () => {
    expect(lightness([255, 255, 255])).toBeCloseTo(100, 6);
    expect(lightness([0, 0, 0])).toBeCloseTo(0, 6);
    expect(lightness([119, 119, 119])).toBeCloseTo(50.0, 1);
  });

  it('is no rainbow: it has ten control points and starts violet, ends yellow', () => {
    expect(RAMP_CONTROL_POINTS).toHaveLength(10);
    const [r0, , b0] = hexToRgb(RAMP_CONTROL_POINTS[0]);
    const [r1, g1, b1] = hexToRgb(RAMP_CONTROL_POINTS[9]);
    expect(b0).toBeGreaterThan(r0 - 20);
    expect(r1).toBeGreaterThan(200);
    expect(g1).toBeGreaterThan(200);
    expect(b1).toBeLessThan(60);
  });
});

describe('ColourScale', () => {
  it('log: the floor maps to 0, the ceiling to 1 and their geometric mean to 0.5 (definition of a log axis)', () => {
    const scale = new ColourScale(0.04, 40);
    expect(scale.position(0.04)).toBeCloseTo(0, 12);
    expect(scale.position(40)).toBeCloseTo(1, 12);
    expect(scale.position(Math.sqrt(0.04 * 40))).toBeCloseTo(0.5, 12);
    expect(scale.position(0.4)).toBeCloseTo(1 / 3, 12);
    expect(scale.position(400)).toBe(1);
    expect(Number.isNaN(scale.position(0.039))).toBe(true);
    expect(Number.isNaN(scale.position(0))).toBe(true);
    expect(scale.colour(0.01)).toBeNull();
    expect(scale.valueAt(scale.position(3.3))).toBeCloseTo(3.3, 10);
  });

  it('linear: positions proportional to the value', () => {
    const scale = new ColourScale(0, 50, { kind: 'linear' });
    expect(scale.position(12.5)).toBeCloseTo(0.25, 12);
    expect(scale.valueAt(0.8)).toBeCloseTo(40, 12);
    expect(Number.isNaN(scale.position(0))).toBe(true);
  });

  it('refuses a floor or ceiling that makes no scale, naming it', () => {
    expect(() => new ColourScale(0, 10)).toThrow(/floor: 0/);
    expect(() => new ColourScale(5, 5)).toThrow(/ceiling: 5/);
    expect(() => new ColourScale(1, Number.NaN)).toThrow(/ceiling/);
  });
});

describe('paintField', () => {
  it('puts the north row first (image order) and leaves values below the floor transparent', () => {
    // 2 x 2 field, i + nx * j with j = 0 south: south row [0, 1], north row [10, 100].
    const field = [0, 1, 10, 100];
    const pixels = new Uint8ClampedArray(16);
    paintField(field, 2, 2, new ColourScale(1, 100), pixels);
    const pixel = (p: number) => Array.from(pixels.slice(4 * p, 4 * p + 4));
    // Image pixel 0 is the north-west column: value 10, half-way up the log scale.
    const mid = rampColour(0.5).map(Math.round);
    expect(pixel(0).slice(0, 3).map((v, c) => Math.abs(v - mid[c]) <= 1)).toEqual([true, true, true]);
    expect(pixel(0)[3]).toBe(255);
    // Image pixel 1: north-east, 100, the top colour.
    expect(pixel(1).slice(0, 3)).toEqual(hexToRgb('#fde725'));
    // Image pixel 2: south-west, 0, below the floor: transparent.
    expect(pixel(2)[3]).toBe(0);
    // Image pixel 3: south-east, 1, the floor: the bottom colour.
    expect(pixel(3).slice(0, 3)).toEqual(hexToRgb('#440154'));
  });

  it('refuses a field that does not fit the grid', () => {
    expect(() => paintField([1, 2, 3], 2, 2, new ColourScale(1, 2), new Uint8ClampedArray(16))).toThrow(/3 values for a 2 x 2 grid/);
  });
});

describe('the difference ramp and scale', () => {
  it('is lightest at zero and darkens steadily toward both ends (readable by lightness alone)', () => {
    const mid = lightness(divergingColour(0.5));
    let previous = mid;
    for (let n = 1; n <= 50; n++) {
      const l = lightness(divergingColour(0.5 + n / 100));
      expect(l).toBeLessThan(previous);
      previous = l;
    }
    previous = mid;
    for (let n = 1; n <= 50; n++) {
      const l = lightness(divergingColour(0.5 - n / 100));
      expect(l).toBeLessThan(previous);
      previous = l;
    }
    expect(DIVERGING_CONTROL_POINTS).toHaveLength(11);
  });

  it('maps differences symmetrically about zero and leaves tiny ones undrawn', () => {
    const scale = new DifferenceScale(10, 0.1);
    expect(scale.position(10)).toBe(1);
    expect(scale.position(-10)).toBe(0);
    expect(scale.position(5)).toBeCloseTo(0.75, 12);
    expect(scale.position(-2.5)).toBeCloseTo(0.375, 12);
    expect(scale.position(-40)).toBe(0);
    expect(Number.isNaN(scale.position(0.05))).toBe(true);
    expect(scale.valueAt(0.25)).toBeCloseTo(-5, 12);
    expect(() => new DifferenceScale(0)).toThrow(/limit: 0/);
  });
});
