/**
 * The consultation report's content, built once from a run and drawn twice: as an HTML page with an A4
 * print stylesheet (reportHtml.ts, EJS) and as a PDF (reportPdf.ts, pdfkit). Both draw this model and
 * nothing else, so the two cannot say different things.
 *
 * Every figure here is already rounded for print (concentrations to 3 significant figures) and every
 * table names its units in the column headings.
 */
import type { Scenario } from '../../../scenarios/format/types.ts';
import type { ScenarioRunResult } from '../../../solver/drivers/types.ts';
import type { LevelArea } from '../../../solver/assessment/footprintAreas.ts';
import type { PointVerdict, ScreeningVerdicts, StandardVerdict } from '../../../solver/assessment/verdicts.ts';
import { footprintLevelAreas, OUTCOME_WORDS } from '../assessmentFigures.ts';
import { SCREENING_CAUTION } from '../caution.ts';
import { lonLatConverter, siteUtmCrs, type ExportCrs } from '../crs.ts';
import type { FootprintCollection } from '../footprint.ts';
import type { RunProvenance } from '../provenance.ts';
import { roundDecimals, roundSignificant } from '../rounding.ts';
import type { ResultSummary } from '../summary.ts';

/** A table as both renderers draw it: headings, rows of text, right-aligned numeric columns. */
export interface ReportTable {
  /** stable name, used as an id in HTML and by the tests */
  id: string;
  caption: string;
  headings: string[];
  /** true for columns holding numbers (right-aligned) */
  numeric: boolean[];
  rows: string[][];
  /** relative column widths for the PDF (sum is spread over the text width) */
  widths: number[];
  /** a line under the table */
  note?: string;
}

export interface ReportSection {
  id: string;
  heading: string;
  /** paragraphs before the tables */
  paragraphs: string[];
  tables: ReportTable[];
  /** an SVG figure drawn in the section (the map, the wind rose), with its caption */
  figure?: { svg: string; caption: string; width: number; height: number };
  /** paragraphs after the tables */
  after?: string[];
}

export interface ReportModel {
  title: string;
  subtitle: string;
  caution: string;
  /** one line under the title: pollutant, mode, weather, grid */
  runLine: string;
  sections: ReportSection[];
  provenance: RunProvenance;
}

export interface ReportInput {
  scenario: Scenario;
  result: ScenarioRunResult;
  summary: ResultSummary;
  footprint: FootprintCollection;
  /** the map figure's SVG and size */
  map: { svg: string; width: number; height: number; crs: ExportCrs };
  /** the wind rose picture, when the run has one */
  windRoseSvg?: string;
  provenance: RunProvenance;
}

const fig = (value: number): string => String(roundSignificant(value, 3));

/** Column headings a person reads, from receptor column keys (units kept). */
export function columnHeading(key: string): string {
  const known: Record<string, string> = {
    concentration_ug_m3: 'concentration [µg/m³]',
    mean_ug_m3: 'period mean [µg/m³]',
    max_ug_m3: 'highest hour [µg/m³]',
  };
  if (known[key] !== undefined) return known[key];
  return key.replace(/_ug_m3$/, ' [µg/m³]').replace(/_/g, ' ');
}

/**
 * Build the report's content.
 *
 * @param input the scenario, the run, its summary and footprint as written, the map figure, provenance
 * @returns the model both renderers draw
 */
export function buildReportModel(input: ReportInput): ReportModel {
  const { scenario, result, summary, provenance } = input;
  const weatherWords = { steady: 'steady weather', hourly: 'hourly series', windRose: 'wind rose', screeningSet: 'screening weather set (highest hourly value)' }[result.weatherKind];
  const grid = result.grid;
  return {
    title: 'Air-quality screening report',
    subtitle: scenario.name,
    caution: SCREENING_CAUTION,
    runLine:
      `${scenario.pollutant.name}, ${result.mode === 'grid' ? 'grid mode (advection-diffusion)' : 'Gaussian plume reference mode'}, ` +
      `${weatherWords}; grid ${grid.nx} x ${grid.ny} x ${grid.nz} cells at ${grid.spacing_m} m; run ${provenance.runDate}`,
    sections: [
      mapSection(input),
      receptorSection(input),
      ...verdictSection(input),
      peakSection(input),
      areaSection(input),
      sourceSection(scenario, result),
      weatherSection(input),
      pollutantSection(scenario),
      methodSection(scenario, result, summary),
      reproducibilitySection(provenance),
    ],
    provenance,
  };
}

