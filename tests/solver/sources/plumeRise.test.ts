/**
 * Briggs plume rise against its formulas (Briggs 1969, 1975) as listed in ../shared/REFERENCES.md:
 * F and Fm [F read, Fm memory]; transitional 1.6 F^(1/3) x^(2/3) / u [read: Beni-Suef Univ. J. Basic Appl.
 * Sci. 2021]; neutral final rise split at F = 55 [split read, coefficients memory]; stable 2.6 (F/(u s))^(1/3)
 * and calm 5.0 F^(1/4) s^(-3/8) with dtheta/dz 0.020 (E) / 0.035 (F) K/m [memory]; momentum 3 d v / u
 * [memory]; stable momentum 1.5 (Fm / (u sqrt s))^(1/3) and the jet law with beta_j = 1/3 + u/v
 * (Briggs 1975, from memory). Expected values are computed in the tests from those printed formulas.
 */
import { describe, expect, it } from 'vitest';
import {
  GRAVITY_M_S2,
  briggsPlumeRise,
  effectiveHeight_m,
  plumeRiseFor,
  type PlumeRise,
  type StackExit,
} from '../../../solver/sources/plumeRise.ts';
import type { PlacedPointSource, ResolvedWeather } from '../../../solver/drivers/types.ts';

const g = GRAVITY_M_S2;
const expectRelative = (actual: number, expected: number, tolerance: number) =>
  expect(Math.abs(actual - expected) / Math.abs(expected)).toBeLessThan(tolerance);

/**
 * The gradual law must reach the final rise at x_f, and stay there. The published coefficients are
 * rounded (1.6 * 49^(2/3) = 21.4244 against 21.425; 1.6 * 119^(2/3) = 38.7095 against 38.71), so the two
 * meet to 2e-5, not exactly.
 */
function expectContinuousAtFinalDistance(rise: PlumeRise): void {
  const xf = rise.distanceToFinalRise_m;
  expectRelative(rise.riseAt(xf * (1 - 1e-9)), rise.finalRise_m, 2e-5);
  expect(rise.riseAt(xf)).toBe(rise.finalRise_m);
  expect(rise.riseAt(10 * xf)).toBe(rise.finalRise_m);
  expect(rise.riseAt(0)).toBe(0);
  expect(rise.riseAt(-5)).toBe(0);
  let previous = 0;
  for (let n = 1; n <= 50; n++) {
    const value = rise.riseAt((xf * n) / 40);
    expect(value).toBeGreaterThanOrEqual(previous);
    previous = value;
  }
}

const boiler: StackExit = { diameter_m: 1, exitVelocity_m_s: 12, exitTemperature_K: 420 };

describe('the boiler worked by hand (REFERENCES.md Briggs formulas; numbers from a separate calculation)', () => {
  it('1 m stack, 12 m/s, 420 K into 288 K, wind 6 m/s, class D: dh = 18.934 m at x_f = 196.75 m', () => {
    // F = 9.24627 m4/s3 < 55: dh = 21.425 F^(3/4) / u = 18.9341 m, x_f = 49 F^(5/8) = 196.755 m [derived in Python];
    // the 2/3 law 1.6 F^(1/3) x^(2/3) / u reaches 18.9339 m there (the coefficients agree to 1e-5).
    const rise = briggsPlumeRise(boiler, 6, 'D', 288);
    expect(rise.finalRise_m).toBeCloseTo(18.9341, 3);
    expect(rise.distanceToFinalRise_m).toBeCloseTo(196.755, 2);
    expect(rise.riseAt(100)).toBeCloseTo(1.6 * Math.cbrt(9.24627) * Math.pow(100, 2 / 3) / 6, 3);
  });
});

describe('fluxes', () => {
  it('F = g v d^2 (Ts - Ta) / (4 Ts) and Fm = v^2 d^2 Ta / (4 Ts): 1 m stack, 12 m/s, 420 K into 288 K -> 9.2463 m4/s3, 24.686 m4/s2 (hand, 1e-4)', () => {
    const rise = briggsPlumeRise(boiler, 6, 'D', 288);
    expect(rise.buoyancyFlux_m4_s3).toBeCloseTo((9.80665 * 12 * 132) / 1680, 10);
    expect(rise.buoyancyFlux_m4_s3).toBeCloseTo(9.2463, 4);
    expect(rise.momentumFlux_m4_s2).toBeCloseTo(24.6857, 4);
  });
});

