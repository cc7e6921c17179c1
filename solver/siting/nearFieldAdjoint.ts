/**
 * The near field in the siting map: the receptor's value for a stack at a position, as the forward grid
 * run reports it, from the receptor's adjoint and the forward run's own near-field plan.
 *
 * A forward run (../drivers/gridSteady.ts) does not put the stack straight into the grid: its near-field
 * treatment (../sources/nearField.ts; by default the sub-grid plume, ../sources/subGridPlume.ts) plans,
 * for the stack at s, the emission the grid receives q_s [g/s per cell] (the hand-over band) and the
 * concentration its sub-grid plume still holds, C_s(x). The receptor then reads
 *
 *   R(s) = w . B^-1 q_s + C_s(receptor) = psi . q_s + C_s(receptor),   B^T psi = w   (./adjointSolve.ts)
 *
 * so the siting map is the adjoint summed over the plan's hand-over cells with the plan's rates, plus
 * the sub-grid plume's own value at the receptor (non-zero only when the receptor lies in the near field).
 * Both parts are linear in the emission; nothing here approximates the forward model beyond the adjoint's
 * own exactness (exact for first-order upwind, the scheme's discretisation error for the limited one).
 *
 * The cost. A sub-grid plan is not cheap (the demo: 16 ms and 7,600 cells), and the map needs one per grid
 * column. On flat ground the plan of a stack moved by whole cells is the same plan moved by those cells
 * (the plume, the hand-over distance, the band and its weights depend on the offsets from the stack only),
 * with two exceptions that depend on where the stack stands:
 * - the distance to the domain's downwind edge: the hand-over moves up to the edge, and the band narrows,
 *   when the edge is closer than the plume needs. Positions are therefore grouped by that distance (and
 *   the edge it is measured to); positions far enough from the edge that neither happens form one group
 *   ("free": at least max(2 x_h + 2 dx, x_h + 3 dx) from it, x_h the free hand-over distance, which keeps
 *   both the hand-over search and the band's half-width min(sigma_y, x_h, edge - x_h - dx) unchanged);
 * - the band's cells that fall outside the grid: the plan drops them and renormalises the rest to the
 *   same mass flux, which is done here the same way (the shifted representative's cells inside the grid,
 *   scaled to its total).
 * Each group gets one exact plan at a representative position whose band touches no side of the grid it
 * could be moved against; every other position uses that plan moved by whole cells. The sub-grid
 * concentration at the receptor is read from a representative next to the receptor, moved the same way,
 * wherever both points read the grid's held share with the same interpolation (inside the hull of the
 * column centres); elsewhere it is zero when the receptor is beyond the sub-grid plume's reach (bounds
 * with room to spare over the plume's own cut-offs), and otherwise, as for any group whose representative
 * is cut by a side, the position gets its own exact plan. On the demo: 154 groups, 412 plans for 40,000
 * positions (2,858 before the reach bound). tests/solver/siting/nearFieldAdjoint.test.ts compares the
 * moved plans with each column's own plan at every column (to 1e-12), and the map with forward runs.
 */
import { paddedIndex, type PaddedLayout } from '../fields/paddedLayout.ts';
import type { PlacedPointSource, PlacedReceptor } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import type { NearFieldContext, NearFieldPlan, NearFieldTreatment } from '../sources/nearField.ts';
import { SubGridPlume } from '../sources/subGridPlume.ts';
import { pointSourcePlume } from '../reference/sourcePlumes.ts';

/** What the near-field part of the map reads for one weather state. */
export interface NearFieldSitingInput {
  treatment: NearFieldTreatment;
  /** the forward run's near-field context less the sources and their heights */
  context: Omit<NearFieldContext, 'sources' | 'releaseHeights_m'>;
  /** the stack (its position is ignored) */
  stack: PlacedPointSource;
  /** its effective height in this weather state [m] */
  height_m: number;
}

/** One receptor's solved adjoint [s/m3] in the padded layout. */
export interface ReceptorAdjointField {
  receptor: PlacedReceptor;
  layout: PaddedLayout;
  field: Float64Array;
}

export interface NearFieldMapReport {
  /** exact near-field plans made (representatives and positions that needed their own) */
  plans: number;
  /** position groups by distance to the downwind edge */
  groups: number;
  /** the free hand-over distance (0 for a direct release) [m] */
  handover_m: number;
}