function mapSection(input: ReportInput): ReportSection {
  const statistic = input.result.footprintStatistic === 'mean' ? 'mean concentration' : 'concentration';
  return {
    id: 'map',
    heading: 'Site map',
    paragraphs: [],
    tables: [],
    figure: {
      svg: input.map.svg,
      width: input.map.width,
      height: input.map.height,
      caption:
        `Ground-level ${input.scenario.pollutant.name} ${statistic} at ${input.footprint.properties.height_m} m, isopleth bands in µg/m³, ` +
        `drawn in ${input.map.crs.name} (EPSG:${input.map.crs.epsg}). The same field is in ground.tif; the bands are in footprint.geojson.`,
    },
  };
}

function receptorSection(input: ReportInput): ReportSection {
  const { scenario, result } = input;
  const assessment = result.extraSummary.assessment as { standards?: unknown[]; note?: string } | undefined;
  const verdicts = input.summary.verdicts as ScreeningVerdicts | undefined;
  // A series or a wind rose gives each standard's statistic per receptor: those columns are read in the
  // screening verdicts below, so this table keeps to the period mean and the highest hour.
  const evaluated = verdicts !== undefined || (assessment?.standards !== undefined && assessment.standards.every((standard) => Array.isArray((standard as { receptors?: unknown }).receptors)));
  const keys = result.receptorColumns
    .map((column) => column.key)
    .filter((key) => !evaluated || key === 'mean_ug_m3' || key === 'max_ug_m3' || key === 'concentration_ug_m3');
  const background = scenario.assessment?.background_ug_m3;
  const steady = result.weatherKind === 'steady';
  const headings = ['id', 'receptor', 'height [m]', ...keys.map(columnHeading)];
  const numeric = [false, false, true, ...keys.map(() => true)];
  const widths = [1.3, 2.6, 0.9, ...keys.map(() => 1.3)];
  if (steady && background !== undefined) {
    headings.push('PC + background [µg/m³]');
    numeric.push(true);
    widths.push(1.3);
  }
  const rows = input.summary.receptors.map((receptor) => {
    const row = [receptor.id, receptor.name, fig(receptor.height_m), ...keys.map((key) => String(receptor[key]))];
    if (steady && background !== undefined) row.push(fig(Number(receptor.concentration_ug_m3) + background));
    return row;
  });
  const tables: ReportTable[] = [
    {
      id: 'receptors',
      caption: 'Process contribution (PC) at each receptor',
      headings,
      numeric,
      rows,
      widths,
      note: background === undefined ? 'No background concentration was given in the scenario.' : `Background taken as ${fig(background)} µg/m³ (from the scenario).`,
    },
  ];
  const paragraphs: string[] = [];
  if (verdicts === undefined && assessment?.note !== undefined) paragraphs.push(`Standards: ${assessment.note}.`);
  return { id: 'receptors', heading: 'Receptor results', paragraphs, tables };
}

/** A verdict in words: the outcome and the stage that decided it, with its threshold. */
export function verdictWords(verdict: PointVerdict): string {
  const { stage1, stage2 } = verdict;
  if (verdict.outcome === 'indicative') {
    return `${OUTCOME_WORDS.indicative}: PC ${stage1.passed ? 'below' : 'not below'} ${stage1.threshold_pct} % for this weather`;
  }
  if (stage1.passed) return `${OUTCOME_WORDS[verdict.outcome]}: PC < ${stage1.threshold_pct} %`;
  if (stage2?.passed) return `${OUTCOME_WORDS[verdict.outcome]}: PEC < ${stage2.threshold_pct} %`;
  const failed = stage2 === null ? `PC ≥ ${stage1.threshold_pct} %` : `PC ≥ ${stage1.threshold_pct} %, PEC ≥ ${stage2.threshold_pct} %`;
  return `${OUTCOME_WORDS[verdict.outcome]}: ${failed}`;
}