describe('neutral and unstable air: the F = 55 split', () => {
  // d = 2 m, Ts = 450 K, Ta = 290 K: F = g v 4 (160) / (4 450), so v = 450 F / (160 g)
  const stackFor = (flux: number): StackExit => ({ diameter_m: 2, exitVelocity_m_s: (450 * flux) / (160 * g), exitTemperature_K: 450 });
  const u = 7;

  it('F = 54.9 (just below 55): dh = 21.425 F^(3/4) / u at x_f = 49 F^(5/8) (1e-9)', () => {
    const rise = briggsPlumeRise(stackFor(54.9), u, 'D', 290);
    expect(rise.buoyancyFlux_m4_s3).toBeCloseTo(54.9, 9);
    expect(rise.regime).toBe('buoyant-neutral-low-flux');
    expectRelative(rise.finalRise_m, (21.425 * Math.pow(54.9, 0.75)) / u, 1e-9);
    expectRelative(rise.distanceToFinalRise_m, 49 * Math.pow(54.9, 0.625), 1e-9);
    expectContinuousAtFinalDistance(rise);
  });

  it('F = 55.1 (just above): dh = 38.71 F^(3/5) / u at x_f = 119 F^(2/5) (1e-9); the two forms differ by about 1 % at the split', () => {
    const above = briggsPlumeRise(stackFor(55.1), u, 'C', 290);
    expect(above.regime).toBe('buoyant-neutral-high-flux');
    expectRelative(above.finalRise_m, (38.71 * Math.pow(55.1, 0.6)) / u, 1e-9);
    expectRelative(above.distanceToFinalRise_m, 119 * Math.pow(55.1, 0.4), 1e-9);
    expectContinuousAtFinalDistance(above);
    const below = briggsPlumeRise(stackFor(54.9), u, 'C', 290);
    expectRelative(above.finalRise_m, below.finalRise_m, 0.02);
    expect(briggsPlumeRise(stackFor(55), u, 'A', 290).regime).toBe('buoyant-neutral-high-flux');
  });

  it('the transitional law is 1.6 F^(1/3) x^(2/3) / u before x_f [read], for every neutral/unstable class', () => {
    for (const stability of ['A', 'B', 'C', 'D'] as const) {
      const rise = briggsPlumeRise(boiler, 4, stability, 288);
      const x = 0.3 * rise.distanceToFinalRise_m;
      expectRelative(rise.riseAt(x), (1.6 * Math.cbrt(rise.buoyancyFlux_m4_s3) * Math.pow(x, 2 / 3)) / 4, 1e-12);
      expect(rise.regime).toBe('buoyant-neutral-low-flux');
    }
  });

  it('final rise falls as 1/u in neutral air (formula behaviour)', () => {
    expectRelative(briggsPlumeRise(boiler, 3, 'D', 288).finalRise_m / briggsPlumeRise(boiler, 6, 'D', 288).finalRise_m, 2, 1e-12);
  });
});

