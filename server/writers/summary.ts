/**
 * summary.json: the run at a glance, as `../shared/spec/scenario-format.md` lists it (format, name,
 * mode, grid, run figures, mass budget, sources, peak, receptors, caution), plus notes, the footprint's
 * levels and whatever the weather driver adds in `extraSummary` (statistics, standards, frequencies).
 *
 * Rounding: concentrations (every key ending in `_ug_m3`) to 3 significant figures, positions to
 * 7 decimals of a degree and 0.1 m, masses to 6 significant figures. Other figures (counts, fractions)
 * are written as the driver gives them.
 */
import { RESULT_FORMAT, type Scenario, type SolverMode } from '../../scenarios/format/types.ts';
import type { FootprintStatistic, MassBudget, ScenarioRunResult } from '../../solver/drivers/types.ts';
import { GROUND_LEVEL_HEIGHT_m } from '../../solver/drivers/steadyScenario.ts';
import { edgeCutNotes, footprintEdgeCuts } from '../../solver/diagnostics/edgeCut.ts';
import { sitePeak, type GroundPeak } from '../../solver/grid/siteBoundary.ts';
import { SCREENING_CAUTION } from './caution.ts';
import { footprintLevelAreas, roundVerdicts } from './assessmentFigures.ts';
import type { LevelArea } from '../../solver/assessment/footprintAreas.ts';
import {
  CONCENTRATION_SIGNIFICANT_FIGURES,
  LON_LAT_DECIMALS,
  roundDecimals,
  roundSignificant,
} from './rounding.ts';

/** Significant figures of masses in the budget. */
const MASS_SIGNIFICANT_FIGURES = 6;

export interface SummaryGrid {
  nx: number;
  ny: number;
  nz: number;
  spacing_m: number;
  /** proj4 definition of the local transverse Mercator projection */
  projection: string;
  /** local x of the west edge and y of the south edge [m] */
  xWest_m: number;
  ySouth_m: number;
  /** top of the grid [m] */
  height_m: number;
}

export interface SummaryPeak {
  /** ground-level maximum of the footprint field [ug/m3] */
  concentration_ug_m3: number;
  lat: number;
  lon: number;
  /** centre of the cell holding the maximum, local metres */
  x_m: number;
  y_m: number;
  /** what the field is: a steady concentration or a period mean */
  statistic: FootprintStatistic;
  /** where the peak was looked for: off the site (a boundary was given) or anywhere (it may be on the site) */
  where: string;
  /** the maximum on the site, labelled, when the scenario gives site.boundary */
  onSite?: Omit<SummaryPeak, 'statistic' | 'where' | 'onSite'> & { label: string };
}

export interface SummaryReceptor {
  id: string;
  name: string;
  lat: number;
  lon: number;
  x_m: number;
  y_m: number;
  height_m: number;
  /** the run's figures, keyed by column name, e.g. concentration_ug_m3 or mean_ug_m3 */
  [figure: string]: number | string;
}

export interface SummarySource {
  id: string;
  x_m: number;
  y_m: number;
  /** release height after plume rise [m]; steady weather only */
  effectiveHeight_m?: number;
}

export interface ResultSummary {
  format: typeof RESULT_FORMAT;
  name: string;
  mode: SolverMode;
  weatherKind: ScenarioRunResult['weatherKind'];
  pollutant: string;
  grid: SummaryGrid;
  run: { steps: number; wallSeconds: number };
  massBudget_g: MassBudget | null;
  sources: SummarySource[];
  peak: SummaryPeak;
  receptors: SummaryReceptor[];
  footprint: {
    file: string;
    statistic: FootprintStatistic;
    height_m: number;
    levels_ug_m3: number[];
    /** how the levels were chosen, when as percentages of a standard */
    levelsBasis?: string;
    /** per level: area [m2, ha], farthest distance from each source [m], receptors inside (2 significant figures) */
    areas: LevelArea[];
    /** whether the lowest band reaches the domain's edge: a sentence when it does not, else where it is cut */
    edge?: string | { side: string; length_m: number; from_m: number; to_m: number; largest_ug_m3: number }[];
  };
  caution: string;
  notes: string[];
  [extra: string]: unknown;
}

