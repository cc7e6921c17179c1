/**
 * The siting result's own figure and report, beside siting.json and the rasters:
 * - siting-map.svg and siting-map.png: the siting map's bands ("highest PC at the sensitive receptors if
 *   the stack stood here", or the weighted sum the result states) drawn by the site map's code
 *   (./map/mapSvg.ts, renderSitingMapSvg) on a sequential scale of our own, with the site polygon, the
 *   receptors, the ranked candidates, the best position, scale bar, north arrow, grid coordinates and the
 *   caution line;
 * - siting-report.html and siting-report.pdf (A4): the caution first, what was asked, the figure, the ranked
 *   candidates, the best position, the limits and the measured agreement with forward runs, and what it
 *   takes to run the siting again. Drawn by the run report's renderers (./report/), as the comparison report is.
 *
 * `buildSitingReportFiles` makes them in memory as [name, content] pairs; `buildSitingFiles` (./siting.ts)
 * adds them to the siting folder, so the CLI and the server's site job write the same files.
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import { isInsideRing } from '../../solver/grid/siteBoundary.ts';
import type { SitingResult } from '../../solver/siting/runSiting.ts';
import { OUTCOME_WORDS } from './assessmentFigures.ts';
import { SCREENING_CAUTION } from './caution.ts';
import type { FootprintCollection } from './footprint.ts';
import { renderSvgToPng } from './map/mapPng.ts';
import { renderSitingMapSvg, type MapFigure } from './map/mapSvg.ts';
import { plumeplanVersion, scenarioChecksum, type RunProvenance } from './provenance.ts';
import { renderReportHtml } from './report/reportHtml.ts';
import { reproducibilityBlock, type ReportModel, type ReportSection } from './report/reportModel.ts';
import { writeReportPdf } from './report/reportPdf.ts';
import { roundDecimals, roundSignificant } from './rounding.ts';

export const SITING_MAP_SVG_FILE = 'siting-map.svg';
export const SITING_MAP_PNG_FILE = 'siting-map.png';
export const SITING_REPORT_HTML_FILE = 'siting-report.html';
export const SITING_REPORT_PDF_FILE = 'siting-report.pdf';

/** Candidates listed in the report's table, best first; the rest are in candidates.csv. */
export const REPORT_CANDIDATE_ROWS = 40;

export interface SitingReportInput {
  result: SitingResult;
  /** siting.geojson's map bands (the figure draws the same bands) */
  bands: FootprintCollection;
  /** the scenario as sited (its checksum goes in the reproducibility block; its site fixes the figure's UTM zone) */
  scenario: Scenario;
  /** the command as typed; default "plumeplan site SCENARIO" */
  command?: string;
  /** the siting's date; default now */
  runDate?: Date;
  /** 'quick' leaves out the rendered files (siting-map.png and siting-report.pdf) */
  outputs?: 'full' | 'quick';
}

const fig = (value: number): string => String(roundSignificant(value, 3));
const capitalise = (text: string): string => `${text.charAt(0).toUpperCase()}${text.slice(1)}`;

/** What a map value is, in words a reader of the figure needs: the combination and the statistic. */
function mapHeading(result: SitingResult): string {
  return result.map.receptorWeights === null
    ? 'Highest PC at the sensitive receptors if the stack stood here'
    : 'Weighted sum of the receptors\u2019 PC if the stack stood here';
}

function statisticWords(result: SitingResult): string {
  return result.statistic === 'mean'
    ? `long-term mean (${result.weatherKind === 'windRose' ? 'wind rose, frequency-weighted' : 'hourly series, period mean'})`
    : 'one steady weather state';
}

function offsetWords(x_m: number, y_m: number): string {
  return `${Math.round(Math.abs(x_m))} m ${x_m < 0 ? 'west' : 'east'} and ${Math.round(Math.abs(y_m))} m ${y_m < 0 ? 'south' : 'north'} of the site origin`;
}

/**
 * The siting figure and report, in memory.
 *
 * @returns [file name, content] pairs in the order to write them: the figure's SVG (and PNG), the report's HTML (and PDF)
 * @example for (const [name, data] of await buildSitingReportFiles({ result, bands, scenario })) await writeFile(path.join(dir, name), data);
 */
