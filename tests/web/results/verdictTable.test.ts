/**
 * The receptor table with the screen and the footprint areas table, read as text. The preview's figures
 * are checked against hand arithmetic of the two-stage screen as solver/assessment/verdicts.ts states it
 * (common practice in permit guidance: PC under 1 % of a long-term or 10 % of a short-term limit is
 * insignificant; PEC under 70 % of a long-term limit at stage 2; thresholds from memory, REFERENCES.md).
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_SCREENING_THRESHOLDS } from '../../../solver/assessment/standards.ts';
import { areasTableHtml, formatPercent, previewVerdicts, thresholdsLine, verdictTableHtml, type VerdictStandard } from '../../../web/results/verdictTable.ts';

const receptors = [
  { id: 'a', name: 'Ashby Lane houses' },
  { id: 'b', name: 'Brindle school' },
];

function text(html: string): string {
  return html.replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ').trim();
}

describe('the verdict table', () => {
  it('forms the preview\'s figures by hand arithmetic: PC x factor, % of limit, PEC = PC + background', () => {
    // NOx 10 ug/m3 at the peak, short-term share 0.35 (the default NOx to NO2 share): NO2 PC 3.5 of 200 = 1.75 %
    const standard = { name: 'NO2 1-hour', limit_ug_m3: 200, term: 'short' as const, pcFactor: 0.35, conversion: 'NO2 = 0.35 x NOx' };
    const figures = previewVerdicts(standard, { value_ug_m3: 10, x_m: 120, y_m: -40 }, [2, 0], receptors, 20, DEFAULT_SCREENING_THRESHOLDS);
    expect(figures.maximum?.pc_ug_m3).toBeCloseTo(3.5, 12);
    expect(figures.maximum?.pcPercentOfStandard).toBeCloseTo(1.75, 12);
    expect(figures.maximum?.pec_ug_m3).toBeCloseTo(23.5, 12);
    expect(figures.maximum?.pecPercentOfStandard).toBeCloseTo(11.75, 12);
    // one weather state decides nothing: the solver calls it indicative
    expect(figures.maximum?.outcome).toBe('indicative');
    const html = text(verdictTableHtml(figures, receptors, 'Gaussian preview'));
    expect(html).toContain('maximum x 120, y -40 m 3.5 1.8 % 20 23.5 12 % indicative');
    expect(html).toContain('Ashby Lane houses 0.7 0.35 % 20 20.7 10 % indicative');
    expect(html).toContain('NO2 = 0.35 x NOx');
  });

  it('shows a run\'s verdicts in our words, and a standard without figures with its reason', () => {
    const run: VerdictStandard = {
      name: 'NO2 annual',
      limit_ug_m3: 40,
      term: 'long',
      basisNote: "the standard's own statistic",
      maximum: { where: 'ground', x_m: 75, y_m: -25, pc_ug_m3: 1.2, pcPercentOfStandard: 3, background_ug_m3: 14, pec_ug_m3: 15.2, pecPercentOfStandard: 38, stage1: { threshold_pct: 1, passed: false }, stage2: { threshold_pct: 70, passed: true }, outcome: 'screenedOut' },
      receptors: [
        { id: 'a', pc_ug_m3: 0.2, pcPercentOfStandard: 0.5, background_ug_m3: 14, pec_ug_m3: 14.2, pecPercentOfStandard: 36, stage1: { threshold_pct: 1, passed: true }, stage2: null, outcome: 'screenedOut' },
        { id: 'b', pc_ug_m3: 16, pcPercentOfStandard: 40, background_ug_m3: 14, pec_ug_m3: 30, pecPercentOfStandard: 75, stage1: { threshold_pct: 1, passed: false }, stage2: { threshold_pct: 70, passed: false }, outcome: 'notScreenedOut' },
      ],
    };
    const html = text(verdictTableHtml(run, receptors, 'grid run, revision 2'));
    expect(html).toContain('Ashby Lane houses 0.2 0.5 % 14 14.2 36 % insignificant');
    expect(html).toContain('Brindle school 16 40 % 14 30 75 % assess further');
    const none = text(verdictTableHtml({ name: 'NO2 annual', limit_ug_m3: 40, term: 'long', basisNote: 'no figure', reason: 'one steady state cannot tell an annual mean' }, receptors, 'grid run'));
    expect(none).toContain('Brindle school no figure');
    expect(none).toContain('one steady state cannot tell an annual mean');
  });

  it('states the thresholds and the background beside the table', () => {
    const line = thresholdsLine({ label: 'a screening aid', thresholds: DEFAULT_SCREENING_THRESHOLDS, background_ug_m3: 14, noxToNo2: { longTerm: 0.7, shortTerm: 0.35, source: '' } });
    expect(line).toContain('PC under 1 % of a long-term or 10 % of a short-term limit');
    expect(line).toContain('PEC under 70 %');
    expect(line).toContain('Background 14 µg/m³');
    expect(line).toContain('NO2 = 0.7 (long-term), 0.35 (short-term) × NOx');
  });

  it('rounds percentages to two significant figures', () => {
    expect(formatPercent(11.75)).toBe('12 %');
    expect(formatPercent(0.354)).toBe('0.35 %');
    expect(formatPercent(0)).toBe('0 %');
    expect(formatPercent(6.9e-6)).toBe('< 0.01 %');
  });
});

describe('the footprint areas table', () => {
  it('lists area, reach and receptors inside per level, marking lower bounds at the grid edge', () => {
    const html = areasTableHtml(
      [
        { level_ug_m3: 1, area_m2: 2_830_000, area_ha: 283, farthest: [{ sourceId: 's', distance_m: 5600 }], receptorsInside: ['a', 'b'], reachesGridEdge: true },
        { level_ug_m3: 10, area_m2: 4600, area_ha: 0.46, farthest: [{ sourceId: 's', distance_m: 150 }], receptorsInside: [], reachesGridEdge: false },
      ],
      receptors,
      'grid run, revision 1',
      50,
    );
    const flat = text(html);
    expect(flat).toContain('1 ≥ 283 ≥ 5600 2');
    expect(flat).toContain('10 0.46 150 0');
    expect(flat).toContain('the true area is larger');
    expect(html).toContain('title="Ashby Lane houses, Brindle school"');
  });
});