describe('stable air', () => {
  it('class E, default dtheta/dz 0.020 K/m: s = (g/Ta) 0.020, dh = 2.6 (F/(u s))^(1/3), x_f = 2.0715 u / sqrt(s) [derived]', () => {
    const u = 3;
    const rise = briggsPlumeRise(boiler, u, 'E', 288);
    const s = (g / 288) * 0.02;
    expect(rise.regime).toBe('buoyant-stable');
    expectRelative(rise.finalRise_m, 2.6 * Math.cbrt(rise.buoyancyFlux_m4_s3 / (u * s)), 1e-12);
    expectRelative(rise.distanceToFinalRise_m, (2.0715 * u) / Math.sqrt(s), 1e-12);
    // the 2/3 law reaches the stable rise at that distance (to the 5 figures of 2.0715)
    expectRelative((1.6 * Math.cbrt(rise.buoyancyFlux_m4_s3) * Math.pow(rise.distanceToFinalRise_m, 2 / 3)) / u, rise.finalRise_m, 2e-5);
    expectContinuousAtFinalDistance(rise);
  });

  it('class F uses 0.035 K/m by default; a given gradient overrides it', () => {
    const u = 2;
    const f = briggsPlumeRise(boiler, u, 'F', 280);
    const s = (g / 280) * 0.035;
    expectRelative(f.finalRise_m, 2.6 * Math.cbrt(f.buoyancyFlux_m4_s3 / (u * s)), 1e-12);
    const steeper = briggsPlumeRise(boiler, u, 'F', 280, { potentialTemperatureGradient_K_m: 0.05 });
    expectRelative(steeper.finalRise_m, 2.6 * Math.cbrt(f.buoyancyFlux_m4_s3 / (u * (g / 280) * 0.05)), 1e-12);
    expect(() => briggsPlumeRise(boiler, u, 'F', 280, { potentialTemperatureGradient_K_m: 0 })).toThrow(/potentialTemperatureGradient_K_m is 0/);
  });

  it('neutral vs stable for the same stack and wind: D uses 21.425 F^(3/4)/u, E the stable formula', () => {
    const d = briggsPlumeRise(boiler, 2.5, 'D', 288);
    const e = briggsPlumeRise(boiler, 2.5, 'E', 288);
    expect(d.regime).toBe('buoyant-neutral-low-flux');
    expect(e.regime).toBe('buoyant-stable');
    expectRelative(d.finalRise_m, (21.425 * Math.pow(d.buoyancyFlux_m4_s3, 0.75)) / 2.5, 1e-12);
    expectRelative(e.finalRise_m, 2.6 * Math.cbrt(e.buoyancyFlux_m4_s3 / (2.5 * (g / 288) * 0.02)), 1e-12);
  });

  it('near calm the calm-air rise 5.0 F^(1/4) s^(-3/8) bounds the windy formula (lesser of the two)', () => {
    const u = 0.05;
    const rise = briggsPlumeRise(boiler, u, 'F', 288);
    const s = (g / 288) * 0.035;
    const calm = 5.0 * Math.pow(rise.buoyancyFlux_m4_s3, 0.25) * Math.pow(s, -0.375);
    const windy = 2.6 * Math.cbrt(rise.buoyancyFlux_m4_s3 / (u * s));
    expect(windy).toBeGreaterThan(calm);
    expect(rise.regime).toBe('buoyant-stable-calm');
    expectRelative(rise.finalRise_m, calm, 1e-12);
    expectContinuousAtFinalDistance(rise);
    // at an ordinary wind the windy formula is the smaller one
    expect(briggsPlumeRise(boiler, 1, 'F', 288).regime).toBe('buoyant-stable');
  });
});

