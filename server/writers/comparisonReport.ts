/**
 * The comparison's own report and difference figure, beside comparison.json and difference.geojson:
 * - difference-map.svg and difference-map.png: B - A on A's grid, drawn by the site map's code
 *   (./map/mapSvg.ts) with a diverging scale of our own (increases warm, decreases cool), a legend of the
 *   change in µg/m³, A's sources and receptors, scale bar, north arrow and the caution line;
 * - comparison-report.html and comparison-report.pdf: the caution first, both scenarios, the difference
 *   figure, the change at each receptor, the footprint levels whose area changes, the screening verdicts
 *   that change, and what it takes to run the comparison again. Drawn by the run report's renderers
 *   (./report/), so the two reports share one look and one print layout.
 *
 * `buildComparisonReportFiles` makes them in memory as [name, content] pairs: the CLI writes them into its
 * folder, the server can store them with a comparison job.
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import type { Comparison } from '../../solver/assessment/comparison.ts';
import type { ScenarioRunResult } from '../../solver/drivers/types.ts';
import { OUTCOME_WORDS } from './assessmentFigures.ts';
import { SCREENING_CAUTION } from './caution.ts';
import { comparisonJson, type DifferenceCollection } from './comparison.ts';
import type { CrsRequest } from './crs.ts';
import { renderSvgToPng } from './map/mapPng.ts';
import { renderMapSvg, type ContextLayer, type MapFigure } from './map/mapSvg.ts';
import { plumeplanVersion, scenarioChecksum, type RunProvenance } from './provenance.ts';
import { renderReportHtml } from './report/reportHtml.ts';
import { reproducibilityBlock, type ReportModel, type ReportSection, type ReportTable } from './report/reportModel.ts';
import { writeReportPdf } from './report/reportPdf.ts';
import { roundSignificant } from './rounding.ts';

export const DIFFERENCE_MAP_SVG_FILE = 'difference-map.svg';
export const DIFFERENCE_MAP_PNG_FILE = 'difference-map.png';
export const COMPARISON_REPORT_HTML_FILE = 'comparison-report.html';
export const COMPARISON_REPORT_PDF_FILE = 'comparison-report.pdf';

/** One side of the comparison as the caller ran (or read) it. */
export interface ComparisonReportSide {
  /** the scenario file or run folder the side came from */
  path: string;
  scenario: Scenario;
  result: ScenarioRunResult;
}

export interface ComparisonReportInput {
  a: ComparisonReportSide;
  b: ComparisonReportSide;
  /** the solver's comparison of A and B */
  comparison: Comparison;
  /** difference.geojson's bands */
  difference: DifferenceCollection;
  /** how the compared footprint levels were chosen (as in comparison.json) */
  levelsBasis?: string;
  /** the command as typed, for the reproducibility block; default "plumeplan compare A B" */
  command?: string;
  /** the comparison's date; default now */
  runDate?: Date;
  /** 'quick' leaves out the rendered files (difference-map.png and comparison-report.pdf) */
  outputs?: 'full' | 'quick';
  /** CRS of the difference figure; default A's site's UTM zone */
  crs?: CrsRequest;
  contextLayers?: ContextLayer[];
}

const capitalise = (text: string): string => `${text.charAt(0).toUpperCase()}${text.slice(1)}`;
const fig = (value: number): string => String(roundSignificant(value, 3));
const signed = (value: number | null, unit = ''): string => (value === null ? '-' : `${value > 0 ? '+' : ''}${value}${unit}`);

/**
 * The comparison report and difference figure, in memory.
 *
 * @param input both sides, the comparison, the difference bands and options
 * @returns [file name, content] pairs in the order to write them: the figure's SVG (and PNG), the report's HTML (and PDF)
 * @example for (const [name, data] of await buildComparisonReportFiles({ a, b, comparison, difference })) await writeFile(path.join(dir, name), data);
 */
export async function buildComparisonReportFiles(input: ComparisonReportInput): Promise<[string, string | Uint8Array][]> {
  const full = (input.outputs ?? 'full') === 'full';
  const model = buildComparisonReportModel(input);
  const figure = model.figure;
  const files: [string, string | Uint8Array][] = [[DIFFERENCE_MAP_SVG_FILE, figure.svg]];
  if (full) files.push([DIFFERENCE_MAP_PNG_FILE, renderSvgToPng(figure.svg).bytes]);
  files.push([COMPARISON_REPORT_HTML_FILE, renderReportHtml(model.report)]);
  if (full) files.push([COMPARISON_REPORT_PDF_FILE, await writeReportPdf(model.report)]);
  return files;
}

/**
 * The difference figure and the report's content, before either is rendered.
 *
 * @returns the figure (SVG text) and the report model both report renderers draw
 */
