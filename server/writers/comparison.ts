/**
 * The comparison folder's files: comparison.json (the figures of ../../solver/assessment/comparison.ts,
 * rounded, with the caution) and difference.geojson (bands of B - A on A's grid: increases and decreases
 * as separate bands, each drawn with the footprint's own contouring).
 */
import type { Feature, MultiPolygon, Polygon } from 'geojson';
import type { Comparison } from '../../solver/assessment/comparison.ts';
import { SCREENING_CAUTION } from './caution.ts';
import { defaultFootprintLevels, footprintBands, type FootprintBandProperties } from './footprint.ts';
import { CONCENTRATION_SIGNIFICANT_FIGURES, roundDecimals, roundSignificant } from './rounding.ts';
import { DECISION_SIGNIFICANT_FIGURES } from './assessmentFigures.ts';

export const COMPARISON_FORMAT = 'plumeplan.comparison/1';

const concentration = (value: number): number => roundSignificant(value, CONCENTRATION_SIGNIFICANT_FIGURES);
const decision = (value: number | null): number | null => (value === null ? null : roundSignificant(value, DECISION_SIGNIFICANT_FIGURES));

/**
 * comparison.json's content.
 *
 * @param comparison the solver's comparison
 * @param levelsBasis how the compared levels were chosen
 * @returns a JSON-ready object with `receptors: [{ id, a_ug_m3, b_ug_m3, delta_ug_m3, change_pct }]`, the
 *   level areas' changes, the verdicts that change, the notes and the caution
 */
export function comparisonJson(comparison: Comparison, levelsBasis: string): Record<string, unknown> {
  return {
    format: COMPARISON_FORMAT,
    a: { ...comparison.a, peak_ug_m3: concentration(comparison.a.peak_ug_m3) },
    b: { ...comparison.b, peak_ug_m3: concentration(comparison.b.peak_ug_m3) },
    identical: comparison.identical,
    grid: {
      nx: comparison.grid.nx,
      ny: comparison.grid.ny,
      spacing_m: comparison.grid.spacing_m,
      projection: comparison.grid.projection.definition,
      resampled: comparison.resampled,
      cellsOutsideB: comparison.cellsOutsideB,
    },
    largestIncrease: { delta_ug_m3: concentration(comparison.largestIncrease.delta_ug_m3), ...roundPosition(comparison.largestIncrease) },
    largestDecrease: { delta_ug_m3: concentration(comparison.largestDecrease.delta_ug_m3), ...roundPosition(comparison.largestDecrease) },
    receptors: comparison.receptors.map((r) => ({
      id: r.id,
      a_ug_m3: concentration(r.a_ug_m3),
      b_ug_m3: concentration(r.b_ug_m3),
      delta_ug_m3: concentration(r.delta_ug_m3),
      change_pct: decision(r.change_pct),
    })),
    unmatchedReceptors: comparison.unmatchedReceptors,
    levels: {
      basis: levelsBasis,
      areas: comparison.levels.map((level) => ({
        level_ug_m3: level.level_ug_m3,
        a_m2: decision(level.a_m2),
        b_m2: decision(level.b_m2),
        change_m2: decision(level.change_m2),
        change_pct: decision(level.change_pct),
      })),
    },
    verdictChanges: comparison.verdictChanges.map((change) => ({
      ...change,
      a_pc_ug_m3: concentration(change.a_pc_ug_m3),
      b_pc_ug_m3: concentration(change.b_pc_ug_m3),
    })),
    notes: comparison.notes,
    differenceFile: 'difference.geojson',
    caution: SCREENING_CAUTION,
  };
}

export interface DifferenceBandProperties extends FootprintBandProperties {
  /** "increase" (B above A) or "decrease" (B below A) */
  change: 'increase' | 'decrease';
}

export interface DifferenceCollection {
  type: 'FeatureCollection';
  properties: {
    caution: string;
    a: string;
    b: string;
    statistic: 'difference';
    units: 'ug/m3';
    /** the levels of |B - A| the bands were drawn at [ug/m3] */
    levels_ug_m3: number[];
    description: string;
  };
  features: Feature<Polygon | MultiPolygon, DifferenceBandProperties>[];
}

/**
 * difference.geojson: bands of |B - A| at the given (or default round) levels, increases and decreases
 * apart, as an RFC 7946 FeatureCollection in WGS 84 lon/lat.
 *
 * @param comparison the solver's comparison (difference on A's grid)
 * @param levels_ug_m3 levels of |B - A|; default round numbers across its range
 */
export function differenceFootprint(comparison: Comparison, levels_ug_m3?: number[]): DifferenceCollection {
  const columns = comparison.difference_ug_m3.length;
  const increase = new Float64Array(columns);
  const decrease = new Float64Array(columns);
  const magnitude = new Float64Array(columns);
  for (let c = 0; c < columns; c++) {
    const delta = comparison.difference_ug_m3[c];
    if (Number.isNaN(delta)) continue;
    if (delta > 0) increase[c] = delta;
    else decrease[c] = -delta;
    magnitude[c] = Math.abs(delta);
  }
  const levels = levels_ug_m3 ?? defaultFootprintLevels(magnitude);
  const features: Feature<Polygon | MultiPolygon, DifferenceBandProperties>[] = [];
  if (levels.length > 0) {
    for (const [change, field] of [
      ['increase', increase],
      ['decrease', decrease],
    ] as const) {
      const bands = footprintBands(field, comparison.grid, { levels_ug_m3: levels });
      for (const feature of bands.features) {
        features.push({
          ...feature,
          properties: { ...feature.properties, change, label: `${change} ${feature.properties.label}` },
        });
      }
    }
  }
  return {
    type: 'FeatureCollection',
    properties: {
      caution: SCREENING_CAUTION,
      a: comparison.a.label,
      b: comparison.b.label,
      statistic: 'difference',
      units: 'ug/m3',
      levels_ug_m3: [...levels],
      description: 'bands of B - A on A\'s grid: "increase" where B is above A, "decrease" where below, by how much',
    },
    features,
  };
}

/** Position rounding for the largest changes (local metres to 0.1 m). */
export function roundPosition(position: { x_m: number; y_m: number }): { x_m: number; y_m: number } {
  return { x_m: roundDecimals(position.x_m, 1), y_m: roundDecimals(position.y_m, 1) };
}
