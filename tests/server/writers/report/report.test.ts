/**
 * The report, read back by poppler (Debian poppler-utils), the outside reader: pdfinfo shows A4 pages
 * (ISO 216: 595.28 x 841.89 pt), pdftotext finds the caution on page one and the receptor table with the
 * run's figures. The HTML page carries the same content, escaped, with its A4 print stylesheet; printed
 * by Debian's chromium it gives A4 pages too.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { chromium } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../../server/writers/caution.ts';
import { footprintBands } from '../../../../server/writers/footprint.ts';
import { renderMapSvg } from '../../../../server/writers/map/mapSvg.ts';
import type { RunProvenance } from '../../../../server/writers/provenance.ts';
import { renderReportHtml } from '../../../../server/writers/report/reportHtml.ts';
import { buildReportModel, type ReportModel } from '../../../../server/writers/report/reportModel.ts';
import { writeReportPdf } from '../../../../server/writers/report/reportPdf.ts';
import { buildSummary } from '../../../../server/writers/summary.ts';
import { makePackScenario, packRunResult } from '../packFixture.ts';
import { runScenario } from '../../../../solver/drivers/runScenario.ts';
import type { ResultSummary } from '../../../../server/writers/summary.ts';
import type { LevelArea } from '../../../../solver/assessment/footprintAreas.ts';

const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-report-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

const provenance: RunProvenance = { version: '0.1.0', scenarioSha256: 'cd'.repeat(32), runDate: '2026-12-02T03:00:00Z', command: 'plumeplan run pack.json --out out/pack' };
const scenario = { ...makePackScenario(), name: 'Pack test <b>bold</b> & "quoted" (invented)' };
let model: ReportModel;
let pdfFile: string;
let figures: Record<string, number>;

const squash = (text: string): string => text.replace(/\s+/g, ' ').trim();

beforeAll(async () => {
  const result = await packRunResult();
  const footprint = footprintBands(result.footprint_ug_m3, result.grid, { scenarioName: scenario.name, levels_ug_m3: [0.5, 1, 2, 5] });
  const summary = buildSummary(scenario, result, { levels_ug_m3: footprint.properties.levels_ug_m3 });
  figures = Object.fromEntries(summary.receptors.map((receptor) => [receptor.id, Number(receptor.concentration_ug_m3)]));
  const map = renderMapSvg(scenario, result, { footprint, provenance });
  model = buildReportModel({ scenario, result, summary, footprint, map, provenance });
  pdfFile = path.join(scratch, 'report.pdf');
  writeFileSync(pdfFile, await writeReportPdf(model));
});

/**
 * The same site with an assessment: one user-defined hourly standard (200 ug/m3, the NO2 1-hour limit
 * value of EU 2008/50/EC annex XI, REFERENCES.md) and a background of 20 ug/m3, and a site boundary
 * around the stack so the point of maximum impact is taken off the site.
 */
describe('report with an assessment: verdicts and footprint areas', () => {
  const assessed = {
    ...makePackScenario(),
    site: {
      ...makePackScenario().site,
      boundary: [
        [-2.2855, 54.0604],
        [-2.2830, 54.0604],
        [-2.2830, 54.0618],
        [-2.2855, 54.0618],
        [-2.2855, 54.0604],
      ] as [number, number][],
    },
    assessment: { background_ug_m3: 20, standards: [{ name: 'NO2 1-hour mean', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 18 }] },
  };
  let assessedModel: ReportModel;
  let assessedSummary: ResultSummary;
  let text: string;

  beforeAll(async () => {
    const result = await runScenario(assessed, { mode: 'gaussian' });
    const footprint = footprintBands(result.footprint_ug_m3, result.grid, { scenarioName: assessed.name, levels_ug_m3: [0.5, 2, 5], site: result.site ?? null });
    assessedSummary = buildSummary(assessed, result, { levels_ug_m3: footprint.properties.levels_ug_m3 });
    const map = renderMapSvg(assessed, result, { footprint, provenance });
    assessedModel = buildReportModel({ scenario: assessed, result, summary: assessedSummary, footprint, map, provenance });
    const file = path.join(scratch, 'assessed.pdf');
    writeFileSync(file, await writeReportPdf(assessedModel));
    text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
  });

  it('pdftotext finds the verdict table: PC, % of the standard, background, PEC, % and verdict at the maximum and every receptor', () => {
    expect(text).toContain('Screening verdicts');
    expect(text).toContain('NO2 1-hour mean: limit 200 µg/m³');
    const lines = text.split('\n');
    for (const receptor of assessed.receptors) {
      const pc = Number(assessedSummary.receptors.find((r) => r.id === receptor.id)!.concentration_ug_m3);
      // by the definitions: % of standard = 100 PC / limit; PEC = PC + background (2 and 3 significant figures)
      const pcPercent = Number(((100 * pc) / 200).toPrecision(2));
      const pec = Number((pc + 20).toPrecision(3));
      const pecPercent = Number(((100 * (pc + 20)) / 200).toPrecision(2));
      const row = lines.find((line) => line.trimStart().startsWith(`${receptor.id} `) && line.includes('indicative'));
      expect(row, receptor.id).toBeDefined();
      const numbers = row!.replace(receptor.id, ' ').match(/\d+(\.\d+)?/g)!.map(Number);
      expect(numbers.slice(0, 5)).toEqual([pc, pcPercent, 20, pec, pecPercent]);
      expect(row).toContain('indicative only');
    }
    const maximum = lines.find((line) => line.trimStart().startsWith('maximum off the site'));
    expect(maximum).toBeDefined();
    expect(maximum).toContain(String(assessedSummary.peak.concentration_ug_m3));
  });

  it('lists each footprint level with its area, farthest distances and receptors inside, as summary.json does', () => {
    const table = assessedModel.sections.find((section) => section.id === 'areas')!.tables[0];
    const areas = assessedSummary.footprint.areas as LevelArea[];
    expect(table.rows).toHaveLength(areas.length);
    areas.forEach((entry, k) => {
      expect(table.rows[k][1].replace('≥ ', '')).toBe(String(entry.area_ha));
      expect(table.rows[k][1].startsWith('≥')).toBe(entry.reachesGridEdge);
      expect(table.rows[k].at(-1)).toBe(entry.receptorsInside.length > 0 ? entry.receptorsInside.join(', ') : 'none');
    });
    expect(text).toContain('farthest from');
    expect(text).toContain('receptors inside');
  });

  it('every paragraph starts with a capital letter (the on-site peak sentence included)', () => {
    const paragraphs = assessedModel.sections.flatMap((section) => [...section.paragraphs, ...(section.after ?? [])]);
    const onSite = paragraphs.find((paragraph) => paragraph.includes('on the site is'));
    expect(onSite).toBeDefined();
    for (const paragraph of paragraphs) expect(paragraph, paragraph).toMatch(/^[A-Z]/);
  });
});

