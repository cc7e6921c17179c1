/**
 * The Pasquill-Turner table cells against REFERENCES.md (Pasquill 1961; Turner 1970, Table 1; read in
 * Boubel, Fox, Turner & Stern 1994, Table 19-3), the stated choices for its blank and split cells, and
 * the temperature-difference classes (US NRC Regulatory Guide 1.23 ranges, from memory).
 */
import { describe, expect, it } from 'vitest';
import {
  classFromEntry,
  isBlankTableCell,
  pasquillTurnerEntry,
  skyVerdict,
  stabilityFromSky,
  stabilityFromTemperatureDifference,
  type SkyColumn,
} from '../../../solver/meteorology/stabilityClass.ts';

// Transcribed from REFERENCES.md row by row; null = blank in the published table.
const PUBLISHED: { speeds_m_s: number[]; cells: Record<SkyColumn, string | null> }[] = [
  { speeds_m_s: [0, 1.0, 1.99], cells: { strongSun: 'A', moderateSun: 'A-B', slightSun: 'B', nightCloudy: null, nightClear: null } },
  { speeds_m_s: [2.0, 2.5, 2.99], cells: { strongSun: 'A-B', moderateSun: 'B', slightSun: 'C', nightCloudy: 'E', nightClear: 'F' } },
  { speeds_m_s: [3.0, 4.0, 4.99], cells: { strongSun: 'B', moderateSun: 'B-C', slightSun: 'C', nightCloudy: 'D', nightClear: 'E' } },
  { speeds_m_s: [5.0, 5.5, 6.0], cells: { strongSun: 'C', moderateSun: 'C-D', slightSun: 'D', nightCloudy: 'D', nightClear: 'D' } },
  { speeds_m_s: [6.01, 8, 15], cells: { strongSun: 'C', moderateSun: 'D', slightSun: 'D', nightCloudy: 'D', nightClear: 'D' } },
];

describe('Pasquill-Turner table (Turner 1970 via Boubel et al. 1994, Table 19-3)', () => {
  it('every published cell matches, at speeds inside and at the edges of each row', () => {
    let checked = 0;
    for (const row of PUBLISHED) {
      for (const speed of row.speeds_m_s) {
        for (const [column, published] of Object.entries(row.cells) as [SkyColumn, string | null][]) {
          if (published === null) {
            expect(isBlankTableCell(speed, column)).toBe(true);
          } else {
            expect(isBlankTableCell(speed, column)).toBe(false);
            expect(pasquillTurnerEntry(speed, column)).toBe(published);
            checked++;
          }
        }
      }
    }
    expect(checked).toBe(69); // 23 published cells x 3 speeds
  });

  it('blank cells are filled as stated: night below 2 m/s -> E (>= 4/8 cloud), F (<= 3/8)', () => {
    expect(pasquillTurnerEntry(1.2, 'nightCloudy')).toBe('E');
    expect(pasquillTurnerEntry(1.2, 'nightClear')).toBe('F');
  });

  it('split cells resolve to the more stable class, as stated', () => {
    expect(classFromEntry('A-B')).toBe('B');
    expect(classFromEntry('B-C')).toBe('C');
    expect(classFromEntry('C-D')).toBe('D');
    expect(classFromEntry('E')).toBe('E');
  });

  it('insolation from solar elevation: strong above 60 deg, moderate 35-60, slight below 35; 5-7/8 cloud one step weaker', () => {
    const sky = (solarElevation_deg: number, cloudCover_oktas: number) => ({ solarElevation_deg, cloudCover_oktas, nextToNight: false });
    expect(skyVerdict(sky(62, 0))).toEqual({ column: 'strongSun' });
    expect(skyVerdict(sky(45, 3))).toEqual({ column: 'moderateSun' });
    expect(skyVerdict(sky(20, 4))).toEqual({ column: 'slightSun' });
    expect(skyVerdict(sky(8, 0))).toEqual({ column: 'slightSun' });
    expect(skyVerdict(sky(62, 6))).toEqual({ column: 'moderateSun' });
    expect(skyVerdict(sky(45, 7))).toEqual({ column: 'slightSun' });
    expect(skyVerdict(sky(20, 5))).toEqual({ column: 'slightSun' });
  });

  it('overcast (8/8) day or night and the hour either side of night give D (REFERENCES.md footnote)', () => {
    expect(stabilityFromSky(1.5, { solarElevation_deg: 55, nextToNight: false, cloudCover_oktas: 8 })).toBe('D');
    expect(stabilityFromSky(1.5, { solarElevation_deg: -30, nextToNight: false, cloudCover_oktas: 8 })).toBe('D');
    expect(stabilityFromSky(1.5, { solarElevation_deg: 4, nextToNight: true, cloudCover_oktas: 0 })).toBe('D');
    // without the transition the same hour would be B (slight sun, < 2 m/s)
    expect(stabilityFromSky(1.5, { solarElevation_deg: 4, nextToNight: false, cloudCover_oktas: 0 })).toBe('B');
  });

  it('night columns split at 4/8 cloud', () => {
    expect(stabilityFromSky(2.5, { solarElevation_deg: -10, nextToNight: false, cloudCover_oktas: 4 })).toBe('E');
    expect(stabilityFromSky(2.5, { solarElevation_deg: -10, nextToNight: false, cloudCover_oktas: 3 })).toBe('F');
  });

  it('rejects a negative speed and cloud above 8 oktas, naming the field', () => {
    expect(() => pasquillTurnerEntry(-1, 'strongSun')).toThrow(/windSpeed_m_s: -1/);
    expect(() => skyVerdict({ solarElevation_deg: 10, nextToNight: false, cloudCover_oktas: 9 })).toThrow(/cloudCover_oktas: 9/);
  });
});

describe('stability from a mast temperature difference (US NRC Regulatory Guide 1.23 ranges, from memory)', () => {
  // dT/dz in K per 100 m: A <= -1.9, B <= -1.7, C <= -1.5, D <= -0.5, E <= 1.5, F above (G counted as F).
  const cases: [number, string][] = [
    [-2.5, 'A'], [-1.91, 'A'], [-1.8, 'B'], [-1.6, 'C'], [-1.0, 'D'], [-0.98, 'D'], [0.0, 'E'], [1.4, 'E'], [2.0, 'F'], [6.0, 'F'],
  ];
  for (const [gradient_per_100m, expected] of cases) {
    it(`dT/dz = ${gradient_per_100m} K/100 m -> ${expected}`, () => {
      // a 10 m to 60 m mast
      const difference_K = (gradient_per_100m * 50) / 100;
      expect(stabilityFromTemperatureDifference({ lowerHeight_m: 10, upperHeight_m: 60, difference_K })).toBe(expected);
    });
  }

  it('the dry adiabatic gradient (dtheta/dz = 0) is neutral, D', () => {
    expect(stabilityFromTemperatureDifference({ lowerHeight_m: 2, upperHeight_m: 102, difference_K: -0.98 })).toBe('D');
  });

  it('rejects an upper height not above the lower, naming the field', () => {
    expect(() =>
      stabilityFromTemperatureDifference({ lowerHeight_m: 10, upperHeight_m: 10, difference_K: 0 }, 'weather.temperatureDifference'),
    ).toThrow(/weather\.temperatureDifference\.upperHeight_m: 10/);
  });
});
