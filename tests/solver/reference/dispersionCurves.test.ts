/**
 * Dispersion curves against ../shared/REFERENCES.md.
 * Briggs (1973) formulas [read: Boubel, Fox, Turner & Stern 1994, Tables 19-6/19-7, after Gifford 1976];
 * Pasquill-Gifford fits [Boubel et al. 1994, Tables 19-4/19-5; rows not marked there as read are from memory].
 * The tabulated expected values below are [derived]: computed from those formulas by hand (an independent
 * Python calculation), not by this code.
 */
import { describe, expect, it } from 'vitest';
import {
  PASQUILL_GIFFORD_SIGMA_Z_CAP_M,
  PASQUILL_GIFFORD_SIGMA_Z_ROWS,
  briggsSigmas,
  constantDiffusivitySigmas,
  pasquillGiffordSigmas,
  sigmasFor,
} from '../../../solver/reference/dispersionCurves.ts';
import { STABILITY_CLASSES, type StabilityClass } from '../../../scenarios/format/types.ts';

/** relative closeness */
const expectRelative = (actual: number, expected: number, tolerance: number) =>
  expect(Math.abs(actual - expected) / Math.abs(expected)).toBeLessThan(tolerance);

// [derived] Briggs sigmas (sigma_y, sigma_z) [m] at 100 m, 1 km and 10 km, by hand from REFERENCES.md.
const BRIGGS_EXPECTED: Record<'rural' | 'urban', Record<StabilityClass, [number, number][]>> = {
  rural: {
    A: [[21.8908, 20.0], [209.7618, 200.0], [1555.6349, 2000.0]],
    B: [[15.9206, 12.0], [152.554, 120.0], [1131.3708, 1200.0]],
    C: [[10.9454, 7.9212], [104.8809, 73.0297], [777.8175, 461.8802]],
    D: [[7.9603, 5.595], [76.277, 37.9473], [565.6854, 150.0]],
    E: [[5.9702, 2.9126], [57.2078, 23.0769], [424.2641, 75.0]],
    F: [[3.9801, 1.5534], [38.1385, 12.3077], [282.8427, 40.0]],
  },
  urban: {
    A: [[31.3786, 25.1714], [270.4494, 339.4113], [1431.0835, 7959.8995]],
    B: [[31.3786, 25.1714], [270.4494, 339.4113], [1431.0835, 7959.8995]],
    C: [[21.5728, 20.0], [185.9339, 200.0], [983.8699, 2000.0]],
    D: [[15.6893, 13.7946], [135.2247, 122.7881], [715.5418, 700.0]],
    E: [[10.7864, 7.46], [92.967, 50.5964], [491.935, 200.0]],
    F: [[10.7864, 7.46], [92.967, 50.5964], [491.935, 200.0]],
  },
};

describe('Briggs (1973) sigmas, open country and urban (Boubel et al. 1994 Tables 19-6/19-7 [read])', () => {
  it('REFERENCES.md check values at 1 km, open country [derived]: D 76.28 / 37.95 m, F 38.14 / 12.31 m (to 0.01 m)', () => {
    const d = briggsSigmas(1000, 'D', 'rural');
    const f = briggsSigmas(1000, 'F', 'rural');
    expect(d.sigmaY_m).toBeCloseTo(76.28, 2);
    expect(d.sigmaZ_m).toBeCloseTo(37.95, 2);
    expect(f.sigmaY_m).toBeCloseTo(38.14, 2);
    expect(f.sigmaZ_m).toBeCloseTo(12.31, 2);
  });

  for (const landUse of ['rural', 'urban'] as const) {
    for (const stability of STABILITY_CLASSES) {
      it(`${landUse} class ${stability} at 100 m, 1 km, 10 km matches the formulas [derived] to 5e-5 relative (literals rounded to 0.0001 m)`, () => {
        [100, 1000, 10_000].forEach((x, n) => {
          const [sigmaY, sigmaZ] = BRIGGS_EXPECTED[landUse][stability][n];
          const got = briggsSigmas(x, stability, landUse);
          expectRelative(got.sigmaY_m, sigmaY, 5e-5);
          expectRelative(got.sigmaZ_m, sigmaZ, 5e-5);
        });
      });
    }
  }

  it('below 100 m the formulas are used as they are: linear to zero at the source (behaviour, stated in the module)', () => {
    for (const stability of STABILITY_CLASSES) {
      const at10 = briggsSigmas(10, stability, 'rural');
      const at1 = briggsSigmas(1, stability, 'rural');
      expectRelative(at10.sigmaY_m / at1.sigmaY_m, 10, 0.01);
      expectRelative(at10.sigmaZ_m / at1.sigmaZ_m, 10, 0.02);
      expect(briggsSigmas(0, stability, 'urban')).toEqual({ sigmaY_m: 0, sigmaZ_m: 0 });
    }
  });

  it('rejects a negative or non-finite distance, an unknown class and an unknown land use with a RangeError', () => {
    expect(() => briggsSigmas(-1, 'D', 'rural')).toThrow(/x_m is -1/);
    expect(() => briggsSigmas(Number.NaN, 'D', 'rural')).toThrow(RangeError);
    expect(() => briggsSigmas(100, 'G' as StabilityClass, 'rural')).toThrow(/stability is "G"/);
    expect(() => briggsSigmas(100, 'D', 'suburban' as 'rural')).toThrow(/landUse is "suburban"/);
  });
});

