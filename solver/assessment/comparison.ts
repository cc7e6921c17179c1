/**
 * Comparison of two runs (two scenarios, or one scenario under two assumptions): the difference and the
 * ratio of their ground-level fields on one grid, the change at every receptor they share, the change of
 * each footprint level's area, and every screening verdict that changes.
 *
 * One grid: the first run's (A). When B's grid differs (size, spacing, corner or projection), B's field
 * is resampled onto A's cell centres: each centre goes to WGS 84 through A's projection, into B's local
 * metres through B's projection, and B's field is interpolated bilinearly between B's cell centres
 * (held flat over the half cell at B's edge). Centres outside B's grid get no value; the comparison says
 * how many and leaves them out. Identical grids are compared value by value, so a run compared with
 * itself differs by exactly zero.
 */
import type { PlacedReceptor, ScenarioRunResult } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import { levelAreas, type LevelArea } from './footprintAreas.ts';
import type { ScreenOutcome, ScreeningVerdicts } from './verdicts.ts';

/** One side of a comparison. */
export interface ComparedRun {
  /** shown in the comparison, e.g. the scenario's name or file */
  label: string;
  result: ScenarioRunResult;
  /** the run's receptors in its own local metres (ids match across runs) */
  receptors: readonly Pick<PlacedReceptor, 'id' | 'x_m' | 'y_m'>[];
}

export interface ReceptorChange {
  id: string;
  a_ug_m3: number;
  b_ug_m3: number;
  /** b - a [ug/m3] */
  delta_ug_m3: number;
  /** 100 (b - a) / a [%]; null when a is zero */
  change_pct: number | null;
}

export interface LevelAreaChange {
  level_ug_m3: number;
  a_m2: number;
  b_m2: number;
  /** b - a [m2] */
  change_m2: number;
  /** 100 (b - a) / a [%]; null when a is zero */
  change_pct: number | null;
}

export interface VerdictChange {
  standard: string;
  /** "maximum" or a receptor id */
  where: string;
  a: ScreenOutcome;
  b: ScreenOutcome;
  a_pc_ug_m3: number;
  b_pc_ug_m3: number;
}

export interface Comparison {
  a: { label: string; peak_ug_m3: number; statistic: ScenarioRunResult['footprintStatistic']; receptorColumn: string | null };
  b: { label: string; peak_ug_m3: number; statistic: ScenarioRunResult['footprintStatistic']; receptorColumn: string | null };
  /** true when B's field was interpolated onto A's grid */
  resampled: boolean;
  /** A's cells with no value of B (outside B's grid) */
  cellsOutsideB: number;
  /** the grid the fields below live on (A's) */
  grid: LocalGrid;
  /** B - A on A's grid [ug/m3]; NaN where B has no value */
  difference_ug_m3: Float64Array;
  /** B / A on A's grid [-]; NaN where A is zero or B has no value */
  ratio: Float64Array;
  /** largest |B - A| over the grid [ug/m3] and where */
  largestIncrease: { delta_ug_m3: number; x_m: number; y_m: number };
  largestDecrease: { delta_ug_m3: number; x_m: number; y_m: number };
  /** every difference exactly zero and every receptor the same */
  identical: boolean;
  receptors: ReceptorChange[];
  /** receptors in only one of the runs */
  unmatchedReceptors: { a: string[]; b: string[] };
  levels: LevelAreaChange[];
  verdictChanges: VerdictChange[];
  notes: string[];
}

export interface CompareOptions {
  /** footprint levels whose areas are compared [ug/m3]; default none */
  levels_ug_m3?: readonly number[];
}

/**
 * Compare two runs.
 *
 * @param a the reference run (its grid is the comparison's grid)
 * @param b the other run
 * @param options levels whose areas to compare
 * @returns differences, ratios, receptor changes, area changes and verdict changes
 * @example const comparison = compareRuns({ label: 'A', result: ra, receptors }, { label: 'B', result: rb, receptors }, { levels_ug_m3: [1, 10] });
 */
