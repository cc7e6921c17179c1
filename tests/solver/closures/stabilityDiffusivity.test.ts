/**
 * The stability-dependent closure's pieces against their published forms (all from memory, as the
 * module says): the neutral log law, the Golder (1972) fit, Businger-Dyer phi_h, the Troen-Mahrt /
 * Holtslag-Boville shape and mixed-layer velocity scale, and the Briggs-growth horizontal construction.
 */
import { briggsSigmas } from '../../../solver/reference/dispersionCurves.ts';
import { describe, expect, it } from 'vitest';
import type { ResolvedWeather } from '../../../solver/drivers/types.ts';
import type { LocalGrid } from '../../../solver/grid/types.ts';
import {
  BACKGROUND_LENGTH_m,
  briggsSigmaY_m,
  briggsSigmaZ_m,
  createStabilityDiffusivity,
  crosswindSpreadingLength_m,
  frictionVelocity_m_s,
  inverseObukhovLength_per_m,
  outerLayerVelocityScale_m_s,
  phiHeat,
  phiMomentum,
  psiMomentum,
  ROUGHNESS_LENGTH_m,
  travelDistanceToHeight_m,
  verticalDiffusivityAt_m2_s,
  verticalProfileSettings,
  VON_KARMAN,
} from '../../../solver/closures/stabilityDiffusivity.ts';

const weather = (stability: ResolvedWeather['stability'], windSpeed_m_s = 5, mixingHeight_m = 800): ResolvedWeather => ({
  windSpeed_m_s, windFrom_deg: 270, stability, mixingHeight_m, rain_mm_h: 0, airTemperature_K: 288, anemometerHeight_m: 10, calm: false,
});

/** A small stand-in grid: only the vertical geometry matters to a closure. */
function columnGrid(faces: number[]): LocalGrid {
  const zFaces_m = Float64Array.from(faces);
  const nz = faces.length - 1;
  const zCentres_m = new Float64Array(nz);
  const dz_m = new Float64Array(nz);
  for (let k = 0; k < nz; k++) { zCentres_m[k] = (faces[k] + faces[k + 1]) / 2; dz_m[k] = faces[k + 1] - faces[k]; }
  return { nx: 1, ny: 1, nz, spacing_m: 100, xWest_m: 0, ySouth_m: 0, zFaces_m, zCentres_m, dz_m,
    projection: { definition: 'test', toLocal: () => [0, 0], toLonLat: () => [0, 0] } };
}

describe('surface-layer similarity', () => {
  it('neutral u* is the log law kappa u / ln(z / z0) (common practice)', () => {
    expect(frictionVelocity_m_s(5, 10, 0, 0.1)).toBeCloseTo((0.4 * 5) / Math.log(100), 12);
  });

  it('Golder (1972) fit 1/L = a + b log10 z0 (Myrup & Ranzieri 1976 via Seinfeld & Pandis, from memory)', () => {
    expect(inverseObukhovLength_per_m('D', 0.1)).toBe(0);
    expect(inverseObukhovLength_per_m('A', 0.1)).toBeCloseTo(-0.096 - 0.029, 12);
    expect(inverseObukhovLength_per_m('F', 1)).toBeCloseTo(0.035, 12);
    // ordering: unstable classes negative, stable positive, more so away from D
    const r = ROUGHNESS_LENGTH_m.rural;
    const order = (['A', 'B', 'C', 'D', 'E', 'F'] as const).map((c) => inverseObukhovLength_per_m(c, r));
    for (let i = 1; i < order.length; i++) expect(order[i]).toBeGreaterThan(order[i - 1]);
  });

  it('Businger-Dyer phi_h and Paulson psi_m (Dyer 1974; Paulson 1970, from memory)', () => {
    expect(phiHeat(0)).toBe(1);
    expect(phiHeat(0.2)).toBeCloseTo(2, 12);
    expect(phiHeat(-1)).toBeCloseTo(1 / Math.sqrt(17), 12);
    expect(psiMomentum(0)).toBeCloseTo(0, 12);
    expect(psiMomentum(0.1)).toBeCloseTo(-0.5, 12);
    expect(psiMomentum(-1)).toBeGreaterThan(0); // unstable profiles are flatter than the log law
  });

  it('u* grows with instability at a fixed 10 m wind (flatter profile) and is proportional to the wind', () => {
    const u = (c: ResolvedWeather['stability'], speed = 5) => verticalProfileSettings(weather(c, speed), 'rural').frictionVelocity_m_s;
    expect(u('A')).toBeGreaterThan(u('D'));
    expect(u('F')).toBeLessThan(u('D'));
    expect(u('E', 7.5) / u('E', 5)).toBeCloseTo(1.5, 12);
  });
});

