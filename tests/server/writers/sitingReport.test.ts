/**
 * The siting figure and report (server/writers/sitingReport.ts, the figure by map/mapSvg.ts), read back by
 * outside tools: poppler (Debian poppler-utils) reads the PDF (pdfinfo: A4 pages, ISO 216 595.28 x 841.89 pt;
 * pdftotext: the caution on page one before anything else, then the ranked candidate table), GDAL's PNG
 * driver reads the PNG (its stated size; content: more than one grey level). The SVG is checked by its
 * structure (elements and their classes), not by pixels.
 *
 * Expected geometry from outside the code under test: the site polygon is a 400 m square about the site,
 * so the best position (sought inside it) must be drawn inside the polygon's drawn bounding box.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseScenario } from '../../../scenarios/format/schema.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import { runSiting, type SitingResult } from '../../../solver/siting/runSiting.ts';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { LABELLED_CANDIDATE_RANKS, SITING_PALETTE } from '../../../server/writers/map/mapSvg.ts';
import { buildSitingFiles, sitingMapBands } from '../../../server/writers/siting.ts';
import { buildSitingReportFiles, buildSitingReportModel, SITING_MAP_PNG_FILE, SITING_MAP_SVG_FILE, SITING_REPORT_HTML_FILE, SITING_REPORT_PDF_FILE } from '../../../server/writers/sitingReport.ts';

const site = { lat: 53.91, lon: -1.72, landUse: 'rural' as const };
const projection = createLocalProjection(site);
const lonLat = (x: number, y: number): [number, number] => projection.toLonLat(x, y);
const scratch = mkdtempSync(path.join(tmpdir(), 'plumeplan-siting-report-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));
const squash = (text: string): string => text.replace(/\s+/g, ' ');

let scenario: Scenario;
let result: SitingResult;
let files: Map<string, string | Uint8Array>;
let pdfPath: string;

beforeAll(async () => {
  const outcome = parseScenario({
    format: 'plumeplan.scenario/1',
    name: 'Siting report test (invented)',
    site,
    domain: { halfWidth_m: 1000, spacing_m: 50, height_m: 500, layers: 10 },
    pollutant: { name: 'NOx', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 },
    weather: { kind: 'steady', windSpeed_m_s: 4, windFrom_deg: 240, stability: 'C', mixingHeight_m: 800, rain_mm_h: 0, airTemperature_K: 285, anemometerHeight_m: 10 },
    dispersion: { kind: 'stability', curves: 'briggs' },
    solver: { mode: 'gaussian' },
    windProfile: 'powerLaw',
    sources: [{ kind: 'point', id: 'stack', name: 'Stack', lat: site.lat, lon: site.lon, height_m: 15, diameter_m: 0.5, exitVelocity_m_s: 8, exitTemperature_K: 380, emission_g_s: 0.5, plumeRise: true }],
    receptors: [
      { id: 'houses', name: 'Houses, east row', lon: lonLat(600, 300)[0], lat: lonLat(600, 300)[1], height_m: 1.5 },
      { id: 'nursery', name: 'Nursery', lon: lonLat(500, 600)[0], lat: lonLat(500, 600)[1], height_m: 1.5 },
    ],
    assessment: { background_ug_m3: 10, standards: [{ name: 'NO2 1-hour mean', limit_ug_m3: 200, averaging_h: 1, allowedExceedances: 18 }] },
  });
  if (!outcome.ok) throw new Error(JSON.stringify(outcome.issues));
  scenario = outcome.scenario;
  const ring = [lonLat(-200, -200), lonLat(200, -200), lonLat(200, 200), lonLat(-200, 200), lonLat(-200, -200)];
  result = await runSiting(scenario, { sitePolygon: ring, spacing_m: 100, candidates: [{ id: 'gate-west', lon: lonLat(-150, 0)[0], lat: lonLat(-150, 0)[1] }] });
  const built = await buildSitingReportFiles({ result, bands: sitingMapBands(result), scenario, command: 'plumeplan site test.json --out out', runDate: new Date('2026-12-02T10:00:00Z') });
  files = new Map(built);
  pdfPath = path.join(scratch, SITING_REPORT_PDF_FILE);
  writeFileSync(pdfPath, files.get(SITING_REPORT_PDF_FILE) as Uint8Array);
});

describe('siting figure (siting-map.svg, siting-map.png)', () => {
  it('draws the bands on the siting scale, the site polygon, each receptor, each candidate with its rank, the best position', () => {
    const svg = files.get(SITING_MAP_SVG_FILE) as string;
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg" width="1000" height="790"')).toBe(true);
    expect(svg).toContain(`<desc id="caution">${SCREENING_CAUTION}</desc>`);
    const bands = [...svg.matchAll(/<path class="siting-band"[^>]* fill="(#[0-9a-f]{6})"/g)];
    expect(bands.length).toBeGreaterThan(0);
    for (const [, fill] of bands) expect(SITING_PALETTE as readonly string[]).toContain(fill);
    expect(svg.match(/class="site-polygon"/g)).toHaveLength(1);
    for (const id of ['houses', 'nursery']) expect(svg).toContain(`<g class="receptor" data-id="${id}">`);
    const candidates = [...svg.matchAll(/<g class="candidate" data-id="([^"]+)" data-rank="(\d+)" data-numbered="(true|false)">(.*?)<\/g>/g)];
    expect(candidates).toHaveLength(result.candidates.length);
    expect(result.candidates.length).toBeGreaterThan(LABELLED_CANDIDATE_RANKS); // the lattice: 16 positions and the gate
    // 100 m lattice on a frame about 1.1 km wide: circles 50 px apart, so none crowd and the first 12 are numbered
    for (const [, , rank, numbered, body] of candidates) {
      expect(numbered).toBe(String(Number(rank) <= LABELLED_CANDIDATE_RANKS));
      if (Number(rank) <= LABELLED_CANDIDATE_RANKS) expect(body).toContain(`>${rank}</text>`);
      else expect(body).not.toContain('<text');
    }
    expect(svg.match(/class="best-position"/g)).toHaveLength(1);
    for (const part of ['class="scale-bar"', 'class="north-arrow"', 'class="ticks"', 'class="graticule"', 'class="grid-edge"', 'class="caution"', 'class="provenance"']) {
      expect(svg, part).toContain(part);
    }
  });

  it('numbers only rank 1 where the numbered circles would overlap (candidates 10 m apart on a frame of about 1 km)', async () => {
    const close = await runSiting(scenario, {
      candidates: [0, 10, 20].map((x, n) => ({ id: `c${n}`, lon: lonLat(x - 150, 0)[0], lat: lonLat(x - 150, 0)[1] })),
    });
    const { figure } = buildSitingReportModel({ result: close, bands: sitingMapBands(close), scenario });
    const numbered = [...figure.svg.matchAll(/data-rank="(\d+)" data-numbered="(true|false)"/g)].map((match) => [Number(match[1]), match[2]]);
    expect(numbered.sort()).toEqual([[1, 'true'], [2, 'false'], [3, 'false']]);
    expect(figure.svg).toContain('ranks in the table)');
  });

  it('marks the best position inside the drawn site polygon', () => {
    const svg = files.get(SITING_MAP_SVG_FILE) as string;
    const polygon = /class="site-polygon" d="([^"]+)"/.exec(svg)?.[1] ?? '';
    const corners = [...polygon.matchAll(/[ML](-?[\d.]+) (-?[\d.]+)/g)].map((match) => [Number(match[1]), Number(match[2])]);
    expect(corners.length).toBeGreaterThanOrEqual(4);
    const xs = corners.map(([x]) => x);
    const ys = corners.map(([, y]) => y);
    const star = /class="best-position"[^>]*><path d="M(-?[\d.]+) (-?[\d.]+)/.exec(svg);
    expect(star).not.toBeNull();
    // the star's first point is its top tip, 13 px above its centre
    const [x, y] = [Number(star?.[1]), Number(star?.[2]) + 13];
    expect(x).toBeGreaterThanOrEqual(Math.min(...xs));
    expect(x).toBeLessThanOrEqual(Math.max(...xs));
    expect(y).toBeGreaterThanOrEqual(Math.min(...ys));
    expect(y).toBeLessThanOrEqual(Math.max(...ys));
  });

  it('legend says what a value is, the units and the statistic', () => {
    const svg = files.get(SITING_MAP_SVG_FILE) as string;
    expect(squash(svg.replace(/<[^>]+>/g, ' '))).toContain('Highest PC at the sensitive receptors if the stack stood here');
    expect(svg).toContain('NOx process contribution, µg/m³');
    expect(svg).toContain('one steady weather state');
    expect(svg.match(/class="legend-band"/g)?.length).toBe(sitingMapBands(result).properties.levels_ug_m3.length);
  });

  it('the PNG has its stated size (2000 x 1580) and content (GDAL: more than one grey level)', () => {
    const png = files.get(SITING_MAP_PNG_FILE) as Uint8Array;
    const file = path.join(scratch, SITING_MAP_PNG_FILE);
    writeFileSync(file, png);
    const info = JSON.parse(execFileSync('gdalinfo', ['-json', '-stats', file], { encoding: 'utf8' }));
    expect(info.driverShortName).toBe('PNG');
    expect(info.size).toEqual([2000, 1580]);
    const red = info.bands[0];
    expect(red.maximum - red.minimum).toBeGreaterThan(100);
    expect(red.stdDev).toBeGreaterThan(5);
  });
});

describe('siting report (siting-report.html, siting-report.pdf)', () => {
  it('writes the figure and the report in order; quick leaves out the PNG and PDF', async () => {
    expect([...files.keys()]).toEqual([SITING_MAP_SVG_FILE, SITING_MAP_PNG_FILE, SITING_REPORT_HTML_FILE, SITING_REPORT_PDF_FILE]);
    const quick = await buildSitingReportFiles({ result, bands: sitingMapBands(result), scenario, outputs: 'quick' });
    expect(quick.map(([name]) => name)).toEqual([SITING_MAP_SVG_FILE, SITING_REPORT_HTML_FILE]);
  });

  it('pdfinfo: A4 pages; pdftotext: the caution first on page one, then what was asked', () => {
    const info = execFileSync('pdfinfo', ['-f', '1', '-l', '99', pdfPath], { encoding: 'utf8' });
    const sizes = [...info.matchAll(/^Page\s+\d+ size:\s+(.*)$/gm)].map((match) => match[1].trim());
    expect(sizes.length).toBeGreaterThanOrEqual(1);
    for (const size of sizes) expect(size).toBe('595.28 x 841.89 pts (A4)');
    const first = squash(execFileSync('pdftotext', ['-f', '1', '-l', '1', pdfPath, '-'], { encoding: 'utf8' }));
    expect(first).toContain(`Caution. ${SCREENING_CAUTION}`);
    expect(first.indexOf('Caution.')).toBeLessThan(first.indexOf('What was asked'));
    expect(first).toContain('Stack siting report');
  });

  it('pdftotext finds the ranked candidate table: every candidate, best first, with its highest PC and verdict', () => {
    const text = execFileSync('pdftotext', ['-layout', pdfPath, '-'], { encoding: 'utf8' });
    expect(text).toContain('Candidate positions, best first');
    const lines = text.split('\n');
    let previous = -1;
    for (const candidate of result.candidates) {
      const index = lines.findIndex((line) => new RegExp(`^\\s*${candidate.rank}\\s+${candidate.id}\\s`).test(line));
      expect(index, candidate.id).toBeGreaterThan(previous);
      expect(lines[index]).toContain(String(Number(candidate.highestPc_ug_m3.toPrecision(3))));
      previous = index;
    }
    expect(squash(text)).toContain('Where the map holds');
    expect(squash(text)).toContain('Flat terrain');
    expect(squash(text)).toContain('plumeplan site test.json --out out');
  });

  it('the HTML page carries the caution before the first section, every section and the figure', () => {
    const html = files.get(SITING_REPORT_HTML_FILE) as string;
    expect(html.indexOf(SCREENING_CAUTION)).toBeLessThan(html.indexOf('<section'));
    for (const id of ['asked', 'map', 'candidates', 'best', 'limits', 'reproducibility']) expect(html).toContain(`<section id="${id}"`);
    expect(html).toContain('class="siting-band"');
  });

  it('says when a candidate outside the site polygon has a lower value than the best position sought inside it', async () => {
    // 950 m east, 800 m south: outside the 400 m square; the wind from 240 deg carries its plume north-east,
    // well clear of both receptors (north-west of it), so its PC there is far below any position on the site
    const ring = [lonLat(-200, -200), lonLat(200, -200), lonLat(200, 200), lonLat(-200, 200), lonLat(-200, -200)];
    const away = await runSiting(scenario, { sitePolygon: ring, spacing_m: 200, candidates: [{ id: 'far-east', lon: lonLat(950, -800)[0], lat: lonLat(950, -800)[1] }] });
    const { report } = buildSitingReportModel({ result: away, bands: sitingMapBands(away), scenario });
    const best = report.sections.find((section) => section.id === 'best');
    expect(best?.paragraphs.join(' ')).toContain('Candidate far-east has a lower value but lies outside the site polygon, where the best position was not sought.');
  });

  it('buildSitingFiles adds them after the rasters and names them in siting.json', async () => {
    const all = await buildSitingFiles(result, { site, scenario, outputs: 'quick' });
    const names = all.map(([name]) => name);
    expect(names).toContain(SITING_MAP_SVG_FILE);
    expect(names).toContain(SITING_REPORT_HTML_FILE);
    expect(names).not.toContain(SITING_MAP_PNG_FILE);
    const json = JSON.parse(all[0][1] as string);
    expect(json.map.files).toMatchObject({ figure: SITING_MAP_SVG_FILE, report: SITING_REPORT_HTML_FILE });
    expect(json.map.files.reportPdf).toBeUndefined();
  });
});