describe('momentum rise', () => {
  const jet: StackExit = { diameter_m: 0.3, exitVelocity_m_s: 30, exitTemperature_K: 300 };

  it('a fast narrow, barely warm jet: 3 d v / u exceeds the buoyant rise and is used (neutral)', () => {
    const u = 2;
    const rise = briggsPlumeRise(jet, u, 'D', 288);
    const buoyant = (21.425 * Math.pow(rise.buoyancyFlux_m4_s3, 0.75)) / u;
    expect((3 * 0.3 * 30) / u).toBeGreaterThan(buoyant);
    expect(rise.regime).toBe('momentum-neutral');
    expectRelative(rise.finalRise_m, (3 * 0.3 * 30) / u, 1e-12);
    // jet law (3 Fm x / (beta^2 u^2))^(1/3), beta = 1/3 + u / v
    const beta = 1 / 3 + u / 30;
    const x = 0.2 * rise.distanceToFinalRise_m;
    expectRelative(rise.riseAt(x), Math.cbrt((3 * rise.momentumFlux_m4_s2 * x) / (beta * beta * u * u)), 1e-12);
    expectContinuousAtFinalDistance(rise);
  });

  it('a cold plume (Ts <= Ta, F <= 0) rises by momentum only', () => {
    const cold = briggsPlumeRise({ diameter_m: 1.5, exitVelocity_m_s: 8, exitTemperature_K: 280 }, 4, 'B', 290);
    expect(cold.buoyancyFlux_m4_s3).toBeLessThan(0);
    expect(cold.regime).toBe('momentum-neutral');
    expectRelative(cold.finalRise_m, (3 * 1.5 * 8) / 4, 1e-12);
  });

  it('stable: the smaller of 3 d v / u and 1.5 (Fm / (u sqrt s))^(1/3)', () => {
    const u = 2;
    const rise = briggsPlumeRise({ ...jet, exitTemperature_K: 289 }, u, 'E', 288);
    const s = (g / 288) * 0.02;
    const expected = Math.min((3 * 0.3 * 30) / u, 1.5 * Math.cbrt(rise.momentumFlux_m4_s2 / (u * Math.sqrt(s))));
    expect(rise.regime).toBe('momentum-stable');
    expectRelative(rise.finalRise_m, expected, 1e-12);
    expect(rise.finalRise_m).toBeLessThan((3 * 0.3 * 30) / u); // here the stable form is the smaller
    expectContinuousAtFinalDistance(rise);
  });

  it('no exit velocity: no rise', () => {
    const still = briggsPlumeRise({ diameter_m: 1, exitVelocity_m_s: 0, exitTemperature_K: 500 }, 3, 'D', 288);
    expect(still.regime).toBe('none');
    expect(still.finalRise_m).toBe(0);
    expect(still.riseAt(100)).toBe(0);
  });
});

describe('effective height of a placed stack', () => {
  const weather: ResolvedWeather = {
    windSpeed_m_s: 5,
    windFrom_deg: 270,
    stability: 'D',
    mixingHeight_m: 800,
    rain_mm_h: 0,
    airTemperature_K: 288,
    anemometerHeight_m: 10,
    calm: false,
  };
  const stack: PlacedPointSource = {
    kind: 'point',
    id: 'stack-1',
    x_m: 0,
    y_m: 0,
    height_m: 30,
    diameter_m: 1,
    exitVelocity_m_s: 12,
    exitTemperature_K: 420,
    emission_g_s: 1.5,
    plumeRise: true,
  };

  it('= stack height + final rise with the power-law wind at the stack top (5 (30/10)^0.15 m/s), worked by hand', () => {
    // u_top = 5 * 3^0.15 = 5.89574 m/s (Irwin rural D exponent, from memory); F = 9.24627 m4/s3;
    // dh = 21.425 F^(3/4) / u_top = 19.2689 m, so 49.2689 m; with the measured 5 m/s, 22.7209 m [derived in Python].
    expect(effectiveHeight_m(stack, weather, 'rural', 'powerLaw')).toBeCloseTo(49.2689, 3);
    expect(plumeRiseFor(stack, weather, 'rural', 'powerLaw').windSpeed_m_s).toBeCloseTo(5.89574, 4);
    expect(effectiveHeight_m(stack, weather, 'rural', 'uniform')).toBeCloseTo(30 + 22.7209, 3);
  });

  it('= height_m exactly when plumeRise is false', () => {
    expect(effectiveHeight_m({ ...stack, plumeRise: false }, weather, 'rural', 'powerLaw')).toBe(30);
  });

  it('rejects bad stack data with a RangeError naming the field', () => {
    expect(() => briggsPlumeRise({ ...boiler, diameter_m: -1 }, 3, 'D', 288)).toThrow(/source.diameter_m is -1/);
    expect(() => briggsPlumeRise({ ...boiler, exitTemperature_K: 0 }, 3, 'D', 288)).toThrow(/exitTemperature_K is 0/);
    expect(() => briggsPlumeRise(boiler, 0, 'D', 288)).toThrow(/windSpeed_m_s is 0/);
    expect(() => briggsPlumeRise(boiler, 3, 'D', Number.NaN)).toThrow(/airTemperature_K is NaN/);
  });
});