describe('vertical profile K_z = kappa w_t z (1 - z/h)^2 (Troen & Mahrt 1986; Holtslag & Boville 1993)', () => {
  it('neutral: kappa u* z (1 - z/h)^2 exactly', () => {
    const s = verticalProfileSettings(weather('D'), 'rural');
    for (const z of [1, 10, 100, 400]) {
      expect(verticalDiffusivityAt_m2_s(s, z)).toBeCloseTo(VON_KARMAN * s.frictionVelocity_m_s * z * (1 - z / 800) ** 2, 12);
    }
  });

  it('stable: divided by 1 + 5 z/L; unstable: surface similarity below 0.1 h, one outer scale above (worked by hand)', () => {
    // Troen & Mahrt / Holtslag & Boville profile K = kappa w_t z (1 - z/h)^2 (file comment; from memory), worked
    // by hand with kappa = 0.4 for given u*, 1/L and h (no value here comes from the code):
    // stable, u* = 0.3 m/s, 1/L = 0.01 1/m, h = 400 m, z = 50 m: 0.4 * 0.3 * 50 * 0.875^2 / (1 + 2.5) = 1.3125 m2/s.
    const stable = { frictionVelocity_m_s: 0.3, inverseObukhov_per_m: 0.01, mixingHeight_m: 400 };
    expect(verticalDiffusivityAt_m2_s(stable, 50)).toBeCloseTo(1.3125, 10);
    // unstable, u* = 0.5 m/s, L = -20 m, h = 1000 m. Surface layer (z = 60 m < 0.1 h): phi_h = (1 + 48)^(-1/2) = 1/7,
    // K = 0.4 * 0.5 * 7 * 60 * 0.94^2 = 74.2224 m2/s. Outer layer (z = 300 m): w_t = 2.14566 m/s (the Holtslag &
    // Boville scale worked in the next test), K = 0.4 * 2.14566 * 300 * 0.7^2 = 126.165 m2/s, the same scale at 130 m.
    const unstable = { frictionVelocity_m_s: 0.5, inverseObukhov_per_m: -0.05, mixingHeight_m: 1000 };
    expect(verticalDiffusivityAt_m2_s(unstable, 60)).toBeCloseTo(74.2224, 4);
    expect(verticalDiffusivityAt_m2_s(unstable, 300)).toBeCloseTo(126.165, 2);
    expect(verticalDiffusivityAt_m2_s(unstable, 130)).toBeCloseTo(0.4 * 2.14566 * 130 * 0.87 ** 2, 3);
    // and the class-derived settings of a real weather state follow the same branches
    const e = verticalProfileSettings(weather('E', 5, 400), 'rural');
    expect(e.inverseObukhov_per_m).toBeGreaterThan(0);
    const b = verticalProfileSettings(weather('B', 5, 1200), 'rural');
    expect(b.inverseObukhov_per_m).toBeLessThan(0);
  });

  it('Holtslag & Boville (1993) outer scale, worked by hand (from memory): w_m, Pr, w_t = w_m / Pr', () => {
    // u* = 0.5 m/s, L = -20 m, h = 1000 m: w*^3 = u*^3 h / (kappa |L|) = 0.125 * 1000 / 8 = 15.625 -> w* = 2.5 m/s;
    // w_m^3 = 0.125 + 7 * 0.1 * 0.4 * 15.625 = 4.5 -> w_m = 1.6510 m/s; zeta = 0.1 h / L = -5, 1 - 16 zeta = 81:
    // phi_h = 1/9, phi_m = 1/3, Pr = 1/3 + 7.2 * 0.4 * 0.1 * 2.5 / 1.6510 = 0.3333 + 0.4361 = 0.7694.
    const wm = Math.cbrt(4.5);
    expect(outerLayerVelocityScale_m_s(0.5, -1 / 20, 1000)).toBeCloseTo(wm / (1 / 3 + (7.2 * 0.4 * 0.1 * 2.5) / wm), 12);
    expect(outerLayerVelocityScale_m_s(0.5, -1 / 20, 1000)).toBeCloseTo(2.146, 3);
    // w_m is u* / phi_m(0.1 h / L) with the free-convection phi_m = (1 - 7 zeta)^(-1/3): 0.5 * 36^(1/3)
    expect(wm).toBeCloseTo(0.5 * Math.cbrt(36), 12);
    // proportional to u* at a fixed L (what keeps the closure linear in the wind speed)
    expect(outerLayerVelocityScale_m_s(1.5, -1 / 20, 1000) / outerLayerVelocityScale_m_s(0.5, -1 / 20, 1000)).toBeCloseTo(3, 12);
    expect(() => outerLayerVelocityScale_m_s(0.5, 0.01, 1000)).toThrow(/inverseObukhov_per_m: 0.01/);
    expect(phiMomentum(-5)).toBeCloseTo(1 / 3, 12);
    expect(phiMomentum(0.2)).toBeCloseTo(2, 12);
  });

  it('falls to the background at the ground face, at and above the mixing height', () => {
    const s = verticalProfileSettings(weather('C', 5, 1000), 'rural');
    const background = BACKGROUND_LENGTH_m * s.frictionVelocity_m_s;
    expect(verticalDiffusivityAt_m2_s(s, 0)).toBe(background);
    expect(verticalDiffusivityAt_m2_s(s, 1000)).toBe(background);
    expect(verticalDiffusivityAt_m2_s(s, 1500)).toBe(background);
    expect(background).toBeGreaterThan(0.005);
    expect(background).toBeLessThan(0.05);
    expect(verticalDiffusivityAt_m2_s(s, 100)).toBeGreaterThan(1);
  });
});

