/**
 * The wind-rose table and picture: frequencies conserve the time (sectors + calm = 1), sectors are
 * centred on their directions (the wind-rose convention: where the wind blows FROM, common practice),
 * and the SVG carries one wedge per non-empty sector and speed class, the legend, the stability strip
 * and the caption, with text escaped.
 */
import { describe, expect, it } from 'vitest';
import { sectorIndex, speedClassIndex, windRoseFromCells, windRoseFromHours } from '../../../solver/meteorology/windRoseTable.ts';
import { windRoseSvg } from '../../../server/writers/windRoseSvg.ts';
import type { ResolvedWeather } from '../../../solver/drivers/types.ts';

const hour = (windFrom_deg: number, windSpeed_m_s: number, stability: ResolvedWeather['stability'], calm = false): ResolvedWeather => ({
  windFrom_deg, windSpeed_m_s, stability, calm, mixingHeight_m: 800, rain_mm_h: 0, airTemperature_K: 285, anemometerHeight_m: 10,
});

describe('wind-rose table', () => {
  it('bins directions into sectors centred on multiples of the width', () => {
    expect(sectorIndex(0, 30)).toBe(0);
    expect(sectorIndex(14.9, 30)).toBe(0);
    expect(sectorIndex(15, 30)).toBe(1);
    expect(sectorIndex(350, 30)).toBe(0);
    expect(sectorIndex(240, 30)).toBe(8);
    expect(speedClassIndex(0.5, [1, 2, 3, 5, 8, 11])).toBe(0);
    expect(speedClassIndex(4.9, [1, 2, 3, 5, 8, 11])).toBe(2);
    expect(speedClassIndex(25, [1, 2, 3, 5, 8, 11])).toBe(5);
  });

  it('fractions of the sectors plus the calm fraction sum to 1, and so do the stability fractions', () => {
    const hours = [hour(240, 4, 'D'), hour(250, 6, 'D'), hour(90, 2.5, 'E'), hour(10, 1, 'F', true)];
    const table = windRoseFromHours(hours);
    const sectors = table.frequency.flat().reduce((a, b) => a + b, 0);
    expect(sectors + table.calmFraction).toBeCloseTo(1, 12);
    expect(table.calmFraction).toBeCloseTo(0.25, 12);
    expect(table.frequency[8][2]).toBeCloseTo(0.25, 12); // 240 deg, 3-5 m/s
    expect(table.frequency[8][3]).toBeCloseTo(0.25, 12); // 250 deg -> sector 240, 5-8 m/s
    expect(Object.values(table.stabilityFrequency).reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
    const rose = windRoseFromCells([{ windFrom_deg: 90, windSpeed_m_s: 3, stability: 'C', frequency: 0.6 }, { windFrom_deg: 270, windSpeed_m_s: 0.5, stability: 'F', frequency: 0.4 }], 90, 1);
    expect(rose.calmFraction).toBeCloseTo(0.4, 12);
    expect(rose.frequency[1][2]).toBeCloseTo(0.6, 12); // 90 deg, 3-5 m/s
  });
});

describe('wind-rose SVG', () => {
  it('draws one wedge per non-empty cell, the legend, the stability strip and an escaped caption', () => {
    const hours = [hour(240, 4, 'D'), hour(250, 6, 'D'), hour(90, 2.5, 'E'), hour(10, 1, 'F', true), hour(180, 12, 'C')];
    const svg = windRoseSvg(windRoseFromHours(hours), { caption: 'Test <year> & "rose"' });
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg.trim().endsWith('</svg>')).toBe(true);
    expect(svg.match(/<path /g)?.length).toBe(4); // four non-calm hours, each its own sector/speed cell
    for (const label of ['N', 'E', 'S', 'W', '3-5 m/s', '&gt;= 11 m/s', 'calm', 'Stability class frequency']) expect(svg).toContain(label);
    expect(svg).toContain('Test &lt;year&gt; &amp; &quot;rose&quot;');
    expect(svg).not.toContain('NaN');
    // balanced tags: every opened element that is not self-closed is closed
    const opened = (svg.match(/<(svg|path|text|title)[ >]/g) ?? []).length;
    const selfClosed = (svg.match(/<path [^>]*\/>/g) ?? []).length;
    const closed = (svg.match(/<\/(svg|path|text|title)>/g) ?? []).length;
    expect(opened - selfClosed).toBe(closed);
  });
});
