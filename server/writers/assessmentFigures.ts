/**
 * The assessment's figures as a person reads them: screening verdicts and footprint level areas, rounded
 * without false precision. Concentrations keep 3 significant figures (the house rule,
 * ./rounding.ts); percentages, areas and distances are read as decision figures and keep 2.
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import { levelAreas, type LevelArea } from '../../solver/assessment/footprintAreas.ts';
import type { PointVerdict, ScreeningVerdicts } from '../../solver/assessment/verdicts.ts';
import type { ScenarioRunResult } from '../../solver/drivers/types.ts';
import { CONCENTRATION_SIGNIFICANT_FIGURES, roundDecimals, roundSignificant } from './rounding.ts';

/** Significant figures of decision figures a person reads: percentages, areas, distances. */
export const DECISION_SIGNIFICANT_FIGURES = 2;

const concentration = (value: number): number => roundSignificant(value, CONCENTRATION_SIGNIFICANT_FIGURES);
const decision = (value: number): number => roundSignificant(value, DECISION_SIGNIFICANT_FIGURES);

/** One place's verdict, rounded. */
function roundPoint<T extends PointVerdict>(verdict: T): T {
  return {
    ...verdict,
    pc_ug_m3: concentration(verdict.pc_ug_m3),
    pcPercentOfStandard: decision(verdict.pcPercentOfStandard),
    background_ug_m3: concentration(verdict.background_ug_m3),
    pec_ug_m3: concentration(verdict.pec_ug_m3),
    pecPercentOfStandard: decision(verdict.pecPercentOfStandard),
  };
}

/**
 * Verdicts rounded for summary.json and the screen.
 *
 * @param verdicts the solver's verdicts (unrounded)
 * @returns the same shape; PC and PEC to 3 significant figures, percentages to 2, positions to 0.1 m
 */
export function roundVerdicts(verdicts: ScreeningVerdicts): ScreeningVerdicts {
  return {
    ...verdicts,
    standards: verdicts.standards.map((standard) => ({
      ...standard,
      ...(standard.maximum
        ? { maximum: { ...roundPoint(standard.maximum), x_m: roundDecimals(standard.maximum.x_m, 1), y_m: roundDecimals(standard.maximum.y_m, 1) } }
        : {}),
      ...(standard.receptors ? { receptors: standard.receptors.map(roundPoint) } : {}),
    })),
  };
}

/**
 * Footprint level areas of a run, measured with the solver's level arithmetic and rounded.
 *
 * @param scenario the scenario (receptor positions)
 * @param result the run (field, grid, sources)
 * @param levels_ug_m3 the footprint's levels [ug/m3]
 * @returns per level: area in m2 and ha, farthest distance from each source, receptors inside, whether it reaches the grid's edge
 */
export function footprintLevelAreas(scenario: Scenario, result: ScenarioRunResult, levels_ug_m3: readonly number[]): LevelArea[] {
  const { grid } = result;
  const receptors = scenario.receptors.map((receptor) => {
    const [x_m, y_m] = grid.projection.toLocal(receptor.lon, receptor.lat);
    return { id: receptor.id, x_m, y_m };
  });
  return roundLevelAreas(levelAreas(result.footprint_ug_m3, grid, levels_ug_m3, { sources: result.sources, receptors }));
}

/** Areas, hectares and distances to 2 significant figures. */
export function roundLevelAreas(areas: readonly LevelArea[]): LevelArea[] {
  return areas.map((entry) => ({
    ...entry,
    area_m2: decision(entry.area_m2),
    area_ha: decision(entry.area_ha),
    farthest: entry.farthest.map((f) => ({ sourceId: f.sourceId, distance_m: f.distance_m === null ? null : decision(f.distance_m) })),
  }));
}

/** Plain words for a screen outcome. */
export const OUTCOME_WORDS: Readonly<Record<PointVerdict['outcome'], string>> = {
  screenedOut: 'screened out',
  notScreenedOut: 'not screened out',
  undetermined: 'undetermined',
  indicative: 'indicative only',
};

/**
 * A short verdict table for the terminal: one row per standard, the point of maximum impact.
 *
 * @param verdicts rounded verdicts
 * @returns lines without a trailing newline
 */
export function verdictTable(verdicts: ScreeningVerdicts): string[] {
  const header = ['standard', 'PC max ug/m3', 'PC % of std', 'PEC % of std', 'screen at the maximum'];
  const rows = verdicts.standards.map((standard) => {
    const max = standard.maximum;
    if (max === undefined) return [standard.name, '-', '-', '-', 'no figure: see summary.json'];
    const stage =
      max.outcome === 'indicative'
        ? `: ${max.stage1.passed ? 'below' : 'not below'} ${max.stage1.threshold_pct} % for this weather`
        : max.stage1.passed
          ? ' (stage 1)'
          : max.stage2?.passed
            ? ' (stage 2)'
            : '';
    return [standard.name, String(max.pc_ug_m3), String(max.pcPercentOfStandard), String(max.pecPercentOfStandard), OUTCOME_WORDS[max.outcome] + stage];
  });
  const widths = header.map((title, column) => Math.max(title.length, ...rows.map((row) => row[column].length)));
  const format = (row: string[]): string => `  ${row.map((cell, column) => (column === row.length - 1 ? cell : cell.padEnd(widths[column]))).join('  ')}`;
  const t = verdicts.thresholds;
  return [
    `Screening (common practice in permit guidance, not a legal decision): PC < ${t.pcLongTerm_pct} % of a long-term or ` +
      `< ${t.pcShortTerm_pct} % of a short-term standard, then PEC < ${t.pecLongTerm_pct} % of a long-term one; background ${verdicts.background_ug_m3} ug/m3` +
      (verdicts.noxToNo2 ? `; NO2 = ${verdicts.noxToNo2.longTerm} (long-term) / ${verdicts.noxToNo2.shortTerm} (short-term) x NOx` : ''),
    format(header),
    ...rows.map(format),
  ];
}