// [derived] PG sigma_y = 465.11628 x tan(c - d ln x) at 0.1, 1 and 10 km, by hand.
const PG_SIGMA_Y_EXPECTED: Record<StabilityClass, [number, number, number]> = {
  A: [26.8539, 208.70963, 1541.25431],
  B: [19.26552, 154.11975, 1174.00968],
  C: [12.46268, 103.1138, 820.13247],
  D: [8.20122, 68.12923, 543.641],
  E: [6.12338, 50.93852, 406.92366],
  F: [4.06926, 33.88424, 270.90249],
};

// The sigma_z rows exactly as printed in REFERENCES.md (x upper bound [km], a, b), re-typed here so a
// transcription slip in the module shows up. Infinity = "beyond".
const PG_SIGMA_Z_REFERENCE: Record<StabilityClass, [number, number, number][]> = {
  A: [[0.1, 122.8, 0.9447], [0.15, 158.08, 1.0542], [0.2, 170.22, 1.0932], [0.25, 179.52, 1.1262],
    [0.3, 217.41, 1.2644], [0.4, 258.89, 1.4094], [0.5, 346.75, 1.7283], [3.11, 453.85, 2.1166]],
  B: [[0.2, 90.673, 0.93198], [0.4, 98.483, 0.98332], [Infinity, 109.3, 1.0971]],
  C: [[Infinity, 61.141, 0.91465]],
  D: [[0.3, 34.459, 0.86974], [1, 32.093, 0.81066], [3, 32.093, 0.64403], [10, 33.504, 0.60486],
    [30, 36.65, 0.56589], [Infinity, 44.053, 0.51179]],
  E: [[0.1, 24.26, 0.8366], [0.3, 23.331, 0.81956], [1, 21.628, 0.7566], [2, 21.628, 0.63077], [4, 22.534, 0.57154],
    [10, 24.703, 0.50527], [20, 26.97, 0.46713], [40, 35.42, 0.37615], [Infinity, 47.618, 0.29592]],
  F: [[0.2, 15.209, 0.81558], [0.7, 14.457, 0.78407], [1, 13.953, 0.68465], [2, 13.953, 0.63227], [3, 14.823, 0.54503],
    [7, 16.187, 0.4649], [15, 17.836, 0.41507], [30, 22.651, 0.32681], [60, 27.074, 0.27436], [Infinity, 34.219, 0.21716]],
};

