/**
 * The grid solver (stability closure, sub-grid plume near field) against the Gaussian reference (Briggs
 * 1973 curves, Boubel et al. 1994 Tables 19-6/19-7 via REFERENCES.md): ground-level centreline
 * concentrations (1.5 m) from 300 m to 5 km, every class A-F, both land uses, a ground release (1 m)
 * and a 30 m stack, plume rise off. Every pair is asserted, at the tolerance of its regime (below);
 * docs/closure-check.md has the table and the reasons.
 *
 * Set-up: wind 5 m/s at 10 m from 270 deg (along the grid rows), power-law profile, the class's default
 * mixing height (A 1500, B 1200, C 1000, D 800, E 400, F 200 m), 1 g/s, grid 6 km x 6 km at 50 m,
 * 1300 m deep in 30 layers (3 m ground layer), source 200 m in from the west edge on the centre line.
 *
 * Regimes and their tolerances:
 * - Before the hand-over (the receptor more than two cells upwind of it): the sub-grid plume is the
 *   reference plume carried at the grid's wind averaged over its profile instead of the wind at the
 *   release height, so grid / Gaussian = u(release) / u(plume), asserted within 3 %. For a 30 m stack that
 *   is 0.85-0.99; for a ground release 0.21-0.77 (the reference's wind at 1 m is the slowest in the
 *   profile: docs/near-field.md).
 * - From the hand-over on (the grid's own transport): within a factor of two (FAC2; Chang & Hanna 2004,
 *   Meteorol. Atmos. Phys. 87:167), except where a wider factor is stated with its reason in WIDER.
 */
import { describe, expect, it } from 'vitest';
import { solveGridSteadyDetailed } from '../../../solver/drivers/gridSteady.ts';
import { runGaussianSteady } from '../../../solver/drivers/gaussianSteady.ts';
import type { SteadyRunInput } from '../../../solver/drivers/types.ts';
import { buildLocalGrid } from '../../../solver/grid/localGrid.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import { DEFAULT_MIXING_HEIGHT_m } from '../../../solver/meteorology/resolveWeather.ts';
import { windSpeedAtHeight_m_s } from '../../../solver/wind/powerLaw.ts';
import type { LandUse, StabilityClass } from '../../../scenarios/format/types.ts';

const DISTANCES_m = [300, 500, 1000, 2000, 3000, 5000];
const HALF_WIDTH_m = 3000;
const SPACING_m = 50;
const projection = createLocalProjection({ lat: 52, lon: 5 });
const grid = buildLocalGrid({ halfWidth_m: HALF_WIDTH_m, spacing_m: SPACING_m, height_m: 1300, layers: 30 }, projection);
const SOURCE_X_m = -HALF_WIDTH_m + 200;

/** Within this share of the wind ratio before the hand-over [-]. */
const SUB_GRID_TOLERANCE = 0.03;

/**
 * Wider factors than two from the hand-over on, each measured and explained (docs/closure-check.md):
 * - rural E and F ground releases: handed over late (1.8 and 2.9 km), the grid plume goes on at the
 *   level the sub-grid plume's wind ratio left it (0.34 and 0.21), rising toward the reference with
 *   distance (E 0.36, 0.51, 0.63 at 2, 3, 5 km; F 0.21 at 3 km just past the hand-over, 0.30 at 5 km);
 * - urban B, C, D and F stacks and the urban C ground release: the grid plume stays shallower than the
 *   urban Briggs sigma_z (Table 19-7 gives C 0.2 x, far more vertical spread than the closure's Golder fit
 *   at z0 = 1 m, which is nearly neutral), so ground-level figures come out high (up to 4.1).
 */
const WIDER: Record<string, number> = {
  'rural E 1': 3.5,
  'rural F 1': 5,
  'urban C 1': 3,
  'urban B 30': 3,
  'urban C 30': 5,
  'urban D 30': 3.5,
  'urban F 30': 4,
};

function input(landUse: LandUse, stability: StabilityClass, height_m: number): SteadyRunInput {
  return {
    grid,
    sources: [{ kind: 'point', id: 'release', x_m: SOURCE_X_m, y_m: 0, height_m, diameter_m: 1, exitVelocity_m_s: 10, exitTemperature_K: 400, emission_g_s: 1, plumeRise: false }],
    receptors: DISTANCES_m.map((d) => ({ id: `x${d}`, x_m: SOURCE_X_m + d, y_m: 0, height_m: 1.5 })),
    pollutant: { name: 'tracer', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 },
    weather: {
      windSpeed_m_s: 5, windFrom_deg: 270, stability, mixingHeight_m: DEFAULT_MIXING_HEIGHT_m[stability],
      rain_mm_h: 0, airTemperature_K: 288, anemometerHeight_m: 10, calm: false,
    },
    dispersion: { kind: 'stability', curves: 'briggs' },
    landUse,
    windProfile: 'powerLaw',
    groundLevelHeight_m: 1.5,
  };
}

for (const landUse of ['rural', 'urban'] as const) {
  describe(`grid (sub-grid plume near field) against the Gaussian reference, ${landUse}`, () => {
    for (const height_m of [1, 30]) {
      for (const stability of ['A', 'B', 'C', 'D', 'E', 'F'] as const) {
        const key = `${landUse} ${stability} ${height_m}`;
        const factor = WIDER[key] ?? 2;
        it(`class ${stability}, ${height_m === 1 ? 'ground release' : '30 m stack'}: wind ratio before the hand-over, a factor of ${factor} after`, () => {
          const run = input(landUse, stability, height_m);
          const { result, nearField } = solveGridSteadyDetailed(run);
          const reference = runGaussianSteady(run);
          const handover = nearField.handovers[0];
          const windRatio = windSpeedAtHeight_m_s(run.weather, height_m, landUse, 'powerLaw') / (handover.transportWind_m_s as number);
          DISTANCES_m.forEach((distance, n) => {
            expect(reference.receptors_ug_m3[n]).toBeGreaterThan(0);
            const ratio = result.receptors_ug_m3[n] / reference.receptors_ug_m3[n];
            const label = `${key} at ${distance} m (hand-over ${handover.handoverDistance_m.toFixed(0)} m): ratio ${ratio.toFixed(3)}`;
            if (distance < handover.handoverDistance_m - 2 * SPACING_m) {
              expect(Math.abs(ratio / windRatio - 1), `${label}, wind ratio ${windRatio.toFixed(3)}`).toBeLessThan(SUB_GRID_TOLERANCE);
            } else {
              expect(ratio, label).toBeGreaterThanOrEqual(1 / factor);
              expect(ratio, label).toBeLessThanOrEqual(factor);
            }
          });
        });
      }
    }
  });
}