export async function buildSitingReportFiles(input: SitingReportInput): Promise<[string, string | Uint8Array][]> {
  const full = (input.outputs ?? 'full') === 'full';
  const { report, figure } = buildSitingReportModel(input);
  const files: [string, string | Uint8Array][] = [[SITING_MAP_SVG_FILE, figure.svg]];
  if (full) files.push([SITING_MAP_PNG_FILE, renderSvgToPng(figure.svg).bytes]);
  files.push([SITING_REPORT_HTML_FILE, renderReportHtml(report)]);
  if (full) files.push([SITING_REPORT_PDF_FILE, await writeReportPdf(report)]);
  return files;
}

/**
 * The siting figure and the report's content, before either is rendered.
 *
 * @returns the figure (SVG text) and the report model both report renderers draw
 */
export function buildSitingReportModel(input: SitingReportInput): { report: ReportModel; figure: MapFigure } {
  const { result, scenario } = input;
  const runDate = (input.runDate ?? new Date()).toISOString().replace(/\.\d{3}Z$/, 'Z');
  const provenance: RunProvenance = {
    version: plumeplanVersion(),
    scenarioSha256: scenarioChecksum(scenario),
    runDate,
    command: input.command ?? 'plumeplan site SCENARIO',
  };
  const toLonLat = (x: number, y: number): [number, number] => result.grid.projection.toLonLat(x, y);
  const figure = renderSitingMapSvg({
    grid: result.grid,
    site: scenario.site,
    bands: input.bands,
    siteRing: result.siteRing_m === null ? null : result.siteRing_m.map(([x, y]) => toLonLat(x, y)),
    receptors: result.receptors.map((receptor) => {
      const [lon, lat] = toLonLat(receptor.x_m, receptor.y_m);
      return { id: receptor.id, lon, lat };
    }),
    candidates: result.candidates.map((candidate) => ({ rank: candidate.rank, id: candidate.id, lon: candidate.lon, lat: candidate.lat })),
    best: { lon: result.best.lon, lat: result.best.lat, value_ug_m3: roundSignificant(result.best.combined_ug_m3, 3), within: result.best.within },
    title: `Siting map: ${result.pollutant} from stack ${result.stack.id}`,
    subtitle: result.scenarioName,
    legendHeading: mapHeading(result),
    legendLines: [`${result.pollutant} process contribution, µg/m³`, statisticWords(result), `${result.map.combination}`],
    provenance,
  });
  const grid = result.grid;
  const report: ReportModel = {
    title: 'Stack siting report',
    subtitle: `${result.scenarioName} · stack ${result.stack.id}`,
    caution: SCREENING_CAUTION,
    runLine:
      `${result.pollutant}; ${result.mode === 'grid' ? `grid mode, ${result.map.mode === 'grid' ? `${result.map.solves} adjoint solves` : 'direct evaluation'}` : 'Gaussian plume reference mode, direct evaluation'}; ` +
      `${statisticWords(result)}; grid ${grid.nx} x ${grid.ny} cells at ${grid.spacing_m} m; sited ${runDate}`,
    sections: [askedSection(result), figureSection(result, figure), candidateSection(result), bestSection(result), limitsSection(result), reproducibilitySection(provenance)],
    provenance,
  };
  return { report, figure };
}