/** Where the point of maximum impact was taken, in words. */
function maximumPlace(standard: StandardVerdict): string {
  const maximum = standard.maximum!;
  if (maximum.where === 'receptors') return `maximum over receptors (${maximum.receptorId ?? '-'})`;
  const off = maximum.searched?.startsWith('off the site') === true;
  const at = `${Math.round(Math.abs(maximum.x_m))} m ${maximum.x_m < 0 ? 'W' : 'E'}, ${Math.round(Math.abs(maximum.y_m))} m ${maximum.y_m < 0 ? 'S' : 'N'}`;
  return `${off ? 'maximum off the site' : 'maximum on the grid'} (${at})`;
}

/**
 * The screening verdicts (summary.json's, rounded as written there): for each standard with figures, the
 * point of maximum impact and every receptor with PC, PC as % of the standard, background, PEC, PEC as %
 * of the standard and the screen's outcome; standards the weather gives no figure for say why.
 */
function verdictSection(input: ReportInput): ReportSection[] {
  const verdicts = input.summary.verdicts as ScreeningVerdicts | undefined;
  if (verdicts === undefined) return [];
  const t = verdicts.thresholds;
  const paragraphs = [
    `The ${verdicts.label}. Stage 1: PC below ${t.pcLongTerm_pct} % of a long-term or ${t.pcShortTerm_pct} % of a short-term standard; ` +
      `stage 2 (long-term standards not cleared at stage 1): PEC below ${t.pecLongTerm_pct} % of the standard. ` +
      `Background ${fig(verdicts.background_ug_m3)} µg/m³ (from the scenario)` +
      (verdicts.noxToNo2 !== null
        ? `; NO2 taken as ${verdicts.noxToNo2.longTerm} (long-term) and ${verdicts.noxToNo2.shortTerm} (short-term) times NOx (${verdicts.noxToNo2.source}).`
        : '.'),
  ];
  const overview: ReportTable = {
    id: 'standards',
    caption: 'Standards assessed and the screen at the point of maximum impact',
    headings: ['standard', 'limit [µg/m³]', 'statistic', 'what the figures are', 'at the maximum'],
    numeric: [false, true, false, false, false],
    rows: verdicts.standards.map((standard) => [
      `${standard.name} (${standard.setTitle})`,
      fig(standard.limit_ug_m3),
      `${standard.statistic}, ${standard.averaging_h} h${standard.allowedExceedances > 0 ? `, ${standard.allowedExceedances} exceedances allowed` : ''}${standard.conversion !== null ? `; ${standard.conversion}` : ''}`,
      standard.maximum !== undefined ? standard.basisNote : `no figure: ${standard.reason ?? 'the run gave none'}`,
      standard.maximum !== undefined ? verdictWords(standard.maximum) : '-',
    ]),
    widths: [1.6, 0.7, 1.6, 3, 1.5],
  };
  const tables: ReportTable[] = [overview];
  verdicts.standards.forEach((standard, index) => {
    if (standard.maximum === undefined) return;
    const row = (place: string, verdict: PointVerdict): string[] => [
      place,
      fig(verdict.pc_ug_m3),
      String(verdict.pcPercentOfStandard),
      fig(verdict.background_ug_m3),
      fig(verdict.pec_ug_m3),
      String(verdict.pecPercentOfStandard),
      verdictWords(verdict),
    ];
    tables.push({
      id: `verdicts-${index + 1}`,
      caption: `${standard.name}: limit ${fig(standard.limit_ug_m3)} µg/m³ of ${standard.assessedPollutant}`,
      headings: ['place', 'PC [µg/m³]', 'PC % of standard', 'background [µg/m³]', 'PEC [µg/m³]', 'PEC % of standard', 'screening verdict'],
      numeric: [false, true, true, true, true, true, false],
      rows: [
        row(maximumPlace(standard), standard.maximum),
        ...(standard.receptors ?? []).map((receptor) => row(receptor.id, receptor)),
      ],
      widths: [2.2, 0.8, 0.8, 1.1, 0.8, 0.8, 2],
      note: `Source of the standard: ${standard.source}. Percentages to 2 significant figures; PC and PEC to 3.`,
    });
  });
  return [
    {
      id: 'verdicts',
      heading: 'Screening verdicts',
      paragraphs,
      tables,
      after: ['A screening aid as commonly applied in permit guidance; not a legal decision and not a regulatory assessment.'],
    },
  ];
}


