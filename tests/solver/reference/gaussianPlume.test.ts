/**
 * The Gaussian plume kernel against the standard result in ../shared/REFERENCES.md, exact properties of
 * the image sum, the loss factor exp(-k x / u), and the source-depletion integral in closed-form cases.
 */
import { describe, expect, it } from 'vitest';
import {
  GaussianPlume,
  WELL_MIXED_SIGMA_Z_RATIO,
  complementaryErrorFunction,
  crosswindDensity_per_m,
  gaussianPlumeConcentration_g_m3,
  type PlumeSettings,
} from '../../../solver/reference/gaussianPlume.ts';
import { briggsSigmas, sigmasFor } from '../../../solver/reference/dispersionCurves.ts';
import { decayRate_per_s } from '../../../solver/losses/rates.ts';

const expectRelative = (actual: number, expected: number, tolerance: number) =>
  expect(Math.abs(actual - expected) / Math.abs(expected)).toBeLessThan(tolerance);

const briggsD = sigmasFor({ kind: 'stability', curves: 'briggs' }, 'D', 'rural');
const briggsB = sigmasFor({ kind: 'stability', curves: 'briggs' }, 'B', 'rural');

const base: PlumeSettings = {
  emission_g_s: 100,
  windSpeed_m_s: 5,
  releaseHeight_m: 50,
  mixingHeight_m: Infinity,
  sigmas: briggsD,
  lossRate_per_s: 0,
  depositionVelocity_m_s: 0,
};

/** composite Simpson's rule */
function simpson(f: (x: number) => number, a: number, b: number, intervals: number): number {
  const n = intervals % 2 === 0 ? intervals : intervals + 1;
  const h = (b - a) / n;
  let sum = f(a) + f(b);
  for (let i = 1; i < n; i++) sum += (i % 2 === 1 ? 4 : 2) * f(a + i * h);
  return (sum * h) / 3;
}

describe('complementary error function (Numerical Recipes erfcc, fractional error < 1.2e-7)', () => {
  it('matches CPython math.erfc at 0, 0.1, 0.5, 1, 2, 3, 4 and -1 to 1.2e-7 relative', () => {
    const reference: [number, number][] = [
      [0, 1],
      [0.1, 0.8875370839817152],
      [0.5, 0.4795001221869535],
      [1, 0.15729920705028513],
      [2, 0.004677734981047265],
      [3, 2.2090496998585438e-5],
      [4, 1.541725790028002e-8],
      [-1, 1.842700792949715],
    ];
    for (const [x, value] of reference) expectRelative(complementaryErrorFunction(x), value, 1.2e-7);
  });
});