export interface SummaryOptions {
  /** the footprint's levels, ascending [ug/m3] */
  levels_ug_m3?: number[];
  /** how the levels were chosen, e.g. "1, 10, 50, 100 % of NO2 annual mean (EU 2008/50/EC), 40 ug/m3" */
  levelsBasis?: string;
  /** height of the ground-level field [m]; default GROUND_LEVEL_HEIGHT_m */
  groundLevelHeight_m?: number;
}

/**
 * Build summary.json's content from a scenario and its run.
 *
 * @param scenario the parsed scenario (names and positions of receptors)
 * @param result what the run handed back
 * @param options the footprint's levels and the ground-level height
 * @returns a JSON-ready object; keys in the order the spec lists them
 * @throws Error when the run's receptor columns do not match the scenario's receptors, or an
 *   extraSummary key would overwrite one of the keys above
 */
export function buildSummary(
  scenario: Scenario,
  result: ScenarioRunResult,
  options: SummaryOptions = {},
): ResultSummary {
  checkReceptorColumns(scenario, result);
  const { grid } = result;
  const summary: ResultSummary = {
    format: RESULT_FORMAT,
    name: scenario.name,
    mode: result.mode,
    weatherKind: result.weatherKind,
    pollutant: scenario.pollutant.name,
    grid: {
      nx: grid.nx,
      ny: grid.ny,
      nz: grid.nz,
      spacing_m: grid.spacing_m,
      projection: grid.projection.definition,
      xWest_m: roundDecimals(grid.xWest_m, 1),
      ySouth_m: roundDecimals(grid.ySouth_m, 1),
      height_m: roundDecimals(grid.zFaces_m[grid.nz], 1),
    },
    run: { steps: result.steps, wallSeconds: roundDecimals(result.wallSeconds, 3) },
    massBudget_g: result.massBudget_g === null ? null : roundBudget(result.massBudget_g),
    sources: result.sources.map((source) => {
      const entry: SummarySource = { id: source.id, x_m: roundDecimals(source.x_m, 1), y_m: roundDecimals(source.y_m, 1) };
      if (result.weatherKind === 'steady') entry.effectiveHeight_m = roundDecimals(source.effectiveHeight_m, 1);
      return entry;
    }),
    peak: findPeak(result),
    receptors: scenario.receptors.map((receptor, index) => {
      const [x_m, y_m] = grid.projection.toLocal(receptor.lon, receptor.lat);
      const entry: SummaryReceptor = {
        id: receptor.id,
        name: receptor.name,
        lat: receptor.lat,
        lon: receptor.lon,
        x_m: roundDecimals(x_m, 1),
        y_m: roundDecimals(y_m, 1),
        height_m: receptor.height_m,
      };
      for (const column of result.receptorColumns) entry[column.key] = roundFigure(column.key, column.values[index]);
      return entry;
    }),
    footprint: {
      file: 'footprint.geojson',
      statistic: result.footprintStatistic,
      height_m: options.groundLevelHeight_m ?? GROUND_LEVEL_HEIGHT_m,
      levels_ug_m3: [...(options.levels_ug_m3 ?? [])],
      ...(options.levelsBasis !== undefined ? { levelsBasis: options.levelsBasis } : {}),
      areas: footprintLevelAreas(scenario, result, options.levels_ug_m3 ?? []),
    },
    caution: SCREENING_CAUTION,
    notes: [...result.notes],
  };
  // Whether the lowest band shown reaches the domain's edge (and is cut there), and where.
  const lowest = summary.footprint.levels_ug_m3[0];
  if (lowest !== undefined) {
    const cuts = footprintEdgeCuts(grid, result.footprint_ug_m3, lowest);
    summary.footprint.edge =
      cuts.length === 0
        ? `inside the domain down to the lowest level, ${lowest} ug/m3`
        : cuts.map((cut) => ({ side: cut.side, length_m: roundDecimals(cut.length_m, 1), from_m: roundDecimals(cut.from_m, 1), to_m: roundDecimals(cut.to_m, 1), largest_ug_m3: roundFigure('edge_ug_m3', cut.largest) }));
    summary.notes.push(...edgeCutNotes(cuts, lowest));
  }
  if (result.verdicts !== undefined) summary.verdicts = roundVerdicts(result.verdicts);
  if (result.downwash !== undefined) summary.downwash = result.downwash;
  for (const [key, value] of Object.entries(result.extraSummary)) {
    if (key in summary) {
      throw new Error(`extraSummary.${key}: would overwrite summary.json's own "${key}"; give it another name`);
    }
    summary[key] = value;
  }
  return summary;
}