describe('Pasquill-Gifford curve fits (Boubel et al. 1994 Tables 19-4/19-5; unmarked rows from memory)', () => {
  it('REFERENCES.md check values at 1 km, class D: sigma_y 68.1 m [derived], sigma_z 32.1 m [read] (to 0.05 m)', () => {
    const d = pasquillGiffordSigmas(1000, 'D');
    expect(Math.abs(d.sigmaY_m - 68.1)).toBeLessThan(0.05);
    expect(Math.abs(d.sigmaZ_m - 32.1)).toBeLessThan(0.05);
  });

  for (const stability of STABILITY_CLASSES) {
    it(`class ${stability}: sigma_y at 0.1, 1, 10 km [derived] to 1e-5 relative`, () => {
      [100, 1000, 10_000].forEach((x, n) => expectRelative(pasquillGiffordSigmas(x, stability).sigmaY_m, PG_SIGMA_Y_EXPECTED[stability][n], 1e-5));
    });

    it(`class ${stability}: every sigma_z row, in its middle and at both of its boundaries, equals a x^b of that row`, () => {
      const rows = PG_SIGMA_Z_REFERENCE[stability];
      let lower_km = 0.01;
      for (const [upper_km, a, b] of rows) {
        const middle_km = Number.isFinite(upper_km) ? 0.5 * (lower_km + upper_km) : 3 * lower_km;
        const expected = (x_km: number) => Math.min(a * Math.pow(x_km, b), PASQUILL_GIFFORD_SIGMA_Z_CAP_M);
        expectRelative(pasquillGiffordSigmas(middle_km * 1000, stability).sigmaZ_m, expected(middle_km), 1e-9);
        // a row covers x < its upper bound; at the lower bound (inclusive) this row applies
        expectRelative(pasquillGiffordSigmas(lower_km * 1000, stability).sigmaZ_m, expected(lower_km), 1e-9);
        if (Number.isFinite(upper_km)) {
          expectRelative(pasquillGiffordSigmas(upper_km * 1000 * (1 - 1e-12), stability).sigmaZ_m, expected(upper_km), 1e-9);
          lower_km = upper_km;
        }
      }
      expect(PASQUILL_GIFFORD_SIGMA_Z_ROWS[stability].filter((row) => row.b !== 0).length).toBe(rows.length);
    });

    it(`class ${stability}: neighbouring sigma_z rows meet within 0.1 % at every boundary (consistency of the fits)`, () => {
      const rows = PG_SIGMA_Z_REFERENCE[stability];
      for (let n = 0; n + 1 < rows.length; n++) {
        const x_m = rows[n][0] * 1000;
        const below = pasquillGiffordSigmas(x_m * (1 - 1e-9), stability).sigmaZ_m;
        const at = pasquillGiffordSigmas(x_m, stability).sigmaZ_m;
        expectRelative(at, below, 1e-3);
      }
    });
  }

  it('sigma_z is capped at 5000 m [read]: class A beyond 3.11 km, class B far out; below the first row the first fit goes to 0', () => {
    expect(pasquillGiffordSigmas(3110, 'A').sigmaZ_m).toBe(5000);
    expect(pasquillGiffordSigmas(20_000, 'A').sigmaZ_m).toBe(5000);
    expect(pasquillGiffordSigmas(3100, 'A').sigmaZ_m).toBeCloseTo(453.85 * Math.pow(3.1, 2.1166), 6); // 4977 m, below the cap
    expect(pasquillGiffordSigmas(3000, 'A').sigmaZ_m).toBeCloseTo(453.85 * Math.pow(3, 2.1166), 6);
    expect(pasquillGiffordSigmas(40_000, 'B').sigmaZ_m).toBe(5000);
    expect(pasquillGiffordSigmas(30_000, 'B').sigmaZ_m).toBeCloseTo(109.3 * Math.pow(30, 1.0971), 6);
    expect(pasquillGiffordSigmas(0, 'F')).toEqual({ sigmaY_m: 0, sigmaZ_m: 0 });
    expectRelative(pasquillGiffordSigmas(10, 'F').sigmaZ_m, 15.209 * Math.pow(0.01, 0.81558), 1e-9);
  });
});

describe('constant diffusivities: sigma^2 = 2 K x / u (REFERENCES.md, slender-plume limit, Stockie 2011)', () => {
  it('gives sqrt(2 K x / u) for each direction (exact, 1e-12)', () => {
    const s = constantDiffusivitySigmas(500, 5, 10, 2);
    expectRelative(s.sigmaY_m, Math.sqrt(2000), 1e-12);
    expectRelative(s.sigmaZ_m, Math.sqrt(400), 1e-12);
    expect(() => constantDiffusivitySigmas(500, 0, 10, 2)).toThrow(/windSpeed_m_s is 0/);
    expect(() => constantDiffusivitySigmas(500, 5, -1, 2)).toThrow(/horizontal_m2_s is -1/);
  });
});

describe('sigmasFor chooses the curve the scenario asks for (behaviour)', () => {
  it('returns the same numbers as the direct functions, callable and through the scalar forms', () => {
    const briggs = sigmasFor({ kind: 'stability', curves: 'briggs' }, 'E', 'urban');
    expect(briggs(750)).toEqual(briggsSigmas(750, 'E', 'urban'));
    expect(briggs.sigmaZ_m(750)).toBe(briggsSigmas(750, 'E', 'urban').sigmaZ_m);
    const pg = sigmasFor({ kind: 'stability', curves: 'pasquill-gifford' }, 'B', 'urban');
    expect(pg(2500)).toEqual(pasquillGiffordSigmas(2500, 'B'));
    const constant = sigmasFor({ kind: 'constant', horizontal_m2_s: 10, vertical_m2_s: 3 }, 'D', 'rural', 4);
    expect(constant(800)).toEqual(constantDiffusivitySigmas(800, 4, 10, 3));
    expect(() => sigmasFor({ kind: 'constant', horizontal_m2_s: 10, vertical_m2_s: 3 }, 'D', 'rural')).toThrow(/windSpeed_m_s/);
    expect(() => sigmasFor({ kind: 'stability', curves: 'other' as 'briggs' }, 'D', 'rural')).toThrow(/dispersion.curves is "other"/);
  });
});
