/**
 * Steady continuous point source, constant isotropic K, uniform wind along x, reflecting ground: the exact
 * solution C = Q / (4 pi K r) exp((u x - r sqrt(u^2 + 4 k K)) / (2 K)) plus its image source at -H
 * (../shared/REFERENCES.md, after Stockie 2011, SIAM Review 53(2):349), with and without first-order
 * decay, at ground level (the lowest layer centre, 2.5 m) and on the plume centreline (z = H).
 * Tolerance: 3 % from 200 m downwind, 5 % at 100 m (the source is spread over a few 10 m cells).
 */
import { describe, expect, it } from 'vitest';
import { ConstantDiffusivity } from '../../../solver/closures/constantDiffusivity.ts';
import { createDispersionModel } from '../../../solver/drivers/model.ts';
import { steadyBudgetRates_g_s } from '../../../solver/drivers/gridSteady.ts';
import { sampleField } from '../../../solver/diagnostics/receptorSampling.ts';
import { FirstOrderDecay } from '../../../solver/losses/firstOrderLosses.ts';
import { steadyPointSourceWithImage_g_m3 } from '../../../solver/reference/exactSolutions.ts';
import { gridEmissionFromSources } from '../../../solver/sources/gridEmission.ts';
import { solveSteadyState } from '../../../solver/timestepping/steadySweep.ts';
import { uniformColumnWind } from '../../../solver/wind/columnWind.ts';
import { testGrid } from './testGrid.ts';

const K = 5;
const u = 2;
const H = 50;

describe('steady point source against the exact solution with image source', () => {
  for (const decay_per_s of [0, 1e-3]) {
    it(`agrees within tolerance, decay ${decay_per_s} 1/s; budget closes`, () => {
      const grid = testGrid({ nx: 80, ny: 30, nz: 40, height_m: 200, spacing_m: 10, xWest_m: -100, ySouth_m: -150 });
      const stack = { kind: 'point' as const, id: 'stack', x_m: 0, y_m: 0, height_m: H, diameter_m: 1, exitVelocity_m_s: 1, exitTemperature_K: 300, emission_g_s: 1, plumeRise: false };
      const model = createDispersionModel({
        grid,
        wind: uniformColumnWind(grid, u, 270),
        closure: new ConstantDiffusivity(K, K),
        emission: gridEmissionFromSources(grid, [stack], [H]),
        losses: decay_per_s > 0 ? [FirstOrderDecay(decay_per_s)] : [],
      });
      const report = solveSteadyState(model, { tolerance: 1e-11, maxSweeps: 600 });
      expect(report.converged).toBe(true);
      const exact = { emission_g_s: 1, x0_m: 0, y0_m: 0, height_m: H, u_m_s: u, K_m2_s: K, decay_per_s };
      for (const x of [100, 200, 300, 400, 600]) {
        for (const z of [grid.zCentres_m[0], H]) {
          const computed = sampleField(grid, model.layout, model.field, x, 0, z);
          const expected = steadyPointSourceWithImage_g_m3(exact, x, 0, z);
          expect(Math.abs(computed / expected - 1), `x ${x} m, z ${z} m`).toBeLessThan(x >= 200 ? 0.03 : 0.05);
        }
      }
      const budget = steadyBudgetRates_g_s(model);
      expect(Math.abs(budget.relativeImbalance)).toBeLessThan(1e-9);
      if (decay_per_s > 0) expect(budget.decayed).toBeGreaterThan(0.2);
    });
  }
});