/** Which side the downwind ray leaves by, and how far it is [m]. */
function downwindEdge(grid: LocalGrid, x_m: number, y_m: number, downwindX: number, downwindY: number): { side: string; distance_m: number } {
  const east = grid.xWest_m + grid.nx * grid.spacing_m;
  const north = grid.ySouth_m + grid.ny * grid.spacing_m;
  let side = 'none';
  let distance = Infinity;
  const consider = (name: string, value: number): void => {
    if (value < distance) {
      distance = value;
      side = name;
    }
  };
  // the same thresholds as the sub-grid plume's own distance to the edge (a wind along an axis has no side component)
  if (downwindX > 1e-12) consider('east', (east - x_m) / downwindX);
  if (downwindX < -1e-12) consider('west', (grid.xWest_m - x_m) / downwindX);
  if (downwindY > 1e-12) consider('north', (north - y_m) / downwindY);
  if (downwindY < -1e-12) consider('south', (grid.ySouth_m - y_m) / downwindY);
  return { side, distance_m: Math.max(distance, 0) };
}

/** A plan's grid emission split into column offsets, layers and rates, relative to its stack's column. */
interface MovablePlan {
  column: [number, number];
  plan: NearFieldPlan;
  di: Int32Array;
  dj: Int32Array;
  k: Int32Array;
  rates: Float64Array;
  total_g_s: number;
  /** the emission touches the west/east/south/north side of the grid (it may have been cut there) */
  touches: { west: boolean; east: boolean; south: boolean; north: boolean };
}

/**
 * Add the receptors' near-field-consistent map for one weather state: for every column centre s,
 * scale x (psi . q_s + C_s(receptor)) into out[r][column].
 *
 * @param input the treatment, the forward context, the stack and its effective height
 * @param adjoints each receptor's adjoint field (same order as out)
 * @param scale factor on every value (ug per g, times the weather state's weight)
 * @param out per receptor, index i + nx * j, added to
 * @param exactAt positions (not necessarily column centres) whose values are wanted exactly; their values are added to exactOut[n][r]
 * @param signal checked between position groups
 * @returns how many plans were made and the groups
 */
