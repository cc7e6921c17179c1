/**
 * Footprints that answer questions: for each isopleth level, the area of ground at or above it, the
 * farthest distance from each source to that ground, and the receptors inside it. Pure arithmetic on
 * a ground-level field in grid units, converted to metres at the end.
 *
 * The region and its area, stated once. The field's values sit at cell centres, (i + 0.5, j + 0.5) in
 * grid units (the convention of ../../server/writers/footprint.ts). Between the centres the field is
 * taken as linear along each cell edge, and each square between four centres is cut by the level with
 * straight segments through the edge crossings (marching squares with linear interpolation, the same
 * smoothing as the footprint's contours). A square whose corners alternate across the level (a saddle)
 * is taken as connected along the diagonal of the higher corners. The half cell between the outermost
 * centres and the grid's edge takes the edge cells' values (the field extended flat to the edge), so a
 * field above the level everywhere covers exactly the grid's area. Each square's piece is convex, so
 * the farthest point of the region from a source is one of the pieces' corners: the distances are
 * exact for this region.
 *
 * Convergence: for a smooth field the area error of the piecewise-linear cut falls as the square of the
 * spacing (checked against the ellipses of a Gaussian hill, area pi a b, in the tests).
 */
import type { LocalGrid } from '../grid/types.ts';

/** The part of the grid the areas need. */
export type AreaGrid = Pick<LocalGrid, 'nx' | 'ny' | 'spacing_m' | 'xWest_m' | 'ySouth_m'>;

/** A place to measure from or test: a source or a receptor, in local metres. */
export interface NamedPoint {
  id: string;
  x_m: number;
  y_m: number;
}

/** One level's figures. */
export interface LevelArea {
  level_ug_m3: number;
  /** ground at or above the level [m2] */
  area_m2: number;
  /** the same in hectares [ha] */
  area_ha: number;
  /** farthest distance from each source to ground at or above the level [m]; null when no ground is */
  farthest: { sourceId: string; distance_m: number | null }[];
  /** receptors standing on ground at or above the level, in the order given */
  receptorsInside: string[];
  /** true when the region reaches the grid's edge: the area and distances are then lower bounds */
  reachesGridEdge: boolean;
}

export interface LevelAreaOptions {
  /** sources to measure the farthest distances from [m]; default none */
  sources?: readonly NamedPoint[];
  /** receptors to test [m]; default none */
  receptors?: readonly NamedPoint[];
}

/**
 * Areas, farthest distances and receptors inside, for each level.
 *
 * @param field_ug_m3 ground-level field, index i + nx * j, row j = 0 at the south edge [ug/m3]
 * @param grid size, spacing and south-west corner of the grid
 * @param levels_ug_m3 levels, each finite and > 0 [ug/m3]
 * @param options sources and receptors in local metres
 * @returns one entry per level, in the order given
 * @example levelAreas(field, grid, [1, 10], { sources: [{ id: 'stack', x_m: 0, y_m: 0 }] })[0].area_ha
 */