function peakSection(input: ReportInput): ReportSection {
  const { peak } = input.summary;
  const [easting, northing] = lonLatConverter(input.map.crs).forward([peak.lon, peak.lat]);
  const offset = `${Math.round(Math.abs(peak.x_m))} m ${peak.x_m < 0 ? 'west' : 'east'}, ${Math.round(Math.abs(peak.y_m))} m ${peak.y_m < 0 ? 'south' : 'north'} of the site`;
  return {
    id: 'peak',
    heading: 'Point of maximum impact',
    paragraphs: [
      `The highest ground-level ${peak.statistic === 'mean' ? 'mean ' : ''}concentration ${input.scenario.site.boundary !== undefined ? 'off the site' : 'on the grid'} is ${peak.concentration_ug_m3} µg/m³, ` +
        `in the cell centred at lat ${peak.lat}, lon ${peak.lon} (${offset}; ` +
        `${input.map.crs.geographic ? '' : `easting ${Math.round(easting)} m, northing ${Math.round(northing)} m in `}EPSG:${input.map.crs.epsg}). ` +
        'It is a cell value: the true maximum may lie anywhere in that cell and be higher.',
      `Where it was looked for: ${peak.where}.`,
      ...(peak.onSite !== undefined
        ? [
            `The highest value on the site is ${peak.onSite.concentration_ug_m3} µg/m³, at lat ${peak.onSite.lat}, lon ${peak.onSite.lon} ` +
              `(${peak.onSite.label}).`,
          ]
        : []),
    ],
    tables: [],
  };
}

/**
 * Footprint level areas, from the assessment's level arithmetic (footprintLevelAreas, the figures
 * summary.json lists): for each level the ground at or above it in ha and m², the farthest distance from
 * each source and the receptors inside, to 2 significant figures.
 */
function areaSection(input: ReportInput): ReportSection {
  const levels = input.footprint.properties.levels_ug_m3;
  const areas: LevelArea[] =
    input.summary.footprint.areas.length === levels.length ? input.summary.footprint.areas : footprintLevelAreas(input.scenario, input.result, levels);
  const sourceIds = input.result.sources.map((source) => source.id);
  const atLeast = (entry: LevelArea): string => (entry.reachesGridEdge ? '≥ ' : '');
  const basis = input.summary.footprint.levelsBasis;
  return {
    id: 'areas',
    heading: 'Footprint areas',
    paragraphs: basis !== undefined ? [`Levels: ${basis}.`] : [],
    tables: [
      {
        id: 'areas',
        caption: 'Ground at or above each level',
        headings: ['level [µg/m³]', 'area [ha]', 'area [m²]', ...sourceIds.map((id) => `farthest from ${id} [m]`), 'receptors inside'],
        numeric: [true, true, true, ...sourceIds.map(() => true), false],
        rows: areas.map((entry) => [
          fig(entry.level_ug_m3),
          `${atLeast(entry)}${entry.area_ha}`,
          `${atLeast(entry)}${entry.area_m2}`,
          ...sourceIds.map((id) => {
            const distance = entry.farthest.find((f) => f.sourceId === id)?.distance_m ?? null;
            return distance === null ? '-' : `${atLeast(entry)}${distance}`;
          }),
          entry.receptorsInside.length > 0 ? entry.receptorsInside.join(', ') : 'none',
        ]),
        widths: [0.9, 0.8, 1, ...sourceIds.map(() => 1), 2],
        note:
          'Areas and distances to 2 significant figures. "≥": the level reaches the edge of the grid, so the ground at or above it ' +
          'goes on beyond it and the figure is a lower bound; a larger domain would show where it ends.',
      },
    ],
  };
}

