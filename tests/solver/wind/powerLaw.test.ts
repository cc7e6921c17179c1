/**
 * Wind with height: power-law exponents (Irwin 1979, Atmos. Environ. 13:191, from memory, via
 * ../shared/REFERENCES.md) and the profile u(z) = u_ref (z / z_ref)^p, held between 1 m and the mixing height.
 */
import { describe, expect, it } from 'vitest';
import { WIND_PROFILE_FLOOR_M, powerLawExponent, windSpeedAtHeight_m_s } from '../../../solver/wind/powerLaw.ts';
import type { ResolvedWeather } from '../../../solver/drivers/types.ts';
import type { StabilityClass } from '../../../scenarios/format/types.ts';

const weather = (stability: StabilityClass, windSpeed_m_s = 5, anemometerHeight_m = 10): ResolvedWeather => ({
  windSpeed_m_s,
  windFrom_deg: 270,
  stability,
  mixingHeight_m: 800,
  rain_mm_h: 0,
  airTemperature_K: 288.15,
  anemometerHeight_m,
  calm: false,
});

describe('power-law exponents (Irwin 1979, from memory)', () => {
  it('rural A..F = 0.07, 0.07, 0.10, 0.15, 0.35, 0.55 and urban = 0.15, 0.15, 0.20, 0.25, 0.30, 0.30', () => {
    expect((['A', 'B', 'C', 'D', 'E', 'F'] as const).map((c) => powerLawExponent(c, 'rural'))).toEqual([0.07, 0.07, 0.1, 0.15, 0.35, 0.55]);
    expect((['A', 'B', 'C', 'D', 'E', 'F'] as const).map((c) => powerLawExponent(c, 'urban'))).toEqual([0.15, 0.15, 0.2, 0.25, 0.3, 0.3]);
  });
  it('rejects an unknown class or land use with a RangeError naming the value', () => {
    expect(() => powerLawExponent('Z' as StabilityClass, 'rural')).toThrow(/stability is "Z"/);
    expect(() => powerLawExponent('D', 'forest' as 'rural')).toThrow(/landUse is "forest"/);
  });
});

describe('windSpeedAtHeight_m_s', () => {
  it('power law: 5 m/s at 10 m, class D rural, gives 5 (100/10)^0.15 = 7.0627 m/s at 100 m (hand-computed, 1e-4)', () => {
    expect(windSpeedAtHeight_m_s(weather('D'), 100, 'rural', 'powerLaw')).toBeCloseTo(7.0627, 4);
    // urban F: 5 (50/10)^0.30 = 8.1033 m/s
    expect(windSpeedAtHeight_m_s(weather('F'), 50, 'urban', 'powerLaw')).toBeCloseTo(8.1033, 4);
  });
  it('returns the measured speed at the anemometer height and for the uniform profile at any height', () => {
    expect(windSpeedAtHeight_m_s(weather('E', 3.2, 12), 12, 'rural', 'powerLaw')).toBe(3.2);
    expect(windSpeedAtHeight_m_s(weather('E', 3.2, 12), 250, 'rural', 'uniform')).toBe(3.2);
  });
  it('below the 1 m floor the speed at 1 m is used (stated floor)', () => {
    const atFloor = windSpeedAtHeight_m_s(weather('F'), WIND_PROFILE_FLOOR_M, 'rural', 'powerLaw');
    expect(windSpeedAtHeight_m_s(weather('F'), 0, 'rural', 'powerLaw')).toBe(atFloor);
    expect(windSpeedAtHeight_m_s(weather('F'), 0.3, 'rural', 'powerLaw')).toBe(atFloor);
    expect(atFloor).toBeCloseTo(5 * Math.pow(0.1, 0.55), 12);
  });
  it('above the mixing height the speed at the mixing height is used (stated cap)', () => {
    // E rural, 5 m/s at 10 m, mixing height 800 m: 5 (800/10)^0.35 = 23.12 m/s at and above 800 m (hand-computed)
    const atTop = windSpeedAtHeight_m_s(weather('E'), 800, 'rural', 'powerLaw');
    expect(atTop).toBeCloseTo(5 * Math.pow(80, 0.35), 12);
    expect(windSpeedAtHeight_m_s(weather('E'), 1000, 'rural', 'powerLaw')).toBe(atTop);
    expect(windSpeedAtHeight_m_s({ ...weather('E'), mixingHeight_m: 200 }, 1000, 'rural', 'powerLaw')).toBeCloseTo(5 * Math.pow(20, 0.35), 12);
    expect(windSpeedAtHeight_m_s(weather('E'), 799, 'rural', 'powerLaw')).toBeLessThan(atTop);
    // a mixing height below the anemometer does not move the measurement
    expect(windSpeedAtHeight_m_s({ ...weather('E'), mixingHeight_m: 5 }, 10, 'rural', 'powerLaw')).toBe(5);
  });
  it('rejects a negative height, a zero wind and an unknown profile', () => {
    expect(() => windSpeedAtHeight_m_s(weather('D'), -2, 'rural', 'powerLaw')).toThrow(/height_m is -2/);
    expect(() => windSpeedAtHeight_m_s(weather('D', 0), 20, 'rural', 'powerLaw')).toThrow(/windSpeed_m_s is 0/);
    expect(() => windSpeedAtHeight_m_s(weather('D'), 20, 'rural', 'log' as 'uniform')).toThrow(/windProfile is "log"/);
  });
});
