/**
 * Loss rates against ../shared/REFERENCES.md "Losses": k = ln 2 / half-life (exact), Lambda = a R^b.
 */
import { describe, expect, it } from 'vitest';
import { decayRate_per_s, washoutRate_per_s } from '../../../solver/losses/rates.ts';

describe('decayRate_per_s: k = ln 2 / (3600 T_half) (exact)', () => {
  it('a 1 h half-life gives 1.925409e-4 1/s, and after one half-life exp(-k T) = 1/2 (1e-12)', () => {
    expect(decayRate_per_s(1)).toBeCloseTo(1.925409e-4, 9);
    const k = decayRate_per_s(6.5);
    expect(Math.exp(-k * 6.5 * 3600)).toBeCloseTo(0.5, 12);
    // M0 2^(-t / T_half) at t = 10 h, T_half = 4 h
    expect(Math.exp(-decayRate_per_s(4) * 36000)).toBeCloseTo(Math.pow(2, -2.5), 12);
  });
  it('null (conserved) gives 0; zero, negative, NaN or infinite half-lives are rejected', () => {
    expect(decayRate_per_s(null)).toBe(0);
    expect(() => decayRate_per_s(0)).toThrow(/pollutant.halfLife_h is 0/);
    expect(() => decayRate_per_s(-3)).toThrow(RangeError);
    expect(() => decayRate_per_s(Number.NaN)).toThrow(RangeError);
    expect(() => decayRate_per_s(Infinity)).toThrow(RangeError);
  });
});

describe('washoutRate_per_s: Lambda = a R^b', () => {
  it('particles a = 7e-5 1/s, b = 0.8 [REFERENCES.md, read: a published worked answer] at 2 mm/h: 7e-5 2^0.8 = 1.218771e-4 1/s', () => {
    expect(washoutRate_per_s({ a_per_s: 7e-5, b: 0.8 }, 2)).toBeCloseTo(1.218771e-4, 9);
  });
  it('SO2 a = 2e-5, b = 1.0 (VDI 3782 Part 5, from memory) at 3 mm/h is 6e-5 1/s, inside the published 0.4e-5..6e-5 range (McMahon & Denison 1979 [read])', () => {
    const lambda = washoutRate_per_s({ a_per_s: 2e-5, b: 1 }, 3);
    expect(lambda).toBeCloseTo(6e-5, 15);
    expect(lambda).toBeGreaterThanOrEqual(0.4e-5);
    expect(lambda).toBeLessThanOrEqual(6e-5 * (1 + 1e-12));
  });
  it('no rain or no washout gives 0 (even with b = 0); negative rain is rejected', () => {
    expect(washoutRate_per_s({ a_per_s: 7e-5, b: 0.8 }, 0)).toBe(0);
    expect(washoutRate_per_s({ a_per_s: 7e-5, b: 0 }, 0)).toBe(0);
    expect(washoutRate_per_s(null, 5)).toBe(0);
    expect(() => washoutRate_per_s({ a_per_s: 7e-5, b: 0.8 }, -1)).toThrow(/weather.rain_mm_h is -1/);
    expect(() => washoutRate_per_s({ a_per_s: -1, b: 0.8 }, 1)).toThrow(/pollutant.washout.a_per_s is -1/);
  });
});