describe('horizontal: Briggs growth at the distance where the plume mean height reaches z', () => {
  it('sqrt(2/pi) sigma_z(x_z) = z inside the range, clamped outside', () => {
    for (const c of ['B', 'D', 'E'] as const) {
      for (const z of [2, 20, 45]) {
        const x = travelDistanceToHeight_m(c, 'rural', z);
        expect(Math.sqrt(2 / Math.PI) * briggsSigmaZ_m(c, 'rural', x)).toBeCloseTo(z, 6);
      }
    }
    // E's sigma_z never exceeds 0.03 / 0.0003 = 100 m: a layer at 500 m takes the 10 km value
    expect(travelDistanceToHeight_m('E', 'rural', 500)).toBe(10_000);
  });

  it('spreading length = (1/2) d(sigma_y^2)/dx at x_z: urban A, C, F at 15 m against values worked outside the code', () => {
    // Worked in Python from the REFERENCES.md urban Briggs formulas alone (bisection for x_z, a central
    // difference for the slope) [derived]: x_z = 75.53, 94.00, 280.04 m; lengths 7.3975, 4.3052, 2.8936 m.
    const expected = { A: [75.5315, 7.39752], C: [93.9986, 4.30523], F: [280.036, 2.89364] } as const;
    for (const c of ['A', 'C', 'F'] as const) {
      expect(travelDistanceToHeight_m(c, 'urban', 15)).toBeCloseTo(expected[c][0], 3);
      expect(crosswindSpreadingLength_m(c, 'urban', 15)).toBeCloseTo(expected[c][1], 4);
    }
  });

  it('uses the one Briggs table (solver/reference/dispersionCurves.ts): every class and land use, 300 m and 3 km', () => {
    for (const landUse of ['rural', 'urban'] as const) {
      for (const c of ['A', 'B', 'C', 'D', 'E', 'F'] as const) {
        for (const x of [300, 3000]) {
          const curves = briggsSigmas(x, c, landUse);
          expect(briggsSigmaY_m(c, landUse, x)).toBe(curves.sigmaY_m);
          expect(briggsSigmaZ_m(c, landUse, x)).toBe(curves.sigmaZ_m);
        }
      }
    }
  });

  it('Briggs sigma at 1 km match the REFERENCES.md check values (D 76.28 / 37.95 m, F 38.14 / 12.31 m) [derived]', () => {
    expect(briggsSigmaY_m('D', 'rural', 1000)).toBeCloseTo(76.28, 2);
    expect(briggsSigmaZ_m('D', 'rural', 1000)).toBeCloseTo(37.95, 2);
    expect(briggsSigmaY_m('F', 'rural', 1000)).toBeCloseTo(38.14, 2);
    expect(briggsSigmaZ_m('F', 'rural', 1000)).toBeCloseTo(12.31, 2);
  });
});

