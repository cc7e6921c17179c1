/** resolveWeather: precedence, the calms rule (common practice), mixing-height defaults, sky-derived classes. */
import { describe, expect, it } from 'vitest';
import {
  CALM_THRESHOLD_m_s,
  DEFAULT_MIXING_HEIGHT_m,
  resolveWeather,
  resolveWeatherWithSource,
} from '../../../solver/meteorology/resolveWeather.ts';
import { parseIsoTime } from '../../../solver/meteorology/time.ts';

const site = { lat: 52.2, lon: 5.1 };
const base = { windSpeed_m_s: 4, windFrom_deg: 250, rain_mm_h: 0, airTemperature_K: 285, anemometerHeight_m: 10 };

describe('resolveWeather', () => {
  it('keeps a class given directly and defaults the mixing height per class', () => {
    const w = resolveWeather({ ...base, stability: 'E' }, site);
    expect(w).toEqual({ ...base, stability: 'E', mixingHeight_m: DEFAULT_MIXING_HEIGHT_m.E, calm: false });
  });

  it('keeps a mixing height given', () => {
    expect(resolveWeather({ ...base, stability: 'D', mixingHeight_m: 650 }, site).mixingHeight_m).toBe(650);
  });

  it('applies the calms rule: below 1 m/s raised to 1 m/s and flagged; 1 m/s itself is not calm', () => {
    expect(CALM_THRESHOLD_m_s).toBe(1);
    const calm = resolveWeather({ ...base, windSpeed_m_s: 0.3, stability: 'F' }, site);
    expect(calm.windSpeed_m_s).toBe(1);
    expect(calm.calm).toBe(true);
    const notCalm = resolveWeather({ ...base, windSpeed_m_s: 1, stability: 'F' }, site);
    expect(notCalm.calm).toBe(false);
  });

  it('derives the class from the sky with the speed measured before the calms rule', () => {
    // 52.2 N, 5.1 E, clear, winter night at 02:00 local (+01:00), 0.5 m/s: blank cell -> F
    const night = resolveWeatherWithSource({ ...base, windSpeed_m_s: 0.5, cloudCover_oktas: 1, time: '2031-01-10T02:00+01:00' }, site);
    expect(night.weather.stability).toBe('F');
    expect(night.stabilitySource).toBe('sky');
    expect(night.solarElevation_deg).toBeLessThan(0);
    // midsummer noon, clear, 2.5 m/s: elevation about 61 deg -> strong sun -> A-B -> B
    const noon = resolveWeatherWithSource({ ...base, windSpeed_m_s: 2.5, cloudCover_oktas: 0, time: '2031-06-21T13:00+02:00' }, site);
    expect(noon.solarElevation_deg).toBeGreaterThan(60);
    expect(noon.weather.stability).toBe('B');
    // the same hour overcast -> D
    expect(resolveWeather({ ...base, windSpeed_m_s: 2.5, cloudCover_oktas: 8, time: '2031-06-21T13:00+02:00' }, site).stability).toBe('D');
  });

  it('gives D to the first daylight hour after a night', () => {
    // Find the first hour of 10 Jan 2031 whose middle has the sun up: it must be D, the hour after it not.
    const start = parseIsoTime('2031-01-10T00:00Z').epoch_ms;
    const hours = Array.from({ length: 24 }, (_, h) => new Date(start + h * 3_600_000).toISOString());
    const classes = hours.map((time) =>
      resolveWeatherWithSource({ ...base, windSpeed_m_s: 2.5, cloudCover_oktas: 2, time }, site),
    );
    const firstDay = classes.findIndex((c) => (c.solarElevation_deg ?? -1) > 0);
    expect(firstDay).toBeGreaterThan(5);
    expect(classes[firstDay - 1].weather.stability).toBe('F'); // last night hour, clear, 2.5 m/s
    expect(classes[firstDay].weather.stability).toBe('D');
    expect(classes[firstDay + 1].weather.stability).toBe('C'); // slight winter sun at 2.5 m/s
  });

  it('prefers a given class over a temperature difference over the sky', () => {
    const both = { ...base, cloudCover_oktas: 0, time: '2031-06-21T13:00+02:00', temperatureDifference: { lowerHeight_m: 10, upperHeight_m: 60, difference_K: 1.5 } };
    expect(resolveWeatherWithSource(both, site).stabilitySource).toBe('temperatureDifference');
    expect(resolveWeather(both, site).stability).toBe('F');
    expect(resolveWeather({ ...both, stability: 'C' }, site).stability).toBe('C');
  });

  it('names the field path when stability cannot be derived or a value is bad', () => {
    expect(() => resolveWeather({ ...base }, site, 'weather.hours[3]')).toThrow(/weather\.hours\[3\]\.stability: missing/);
    expect(() => resolveWeather({ ...base, cloudCover_oktas: 2 }, site)).toThrow(/weather\.time: missing/);
    expect(() => resolveWeather({ ...base, stability: 'D', windSpeed_m_s: Number.NaN }, site)).toThrow(/weather\.windSpeed_m_s: NaN/);
    expect(() => resolveWeather({ ...base, stability: 'D', windFrom_deg: 400 }, site)).toThrow(/windFrom_deg: 400/);
    expect(() => resolveWeather({ ...base, cloudCover_oktas: 2, time: '2031-01-10T02:00' }, site)).toThrow(/time-zone offset/);
  });
});

describe('parseIsoTime', () => {
  it('reads the offset and the instant', () => {
    expect(parseIsoTime('2031-01-01T01:00:00+01:00')).toEqual({ epoch_ms: Date.UTC(2031, 0, 1), offsetMinutes: 60 });
    expect(parseIsoTime('2031-01-01T00:00Z').epoch_ms).toBe(Date.UTC(2031, 0, 1));
    expect(parseIsoTime('2030-12-31T19:30-0430').offsetMinutes).toBe(-270);
  });
  it('rejects a date that does not exist', () => {
    expect(() => parseIsoTime('2031-02-30T00:00Z', 'weather.hours[0].time')).toThrow(/weather\.hours\[0\]\.time/);
  });
});