function askedSection(result: SitingResult): ReportSection {
  const { stack, standard } = result;
  const sampled: string[] = [];
  const listed = result.candidates.filter((candidate) => candidate.origin === 'list').length;
  const lattice = result.candidates.length - listed;
  if (listed > 0) sampled.push(`${listed} candidate position${listed === 1 ? '' : 's'} given`);
  if (result.siteRing_m !== null) {
    sampled.push(
      `the site polygon${result.sampleSpacing_m === null ? '' : ` sampled at ${result.sampleSpacing_m} m spacing (${lattice} lattice position${lattice === 1 ? '' : 's'})`}; ` +
        'the best position sought over its grid columns',
    );
  } else {
    sampled.push('no site polygon: the best position sought over the whole grid');
  }
  const rows = [
    ['stack', `${stack.id}: height ${stack.height_m} m, diameter ${stack.diameter_m} m, exit ${stack.exitVelocity_m_s} m/s at ${stack.exitTemperature_K} K, emission ${stack.emission_g_s} g/s, plume rise ${stack.plumeRise ? 'on' : 'off'}`],
    ['effective height [m]', result.map.effectiveHeights_m.length <= 6 ? result.map.effectiveHeights_m.map((h) => String(roundDecimals(h, 1))).join(', ') : `${result.map.effectiveHeights_m.length} weather states, ${fig(Math.min(...result.map.effectiveHeights_m))} to ${fig(Math.max(...result.map.effectiveHeights_m))}`],
    ['sensitive receptors', result.receptors.map((receptor) => `${receptor.id} (${receptor.name}, ${receptor.height_m} m)`).join('; ')],
    ['receptors combined as', result.map.combination],
    ['standard', standard === null ? 'none: no % of a standard or verdict' : `${standard.name}: ${standard.limit_ug_m3} µg/m³, averaging ${standard.averaging_h} h; screened out below ${standard.threshold_percent} % of it`],
    ['level for areas', result.level_ug_m3 === null ? 'none' : `${fig(result.level_ug_m3)} µg/m³`],
    ['positions', sampled.join('; ')],
    ['solver, weather', `${result.mode}, ${result.weatherKind}; values are the ${statisticWords(result)}`],
  ];
  return {
    id: 'asked',
    heading: 'What was asked',
    paragraphs: ['Where on the site may this stack go so that its process contribution (PC) at the sensitive receptors is lowest?'],
    tables: [{ id: 'asked', caption: 'The question as posed', headings: ['item', 'value'], numeric: [false, false], rows, widths: [1.2, 4] }],
  };
}

function figureSection(result: SitingResult, figure: MapFigure): ReportSection {
  return {
    id: 'map',
    heading: 'Siting map',
    paragraphs: [],
    tables: [],
    figure: {
      svg: figure.svg,
      width: figure.width,
      height: figure.height,
      caption:
        `${mapHeading(result)}, in µg/m³ (${statisticWords(result)}), drawn in ${figure.crs.name} (EPSG:${figure.crs.epsg}); lighter bands are better places for the stack. ` +
        'The same bands are in siting.geojson; the values in siting-map.tif.',
    },
  };
}

function candidateSection(result: SitingResult): ReportSection {
  const { candidates, receptors, standard } = result;
  if (candidates.length === 0) {
    return { id: 'candidates', heading: 'Ranked candidates', paragraphs: ['No candidate positions were given and no site polygon was sampled.'], tables: [] };
  }
  const shown = candidates.slice(0, REPORT_CANDIDATE_ROWS);
  const hectares = (m2: number | null): string => (m2 === null ? '-' : String(roundSignificant(m2 / 10_000, 2)));
  const anyArea = candidates.some((candidate) => candidate.areaAboveLevel_m2 !== null);
  const headings = [
    'rank',
    'candidate',
    ...receptors.map((receptor) => `${receptor.id} [µg/m³]`),
    'highest [µg/m³]',
    standard === null ? '% of standard' : `% of ${standard.name}`,
    'verdict',
    ...(anyArea ? [`area ≥ ${result.level_ug_m3 === null ? 'level' : fig(result.level_ug_m3)} µg/m³ [ha]`] : []),
  ];
  const rows = shown.map((candidate) => [
    String(candidate.rank),
    candidate.id,
    ...candidate.receptorPc_ug_m3.map(fig),
    fig(candidate.highestPc_ug_m3),
    candidate.percentOfStandard === null ? '-' : String(roundSignificant(candidate.percentOfStandard, 2)),
    candidate.verdict === null ? '-' : OUTCOME_WORDS[candidate.verdict],
    ...(anyArea ? [hectares(candidate.areaAboveLevel_m2)] : []),
  ]);
  const notes = [
    'PC from the siting map at each sensitive receptor, to 3 significant figures; rank 1 has the lowest combined value.',
    'The verdict is the assessment\'s screen, common practice in permit guidance (PC below 1 % of a long-term or 10 % of a short-term standard, then PEC below 70 % of a long-term one, screens out); one steady state, or a mean against a short-term standard, is indicative only. A screening aid, not a legal decision.',
  ];
  if (anyArea) notes.push('Area from a forward run of the stack at the candidate; "-" where none was run.');
  if (candidates.length > shown.length) notes.push(`The best ${shown.length} of ${candidates.length} candidates; all of them are in candidates.csv.`);
  return {
    id: 'candidates',
    heading: 'Ranked candidates',
    paragraphs: [],
    tables: [
      {
        id: 'candidates',
        caption: 'Candidate positions, best first',
        headings,
        numeric: headings.map((_, c) => c === 0 || (c >= 2 && c < 2 + receptors.length + 2) || (anyArea && c === headings.length - 1)),
        rows,
        widths: [0.5, 1.3, ...receptors.map(() => 0.9), 0.9, 0.9, 1.6, ...(anyArea ? [0.9] : [])],
        note: notes.join(' '),
      },
    ],
  };
}

