/**
 * The comparison report and the difference figure, read back by outside tools: poppler (Debian
 * poppler-utils) reads the PDF (pdfinfo: A4 pages, ISO 216 595.28 x 841.89 pt; pdftotext: the caution on
 * page one before anything else, both scenarios, the receptor changes, the verdicts that change), the PNG
 * header (W3C PNG specification, IHDR) gives the picture's size.
 *
 * Expected figures come from linearity, not from the code under test: every run is linear in its
 * emissions (the concentration equation is linear in the source term; solver/drivers/types.ts promises it),
 * so doubling every emission doubles every PC: B - A = A and the change is +100 % everywhere; a scenario
 * compared with itself differs by exactly zero, so the figure has no bands and no area or verdict changes.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { compareRuns, type ComparedRun } from '../../../solver/assessment/comparison.ts';
import type { ScreeningVerdicts } from '../../../solver/assessment/verdicts.ts';
import { runScenario } from '../../../solver/drivers/runScenario.ts';
import type { ScenarioRunResult } from '../../../solver/drivers/types.ts';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { differenceFootprint } from '../../../server/writers/comparison.ts';
import {
  buildComparisonReportFiles,
  buildComparisonReportModel,
  COMPARISON_REPORT_HTML_FILE,
  COMPARISON_REPORT_PDF_FILE,
  DIFFERENCE_MAP_PNG_FILE,
  DIFFERENCE_MAP_SVG_FILE,
  type ComparisonReportSide,
} from '../../../server/writers/comparisonReport.ts';
import { DECREASE_PALETTE, INCREASE_PALETTE } from '../../../server/writers/map/mapSvg.ts';
import { makePackScenario } from './packFixture.ts';

const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-comparison-report-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

const squash = (text: string): string => text.replace(/\s+/g, ' ').trim();

const assessment = { background_ug_m3: 20, standards: [{ name: 'NO2 1-hour mean', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 18 }] };
const scenarioA: Scenario = { ...makePackScenario(), name: 'Comparison test A: laundry boiler as planned (invented)', assessment };
const scenarioB: Scenario = {
  ...scenarioA,
  name: 'Comparison test B: every emission doubled (invented)',
  sources: scenarioA.sources.map((source) => ({ ...source, emission_g_s: 2 * source.emission_g_s })),
};
const LEVELS = [0.5, 1, 2, 5];

function compared(label: string, scenario: Scenario, result: ScenarioRunResult): ComparedRun {
  return {
    label,
    result,
    receptors: scenario.receptors.map((receptor) => {
      const [x_m, y_m] = result.grid.projection.toLocal(receptor.lon, receptor.lat);
      return { id: receptor.id, x_m, y_m };
    }),
  };
}

let resultA: ScenarioRunResult;
let resultB: ScenarioRunResult;

beforeAll(async () => {
  resultA = await runScenario(scenarioA, { mode: 'gaussian' });
  resultB = await runScenario(scenarioB, { mode: 'gaussian' });
});

/** Write the files into a folder of their own, return the PDF's path and the files by name. */
async function build(a: ComparisonReportSide, b: ComparisonReportSide, name: string) {
  const comparison = compareRuns(compared('A', a.scenario, a.result), compared('B', b.scenario, b.result), { levels_ug_m3: LEVELS });
  const difference = differenceFootprint(comparison);
  const files = await buildComparisonReportFiles({ a, b, comparison, difference, levelsBasis: 'given', runDate: new Date('2026-12-02T09:00:00Z') });
  const folder = path.join(scratch, name);
  execFileSync('mkdir', ['-p', folder]);
  for (const [file, data] of files) writeFileSync(path.join(folder, file), data);
  return { comparison, difference, files: new Map(files), pdf: path.join(folder, COMPARISON_REPORT_PDF_FILE) };
}