export function buildComparisonReportModel(input: ComparisonReportInput): { report: ReportModel; figure: MapFigure } {
  const { a, b, comparison, difference } = input;
  const json = comparisonJson(comparison, input.levelsBasis ?? '') as unknown as ComparisonFigures;
  const runDate = (input.runDate ?? new Date()).toISOString().replace(/\.\d{3}Z$/, 'Z');
  const checksumA = scenarioChecksum(a.scenario);
  const checksumB = scenarioChecksum(b.scenario);
  const provenance: RunProvenance = {
    version: plumeplanVersion(),
    scenarioSha256: `A ${checksumA}, B ${checksumB}`,
    runDate,
    command: input.command ?? `plumeplan compare ${a.path} ${b.path}`,
  };
  const figure = renderMapSvg(a.scenario, a.result, {
    crs: input.crs,
    contextLayers: input.contextLayers,
    provenance: { ...provenance, scenarioSha256: checksumA },
    subtitle: `B: ${b.scenario.name} minus A: ${a.scenario.name}`,
    difference: { collection: difference, largestIncrease_ug_m3: json.largestIncrease.delta_ug_m3, largestDecrease_ug_m3: json.largestDecrease.delta_ug_m3 },
  });
  const pollutant = a.scenario.pollutant.name === b.scenario.pollutant.name ? a.scenario.pollutant.name : `${a.scenario.pollutant.name} / ${b.scenario.pollutant.name}`;
  const report: ReportModel = {
    title: 'Scenario comparison report',
    subtitle: `A: ${a.scenario.name} · B: ${b.scenario.name}`,
    caution: SCREENING_CAUTION,
    runLine: `${pollutant}; B − A on A's grid (${comparison.grid.nx} x ${comparison.grid.ny} cells at ${comparison.grid.spacing_m} m)${comparison.resampled ? ', B resampled' : ''}; compared ${runDate}`,
    sections: [
      scenariosSection(input, json),
      figureSection(input, figure),
      receptorSection(json),
      areaSection(json),
      verdictSection(input),
      reproducibilitySection(provenance, checksumA, checksumB),
    ],
    provenance,
  };
  return { report, figure };
}

/** comparison.json's rounded figures, as far as the report reads them. */
interface ComparisonFigures {
  a: { peak_ug_m3: number };
  b: { peak_ug_m3: number };
  largestIncrease: { delta_ug_m3: number; x_m: number; y_m: number };
  largestDecrease: { delta_ug_m3: number; x_m: number; y_m: number };
  receptors: { id: string; a_ug_m3: number; b_ug_m3: number; delta_ug_m3: number; change_pct: number | null }[];
  levels: { basis: string; areas: { level_ug_m3: number; a_m2: number | null; b_m2: number | null; change_m2: number | null; change_pct: number | null }[] };
}

const WEATHER_WORDS: Readonly<Record<ScenarioRunResult['weatherKind'], string>> = {
  steady: 'steady weather',
  hourly: 'hourly series',
  windRose: 'wind rose',
  screeningSet: 'screening weather set',
};

/** The largest change of one sign over the grid, in words: none when B is nowhere above (below) A. */
function largest(change: 'increase' | 'decrease', at: { delta_ug_m3: number; x_m: number; y_m: number }): string {
  if (at.delta_ug_m3 === 0) return `no ${change} anywhere on the grid`;
  return `largest ${change} ${signed(at.delta_ug_m3)} µg/m³ at x ${at.x_m} m, y ${at.y_m} m`;
}

function scenariosSection(input: ComparisonReportInput, json: ComparisonFigures): ReportSection {
  const { a, b, comparison } = input;
  const side = (s: ComparisonReportSide, peak: number): string[] => [
    s.scenario.name,
    s.path,
    `${s.result.mode}, ${WEATHER_WORDS[s.result.weatherKind]}`,
    s.scenario.pollutant.name,
    `${s.result.grid.nx} x ${s.result.grid.ny} at ${s.result.grid.spacing_m} m`,
    fig(peak),
  ];
  const rowA = side(a, json.a.peak_ug_m3);
  const rowB = side(b, json.b.peak_ug_m3);
  const paragraphs = [
    comparison.identical
      ? 'B is identical to A: every difference on the grid and at every receptor is exactly zero.'
      : `${capitalise(largest('increase', json.largestIncrease))}; ${largest('decrease', json.largestDecrease)} (cell centres, in metres east and north of A's site).`,
    ...comparison.notes.map((note) => `Note: ${capitalise(note)}.`),
  ];
  return {
    id: 'scenarios',
    heading: 'The two scenarios',
    paragraphs: [],
    tables: [
      {
        id: 'scenarios',
        caption: 'A is the reference; every difference is B − A',
        headings: ['', 'scenario', 'file or folder', 'solver, weather', 'pollutant', 'grid', 'ground peak [µg/m³]'],
        numeric: [false, false, false, false, false, false, true],
        rows: [['A', ...rowA], ['B', ...rowB]],
        widths: [0.3, 2.1, 1.9, 1.4, 1, 1.2, 0.9],
      },
    ],
    after: paragraphs,
  };
}

function figureSection(input: ComparisonReportInput, figure: MapFigure): ReportSection {
  return {
    id: 'map',
    heading: 'Difference map',
    paragraphs: [],
    tables: [],
    figure: {
      svg: figure.svg,
      width: figure.width,
      height: figure.height,
      caption:
        `Ground-level change B − A in µg/m³ on A's grid, drawn in ${figure.crs.name} (EPSG:${figure.crs.epsg}): warm bands where B is higher, ` +
        `cool bands where B is lower. The same bands are in difference.geojson; the figures in comparison.json.`,
    },
  };
}