function bestSection(result: SitingResult): ReportSection {
  const { best } = result;
  const from = best.from === 'map' ? 'a grid column centre of the map' : best.from;
  return {
    id: 'best',
    heading: 'Best position on the map',
    paragraphs: [
      `Lowest ${result.map.receptorWeights === null ? 'highest receptor PC' : 'weighted sum'} within the ${best.within}: ${fig(best.combined_ug_m3)} µg/m³ at ` +
        `lat ${best.lat.toFixed(6)}, lon ${best.lon.toFixed(6)} (${offsetWords(best.x_m, best.y_m)}); found at ${from}. It is marked with a star on the siting map.`,
      ...lowerOutsideWords(result),
    ],
    tables: [
      {
        id: 'best',
        caption: 'PC at each sensitive receptor with the stack at the best position',
        headings: ['receptor', 'PC [µg/m³]'],
        numeric: [false, true],
        rows: result.receptors.map((receptor, r) => [`${receptor.id} (${receptor.name})`, fig(best.receptorPc_ug_m3[r])]),
        widths: [3, 1],
      },
    ],
  };
}

/** Candidates with a lower value than the best position lie outside the site polygon (it was sought inside); say which. */
function lowerOutsideWords(result: SitingResult): string[] {
  const ring = result.siteRing_m;
  if (ring === null) return [];
  const outside = result.candidates.filter((candidate) => candidate.combined_ug_m3 < result.best.combined_ug_m3 && !isInsideRing(ring, candidate.x_m, candidate.y_m));
  if (outside.length === 0) return [];
  const names = outside.slice(0, 5).map((candidate) => candidate.id).join(', ');
  return [
    `${outside.length === 1 ? 'Candidate' : 'Candidates'} ${names}${outside.length > 5 ? ` and ${outside.length - 5} more` : ''} ` +
      `${outside.length === 1 ? 'has' : 'have'} a lower value but ${outside.length === 1 ? 'lies' : 'lie'} outside the site polygon, where the best position was not sought.`,
  ];
}

function limitsSection(result: SitingResult): ReportSection {
  const measured =
    result.forwardAgreement === null
      ? 'No forward runs were made in this siting, so its agreement with forward runs was not measured here.'
      : `Measured in this siting: forward runs of the stack at ${result.forwardRunCount} candidate${result.forwardRunCount === 1 ? '' : 's'} agree with the map ` +
        (result.forwardAgreement === 0
          ? 'exactly at every receptor.'
          : `within ${roundSignificant(100 * result.forwardAgreement, 2)} % of the largest forward PC at the receptors.`);
  return {
    id: 'limits',
    heading: 'Where the map holds',
    paragraphs: [
      'The siting map is one adjoint solve per sensitive receptor (grid mode) or a direct evaluation (Gaussian mode). It holds only for:',
      ...result.limits.map((limit) => `• ${capitalise(limit)}.`),
      measured,
      'Measured agreement with forward runs (docs/siting.md): with first-order upwind the adjoint is exact (largest difference 6e-10 of the largest forward value); ' +
        'with the default limited scheme the two differ by its discretisation error: 3.1 % of the largest forward PC over 90 receptor values on the demo at 50 m cells, ' +
        '0.36 % at the benchmark\u2019s three positions, 0.12 % on the siting test layout. The Gaussian mode\u2019s map equals forward Gaussian runs to rounding.',
      ...result.notes.map((note) => `Note: ${capitalise(note)}${/[.!?]$/.test(note) ? '' : '.'}`),
    ],
    tables: [],
  };
}

function reproducibilitySection(provenance: RunProvenance): ReportSection {
  return reproducibilityBlock(
    provenance,
    'To site the stack again',
    [
      ['scenario SHA-256', provenance.scenarioSha256],
      ['sited (UTC)', provenance.runDate],
    ],
    'Checksum of the scenario as sited, in canonical JSON (keys sorted), as in a run zip.',
  );
}
