/**
 * Solar elevation against almanac instants and an independent published formula.
 *
 * Independent formula: Spencer's (1971, Search 2(5):172) Fourier series for declination and equation
 * of time, as printed in NOAA's "General Solar Position Calculations" note, re-implemented here from
 * memory. It is a fit to a mid-20th-century epoch, so it trails by up to about 0.4 degree in the 2030s;
 * the almanac instants below pin the solver's (Meeus) formula far more tightly.
 */
import { describe, expect, it } from 'vitest';
import { solarElevation_deg, solarGeometry } from '../../../solver/meteorology/solarElevation.ts';

const DEG = Math.PI / 180;

/** Spencer (1971) via the NOAA note: elevation [deg], from memory. */
function spencerElevation_deg(epoch_ms: number, lat: number, lon: number): number {
  const start = Date.UTC(new Date(epoch_ms).getUTCFullYear(), 0, 1);
  const days = (Date.UTC(new Date(epoch_ms).getUTCFullYear() + 1, 0, 1) - start) / 86_400_000;
  const g = ((2 * Math.PI) / days) * ((epoch_ms - start) / 86_400_000 - 0.5);
  const eq = 229.18 * (0.000075 + 0.001868 * Math.cos(g) - 0.032077 * Math.sin(g) - 0.014615 * Math.cos(2 * g) - 0.040849 * Math.sin(2 * g));
  const decl =
    0.006918 - 0.399912 * Math.cos(g) + 0.070257 * Math.sin(g) - 0.006758 * Math.cos(2 * g) +
    0.000907 * Math.sin(2 * g) - 0.002697 * Math.cos(3 * g) + 0.00148 * Math.sin(3 * g);
  const minutes = (((epoch_ms % 86_400_000) + 86_400_000) % 86_400_000) / 60_000;
  const hourAngle = (minutes + eq + 4 * lon) / 4 - 180;
  const cosZ = Math.sin(lat * DEG) * Math.sin(decl) + Math.cos(lat * DEG) * Math.cos(decl) * Math.cos(hourAngle * DEG);
  return 90 - Math.acos(cosZ) / DEG;
}

const declination_deg = (iso: string) => solarGeometry(Date.parse(iso)).declination_rad / DEG;

describe('solar elevation (Meeus 1991 low-precision solar position)', () => {
  it('declination is zero at the March and September equinoxes of 2024 (almanac instants, from memory: 20 Mar 03:06 UTC, 22 Sep 12:44 UTC)', () => {
    // The declination moves 0.4 degree a day near the equinox, so 0.02 degree is about an hour.
    expect(Math.abs(declination_deg('2024-03-20T03:06Z'))).toBeLessThan(0.02);
    expect(Math.abs(declination_deg('2024-09-22T12:44Z'))).toBeLessThan(0.02);
    expect(declination_deg('2024-03-21T03:06Z')).toBeGreaterThan(0.35);
  });

  it('declination equals the obliquity, 23.44 degrees, at the June 2024 solstice (20 Jun 20:51 UTC, almanac, from memory)', () => {
    expect(declination_deg('2024-06-20T20:51Z')).toBeCloseTo(23.44, 1);
    expect(Math.abs(declination_deg('2024-06-20T20:51Z') - 23.436)).toBeLessThan(0.01);
    expect(declination_deg('2024-12-21T09:21Z')).toBeLessThan(-23.42);
  });

  it('equation of time reaches about -14.2 min in mid-February and +16.4 min in early November (almanac values, from memory)', () => {
    expect(Math.abs(solarGeometry(Date.parse('2031-02-11T12:00Z')).equationOfTime_min + 14.2)).toBeLessThan(0.3);
    expect(Math.abs(solarGeometry(Date.parse('2031-11-03T12:00Z')).equationOfTime_min - 16.4)).toBeLessThan(0.3);
  });

  it('noon elevation is 90 - |lat - declination| (spherical geometry at the meridian)', () => {
    for (const date of ['2031-06-21', '2031-12-21', '2031-04-10']) {
      const midday = Date.parse(`${date}T12:00Z`);
      const { equationOfTime_min, declination_rad } = solarGeometry(midday);
      const solarNoon = midday - equationOfTime_min * 60_000; // local solar noon at longitude 0
      for (const lat of [0, 30, 51.48, -40]) {
        const expected = 90 - Math.abs(lat - declination_rad / DEG);
        expect(Math.abs(solarElevation_deg(solarNoon, lat, 0) - expected)).toBeLessThan(0.02);
      }
    }
  });

  const places = [
    { name: 'mid-latitude north', lat: 52.1, lon: 5.2 },
    { name: 'tropics', lat: 13.5, lon: -16.6 },
    { name: 'southern hemisphere', lat: -33.9, lon: 151.2 },
    { name: 'sub-arctic', lat: 64.1, lon: -21.9 },
  ];
  for (const place of places) {
    it(`agrees with Spencer's series (NOAA note) within 0.5 degree through a year: ${place.name}`, () => {
      for (let day = 0; day < 365; day += 7) {
        for (let hour = 0; hour < 24; hour += 2) {
          const t = Date.UTC(2031, 0, 1 + day, hour, 20);
          expect(Math.abs(solarElevation_deg(t, place.lat, place.lon) - spencerElevation_deg(t, place.lat, place.lon))).toBeLessThan(0.5);
        }
      }
    });
  }

  it('the sun is below the horizon at midnight and above it at noon in a mid-latitude winter', () => {
    expect(solarElevation_deg(Date.parse('2031-01-15T00:00Z'), 52, 0)).toBeLessThan(-50);
    expect(solarElevation_deg(Date.parse('2031-01-15T12:10Z'), 52, 0)).toBeGreaterThan(15);
  });

  it('rejects a latitude out of range, naming it', () => {
    expect(() => solarElevation_deg(0, 95, 0)).toThrow(/site\.lat: 95/);
  });
});