export function levelAreas(
  field_ug_m3: ArrayLike<number>,
  grid: AreaGrid,
  levels_ug_m3: readonly number[],
  options: LevelAreaOptions = {},
): LevelArea[] {
  const { nx, ny } = grid;
  if (field_ug_m3.length !== nx * ny) {
    throw new RangeError(`ground field: length ${field_ug_m3.length} does not match the grid's ${nx} x ${ny} = ${nx * ny} columns`);
  }
  levels_ug_m3.forEach((level, index) => {
    if (!(Number.isFinite(level) && level > 0)) throw new RangeError(`levels_ug_m3[${index}]: ${level} is not allowed (a finite level > 0 ug/m3)`);
  });
  const lattice = extendedLattice(field_ug_m3, nx, ny);
  const sources = options.sources ?? [];
  const receptors = options.receptors ?? [];
  // sources and receptors in grid units
  const toGridU = (x_m: number): number => (x_m - grid.xWest_m) / grid.spacing_m;
  const toGridV = (y_m: number): number => (y_m - grid.ySouth_m) / grid.spacing_m;
  const sourceU = sources.map((s) => toGridU(s.x_m));
  const sourceV = sources.map((s) => toGridV(s.y_m));
  const pieceU = new Float64Array(8);
  const pieceV = new Float64Array(8);
  return levels_ug_m3.map((level) => {
    let area = 0;
    const farthestSquared = new Float64Array(sources.length).fill(-1);
    for (let b = 0; b < lattice.rows - 1; b++) {
      for (let a = 0; a < lattice.columns - 1; a++) {
        const count = cutSquare(lattice, a, b, level, pieceU, pieceV);
        if (count === 0) continue;
        area += polygonArea(pieceU, pieceV, count);
        for (let s = 0; s < sources.length; s++) {
          for (let k = 0; k < count; k++) {
            const du = pieceU[k] - sourceU[s];
            const dv = pieceV[k] - sourceV[s];
            const d2 = du * du + dv * dv;
            if (d2 > farthestSquared[s]) farthestSquared[s] = d2;
          }
        }
      }
    }
    const receptorsInside = receptors
      .filter((receptor) => pointInRegion(lattice, toGridU(receptor.x_m), toGridV(receptor.y_m), level, pieceU, pieceV))
      .map((receptor) => receptor.id);
    const area_m2 = area * grid.spacing_m * grid.spacing_m;
    return {
      level_ug_m3: level,
      area_m2,
      area_ha: area_m2 / 10_000,
      farthest: sources.map((source, s) => ({
        sourceId: source.id,
        distance_m: farthestSquared[s] < 0 ? null : Math.sqrt(farthestSquared[s]) * grid.spacing_m,
      })),
      receptorsInside,
      reachesGridEdge: reachesEdge(field_ug_m3, nx, ny, level),
    };
  });
}

/**
 * Levels at given percentages of a standard's limit.
 *
 * @param percents e.g. [1, 10, 50, 100] [%]
 * @param limit_ug_m3 the standard's limit [ug/m3]
 * @returns ascending levels [ug/m3]
 * @example levelsFromPercentages([1, 10, 50, 100], 40) // [0.4, 4, 20, 40]
 */
export function levelsFromPercentages(percents: readonly number[], limit_ug_m3: number): number[] {
  if (!(Number.isFinite(limit_ug_m3) && limit_ug_m3 > 0)) throw new RangeError(`limit_ug_m3: ${limit_ug_m3} is not allowed (a finite limit > 0 ug/m3)`);
  percents.forEach((percent, index) => {
    if (!(Number.isFinite(percent) && percent > 0)) throw new RangeError(`percentages[${index}]: ${percent} is not allowed (a finite percentage > 0)`);
    if (index > 0 && percent <= percents[index - 1]) throw new RangeError(`percentages[${index}]: ${percent} does not exceed ${percents[index - 1]} before it`);
  });
  // (p / 100) x limit, rounded to 12 significant figures so that 1 % of 40 reads 0.4, not 0.4000000000000001
  return percents.map((percent) => Number(((percent * limit_ug_m3) / 100).toPrecision(12)));
}

/** The field on the lattice of cell centres, extended flat by half a cell to the grid's edge. */
interface Lattice {
  columns: number;
  rows: number;
  /** lattice node positions in grid units */
  u: Float64Array;
  v: Float64Array;
  values: Float64Array;
}

function extendedLattice(field: ArrayLike<number>, nx: number, ny: number): Lattice {
  const columns = nx + 2;
  const rows = ny + 2;
  const u = new Float64Array(columns);
  const v = new Float64Array(rows);
  for (let a = 0; a < columns; a++) u[a] = a === 0 ? 0 : a === columns - 1 ? nx : a - 0.5;
  for (let b = 0; b < rows; b++) v[b] = b === 0 ? 0 : b === rows - 1 ? ny : b - 0.5;
  const values = new Float64Array(columns * rows);
  for (let b = 0; b < rows; b++) {
    const j = Math.min(ny - 1, Math.max(0, b - 1));
    for (let a = 0; a < columns; a++) {
      const i = Math.min(nx - 1, Math.max(0, a - 1));
      values[a + columns * b] = field[i + nx * j];
    }
  }
  return { columns, rows, u, v, values };
}

