/**
 * Pure advection of a square pulse with the limited scheme: no overshoot or undershoot (the limiter's
 * promise: a TVD scheme creates no new extrema, Sweby 1984, SIAM J. Numer. Anal. 21:995) and the mass is
 * exact (flux form in a periodic box: what leaves a cell enters its neighbour).
 */
import { describe, expect, it } from 'vitest';
import { PeriodicBoundaries } from '../../../solver/boundaries/boundaryConditions.ts';
import { ConstantDiffusivity } from '../../../solver/closures/constantDiffusivity.ts';
import { UpwindAdvection } from '../../../solver/advection/schemes.ts';
import { paddedFieldMass_g } from '../../../solver/fields/paddedLayout.ts';
import { uniformColumnWind } from '../../../solver/wind/columnWind.ts';
import { testGrid } from '../verification/testGrid.ts';
import { extremes, fieldOf, modelWithField, runTo } from '../verification/helpers.ts';

const pulse = (i: number, j: number): number => (i >= 8 && i < 20 && j >= 10 && j < 22 ? 2.5 : 0);
const pulseAlongX = (i: number): number => (i >= 8 && i < 20 ? 2.5 : 0);

describe('square pulse, pure advection, periodic box', () => {
  for (const windFrom_deg of [270, 225, 160]) {
    it(`stays within [0, 2.5] g/m3 with exact mass, wind from ${windFrom_deg} deg`, () => {
      const grid = testGrid({ nx: 48, ny: 40, nz: 2, height_m: 20, spacing_m: 10 });
      const model = modelWithField(
        { grid, wind: uniformColumnWind(grid, 4, windFrom_deg), closure: new ConstantDiffusivity(0, 0), boundaries: { lateral: PeriodicBoundaries() } },
        pulse,
      );
      const initialMass = paddedFieldMass_g(model.layout, grid, model.field);
      runTo(model, 150); // 600 m of travel: more than once round the 480 m box
      const { min, max } = extremes(fieldOf(model));
      expect(min).toBeGreaterThanOrEqual(0);
      expect(max).toBeLessThanOrEqual(2.5 * (1 + 1e-14));
      // something did move and was not smeared flat: the limited scheme keeps a peak above 85 % of the top
      expect(max).toBeGreaterThan(0.85 * 2.5);
      const mass = paddedFieldMass_g(model.layout, grid, model.field);
      expect(Math.abs(mass - initialMass) / initialMass).toBeLessThan(1e-13);
    });
  }

  it('the limited scheme stays closer to the exactly shifted pulse than first-order upwind', () => {
    const grid = testGrid({ nx: 64, ny: 2, nz: 1, height_m: 10, spacing_m: 10 });
    // the same step for both schemes (Courant number 0.5)
    const parts = { grid, wind: uniformColumnWind(grid, 4, 270), closure: new ConstantDiffusivity(0, 0), boundaries: { lateral: PeriodicBoundaries() }, maxTimeStep_s: 1.25 };
    // 100 s at 4 m/s = 400 m = exactly 40 cells: the exact answer is the pulse moved 40 cells east.
    const exact = (i: number): number => pulseAlongX((i - 40 + 64) % 64);
    const errorOf = (field: Float64Array): number => {
      let error = 0;
      for (let n = 0; n < field.length; n++) error += Math.abs(field[n] - exact(n % 64));
      return error / field.length;
    };
    const limited = errorOf(fieldOf(runTo(modelWithField(parts, pulseAlongX), 100)));
    const upwind = errorOf(fieldOf(runTo(modelWithField({ ...parts, advection: UpwindAdvection }, pulseAlongX), 100)));
    expect(limited).toBeLessThan(0.5 * upwind);
  });
});