function sourceSection(scenario: Scenario, result: ScenarioRunResult): ReportSection {
  const effective = new Map(result.sources.map((source) => [source.id, source.effectiveHeight_m]));
  const rows = scenario.sources.map((source) => {
    if (source.kind === 'point') {
      const height = effective.get(source.id);
      return [
        source.id,
        source.name,
        'stack',
        `${roundDecimals(source.lat, 5)}, ${roundDecimals(source.lon, 5)}`,
        fig(source.height_m),
        `${fig(source.diameter_m)} m, ${fig(source.exitVelocity_m_s)} m/s, ${fig(source.exitTemperature_K)} K`,
        result.weatherKind === 'steady' && height !== undefined ? fig(height) : source.plumeRise ? 'per hour' : fig(source.height_m),
        fig(source.emission_g_s),
      ];
    }
    const [lon, lat] = source.polygon[0];
    return [source.id, source.name, 'area', `${roundDecimals(lat, 5)}, ${roundDecimals(lon, 5)} (first corner)`, fig(source.releaseHeight_m), '-', fig(source.releaseHeight_m), fig(source.emission_g_s)];
  });
  return {
    id: 'sources',
    heading: 'Sources',
    paragraphs: [],
    tables: [
      {
        id: 'sources',
        caption: 'Emission sources as given in the scenario',
        headings: ['id', 'name', 'kind', 'lat, lon', 'height [m]', 'exit: diameter, velocity, temperature', 'effective height [m]', 'emission [g/s]'],
        numeric: [false, false, false, false, true, false, true, true],
        rows,
        widths: [1.2, 1.9, 0.6, 1.5, 0.8, 1.7, 0.9, 1],
        note: 'Effective height: release height after plume rise (Briggs), for steady weather; in a series it changes hour by hour.',
      },
    ],
  };
}

function weatherSection(input: ReportInput): ReportSection {
  const { scenario, result } = input;
  const weather = scenario.weather;
  const rows: string[][] = [];
  if (weather.kind === 'steady') {
    const resolved = (result.extraSummary.weather ?? {}) as Record<string, unknown>;
    rows.push(
      ['wind speed', `${fig(weather.windSpeed_m_s)} m/s at ${fig(weather.anemometerHeight_m)} m`],
      ['wind from', `${fig(weather.windFrom_deg)}° (clockwise from north)`],
      ['stability class', `${String(resolved.stability ?? weather.stability ?? '-')}${resolved.stabilitySource ? ` (${String(resolved.stabilitySource)})` : ''}`],
      ['mixing height', `${fig(Number(resolved.mixingHeight_m ?? weather.mixingHeight_m))} m`],
      ['air temperature', `${fig(weather.airTemperature_K)} K`],
      ['rain', `${fig(weather.rain_mm_h)} mm/h`],
    );
  } else {
    const summary = (result.extraSummary.weather ?? {}) as Record<string, unknown>;
    for (const [key, value] of Object.entries(summary)) {
      if (value === null || typeof value === 'object') continue;
      rows.push([key.replace(/_/g, ' '), typeof value === 'number' ? fig(value) : String(value)]);
    }
  }
  return {
    id: 'weather',
    heading: 'Weather',
    paragraphs: [],
    tables: [{ id: 'weather', caption: 'Weather used', headings: ['quantity', 'value'], numeric: [false, false], rows, widths: [1, 2] }],
    ...(input.windRoseSvg !== undefined && result.windRose !== undefined
      ? { figure: { svg: input.windRoseSvg, caption: `Wind rose: ${result.windRose.caption}`, width: 560, height: 600 } }
      : {}),
  };
}

function pollutantSection(scenario: Scenario): ReportSection {
  const pollutant = scenario.pollutant;
  const rows = [
    [
      'half-life',
      pollutant.halfLife_h === null ? 'none (conserved)' : `${fig(pollutant.halfLife_h)} h`,
      'first-order decay, k = ln 2 / half-life (exact)',
    ],
    [
      'washout',
      pollutant.washout === null ? 'none' : `Λ = ${pollutant.washout.a_per_s} R^${pollutant.washout.b} 1/s, R in mm/h`,
      'below-cloud scavenging Λ = a R^b; particles a = 7e-5 1/s, b = 0.8 in a published worked answer',
    ],
    [
      'dry deposition velocity',
      `${fig(pollutant.depositionVelocity_m_s)} m/s`,
      'particles 0.001 (< 2.5 µm) to 0.05 m/s (10-50 µm): TA Luft 2002, annex 3, table 13',
    ],
    [
      'NOx to NO2',
      /^nox$/i.test(pollutant.name) ? 'not applied: figures are NOx as emitted' : 'not relevant',
      'common screening practice takes 70 % of NOx as NO2 for long-term and 35 % for short-term statistics (permit guidance, from memory)',
    ],
  ];
  return {
    id: 'pollutant',
    heading: 'Pollutant assumptions',
    paragraphs: [`Pollutant: ${pollutant.name}. Values are those of the scenario file; the last column says where such values come from.`],
    tables: [{ id: 'pollutant', caption: 'Losses and conversion', headings: ['assumption', 'value used', 'source'], numeric: [false, false, false], rows, widths: [1.1, 1.6, 3] }],
  };
}