describe('point source with ground reflection (standard result, REFERENCES.md)', () => {
  it('hand-computed: Q 100 g/s, u 5 m/s, H 50 m, Briggs D rural at 1 km: ground centreline 9.2323762e-4 g/m3 (1e-9)', () => {
    // sigma_y = 80 / sqrt(1.1) = 76.2770 m, sigma_z = 60 / sqrt(2.5) = 37.9473 m;
    // C = Q / (pi u sy sz) exp(-H^2 / 2 sz^2), evaluated by hand (Python) to 9.232376242157324e-4
    expectRelative(gaussianPlumeConcentration_g_m3(1000, 0, 0, base), 9.232376242157324e-4, 1e-9);
  });

  it('hand-computed off the axis and above the ground: y 50 m, z 10 m gives 7.6313015e-4 g/m3 (1e-9)', () => {
    // Q / (2 pi u sy sz) exp(-y^2 / 2 sy^2) [exp(-(z-H)^2 / 2 sz^2) + exp(-(z+H)^2 / 2 sz^2)] = 7.63130149131727e-4
    expectRelative(gaussianPlumeConcentration_g_m3(1000, 50, 10, base), 7.63130149131727e-4, 1e-9);
    expectRelative(gaussianPlumeConcentration_g_m3(1000, -50, 10, base), 7.63130149131727e-4, 1e-9);
  });

  it('is zero upwind and at the source (x <= 0)', () => {
    const plume = new GaussianPlume(base);
    expect(plume.concentration_g_m3(0, 0, 50)).toBe(0);
    expect(plume.concentration_g_m3(-200, 0, 0)).toBe(0);
  });

  it('is linear in the emission rate (C(3.7 Q) = 3.7 C(Q), 1e-14)', () => {
    const one = new GaussianPlume(base);
    const more = new GaussianPlume({ ...base, emission_g_s: 370 });
    for (const [x, y, z] of [[300, 10, 0], [2000, -80, 1.5], [8000, 300, 40]]) {
      expectRelative(more.concentration_g_m3(x, y, z), 3.7 * one.concentration_g_m3(x, y, z), 1e-14);
    }
  });

  it('closer than 1 m the spreads are those at 1 m (stated floor): finite next to a ground release', () => {
    const ground = new GaussianPlume({ ...base, releaseHeight_m: 0 });
    const s = briggsSigmas(1, 'D', 'rural');
    const atOne = (100 / (Math.PI * 5 * s.sigmaY_m * s.sigmaZ_m));
    expectRelative(ground.concentration_g_m3(0.25, 0, 0), atOne, 1e-12);
    expectRelative(ground.concentration_g_m3(1, 0, 0), atOne, 1e-12);
  });

  it('crosswind conservation: the integral of C u over y and z equals Q (no lid, Simpson, 1e-6)', () => {
    const plume = new GaussianPlume(base);
    for (const x of [200, 1500, 6000]) {
      const s = briggsSigmas(x, 'D', 'rural');
      // the crosswind integral is sqrt(2 pi) sigma_y C(x, 0, z) exactly
      const flux = simpson((z) => plume.concentration_g_m3(x, 0, z), 0, 50 + 12 * s.sigmaZ_m, 4000) * Math.sqrt(2 * Math.PI) * s.sigmaY_m * 5;
      expectRelative(flux, 100, 1e-6);
    }
  });
});

describe('first-order loss factor exp(-(k + Lambda) x / u) (REFERENCES.md)', () => {
  it('the ratio of concentrations with and without decay equals exp(-k x / u) (1e-12)', () => {
    const k = decayRate_per_s(0.5); // 30 min half-life
    const without = new GaussianPlume(base);
    const withDecay = new GaussianPlume({ ...base, lossRate_per_s: k });
    for (const x of [150, 1000, 5000, 20_000]) {
      expectRelative(withDecay.concentration_g_m3(x, 20, 1.5) / without.concentration_g_m3(x, 20, 1.5), Math.exp((-k * x) / 5), 1e-12);
    }
    // one half-life of travel (u T_half = 5 * 1800 m) halves it
    expectRelative(withDecay.concentration_g_m3(9000, 0, 0) / without.concentration_g_m3(9000, 0, 0), 0.5, 1e-12);
  });
});