/**
 * Round one receptor figure for the result files: concentrations (keys ending in `_ug_m3`) to
 * 3 significant figures; anything else (counts, fractions) unchanged.
 *
 * @throws Error for a non-finite figure, which no run should produce
 */
export function roundFigure(key: string, value: number): number {
  if (!Number.isFinite(value)) throw new Error(`receptor figure ${key}: ${value} is not a finite number`);
  return key.endsWith('_ug_m3') ? roundSignificant(value, CONCENTRATION_SIGNIFICANT_FIGURES) : value;
}

/**
 * Ground-level maximum of the footprint field, at the centre of its cell: off the site when the run
 * carries the site boundary's columns (the on-site maximum kept as `onSite`, labelled), else anywhere,
 * with `where` saying which.
 */
export function findPeak(
  result: Pick<ScenarioRunResult, 'grid' | 'footprint_ug_m3' | 'footprintStatistic' | 'site'>,
): SummaryPeak {
  const { grid } = result;
  const found = sitePeak(grid, result.footprint_ug_m3, result.site ?? null);
  const place = (peak: GroundPeak) => {
    const [lon, lat] = grid.projection.toLonLat(peak.x_m, peak.y_m);
    return {
      concentration_ug_m3: roundSignificant(peak.value_ug_m3, CONCENTRATION_SIGNIFICANT_FIGURES),
      lat: roundDecimals(lat, LON_LAT_DECIMALS),
      lon: roundDecimals(lon, LON_LAT_DECIMALS),
      x_m: roundDecimals(peak.x_m, 1),
      y_m: roundDecimals(peak.y_m, 1),
    };
  };
  const summaryPeak: SummaryPeak = { ...place(found), statistic: result.footprintStatistic, where: found.where };
  if (found.onSite !== undefined) summaryPeak.onSite = { ...place(found.onSite), label: found.onSite.label };
  return summaryPeak;
}

function roundBudget(budget: MassBudget): MassBudget {
  const mass = (value: number): number => roundSignificant(value, MASS_SIGNIFICANT_FIGURES);
  return {
    basis: budget.basis,
    emitted: mass(budget.emitted),
    inDomain: mass(budget.inDomain),
    decayed: mass(budget.decayed),
    washedOut: mass(budget.washedOut),
    dryDeposited: mass(budget.dryDeposited),
    outflow: mass(budget.outflow),
    relativeImbalance: roundSignificant(budget.relativeImbalance, 3),
  };
}

/** Every receptor column has one value per scenario receptor, in the scenario's order. */
export function checkReceptorColumns(scenario: Scenario, result: ScenarioRunResult): void {
  for (const column of result.receptorColumns) {
    if (column.values.length !== scenario.receptors.length) {
      throw new Error(
        `receptor column ${column.key}: ${column.values.length} values for ${scenario.receptors.length} receptors`,
      );
    }
  }
}