function methodSection(scenario: Scenario, result: ScenarioRunResult, summary: ResultSummary): ReportSection {
  const grid = result.grid;
  const budget = summary.massBudget_g;
  const rows: string[][] = [
    ['solver', result.mode === 'grid' ? 'advection-diffusion equation solved on the local grid (finite volumes)' : 'Gaussian plume with ground and lid reflections (reference mode)'],
    [
      'dispersion',
      scenario.dispersion.kind === 'stability'
        ? `from the stability class (${scenario.site.landUse}; Gaussian curves: ${scenario.dispersion.curves})`
        : `constant diffusivities ${scenario.dispersion.horizontal_m2_s} / ${scenario.dispersion.vertical_m2_s} m²/s`,
    ],
    ['grid', `${grid.nx} x ${grid.ny} cells at ${grid.spacing_m} m, ${grid.nz} layers to ${fig(grid.zFaces_m[grid.nz])} m; local transverse Mercator about the site`],
    ['wind profile', scenario.windProfile === 'powerLaw' ? 'power law with height (Irwin 1979 exponents)' : 'uniform with height'],
    [
      'mass budget',
      budget === null
        ? 'none in Gaussian mode'
        : `emitted ${fig(budget.emitted)} g, in domain ${fig(budget.inDomain)} g, outflow ${fig(budget.outflow)} g, decayed ${fig(budget.decayed)} g, ` +
          `washed out ${fig(budget.washedOut)} g, deposited ${fig(budget.dryDeposited)} g; imbalance ${budget.relativeImbalance} (${budget.basis})`,
    ],
    ['not modelled', 'terrain, buildings (downwash), chemistry, plume interaction with the ground beyond reflection'],
  ];
  return {
    id: 'method',
    heading: 'Method',
    paragraphs: [],
    tables: [{ id: 'method', caption: 'How the figures were computed', headings: ['item', 'statement'], numeric: [false, false], rows, widths: [1, 4] }],
    after: result.notes.map((note) => `Run note: ${note}.`),
  };
}

/**
 * The reproducibility block every report ends with: the version, the checksums, the date and the
 * command, in one table. The run, comparison and siting reports differ only in their words.
 *
 * @param caption what the table is for ("To run this again")
 * @param rows the rows between the version and the command (checksums, the date)
 * @param note how the checksums are made
 */
export function reproducibilityBlock(provenance: RunProvenance, caption: string, rows: string[][], note: string): ReportSection {
  return {
    id: 'reproducibility',
    heading: 'Reproducibility',
    paragraphs: [],
    tables: [
      {
        id: 'reproducibility',
        caption,
        headings: ['item', 'value'],
        numeric: [false, false],
        rows: [['plumeplan version', provenance.version], ...rows, ['command', provenance.command]],
        widths: [1, 4],
        note,
      },
    ],
  };
}

function reproducibilitySection(provenance: RunProvenance): ReportSection {
  return reproducibilityBlock(
    provenance,
    'To run this again',
    [
      ['scenario SHA-256', provenance.scenarioSha256],
      ['run date (UTC)', provenance.runDate],
    ],
    'The checksum is of the scenario as run, in canonical JSON (keys sorted): scenario.json in the run zip.',
  );
}

/** The site's default export CRS (its UTM zone), for callers that draw no map of their own. */
export function defaultReportCrs(scenario: Scenario): ExportCrs {
  return siteUtmCrs(scenario.site);
}