/**
 * The piece of lattice square (a, b) at or above the level, as a convex polygon written into (pu, pv)
 * counter-clockwise; returns its vertex count (0 when the square is wholly below).
 */
function cutSquare(lattice: Lattice, a: number, b: number, level: number, pu: Float64Array, pv: Float64Array): number {
  const { columns, values, u, v } = lattice;
  const u0 = u[a];
  const u1 = u[a + 1];
  const v0 = v[b];
  const v1 = v[b + 1];
  // corners counter-clockwise from the south-west
  const c0 = values[a + columns * b];
  const c1 = values[a + 1 + columns * b];
  const c2 = values[a + 1 + columns * (b + 1)];
  const c3 = values[a + columns * (b + 1)];
  const in0 = c0 >= level;
  const in1 = c1 >= level;
  const in2 = c2 >= level;
  const in3 = c3 >= level;
  if (!in0 && !in1 && !in2 && !in3) return 0;
  if (in0 && in1 && in2 && in3) {
    pu[0] = u0; pv[0] = v0;
    pu[1] = u1; pv[1] = v0;
    pu[2] = u1; pv[2] = v1;
    pu[3] = u0; pv[3] = v1;
    return 4;
  }
  let count = 0;
  const cornersU = [u0, u1, u1, u0];
  const cornersV = [v0, v0, v1, v1];
  const cornerValues = [c0, c1, c2, c3];
  const inside = [in0, in1, in2, in3];
  for (let k = 0; k < 4; k++) {
    const next = (k + 1) & 3;
    if (inside[k]) {
      pu[count] = cornersU[k];
      pv[count] = cornersV[k];
      count++;
    }
    if (inside[k] !== inside[next]) {
      // linear crossing along the edge from corner k to corner next
      const t = (level - cornerValues[k]) / (cornerValues[next] - cornerValues[k]);
      pu[count] = cornersU[k] + t * (cornersU[next] - cornersU[k]);
      pv[count] = cornersV[k] + t * (cornersV[next] - cornersV[k]);
      count++;
    }
  }
  return count;
}

/** Shoelace area of a polygon [grid units squared]. */
function polygonArea(pu: Float64Array, pv: Float64Array, count: number): number {
  let twice = 0;
  for (let k = 0; k < count; k++) {
    const next = k + 1 === count ? 0 : k + 1;
    twice += pu[k] * pv[next] - pu[next] * pv[k];
  }
  return Math.abs(twice) / 2;
}

/** Whether a point (grid units) lies in the region at or above the level. */
function pointInRegion(lattice: Lattice, pointU: number, pointV: number, level: number, pu: Float64Array, pv: Float64Array): boolean {
  if (!(pointU >= 0 && pointV >= 0 && pointU <= lattice.u[lattice.columns - 1] && pointV <= lattice.v[lattice.rows - 1])) return false;
  let a = 0;
  while (a < lattice.columns - 2 && pointU > lattice.u[a + 1]) a++;
  let b = 0;
  while (b < lattice.rows - 2 && pointV > lattice.v[b + 1]) b++;
  const count = cutSquare(lattice, a, b, level, pu, pv);
  if (count === 0) return false;
  // convex, counter-clockwise: inside when on the left of (or on) every edge
  for (let k = 0; k < count; k++) {
    const next = k + 1 === count ? 0 : k + 1;
    const cross = (pu[next] - pu[k]) * (pointV - pv[k]) - (pv[next] - pv[k]) * (pointU - pu[k]);
    if (cross < -1e-12) return false;
  }
  return true;
}

/** Whether any cell on the grid's boundary is at or above the level. */
function reachesEdge(field: ArrayLike<number>, nx: number, ny: number, level: number): boolean {
  for (let i = 0; i < nx; i++) if (field[i] >= level || field[i + nx * (ny - 1)] >= level) return true;
  for (let j = 0; j < ny; j++) if (field[nx * j] >= level || field[nx - 1 + nx * j] >= level) return true;
  return false;
}
