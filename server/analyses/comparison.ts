/**
 * A comparison as the CLI (`plumeplan compare`) and the server's compare jobs both make it: how run B
 * differs from run A, built in memory as comparison.json and difference.geojson, with the footprint
 * levels each side's own result files use (the CLI writes them as folders a/ and b/, the server stores
 * their core files as a.NAME and b.NAME).
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import { compareRuns, type ComparedRun, type Comparison } from '../../solver/assessment/comparison.ts';
import type { ScenarioRunResult } from '../../solver/drivers/types.ts';
import { comparisonJson, differenceFootprint, type DifferenceCollection } from '../writers/comparison.ts';
import { defaultFootprintLevels } from '../writers/footprint.ts';
import { formatFootprint, type ResultFolderOptions } from '../writers/writeResultFolder.ts';

export const COMPARISON_JSON_FILE = 'comparison.json';
export const DIFFERENCE_GEOJSON_FILE = 'difference.geojson';

/** One side as run. */
export interface ComparisonSide {
  /** shown in the comparison beside the scenario's name: the scenario file, or the stored scenario or run */
  source: string;
  scenario: Scenario;
  result: ScenarioRunResult;
  /** set when the side was read back from a run folder (not solved): what that means for its figures */
  readBack?: string[];
}

export interface BuiltComparison {
  comparison: Comparison;
  difference: DifferenceCollection;
  /** comparison.json and difference.geojson, in the order written */
  files: [string, string][];
  /** the options each side's own result files are built with (the levels compared) */
  sideOptions: ResultFolderOptions;
  /** how the compared footprint levels were chosen (as comparison.json says) */
  levelsBasis: string;
}

/**
 * Compare two runs and build the comparison's files.
 * @param levels_ug_m3 levels whose areas are compared; default round numbers across the larger peak
 * @param levelsOrigin how given levels were given, for comparison.json (the CLI: "--levels")
 */
export function buildComparisonFiles(a: ComparisonSide, b: ComparisonSide, levels_ug_m3?: number[], levelsOrigin = '--levels'): BuiltComparison {
  const levels =
    levels_ug_m3 ?? defaultFootprintLevels(peakOf(a.result) >= peakOf(b.result) ? a.result.footprint_ug_m3 : b.result.footprint_ug_m3);
  const comparison = compareRuns(side(a), side(b), { levels_ug_m3: levels });
  for (const [name, compared] of [['A', a], ['B', b]] as const) for (const note of compared.readBack ?? []) comparison.notes.push(`${name} ${note}`);
  const difference = differenceFootprint(comparison);
  const levelsBasis =
    levels_ug_m3 !== undefined ? `given (${levelsOrigin})` : 'round numbers (1-2-5 series) across the range of the run with the larger peak';
  const json = comparisonJson(comparison, levelsBasis);
  return {
    comparison,
    difference,
    files: [
      [COMPARISON_JSON_FILE, `${JSON.stringify(json, null, 2)}\n`],
      [DIFFERENCE_GEOJSON_FILE, formatFootprint(difference)],
    ],
    sideOptions: { levels_ug_m3: levels.length > 0 ? levels : undefined },
    levelsBasis,
  };
}

function side(s: ComparisonSide): ComparedRun {
  const { grid } = s.result;
  return {
    label: `${s.scenario.name} (${s.source})`,
    result: s.result,
    receptors: s.scenario.receptors.map((receptor) => {
      const [x_m, y_m] = grid.projection.toLocal(receptor.lon, receptor.lat);
      return { id: receptor.id, x_m, y_m };
    }),
  };
}

function peakOf(result: ScenarioRunResult): number {
  let peak = 0;
  for (const value of result.footprint_ug_m3) if (value > peak) peak = value;
  return peak;
}
