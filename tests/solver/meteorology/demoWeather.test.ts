/**
 * The invented demo year (scenarios/merrowdene-heat-plant-year/makeWeather.ts): deterministic, complete, shaped as the issue
 * asks (diurnal stability cycle, a prevailing sector, some rain hours), readable by the scenario's CSV
 * reader, and the checked-in file is exactly what the generator writes (fixture comparison).
 */
import { readFile } from 'node:fs/promises';
import { describe, expect, it } from 'vitest';
import { DEMO_SEED, demoYearCsv, makeDemoYear } from '../../../scenarios/merrowdene-heat-plant-year/makeWeather.ts';
import { parseWeatherCsv } from '../../../scenarios/format/weatherCsv.ts';
import { resolveWeather } from '../../../solver/meteorology/resolveWeather.ts';
import { sectorIndex } from '../../../solver/meteorology/windRoseTable.ts';

const SITE = { lat: 54.0612, lon: -2.2841 };

describe('invented demo met year', () => {
  const hours = makeDemoYear();

  it('is deterministic for a seed and differs for another', () => {
    expect(demoYearCsv(makeDemoYear(DEMO_SEED))).toBe(demoYearCsv(hours));
    expect(demoYearCsv(makeDemoYear(DEMO_SEED + 1))).not.toBe(demoYearCsv(hours));
  });

  it('has 8760 consecutive hours of 2031 and some rain hours', () => {
    expect(hours.length).toBe(8760);
    expect(hours[0].time).toBe('2031-01-01T00:00:00Z');
    expect(hours[8759].time).toBe('2031-12-31T23:00:00Z');
    const rain = hours.filter((h) => h.rain_mm_h > 0).length;
    expect(rain).toBeGreaterThan(200);
    expect(rain).toBeLessThan(1500);
  });

  it('has a prevailing west-south-westerly sector', () => {
    const counts = new Array(12).fill(0);
    for (const h of hours) counts[sectorIndex(h.windFrom_deg, 30)]++;
    const top = counts.indexOf(Math.max(...counts));
    expect(top * 30).toBe(240);
    expect(counts[8]).toBeGreaterThan(2 * (8760 / 12));
  });

  it('gives a diurnal stability cycle when the classes are derived: unstable afternoons, stable nights', () => {
    const byHour = Array.from({ length: 24 }, () => ({ unstable: 0, stable: 0 }));
    for (const h of hours) {
      const w = resolveWeather(h, SITE);
      const hourOfDay = Number(h.time.slice(11, 13));
      if (w.stability <= 'C') byHour[hourOfDay].unstable++;
      if (w.stability >= 'E') byHour[hourOfDay].stable++;
    }
    expect(byHour[13].unstable).toBeGreaterThan(100);
    expect(byHour[2].unstable).toBe(0);
    expect(byHour[2].stable).toBeGreaterThan(50);
    expect(byHour[13].stable).toBe(0);
  });

  it('the checked-in weather.csv is the generator output and the CSV reader accepts every row', async () => {
    const text = await readFile(new URL('../../../scenarios/merrowdene-heat-plant-year/weather.csv', import.meta.url), 'utf8');
    expect(text).toBe(demoYearCsv(hours));
    const parsed = parseWeatherCsv(text, 'weather.csv');
    expect(parsed.ok).toBe(true);
    if (parsed.ok) expect(parsed.hours.length).toBe(8760);
  });
});
