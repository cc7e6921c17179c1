/**
 * Footprint level areas against an analytic field whose isopleths are known exactly: the Gaussian hill
 * C = exp(-(x^2 / (2 sx^2) + y^2 / (2 sy^2))), whose level L is the ellipse with semi-axes
 * a = sx sqrt(2 ln(1/L)), b = sy sqrt(2 ln(1/L)) and area pi a b (exact), converging as the grid refines.
 */
import { describe, expect, it } from 'vitest';
import { levelAreas, levelsFromPercentages } from '../../../solver/assessment/footprintAreas.ts';

const SX = 300;
const SY = 150;
const HALF_WIDTH = 1000;

function hill(spacing: number, centre: [number, number] = [0, 0]) {
  const n = Math.round((2 * HALF_WIDTH) / spacing);
  const grid = { nx: n, ny: n, spacing_m: spacing, xWest_m: -HALF_WIDTH, ySouth_m: -HALF_WIDTH };
  const field = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      const x = grid.xWest_m + (i + 0.5) * spacing - centre[0];
      const y = grid.ySouth_m + (j + 0.5) * spacing - centre[1];
      field[i + n * j] = 100 * Math.exp(-(x * x) / (2 * SX * SX) - (y * y) / (2 * SY * SY));
    }
  }
  return { grid, field };
}

const semiAxes = (level: number): [number, number] => {
  const r = Math.sqrt(2 * Math.log(100 / level));
  return [SX * r, SY * r];
};

describe('levelAreas on a Gaussian hill (ellipses of area pi a b)', () => {
  const levels = [10, 50, 90];

  it('converges to pi a b as the spacing halves, second order', () => {
    const errors = [50, 25, 12.5].map((spacing) => {
      const { grid, field } = hill(spacing);
      return levelAreas(field, grid, levels).map((entry, k) => {
        const [a, b] = semiAxes(levels[k]);
        return Math.abs(entry.area_m2 - Math.PI * a * b) / (Math.PI * a * b);
      });
    });
    for (let k = 0; k < levels.length; k++) {
      expect(errors[1][k]).toBeLessThan(errors[0][k] / 3);
      expect(errors[2][k]).toBeLessThan(errors[1][k] / 3);
    }
    // at 12.5 m the 10 % and 50 % ellipses are within 0.05 %; the 90 % one (a = 138 m, b = 69 m, 5.5 cells
    // across its minor axis) within 1 % (measured 0.027 %, 0.041 %, 0.60 %)
    expect(errors[2][0]).toBeLessThan(5e-4);
    expect(errors[2][1]).toBeLessThan(5e-4);
    expect(errors[2][2]).toBeLessThan(1e-2);
  });

  it('gives the farthest distance from the centre as the semi-major axis a, hectares, and receptors inside', () => {
    const { grid, field } = hill(12.5);
    const [entry] = levelAreas(field, grid, [10], {
      sources: [
        { id: 'centre', x_m: 0, y_m: 0 },
        { id: 'east', x_m: 500, y_m: 0 },
      ],
      receptors: [
        { id: 'inside', x_m: 400, y_m: 0 },
        { id: 'just-outside', x_m: 0, y_m: semiAxes(10)[1] + 5 },
        { id: 'off-grid', x_m: 5000, y_m: 0 },
      ],
    });
    const [a] = semiAxes(10);
    expect(entry.farthest[0].distance_m).toBeCloseTo(a, -0.3); // within about 1 m of 643.8 m
    // from (500, 0) the farthest point is the west end of the major axis, at 500 + a
    expect(entry.farthest[1].distance_m! / (500 + a)).toBeCloseTo(1, 3);
    expect(entry.area_ha).toBeCloseTo(entry.area_m2 / 10_000, 12);
    expect(entry.receptorsInside).toEqual(['inside']);
    expect(entry.reachesGridEdge).toBe(false);
  });

  it('covers exactly the grid when the field is above the level everywhere, and nothing when below', () => {
    const grid = { nx: 4, ny: 3, spacing_m: 10, xWest_m: 0, ySouth_m: 0 };
    const field = new Float64Array(12).fill(5);
    const [all, none] = levelAreas(field, grid, [5, 6], { sources: [{ id: 's', x_m: 0, y_m: 0 }] });
    expect(all.area_m2).toBe(1200);
    expect(all.reachesGridEdge).toBe(true);
    expect(all.farthest[0].distance_m).toBeCloseTo(50, 12); // the far corner (40, 30)
    expect(none.area_m2).toBe(0);
    expect(none.farthest[0].distance_m).toBeNull();
  });

  it('rejects a field of the wrong size and levels that are not positive', () => {
    const grid = { nx: 2, ny: 2, spacing_m: 1, xWest_m: 0, ySouth_m: 0 };
    expect(() => levelAreas(new Float64Array(3), grid, [1])).toThrow(/length 3/);
    expect(() => levelAreas(new Float64Array(4), grid, [0])).toThrow(/levels_ug_m3\[0\]: 0/);
  });
});

describe('levelsFromPercentages', () => {
  it('gives 1, 10, 50 and 100 % of the annual NO2 limit 40 ug/m3 (EU 2008/50/EC) as 0.4, 4, 20, 40', () => {
    expect(levelsFromPercentages([1, 10, 50, 100], 40)).toEqual([0.4, 4, 20, 40]);
    expect(() => levelsFromPercentages([10, 1], 40)).toThrow(/percentages\[1\]/);
  });
});