export function compareRuns(a: ComparedRun, b: ComparedRun, options: CompareOptions = {}): Comparison {
  const grid = a.result.grid;
  const notes: string[] = [];
  const same = sameGrid(grid, b.result.grid);
  const bOnA = same ? Float64Array.from(b.result.footprint_ug_m3) : resample(b.result.footprint_ug_m3, b.result.grid, grid);
  let cellsOutsideB = 0;
  const columns = grid.nx * grid.ny;
  const difference = new Float64Array(columns);
  const ratio = new Float64Array(columns);
  let increase = 0;
  let decrease = 0;
  let identical = true;
  for (let c = 0; c < columns; c++) {
    const valueA = a.result.footprint_ug_m3[c];
    const valueB = bOnA[c];
    if (Number.isNaN(valueB)) {
      cellsOutsideB++;
      difference[c] = Number.NaN;
      ratio[c] = Number.NaN;
      identical = false;
      continue;
    }
    difference[c] = valueB - valueA;
    ratio[c] = valueA > 0 ? valueB / valueA : Number.NaN;
    if (difference[c] !== 0) identical = false;
    if (difference[c] > difference[increase] || Number.isNaN(difference[increase])) increase = c;
    if (difference[c] < difference[decrease] || Number.isNaN(difference[decrease])) decrease = c;
  }
  if (!same) {
    notes.push(
      `the grids differ: B's field was resampled onto A's grid (${grid.nx} x ${grid.ny} at ${grid.spacing_m} m) by bilinear ` +
        'interpolation between cell centres, through WGS 84' + (cellsOutsideB > 0 ? `; ${cellsOutsideB} of A's cells lie outside B's grid and are left out` : ''),
    );
  }
  if (a.result.footprintStatistic !== b.result.footprintStatistic) {
    notes.push(`the fields are different statistics: A ${a.result.footprintStatistic}, B ${b.result.footprintStatistic}`);
  }

  const columnA = a.result.receptorColumns[0];
  const columnB = b.result.receptorColumns[0];
  if (columnA !== undefined && columnB !== undefined && columnA.key !== columnB.key) {
    notes.push(`receptor figures compared: A ${columnA.key} with B ${columnB.key}`);
  }
  const indexB = new Map(b.receptors.map((receptor, r) => [receptor.id, r]));
  const idsA = new Set(a.receptors.map((receptor) => receptor.id));
  const receptors: ReceptorChange[] = [];
  if (columnA !== undefined && columnB !== undefined) {
    a.receptors.forEach((receptor, r) => {
      const rb = indexB.get(receptor.id);
      if (rb === undefined) return;
      const valueA = columnA.values[r];
      const valueB = columnB.values[rb];
      const delta = valueB - valueA;
      if (delta !== 0) identical = false;
      receptors.push({ id: receptor.id, a_ug_m3: valueA, b_ug_m3: valueB, delta_ug_m3: delta, change_pct: valueA > 0 ? (100 * delta) / valueA : null });
    });
  }
  const unmatchedReceptors = {
    a: a.receptors.filter((receptor) => !indexB.has(receptor.id)).map((receptor) => receptor.id),
    b: b.receptors.filter((receptor) => !idsA.has(receptor.id)).map((receptor) => receptor.id),
  };

  const levels = options.levels_ug_m3 ?? [];
  const areasA = levelAreas(a.result.footprint_ug_m3, grid, levels);
  const areasB = levelAreas(b.result.footprint_ug_m3, b.result.grid, levels);
  const levelChanges: LevelAreaChange[] = areasA.map((entry: LevelArea, k) => {
    const change = areasB[k].area_m2 - entry.area_m2;
    return {
      level_ug_m3: entry.level_ug_m3,
      a_m2: entry.area_m2,
      b_m2: areasB[k].area_m2,
      change_m2: change,
      change_pct: entry.area_m2 > 0 ? (100 * change) / entry.area_m2 : null,
    };
  });

  const centre = (c: number) => {
    const i = c % grid.nx;
    const j = (c - i) / grid.nx;
    return { x_m: grid.xWest_m + (i + 0.5) * grid.spacing_m, y_m: grid.ySouth_m + (j + 0.5) * grid.spacing_m };
  };
  return {
    a: { label: a.label, peak_ug_m3: peak(a.result.footprint_ug_m3), statistic: a.result.footprintStatistic, receptorColumn: columnA?.key ?? null },
    b: { label: b.label, peak_ug_m3: peak(b.result.footprint_ug_m3), statistic: b.result.footprintStatistic, receptorColumn: columnB?.key ?? null },
    resampled: !same,
    cellsOutsideB,
    grid,
    difference_ug_m3: difference,
    ratio,
    largestIncrease: { delta_ug_m3: Math.max(0, difference[increase] || 0), ...centre(increase) },
    largestDecrease: { delta_ug_m3: Math.min(0, difference[decrease] || 0), ...centre(decrease) },
    identical,
    receptors,
    unmatchedReceptors,
    levels: levelChanges,
    verdictChanges: verdictChanges(a.result.verdicts, b.result.verdicts),
    notes,
  };
}