describe('reflections between the ground and the mixing lid', () => {
  const lid = 300;
  // Briggs B open country: sigma_z = 0.12 x, so sigma_z = r h at x = r h / 0.12
  const lidded: PlumeSettings = { ...base, sigmas: briggsB, releaseHeight_m: 80, mixingHeight_m: lid };

  it('far downwind the ground concentration tends to the well-mixed Q / (sqrt(2 pi) sigma_y u h) [derived]', () => {
    const plume = new GaussianPlume(lidded);
    // just below the switch (sigma_z = 1.5 h) the image sum itself: within 2 exp(-1.125 pi^2) = 3e-5
    for (const ratio of [1.2, 1.5]) {
      const x = (ratio * lid) / 0.12;
      const wellMixed = 100 / (Math.sqrt(2 * Math.PI) * briggsSigmas(x, 'B', 'rural').sigmaY_m * 5 * lid);
      const bound = 2 * Math.exp((-Math.PI * Math.PI * ratio * ratio) / 2);
      expectRelative(plume.concentration_g_m3(x, 0, 0), wellMixed, 1.01 * bound);
    }
    // beyond the switch it is the well-mixed value
    const x = (3 * lid) / 0.12;
    expectRelative(plume.concentration_g_m3(x, 0, 0), 100 / (Math.sqrt(2 * Math.PI) * briggsSigmas(x, 'B', 'rural').sigmaY_m * 5 * lid), 1e-12);
  });

  it('the image sum and the well-mixed value meet at the switch (sigma_z = 1.6 h) to 1e-5', () => {
    const plume = new GaussianPlume(lidded);
    const xSwitch = (WELL_MIXED_SIGMA_Z_RATIO * lid) / 0.12;
    for (const z of [0, 150, 290]) {
      expectRelative(plume.concentration_g_m3(xSwitch * (1 - 1e-9), 0, z), plume.concentration_g_m3(xSwitch * (1 + 1e-9), 0, z), 1e-5);
    }
  });

  it('conservation: the vertical density integrates to 1 over 0..h for any spread and release height (Simpson, 1e-7)', () => {
    for (const height of [0, 80, 299]) {
      const plume = new GaussianPlume({ ...lidded, releaseHeight_m: height });
      for (const ratio of [0.05, 0.3, 0.9, 1.5]) {
        const x = (ratio * lid) / 0.12;
        expectRelative(simpson((z) => plume.verticalDensity_per_m(x, z), 0, lid, 6000), 1, 1e-7);
      }
    }
  });

  it('nothing above the lid; a very high lid gives the plain ground-reflected plume (1e-12)', () => {
    const plume = new GaussianPlume(lidded);
    expect(plume.concentration_g_m3(2000, 0, lid + 1)).toBe(0);
    const high = new GaussianPlume({ ...lidded, mixingHeight_m: 1e6 });
    const none = new GaussianPlume({ ...lidded, mixingHeight_m: Infinity });
    expectRelative(high.concentration_g_m3(1500, 30, 2), none.concentration_g_m3(1500, 30, 2), 1e-12);
  });

  it('a release at or above the lid ignores the lid (ground reflection only)', () => {
    const above = new GaussianPlume({ ...lidded, releaseHeight_m: 350 });
    const none = new GaussianPlume({ ...lidded, releaseHeight_m: 350, mixingHeight_m: Infinity });
    expect(above.lidApplied).toBe(false);
    expect(above.concentration_g_m3(2500, 0, 0)).toBe(none.concentration_g_m3(2500, 0, 0));
  });
});