function receptorSection(json: ComparisonFigures): ReportSection {
  return {
    id: 'receptors',
    heading: 'Differences at the receptors',
    paragraphs: json.receptors.length === 0 ? ['The two scenarios share no receptor (receptors are matched by id).'] : [],
    tables:
      json.receptors.length === 0
        ? []
        : [
            {
              id: 'receptors',
              caption: 'Process contribution at each receptor both scenarios share',
              headings: ['receptor', 'A [µg/m³]', 'B [µg/m³]', 'B − A [µg/m³]', 'change [%]'],
              numeric: [false, true, true, true, true],
              rows: json.receptors.map((r) => [r.id, String(r.a_ug_m3), String(r.b_ug_m3), signed(r.delta_ug_m3), signed(r.change_pct)]),
              widths: [2, 1, 1, 1, 1],
              note: 'Change in % of A, to 2 significant figures; "-" where A is zero.',
            },
          ],
  };
}

function areaSection(json: ComparisonFigures): ReportSection {
  const hectares = (m2: number | null): string => (m2 === null ? '-' : String(roundSignificant(m2 / 10_000, 2)));
  // a level changes when its area differs at the 2 significant figures a person reads (the areas as rounded
  // in comparison.json); a change in the last bits of two contour sums is no change
  const changes = (level: ComparisonFigures['levels']['areas'][number]): boolean => level.a_m2 !== level.b_m2;
  const changed = json.levels.areas.filter(changes);
  const unchanged = json.levels.areas.filter((level) => !changes(level)).map((level) => level.level_ug_m3);
  const paragraphs = [
    json.levels.areas.length === 0
      ? 'No footprint levels were compared.'
      : changed.length === 0
        ? 'No footprint level changes its area.'
        : `Levels chosen: ${json.levels.basis}.`,
  ];
  return {
    id: 'areas',
    heading: 'Footprint areas that change',
    paragraphs,
    tables:
      changed.length === 0
        ? []
        : [
            {
              id: 'areas',
              caption: 'Ground at or above each level, A and B',
              headings: ['level [µg/m³]', 'A [ha]', 'B [ha]', 'B − A [ha]', 'change [%]'],
              numeric: [true, true, true, true, true],
              rows: changed.map((level) => [
                String(level.level_ug_m3),
                hectares(level.a_m2),
                hectares(level.b_m2),
                level.change_m2 === null ? '-' : signed(roundSignificant(level.change_m2 / 10_000, 2)),
                signed(level.change_pct),
              ]),
              widths: [1, 1, 1, 1, 1],
              note:
                'Each run measured on its own grid, to 2 significant figures.' +
                (unchanged.length > 0 ? ` Levels whose area does not change: ${unchanged.join(', ')} µg/m³.` : ''),
            },
          ],
  };
}

function verdictSection(input: ComparisonReportInput): ReportSection {
  const { comparison } = input;
  const assessed = input.a.result.verdicts !== undefined && input.b.result.verdicts !== undefined;
  const table: ReportTable = {
    id: 'verdicts',
    caption: 'Screening verdicts whose outcome differs between A and B',
    headings: ['standard', 'where', 'A', 'B', 'PC in A [µg/m³]', 'PC in B [µg/m³]'],
    numeric: [false, false, false, false, true, true],
    rows: comparison.verdictChanges.map((change) => [
      change.standard,
      change.where === 'maximum' ? 'point of maximum impact' : change.where,
      OUTCOME_WORDS[change.a],
      OUTCOME_WORDS[change.b],
      fig(change.a_pc_ug_m3),
      fig(change.b_pc_ug_m3),
    ]),
    widths: [2, 1.5, 1.2, 1.2, 1, 1],
    note: 'The screen is common practice in permit guidance (PC < 1 % of a long-term or < 10 % of a short-term standard, then PEC < 70 % of a long-term one, unless the scenario sets other thresholds); a screening aid, not a legal decision.',
  };
  return {
    id: 'verdicts',
    heading: 'Screening verdicts that change',
    paragraphs: !assessed
      ? ['One or both scenarios carry no assessment, so there are no screening verdicts to compare.']
      : comparison.verdictChanges.length === 0
        ? ['No screening verdict changes: every standard has the same outcome in A and B at the point of maximum impact and at every shared receptor.']
        : [],
    tables: comparison.verdictChanges.length > 0 ? [table] : [],
  };
}

function reproducibilitySection(provenance: RunProvenance, checksumA: string, checksumB: string): ReportSection {
  return reproducibilityBlock(
    provenance,
    'To compare these again',
    [
      ['scenario A SHA-256', checksumA],
      ['scenario B SHA-256', checksumB],
      ['compared (UTC)', provenance.runDate],
    ],
    'Checksums of each scenario as run, in canonical JSON (keys sorted), as in each run zip.',
  );
}