/** Every verdict outcome that differs between the runs, at the maximum and at each shared receptor. */
export function verdictChanges(a: ScreeningVerdicts | undefined, b: ScreeningVerdicts | undefined): VerdictChange[] {
  if (a === undefined || b === undefined) return [];
  const changes: VerdictChange[] = [];
  const byName = new Map(b.standards.map((standard) => [standard.name, standard]));
  for (const standardA of a.standards) {
    const standardB = byName.get(standardA.name);
    if (standardB === undefined) continue;
    if (standardA.maximum && standardB.maximum && standardA.maximum.outcome !== standardB.maximum.outcome) {
      changes.push({
        standard: standardA.name,
        where: 'maximum',
        a: standardA.maximum.outcome,
        b: standardB.maximum.outcome,
        a_pc_ug_m3: standardA.maximum.pc_ug_m3,
        b_pc_ug_m3: standardB.maximum.pc_ug_m3,
      });
    }
    const receptorsB = new Map((standardB.receptors ?? []).map((receptor) => [receptor.id, receptor]));
    for (const receptorA of standardA.receptors ?? []) {
      const receptorB = receptorsB.get(receptorA.id);
      if (receptorB === undefined || receptorB.outcome === receptorA.outcome) continue;
      changes.push({
        standard: standardA.name,
        where: receptorA.id,
        a: receptorA.outcome,
        b: receptorB.outcome,
        a_pc_ug_m3: receptorA.pc_ug_m3,
        b_pc_ug_m3: receptorB.pc_ug_m3,
      });
    }
  }
  return changes;
}

function peak(field: ArrayLike<number>): number {
  let largest = 0;
  for (let c = 0; c < field.length; c++) if (field[c] > largest) largest = field[c];
  return largest;
}

/** Whether two grids place every ground cell at the same place. */
function sameGrid(a: LocalGrid, b: LocalGrid): boolean {
  return (
    a.nx === b.nx &&
    a.ny === b.ny &&
    a.spacing_m === b.spacing_m &&
    a.xWest_m === b.xWest_m &&
    a.ySouth_m === b.ySouth_m &&
    a.projection.definition === b.projection.definition
  );
}

/**
 * A field on grid `from` sampled at the cell centres of grid `to`: bilinear between `from`'s cell
 * centres, flat over the half cell at its edge, NaN outside it.
 */
export function resample(field: ArrayLike<number>, from: LocalGrid, to: LocalGrid): Float64Array {
  const out = new Float64Array(to.nx * to.ny);
  const sameProjection = from.projection.definition === to.projection.definition;
  for (let j = 0; j < to.ny; j++) {
    for (let i = 0; i < to.nx; i++) {
      let x = to.xWest_m + (i + 0.5) * to.spacing_m;
      let y = to.ySouth_m + (j + 0.5) * to.spacing_m;
      if (!sameProjection) {
        const [lon, lat] = to.projection.toLonLat(x, y);
        [x, y] = from.projection.toLocal(lon, lat);
      }
      out[i + to.nx * j] = sampleBilinear(field, from, x, y);
    }
  }
  return out;
}

function sampleBilinear(field: ArrayLike<number>, grid: LocalGrid, x_m: number, y_m: number): number {
  const u = (x_m - grid.xWest_m) / grid.spacing_m;
  const v = (y_m - grid.ySouth_m) / grid.spacing_m;
  if (!(u >= 0 && v >= 0 && u <= grid.nx && v <= grid.ny)) return Number.NaN;
  // position among the cell centres, clamped to the outermost ones (flat over the edge half cell)
  const fu = Math.min(Math.max(u - 0.5, 0), grid.nx - 1);
  const fv = Math.min(Math.max(v - 0.5, 0), grid.ny - 1);
  const i0 = Math.min(Math.floor(fu), grid.nx - 2 < 0 ? 0 : grid.nx - 2);
  const j0 = Math.min(Math.floor(fv), grid.ny - 2 < 0 ? 0 : grid.ny - 2);
  const i1 = Math.min(i0 + 1, grid.nx - 1);
  const j1 = Math.min(j0 + 1, grid.ny - 1);
  const tu = fu - i0;
  const tv = fv - j0;
  const at = (i: number, j: number): number => field[i + grid.nx * j];
  return (1 - tu) * (1 - tv) * at(i0, j0) + tu * (1 - tv) * at(i1, j0) + (1 - tu) * tv * at(i0, j1) + tu * tv * at(i1, j1);
}