export function addNearFieldMaps(
  input: NearFieldSitingInput,
  adjoints: readonly ReceptorAdjointField[],
  scale: number,
  out: Float64Array[],
  exactAt: readonly { x_m: number; y_m: number }[] = [],
  exactOut: number[][] = [],
  signal?: AbortSignal,
): NearFieldMapReport {
  const { grid } = input.context;
  const { nx, ny, nz } = grid;
  const nxy = nx * ny;
  const dx = grid.spacing_m;
  const theta = (input.context.weather.windFrom_deg * Math.PI) / 180;
  const downwindX = -Math.sin(theta);
  const downwindY = -Math.cos(theta);
  const centreX = (i: number): number => grid.xWest_m + (i + 0.5) * dx;
  const centreY = (j: number): number => grid.ySouth_m + (j + 0.5) * dx;

  // The adjoints unpadded, i + nx * j + nx * ny * k, for the moved plans' inner loop.
  const psi = adjoints.map(({ layout, field }) => {
    const flat = new Float64Array(nxy * nz);
    for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) {
      const from = paddedIndex(layout, 0, j, k);
      flat.set(field.subarray(from, from + nx), nx * j + nxy * k);
    }
    return flat;
  });

  let plans = 0;
  const planAt = (x_m: number, y_m: number): NearFieldPlan => {
    plans++;
    return input.treatment.plan({ ...input.context, sources: [{ ...input.stack, x_m, y_m }], releaseHeights_m: [input.height_m] });
  };
  const movable = new Map<number, MovablePlan>();
  const movableAt = (i: number, j: number): MovablePlan => {
    const known = movable.get(i + nx * j);
    if (known !== undefined) return known;
    const plan = planAt(centreX(i), centreY(j));
    const { cells, rates_g_s } = plan.emission;
    const count = cells.length;
    const di = new Int32Array(count);
    const dj = new Int32Array(count);
    const k = new Int32Array(count);
    const touches = { west: false, east: false, south: false, north: false };
    let total = 0;
    for (let n = 0; n < count; n++) {
      const cell = cells[n];
      const column = cell % nxy;
      const ci = column % nx;
      const cj = (column - ci) / nx;
      di[n] = ci - i;
      dj[n] = cj - j;
      k[n] = (cell - column) / nxy;
      total += rates_g_s[n];
      if (rates_g_s[n] > 0) {
        if (ci === 0) touches.west = true;
        if (ci === nx - 1) touches.east = true;
        if (cj === 0) touches.south = true;
        if (cj === ny - 1) touches.north = true;
      }
    }
    const made: MovablePlan = { column: [i, j], plan, di, dj, k, rates: rates_g_s, total_g_s: total, touches };
    movable.set(i + nx * j, made);
    return made;
  };

  // The free hand-over distance: that of the position farthest from the downwind edge.
  let farthest = 0;
  let farthestDistance = -1;
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    const { distance_m } = downwindEdge(grid, centreX(i), centreY(j), downwindX, downwindY);
    if (distance_m > farthestDistance) {
      farthestDistance = distance_m;
      farthest = i + nx * j;
    }
  }
  const probe = movableAt(farthest % nx, Math.floor(farthest / nx));
  const handover = probe.plan.handovers[0];
  const carried = handover.transportWind_m_s !== null;
  const handover_m = handover.handoverDistance_m;
  const freeFrom_m = carried ? Math.max(2 * handover_m + 2 * dx, handover_m + 3 * dx) + 1e-6 : -Infinity;

  // Where a stack's sub-grid plume can hold anything, for a hand-over distance x_h (SubGridPlume only,
  // bounds with room to spare over its own cut-offs, ../sources/subGridPlume.ts): from a cell upwind of
  // the stack to x_h plus the band's half-width (at most max(2 dx, x_h)) plus 1.5 cells; across the wind
  // within 6 sigma_y(x_h + dx) (bounded here by 8 sigma_y(x_h + 2 dx) + 2 dx). Positions outside it need
  // no plan of their own for the sub-grid part.
  const subGridSigmas = input.treatment instanceof SubGridPlume && carried ? pointSourcePlume({ ...input.stack, x_m: 0, y_m: 0 }, input.context, 2 * Math.hypot(nx * dx, ny * dx) + 1000).sigmas : null;
  const reachOf =
    subGridSigmas === null
      ? null
      : (handover: number) => ({
          upwind_m: 2 * dx,
          downwind_m: handover + Math.max(2 * dx, handover) + 2 * dx,
          crosswind_m: 8 * subGridSigmas.sigmaY_m(handover + 2 * dx) + 2 * dx,
        });

  // Group the columns.
  const groups = new Map<string, number[]>();
  const sideOf = new Map<string, string>();
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    const { side, distance_m } = downwindEdge(grid, centreX(i), centreY(j), downwindX, downwindY);
    const key = distance_m >= freeFrom_m ? 'free' : `${side}:${distance_m.toFixed(6)}`;
    let members = groups.get(key);
    if (members === undefined) {
      members = [];
      groups.set(key, members);
      sideOf.set(key, side);
    }
    members.push(i + nx * j);
  }

  // A representative for moving: cut by no side it could be moved against.
  const movableSides = (key: string): ('west' | 'east' | 'south' | 'north')[] => {
    if (key === 'free') return ['west', 'east', 'south', 'north'];
    // members share the distance to one side: they differ by moves along it, which keep that side's cut
    const side = sideOf.get(key);
    return side === 'east' || side === 'west' ? ['south', 'north'] : ['west', 'east'];
  };
  const cutFree = (candidate: MovablePlan, key: string): boolean => movableSides(key).every((side) => !candidate.touches[side]);
  const representativeFor = (key: string, members: number[]): MovablePlan | null => {
    let best = members[0];
    if (key === 'free') {
      // the band's centre nearest the grid's centre
      const middleX = grid.xWest_m + 0.5 * nx * dx;
      const middleY = grid.ySouth_m + 0.5 * ny * dx;
      let bestDistance = Infinity;
      for (const column of members) {
        const i = column % nx;
        const j = (column - i) / nx;
        const distance = Math.hypot(centreX(i) + handover_m * downwindX - middleX, centreY(j) + handover_m * downwindY - middleY);
        if (distance < bestDistance) {
          bestDistance = distance;
          best = column;
        }
      }
    } else {
      best = members[Math.floor(members.length / 2)];
    }
    const candidate = movableAt(best % nx, Math.floor(best / nx));
    return cutFree(candidate, key) ? candidate : null;
  };

  // psi . q for a representative moved to column (i, j), into sums: 'whole' when every cell of it lands in
  // the grid, 'cut' when some fall outside (renormalised as the plan does), 'outside' when none lands.
  const sums = new Float64Array(adjoints.length);
  const movedEmission = (from: MovablePlan, i: number, j: number): 'whole' | 'cut' | 'outside' => {
    sums.fill(0);
    const shiftI = i - from.column[0];
    const shiftJ = j - from.column[1];
    let inside = 0;
    let cut = false;
    const { di, dj, k, rates } = from;
    for (let n = 0; n < rates.length; n++) {
      const ci = i + di[n];
      const cj = j + dj[n];
      if (ci < 0 || ci >= nx || cj < 0 || cj >= ny) {
        if (rates[n] > 0) cut = true;
        continue;
      }
      const cell = ci + nx * cj + nxy * k[n];
      const rate = rates[n];
      inside += rate;
      for (let r = 0; r < psi.length; r++) sums[r] += rate * psi[r][cell];
    }
    if (!(inside > 0)) return 'outside';
    if (shiftI === 0 && shiftJ === 0) return 'whole';
    // the plan renormalises the band's cells inside the grid to the same mass flux
    const renormalise = from.total_g_s / inside;
    for (let r = 0; r < psi.length; r++) sums[r] *= renormalise;
    return cut ? 'cut' : 'whole';
  };
  const exactEmission = (plan: NearFieldPlan): void => {
    sums.fill(0);
    const { cells, rates_g_s } = plan.emission;
    for (let n = 0; n < cells.length; n++) for (let r = 0; r < psi.length; r++) sums[r] += rates_g_s[n] * psi[r][cells[n]];
  };

  // Inside the hull of the column centres, where the sub-grid share is read with unclamped interpolation.
  const westCentre = centreX(0);
  const eastCentre = centreX(nx - 1);
  const southCentre = centreY(0);
  const northCentre = centreY(ny - 1);
  const inHull = (x_m: number, y_m: number): boolean => x_m >= westCentre && x_m <= eastCentre && y_m >= southCentre && y_m <= northCentre;

  for (const [key, members] of groups) {
    signal?.throwIfAborted();
    const representative = representativeFor(key, members);
    // a second representative for the sub-grid concentration, per receptor: the member nearest it (made
    // only when the first one, moved, would read the receptor outside the hull)
    const nearReceptor = adjoints.map(({ receptor }) => {
      let best = members[0];
      let bestDistance = Infinity;
      for (const column of members) {
        const i = column % nx;
        const j = (column - i) / nx;
        const distance = Math.hypot(centreX(i) - receptor.x_m, centreY(j) - receptor.y_m);
        if (distance < bestDistance) {
          bestDistance = distance;
          best = column;
        }
      }
      return best;
    });
    for (const column of members) {
      const i = column % nx;
      const j = (column - i) / nx;
      let own: NearFieldPlan | null = null;
      const moved = representative === null ? 'outside' : movedEmission(representative, i, j);
      if (moved === 'outside') {
        own = planAt(centreX(i), centreY(j));
        exactEmission(own);
      }
      for (let r = 0; r < adjoints.length; r++) {
        let value = sums[r];
        if (carried) {
          const { receptor } = adjoints[r];
          let subGrid: number | null = null;
          if (own === null && representative !== null && inHull(receptor.x_m, receptor.y_m)) {
            // the receptor moved with the stack onto a representative, read there
            let from = representative;
            let movedX = receptor.x_m + (from.column[0] - i) * dx;
            let movedY = receptor.y_m + (from.column[1] - j) * dx;
            if (!inHull(movedX, movedY)) {
              const near = nearReceptor[r];
              from = movableAt(near % nx, Math.floor(near / nx));
              movedX = receptor.x_m + (from.column[0] - i) * dx;
              movedY = receptor.y_m + (from.column[1] - j) * dx;
            }
            if (inHull(movedX, movedY)) subGrid = from.plan.concentration_g_m3(movedX, movedY, receptor.height_m);
            // a band cut by a side holds a slightly different share along the wind: where the receptor is
            // in this near field at all, the position's own plan says what it holds
            if (subGrid !== null && subGrid > 0 && (moved === 'cut' || !cutFree(from, key))) subGrid = null;
          }
          if (subGrid === null && own === null && representative !== null && reachOf !== null) {
            // Outside the sub-grid plume's reach it holds nothing at the receptor, whatever the plan.
            const rx = receptor.x_m - centreX(i);
            const ry = receptor.y_m - centreY(j);
            const along = rx * downwindX + ry * downwindY;
            const cross = -rx * downwindY + ry * downwindX;
            const reach = reachOf(representative.plan.handovers[0].handoverDistance_m);
            if (along <= -reach.upwind_m || along >= reach.downwind_m || Math.abs(cross) >= reach.crosswind_m) subGrid = 0;
          }
          if (subGrid === null) {
            own ??= planAt(centreX(i), centreY(j));
            subGrid = own.concentration_g_m3(receptor.x_m, receptor.y_m, receptor.height_m);
          }
          value += subGrid;
        }
        out[r][column] += scale * value;
      }
    }
  }

  // Positions wanted exactly (candidates): each its own plan.
  exactAt.forEach(({ x_m, y_m }, n) => {
    const plan = planAt(x_m, y_m);
    exactEmission(plan);
    adjoints.forEach(({ receptor }, r) => {
      exactOut[n][r] += scale * (sums[r] + plan.concentration_g_m3(receptor.x_m, receptor.y_m, receptor.height_m));
    });
  });

  return { plans, groups: groups.size, handover_m: carried ? handover_m : 0 };
}