describe('createStabilityDiffusivity', () => {
  const grid = columnGrid([0, 3, 6.6, 11, 20, 40, 80, 160, 320, 640, 1000]);
  const wind = (w: ResolvedWeather) => grid.zCentres_m.map((z) => w.windSpeed_m_s * (Math.max(z, 1) / 10) ** 0.15);

  it('returns nz horizontal and nz + 1 vertical values, positive, K_h = u(z) x spreading length', () => {
    const closure = createStabilityDiffusivity('rural');
    const w = weather('D');
    const kh = closure.horizontal_m2_s(grid, w, wind(w));
    const kz = closure.vertical_m2_s(grid, w, wind(w));
    expect(kh.length).toBe(grid.nz);
    expect(kz.length).toBe(grid.nz + 1);
    // K_h = u(z) x spreading length, worked in Python from the REFERENCES.md rural D Briggs formulas and the
    // wind 5 (z / 10)^0.15 of this test [derived]: layers at 1.5, 8.8, 30 m and 120 m (x_z held at 10 km).
    const expected = [[0, 0.768569], [2, 6.41693], [4, 32.3725], [6, 174.204]] as const;
    for (const [k, value] of expected) expect(kh[k]).toBeCloseTo(value, 3);
    for (const v of kz) expect(v).toBeGreaterThan(0);
  });

  it('both diffusivities scale exactly with the wind speed (what makes speed reuse exact)', () => {
    const closure = createStabilityDiffusivity('urban');
    const slow = weather('E', 2, 400);
    const fast = weather('E', 6, 400);
    const khSlow = closure.horizontal_m2_s(grid, slow, wind(slow));
    const khFast = closure.horizontal_m2_s(grid, fast, wind(fast));
    const kzSlow = closure.vertical_m2_s(grid, slow, wind(slow));
    const kzFast = closure.vertical_m2_s(grid, fast, wind(fast));
    for (let k = 0; k < grid.nz; k++) expect(khFast[k] / khSlow[k]).toBeCloseTo(3, 10);
    for (let k = 0; k <= grid.nz; k++) expect(kzFast[k] / kzSlow[k]).toBeCloseTo(3, 10);
  });

  it('rejects a wrong wind array length and an unknown land use, naming them', () => {
    const closure = createStabilityDiffusivity('rural');
    expect(() => closure.horizontal_m2_s(grid, weather('D'), new Float64Array(3))).toThrow(/windSpeedAtLayer_m_s has 3/);
    expect(() => createStabilityDiffusivity('suburban' as never)).toThrow(/landUse: "suburban"/);
  });
});
