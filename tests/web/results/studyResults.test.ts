/**
 * Sweep and stack-height results as the page shows them, from files shaped as server/writers/sweepFiles.ts
 * writes them (invented figures): the table lists every member, the chart's points sit where the axes
 * put them, the answer and the caution are shown, and the downloads list the pack first.
 */
import { describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { downloadsHtml } from '../../../web/results/downloads.ts';
import { lineChartSvg, niceTicks } from '../../../web/results/lineChart.ts';
import { comparisonResultHtml, sitingResultHtml, stackHeightResultHtml, sweepResultHtml, type StackHeightFile, type SweepFile } from '../../../web/results/studyResults.ts';

const sweep: SweepFile = {
  format: 'plumeplan.sweep/1',
  parameter: 'stackHeight_m',
  unit: 'm',
  description: "a point source's stack height",
  sourceId: 'boiler-stack',
  statistic: 'concentration',
  members: [20, 40, 60].map((value, n) => ({
    value,
    groundMax_ug_m3: 30 / (n + 1),
    receptors: [{ id: 'a', pc_ug_m3: 12 / (n + 1) }],
    standards: [{ name: 'NO2 1-hour', max_ug_m3: 10 / (n + 1) }],
  })),
  notes: ['members share one grid'],
  caution: SCREENING_CAUTION,
};

function text(html: string): string {
  return html.replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ').trim();
}

describe('study results', () => {
  it('tables every sweep member with the ground maximum, each receptor and each standard', () => {
    const html = sweepResultHtml(sweep, new Map([['a', 'Ashby Lane houses']]));
    const flat = text(html);
    expect(flat).toContain('concentration [µg/m³] for each value of a point source&#39;s stack height (boiler-stack)');
    expect(flat).toContain('stack height [m] ground max. Ashby Lane houses NO2 1-hour max.');
    expect(flat).toContain('40 15 6 5');
    expect(flat).toContain('members share one grid');
    expect(html).toContain(SCREENING_CAUTION.slice(0, 40));
    expect(html).toContain('<svg');
  });

  it('states the stack height found, the target and its basis, with the curve and the caution', () => {
    const result: StackHeightFile = {
      format: 'plumeplan.stackHeight/1',
      found: true,
      height_m: 47,
      bracket_m: [46, 47],
      tolerance_m: 1,
      target_ug_m3: 20,
      targetBasis: '10 % of NO2 1-hour (200 ug/m3)',
      sourceId: 'boiler-stack',
      at: 'ground',
      standard: 'NO2 1-hour',
      message: 'found by bisection',
      monotone: true,
      curve: [
        { height_m: 10, pc_ug_m3: 60, meetsTarget: false },
        { height_m: 47, pc_ug_m3: 19.5, meetsTarget: true },
      ],
      downwash: null,
      caution: SCREENING_CAUTION,
    };
    const flat = text(stackHeightResultHtml(result));
    expect(flat).toContain('Lowest height meeting the target: 47 m (target 20 µg/m³, 10 % of NO2 1-hour (200 ug/m3); within 1 m)');
    expect(flat).toContain('10 60 no 47 19.5 yes');
    expect(flat).toContain(SCREENING_CAUTION.slice(0, 40));
    expect(text(stackHeightResultHtml({ ...result, found: false, height_m: null }))).toContain('no height in the range meets the target');
  });

  it('places chart points on the axes it draws (linear in x and y), with the target line', () => {
    const svg = lineChartSvg([{ name: 'PC', points: [{ x: 0, y: 0 }, { x: 10, y: 10 }] }], { title: 't', xLabel: 'x', yLabel: 'y', width: 300, height: 200, reference: { y: 5, label: 'target' } });
    const circles = [...svg.matchAll(/<circle cx="([\d.]+)" cy="([\d.]+)"/g)].map((m) => [Number(m[1]), Number(m[2])]);
    expect(circles).toHaveLength(2);
    // plot from x = 46 to 290 px; y from 0 at the bottom to 10.5 (5 % headroom) at the top
    expect(circles[0][0]).toBeCloseTo(46, 0);
    expect(circles[1][0]).toBeCloseTo(290, 0);
    const bottom = circles[0][1];
    const topOfTen = circles[1][1];
    const target = Number(/<line x1="46" x2="290" y1="([\d.]+)" y2="[\d.]+" stroke="#9b2c2c"/.exec(svg)?.[1]);
    // the target at 5 sits halfway between 0 and 10
    expect(target).toBeCloseTo((bottom + topOfTen) / 2, 0);
    expect(svg).toContain('<title');
  });

  it('states the best siting position and ranks the candidates with their share of the standard', () => {
    const flat = text(
      sitingResultHtml(
        {
          format: 'plumeplan.siting/1',
          caution: SCREENING_CAUTION,
          statistic: 'steady',
          map: { meaning: 'highest PC in the one steady weather state [ug/m3] if the stack stood at each grid column centre' },
          stack: { id: 'boiler-stack' },
          standard: { name: 'NO2 1-hour', limit_ug_m3: 200 },
          best: { x_m: -62.4, y_m: 10.2, lon: -2.2851, lat: 54.0613, combined_ug_m3: 4.2 },
          candidates: [
            { rank: 1, id: 'c-1', x_m: -62.4, y_m: 10.2, combined_ug_m3: 4.2, highestPc_ug_m3: 4.2, highestReceptor: 'a', percentOfStandard: 2.1, verdict: 'screenedOut' },
            { rank: 2, id: 'c-2', x_m: 40, y_m: -30, combined_ug_m3: 6.5, highestPc_ug_m3: 6.5, highestReceptor: 'a', percentOfStandard: 3.3, verdict: 'screenedOut' },
          ],
        },
        new Map([['a', 'Ashby Lane houses']]),
      ),
    );
    expect(flat).toContain('Best position for boiler-stack: 62 m west and 10 m north of the site');
    expect(flat).toContain('1 x -62, y 10 4.2 Ashby Lane houses (4.2) 2.1 %');
    expect(flat).toContain('The 2 best of 2 candidate positions');
    expect(flat).toContain(SCREENING_CAUTION.slice(0, 40));
  });

  it('shows the server comparison: areas of A and B per level, and each verdict that changes', () => {
    const flat = text(
      comparisonResultHtml(
        {
          format: 'plumeplan.comparison/1',
          a: { label: 'demo (run r1)' },
          b: { label: 'taller (run r2)' },
          levels: { basis: 'round numbers across the larger peak', areas: [{ level_ug_m3: 1, a_m2: 2_800_000, b_m2: 1_400_000, change_m2: -1_400_000, change_pct: -50 }] },
          verdictChanges: [{ standard: 'NO2 1-hour', where: 'a', a: 'notScreenedOut', b: 'screenedOut', a_pc_ug_m3: 30, b_pc_ug_m3: 12 }],
          notes: [],
          caution: SCREENING_CAUTION,
        },
        new Map([['a', 'Ashby Lane houses']]),
      ),
    );
    expect(flat).toContain('1 280 140 -140 (-50 %)');
    expect(flat).toContain('NO2 1-hour at Ashby Lane houses: assess further (A, 30 µg/m³) → insignificant (B, 12 µg/m³)');
    expect(flat).toContain(SCREENING_CAUTION.slice(0, 40));
  });

  it('gives round 1-2-5 ticks', () => {
    expect(niceTicks(0, 16.9)).toEqual([0, 5, 10, 15]);
    expect(niceTicks(10, 120)).toEqual([20, 40, 60, 80, 100, 120]);
  });

  it('lists the consultation pack first and says when a run has none', () => {
    const file = (name: string) => ({ name, contentType: '', bytes: 2048, sha256: '', url: `/api/runs/x/results/${name}` });
    const withPack = downloadsHtml({ results: [file('summary.json'), file('plumeplan-run.zip'), file('report.pdf'), file('ground.tif'), file('map.png')] });
    const order = [...withPack.matchAll(/data-testid="download-([^"]+)"/g)].map((m) => m[1]);
    expect(order).toEqual(['report.pdf', 'ground.tif', 'map.png', 'plumeplan-run.zip', 'summary.json']);
    expect(text(downloadsHtml({ results: [file('summary.json')] }))).toContain('comes with a run that asks for it');
    expect(text(downloadsHtml({ results: [file('a.summary.json'), file('comparison.json')] }))).toContain('A: Summary (JSON)');
    // a siting study's and a comparison's reports and figures lead their lists too, named for people
    const siting = downloadsHtml({ results: [file('siting.json'), file('siting-map.tif'), file('siting-map.png'), file('siting-report.pdf')] });
    expect([...siting.matchAll(/data-testid="download-([^"]+)"/g)].map((m) => m[1])).toEqual(['siting-report.pdf', 'siting-map.png', 'siting.json', 'siting-map.tif']);
    expect(text(siting)).toContain('Siting report (PDF, A4)');
    expect(text(downloadsHtml({ results: [file('comparison.json'), file('comparison-report.pdf')] }))).toContain('Comparison report (PDF, A4)');
  });
});
