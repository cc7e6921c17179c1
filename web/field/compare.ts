/**
 * Comparing two runs: the difference of their ground fields (A minus B, column by column) and the
 * change at each receptor. Two fields can be compared only on the same grid: the same site, cell size,
 * corner and size; otherwise the comparison says which of these differ.
 *
 * Pure: no DOM.
 */
import type { FieldGrid, GroundField } from './groundField.ts';

/** The receptor figures of one run: id, name and figures by column name [ug/m3]. */
export interface ReceptorFigures {
  id: string;
  name: string;
  [column: string]: unknown;
}

export interface ReceptorDelta {
  id: string;
  name: string;
  /** figure in A and B [ug/m3]; null where the receptor is missing from one run */
  a_ug_m3: number | null;
  b_ug_m3: number | null;
  /** A minus B [ug/m3]; null when either is missing */
  delta_ug_m3: number | null;
}

/** Why two grids cannot be compared, or null when they can. */
export function gridMismatch(a: FieldGrid, b: FieldGrid): string | null {
  const differences: string[] = [];
  for (const key of ['nx', 'ny', 'spacing_m', 'xWest_m', 'ySouth_m'] as const) {
    if (Math.abs(a[key] - b[key]) > 1e-6 * Math.max(1, Math.abs(a[key]))) differences.push(`${key} ${a[key]} vs ${b[key]}`);
  }
  return differences.length === 0 ? null : `the two runs use different grids (${differences.join(', ')}); give both scenarios the same site and domain to compare their fields`;
}

/**
 * The difference field A - B.
 *
 * @throws RangeError naming what differs when the grids do not match
 * @example differenceField(withTallerStack, base).values // negative where the taller stack lowers the ground level
 */
export function differenceField(a: GroundField, b: GroundField, label: string): GroundField {
  const mismatch = gridMismatch(a.grid, b.grid);
  if (mismatch !== null) throw new RangeError(mismatch);
  const values = new Float32Array(a.values.length);
  for (let n = 0; n < values.length; n++) values[n] = a.values[n] - b.values[n];
  return { grid: { ...a.grid }, values, statistic: `difference of ${a.statistic === b.statistic ? a.statistic : `${a.statistic} and ${b.statistic}`}`, origin: label, height_m: a.height_m };
}

/** Largest size of a difference [ug/m3]. */
export function largestDifference(field: GroundField): number {
  let largest = 0;
  for (let n = 0; n < field.values.length; n++) largest = Math.max(largest, Math.abs(field.values[n]));
  return largest;
}

/**
 * Receptor changes between two runs, matched by receptor id, in A's order then those only in B.
 *
 * @param column the figure to compare, e.g. "concentration_ug_m3" or "mean_ug_m3"
 */
export function receptorDeltas(a: readonly ReceptorFigures[], b: readonly ReceptorFigures[], column: string): ReceptorDelta[] {
  const figure = (row: ReceptorFigures | undefined) => (row !== undefined && typeof row[column] === 'number' ? (row[column] as number) : null);
  const byIdB = new Map(b.map((row) => [row.id, row]));
  const rows: ReceptorDelta[] = a.map((rowA) => {
    const rowB = byIdB.get(rowA.id);
    const valueA = figure(rowA);
    const valueB = figure(rowB);
    return { id: rowA.id, name: rowA.name, a_ug_m3: valueA, b_ug_m3: valueB, delta_ug_m3: valueA !== null && valueB !== null ? valueA - valueB : null };
  });
  const idsA = new Set(a.map((row) => row.id));
  for (const rowB of b) {
    if (!idsA.has(rowB.id)) rows.push({ id: rowB.id, name: rowB.name, a_ug_m3: null, b_ug_m3: figure(rowB), delta_ug_m3: null });
  }
  return rows;
}
