/**
 * Grid convergence with the near-field treatment (docs/near-field.md has the whole table, cells 100, 50,
 * 25 and 12.5 m, and the same with every source released straight into its cells): a 20 m stack and a
 * 30 m x 30 m ground-level area source, class B, receptors 250 m to 1 km downwind on the axis and one
 * 100 m off it (./convergenceSetUp.ts).
 *
 * Asserted:
 * - at 50 m (the demo's cell) and 25 m (the derived default for a layout this size is 20 m), every
 *   receptor within 10 % of the 12.5 m figure (the yardstick);
 * - with the wind at 240 degrees instead of 270 (receptors rotated with it), within 10 % of each other;
 * - receptors the sub-grid plume still holds (before the hand-over, about 650 m here) the same at every
 *   cell size: the sub-grid plume does not see the grid.
 *
 * The 12.5 m reference is solved at 270 degrees only and to a relative change of 1e-4 per sweep instead
 * of 1e-6 (to keep the suite fast: 12.5 m takes 300-400 sweeps): its receptor figures agree with the 1e-6
 * solve to 4 significant figures (measured), and at 240 degrees they agree with 270 within 0.3 %
 * (docs/near-field.md).
 */
import { describe, expect, it } from 'vitest';
import { solveGridSteadyDetailed } from '../../../solver/drivers/gridSteady.ts';
import { convergenceInput, RECEPTOR_DISTANCES_m, type SourceKind } from './convergenceSetUp.ts';

const YARDSTICK = 0.1;

function receptors(kind: SourceKind, windFrom_deg: number, spacing_m: number, tolerance?: number): { values: number[]; handover_m: number } {
  const detail = solveGridSteadyDetailed(convergenceInput(kind, windFrom_deg, spacing_m), {}, tolerance === undefined ? {} : { tolerance });
  return { values: Array.from(detail.result.receptors_ug_m3), handover_m: detail.nearField.handovers[0].handoverDistance_m };
}

const labels = [...RECEPTOR_DISTANCES_m.map((d) => `${d} m`), '800 m, 100 m off the axis'];

for (const kind of ['stack', 'area'] as const) {
  describe(`grid convergence, ${kind === 'stack' ? '20 m stack' : '30 m ground-level area source'}`, () => {
    const finest = receptors(kind, 270, 12.5, 1e-4);
    const runs = {
      '50 m, 270 deg': receptors(kind, 270, 50),
      '50 m, 240 deg': receptors(kind, 240, 50),
      '25 m, 270 deg': receptors(kind, 270, 25),
      '25 m, 240 deg': receptors(kind, 240, 25),
    };

    it('every receptor at 50 m and 25 m cells within 10 % of the 12.5 m figure, either wind', () => {
      for (const [name, run] of Object.entries(runs)) {
        run.values.forEach((value, n) => {
          expect(finest.values[n]).toBeGreaterThan(0);
          expect(Math.abs(value / finest.values[n] - 1), `${name}, ${labels[n]}: ${value} against ${finest.values[n]}`).toBeLessThan(YARDSTICK);
        });
      }
    });

    it('the same receptors with the wind at 240 and 270 degrees within 10 % of each other', () => {
      for (const cell of ['50 m', '25 m']) {
        const along = runs[`${cell}, 270 deg` as keyof typeof runs].values;
        const oblique = runs[`${cell}, 240 deg` as keyof typeof runs].values;
        along.forEach((value, n) => {
          expect(Math.abs(oblique[n] / value - 1), `${cell}, ${labels[n]}: ${oblique[n]} at 240, ${value} at 270`).toBeLessThan(YARDSTICK);
        });
      }
    });

    it('receptors before the hand-over are the sub-grid plume itself, the same at every cell size', () => {
      // A stack's sub-grid plume does not see the grid (1e-4 allows for the trace the grid's diffusion
      // carries upwind of the band). An area's does through its cell overlaps: the area integral is taken
      // over the rasterised cells, and moves by up to 1 % with the cell size in the Gaussian mode as well.
      const tolerance = kind === 'stack' ? 1e-4 : 0.02;
      const handover_m = finest.handover_m;
      expect(handover_m).toBeGreaterThan(400);
      RECEPTOR_DISTANCES_m.forEach((distance, n) => {
        // the band reaches two cells (up to 100 m) upwind of the hand-over
        if (distance >= handover_m - 100) return;
        for (const run of Object.values(runs)) expect(Math.abs(run.values[n] / finest.values[n] - 1)).toBeLessThan(tolerance);
      });
    });
  });
}