describe('comparison report: every emission doubled', () => {
  let built: Awaited<ReturnType<typeof build>>;
  let text: string;

  beforeAll(async () => {
    // The screen of a steady state is "indicative" on both sides; mark one receptor's outcome changed (as an
    // hourly series would) to see that the report lists each verdict that changes.
    const verdictsB = structuredClone(resultB.verdicts) as ScreeningVerdicts;
    verdictsB.standards[0].receptors![0].outcome = 'notScreenedOut';
    const verdictsA = structuredClone(resultA.verdicts) as ScreeningVerdicts;
    verdictsA.standards[0].receptors![0].outcome = 'screenedOut';
    built = await build(
      { path: 'a.json', scenario: scenarioA, result: { ...resultA, verdicts: verdictsA } },
      { path: 'b.json', scenario: scenarioB, result: { ...resultB, verdicts: verdictsB } },
      'doubled',
    );
    text = execFileSync('pdftotext', ['-layout', built.pdf, '-'], { encoding: 'utf8' });
  });

  it('writes the figure (SVG, PNG) and the report (HTML, PDF)', () => {
    expect([...built.files.keys()]).toEqual([DIFFERENCE_MAP_SVG_FILE, DIFFERENCE_MAP_PNG_FILE, COMPARISON_REPORT_HTML_FILE, COMPARISON_REPORT_PDF_FILE]);
  });

  it('pdfinfo: A4 pages; pdftotext: the caution first on page one, then both scenarios', () => {
    const info = execFileSync('pdfinfo', ['-f', '1', '-l', '99', built.pdf], { encoding: 'utf8' });
    const sizes = [...info.matchAll(/^Page\s+\d+ size:\s+(.*)$/gm)].map((match) => match[1].trim());
    expect(sizes.length).toBeGreaterThanOrEqual(1);
    for (const size of sizes) expect(size).toBe('595.28 x 841.89 pts (A4)');
    const first = squash(execFileSync('pdftotext', ['-f', '1', '-l', '1', built.pdf, '-'], { encoding: 'utf8' }));
    expect(first).toContain(`Caution. ${SCREENING_CAUTION}`);
    expect(first.indexOf('Caution.')).toBeLessThan(first.indexOf('The two scenarios'));
    expect(first).toContain('Comparison test A: laundry boiler');
    expect(first).toContain('Comparison test B: every emission');
  });

  it('the receptor table shows B = 2 A and +100 % at every receptor (linearity)', () => {
    const lines = text.split('\n');
    for (const change of built.comparison.receptors) {
      expect(change.b_ug_m3 / change.a_ug_m3).toBeCloseTo(2, 9);
      const row = lines.find((line) => line.trimStart().startsWith(`${change.id} `) && line.includes('+100'));
      expect(row, change.id).toBeDefined();
    }
  });

  it('lists the footprint levels whose area grows and the verdict that changes', () => {
    expect(text).toContain('Footprint areas that change');
    const areaRows = built.comparison.levels.filter((level) => level.b_m2 > level.a_m2);
    expect(areaRows.length).toBeGreaterThan(0);
    expect(text).toContain('Screening verdicts that change');
    const receptor = scenarioA.receptors[0].id;
    const row = text.split('\n').find((line) => line.includes('NO2 1-hour mean') && line.includes(receptor));
    expect(row).toBeDefined();
    expect(row).toMatch(/screened out\s+not screened out/);
  });

  it('the difference figure: increases only, on the warm side of the diverging scale, legend in µg/m³, the caution', () => {
    const svg = built.files.get(DIFFERENCE_MAP_SVG_FILE) as string;
    expect(svg).toContain(`<desc id="caution">${SCREENING_CAUTION}</desc>`);
    expect(svg).toContain('Change in NOx, B − A');
    expect(svg).toContain('µg/m³ at 1.5 m above ground');
    const bands = [...svg.matchAll(/<path class="difference-band" data-change="(\w+)"[^>]* fill="(#[0-9a-f]{6})"/g)];
    expect(bands.length).toBeGreaterThan(0);
    for (const [, change, fill] of bands) {
      expect(change).toBe('increase');
      expect(INCREASE_PALETTE as readonly string[]).toContain(fill);
    }
    // the legend shows both sides of the scale, the decrease side "not reached"
    const legendFills = [...svg.matchAll(/<rect class="legend-band" data-change="decrease"[^>]* fill="(#[0-9a-f]{6})"/g)].map((match) => match[1]);
    for (const fill of legendFills) expect(DECREASE_PALETTE as readonly string[]).toContain(fill);
    expect(svg).toMatch(/−0\.5 to −1 \(not reached\)/);
    expect(svg).not.toContain('class="peak"');
    const png = built.files.get(DIFFERENCE_MAP_PNG_FILE) as Uint8Array;
    const header = Buffer.from(png);
    expect(header.subarray(1, 4).toString('ascii')).toBe('PNG');
    expect([header.readUInt32BE(16), header.readUInt32BE(20)]).toEqual([2000, 1580]);
  });

  it('the HTML page carries the caution before the first section and the same tables', () => {
    const html = built.files.get(COMPARISON_REPORT_HTML_FILE) as string;
    expect(html.indexOf(SCREENING_CAUTION)).toBeLessThan(html.indexOf('<section'));
    for (const id of ['scenarios', 'map', 'receptors', 'areas', 'verdicts', 'reproducibility']) expect(html).toContain(`<section id="${id}"`);
    expect(html).toContain('class="difference-band"');
  });
});

describe('comparison report: a scenario compared with itself', () => {
  it('says every difference is zero; no bands, no area or verdict changes', async () => {
    const side = { path: 'a.json', scenario: scenarioA, result: resultA };
    const comparison = compareRuns(compared('A', scenarioA, resultA), compared('A', scenarioA, resultA), { levels_ug_m3: LEVELS });
    const { report, figure } = buildComparisonReportModel({ a: side, b: side, comparison, difference: differenceFootprint(comparison) });
    const words = report.sections.flatMap((section) => [...section.paragraphs, ...(section.after ?? [])]).join(' ');
    expect(words).toContain('B is identical to A: every difference on the grid and at every receptor is exactly zero.');
    expect(words).toContain('No footprint level changes its area.');
    expect(words).toContain('No screening verdict changes');
    expect(figure.svg).not.toContain('class="difference-band"');
    expect(figure.svg).toContain('no bands: B equals A everywhere');
    const receptors = report.sections.find((section) => section.id === 'receptors')!.tables[0];
    for (const row of receptors.rows) expect(row[3]).toBe('0');
  });
});