describe('dry deposition by source depletion (Chamberlain 1953, from memory)', () => {
  it('ground release, sigma_z = 0.12 x (Briggs B): Q(x2)/Q(x1) = (x2/x1)^(-sqrt(2/pi) v_d / (u a)) [derived closed form], 1e-6', () => {
    const vd = 0.01;
    const plume = new GaussianPlume({ ...base, releaseHeight_m: 0, sigmas: briggsB, depositionVelocity_m_s: vd });
    const exponent = (Math.sqrt(2 / Math.PI) * vd) / (5 * 0.12);
    for (const [x1, x2] of [[10, 100], [100, 3000], [2, 25_000]]) {
      expectRelative(plume.depletionFactor(x2) / plume.depletionFactor(x1), Math.pow(x2 / x1, -exponent), 1e-6);
    }
  });

  it('well mixed under a lid: Q(x2)/Q(x1) = exp(-v_d (x2 - x1) / (u h)) [derived], 1e-6', () => {
    const vd = 0.02;
    const plume = new GaussianPlume({ ...base, sigmas: briggsB, mixingHeight_m: 200, depositionVelocity_m_s: vd });
    const x1 = 3000; // sigma_z = 360 m = 1.8 h
    const x2 = 9000;
    expectRelative(plume.depletionFactor(x2) / plume.depletionFactor(x1), Math.exp((-vd * (x2 - x1)) / (5 * 200)), 1e-6);
  });

  it('elevated release, no lid: matches an independent integral of sqrt(2/pi) exp(-H^2 / 2 sz^2) / sz (1e-6)', () => {
    const vd = 0.005;
    const plume = new GaussianPlume({ ...base, depositionVelocity_m_s: vd });
    const integrand = (x: number) => {
      const sz = briggsSigmas(Math.max(x, 1), 'D', 'rural').sigmaZ_m;
      return (Math.sqrt(2 / Math.PI) * Math.exp(-(50 * 50) / (2 * sz * sz))) / sz;
    };
    for (const x of [500, 2000, 12_000]) {
      // the integrand is negligible below 100 m for H = 50 m; integrate in two pieces
      const integral = simpson(integrand, 1, 400, 20_000) + simpson(integrand, 400, x, 40_000);
      expectRelative(plume.depletionFactor(x), Math.exp((-vd / 5) * integral), 1e-6);
    }
  });

  it('concentration with deposition = concentration without x depletion factor; none when v_d = 0', () => {
    const dry = new GaussianPlume({ ...base, depositionVelocity_m_s: 0.01, lossRate_per_s: 1e-4 });
    const none = new GaussianPlume({ ...base, lossRate_per_s: 1e-4 });
    expect(none.depletionFactor(5000)).toBe(1);
    expect(dry.depletionFactor(5000)).toBeLessThan(1);
    expectRelative(dry.concentration_g_m3(5000, 40, 1.5), none.concentration_g_m3(5000, 40, 1.5) * dry.depletionFactor(5000), 1e-14);
  });
});

describe('crosswind band average (area-source elements)', () => {
  it('equals the point Gaussian averaged numerically over the band, for narrow and wide bands, on and off the axis (3e-5)', () => {
    const sigma = 20;
    const point = (y: number) => Math.exp(-(y * y) / (2 * sigma * sigma)) / (Math.sqrt(2 * Math.PI) * sigma);
    for (const width of [0.5, 2, 4, 10, 40, 120]) {
      for (const y of [0, 15, 60, 130]) {
        const average = simpson(point, y - width / 2, y + width / 2, 2000) / width;
        if (average < 1e-12 * point(0)) continue;
        expectRelative(crosswindDensity_per_m(y, sigma, width), average, 3e-5);
      }
    }
    expect(crosswindDensity_per_m(15, sigma, 0)).toBe(point(15));
  });

  it('integrates to 1 across the wind (conservation, 1e-6)', () => {
    for (const width of [3, 30, 300]) {
      expectRelative(simpson((y) => crosswindDensity_per_m(y, 25, width), -400, 400, 8000), 1, 1e-6);
    }
  });
});

describe('gradual rise', () => {
  it('at each distance the plume is the fixed-height plume at release height + rise so far', () => {
    const riseAt = (x: number) => (x <= 0 ? 0 : Math.min(2 * Math.pow(x, 2 / 3), 60));
    const rising = new GaussianPlume({ ...base, releaseHeight_m: 30, riseAt });
    expect(rising.finalHeight_m).toBe(90);
    for (const x of [100, 300, 2000]) {
      const fixed = new GaussianPlume({ ...base, releaseHeight_m: 30 + riseAt(x) });
      expectRelative(rising.concentration_g_m3(x, 10, 0), fixed.concentration_g_m3(x, 10, 0), 1e-14);
    }
  });

  it('rejects bad settings with a RangeError naming the setting', () => {
    expect(() => new GaussianPlume({ ...base, windSpeed_m_s: 0 })).toThrow(/windSpeed_m_s is 0/);
    expect(() => new GaussianPlume({ ...base, emission_g_s: -1 })).toThrow(/emission_g_s is -1/);
    expect(() => new GaussianPlume({ ...base, mixingHeight_m: 0 })).toThrow(/mixingHeight_m is 0/);
    expect(() => new GaussianPlume({ ...base, depositionVelocity_m_s: Number.NaN })).toThrow(/depositionVelocity_m_s is NaN/);
  });
});