describe('report.pdf', () => {
  it('pdfinfo shows A4 pages, the title and the caution as its subject', () => {
    const info = execFileSync('pdfinfo', ['-f', '1', '-l', '99', pdfFile], { encoding: 'utf8' });
    const pages = Number(/^Pages:\s+(\d+)/m.exec(info)![1]);
    expect(pages).toBeGreaterThanOrEqual(2);
    const sizes = [...info.matchAll(/^Page\s+\d+ size:\s+(.*)$/gm)].map((match) => match[1].trim());
    expect(sizes).toHaveLength(pages);
    for (const size of sizes) expect(size).toBe('595.28 x 841.89 pts (A4)');
    expect(info).toMatch(/Title:\s+Air-quality screening report: Pack test <b>bold<\/b>/);
    expect(squash(/Subject:\s+(.*)/.exec(info)![1])).toBe(SCREENING_CAUTION);
  });

  it('pdftotext finds the caution on the first page', () => {
    const first = squash(execFileSync('pdftotext', ['-f', '1', '-l', '1', pdfFile, '-'], { encoding: 'utf8' }));
    expect(first).toContain(`Caution. ${SCREENING_CAUTION}`);
    expect(first).toContain('Air-quality screening report');
  });

  it('pdftotext finds the receptor table with each receptor and its figure', () => {
    const text = execFileSync('pdftotext', ['-layout', pdfFile, '-'], { encoding: 'utf8' });
    expect(text).toContain('Process contribution (PC) at each receptor');
    for (const receptor of scenario.receptors) {
      const line = text.split('\n').find((row) => row.trimStart().startsWith(`${receptor.id} `) && row.includes(receptor.name.split(',')[0]));
      expect(line, receptor.id).toBeDefined();
      expect(line).toContain(String(figures[receptor.id]));
    }
    for (const heading of ['Point of maximum impact', 'Footprint areas', 'Sources', 'Weather', 'Pollutant assumptions', 'Method', 'Reproducibility']) {
      expect(text).toContain(heading);
    }
    expect(text).toContain('cd'.repeat(32));
  });
});

describe('report.html', () => {
  it('holds the same sections and tables, the caution first, everything escaped, an A4 print stylesheet', () => {
    const html = renderReportHtml(model);
    expect(html).toContain('@page { size: A4;');
    expect(html.indexOf(SCREENING_CAUTION)).toBeLessThan(html.indexOf('<section'));
    expect(html).toContain('Pack test &lt;b&gt;bold&lt;/b&gt; &amp; &#34;quoted&#34; (invented)');
    expect(html).not.toContain('<b>bold</b>');
    for (const section of model.sections) expect(html).toContain(`<section id="${section.id}"`);
    for (const table of model.sections.flatMap((section) => section.tables)) {
      expect(html).toContain(`<table id="table-${table.id}">`);
      for (const row of table.rows) expect(html).toContain(`>${row[0].replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&#34;')}</td>`);
    }
    expect(html).toContain('<svg xmlns="http://www.w3.org/2000/svg"');
  });

  it('prints on A4 pages in Debian chromium, the caution on page one', async () => {
    const browser = await chromium.launch({
      executablePath: '/usr/bin/chromium',
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
    });
    try {
      const page = await browser.newPage();
      await page.setContent(renderReportHtml(model), { waitUntil: 'load' });
      const printed = path.join(scratch, 'printed.pdf');
      writeFileSync(printed, await page.pdf({ preferCSSPageSize: true, printBackground: true }));
      const info = execFileSync('pdfinfo', ['-f', '1', '-l', '99', printed], { encoding: 'utf8' });
      const sizes = [...info.matchAll(/^Page\s+\d+ size:\s+(.*)$/gm)].map((match) => match[1].trim());
      expect(sizes.length).toBeGreaterThanOrEqual(2);
      // Chromium lays pages out in CSS pixels and writes 594.96 x 841.92 pt: A4 within 0.5 pt (pdfinfo names it A4).
      for (const size of sizes) {
        const [width, height] = /^([\d.]+) x ([\d.]+) pts \(A4\)$/.exec(size)!.slice(1).map(Number);
        expect(Math.abs(width - 595.28)).toBeLessThan(0.5);
        expect(Math.abs(height - 841.89)).toBeLessThan(0.5);
      }
      expect(squash(execFileSync('pdftotext', ['-f', '1', '-l', '1', printed, '-'], { encoding: 'utf8' }))).toContain(SCREENING_CAUTION);
    } finally {
      await browser.close();
    }
  });
});
