/**
 * Candidate stack positions: a given list, or a site polygon sampled on a square lattice; the columns of
 * the map inside the polygon; the best column of a map.
 * Positions are local metres (x east, y north of the site); rings are closed [x, y] lists.
 */
import { isInsideRing, siteColumns } from '../grid/siteBoundary.ts';
import type { LocalGrid } from '../grid/types.ts';

function checkRing(ring_m: readonly (readonly [number, number])[], field: string): void {
  if (ring_m.length < 4) throw new RangeError(`${field}: a ring of ${ring_m.length} points; allowed: a closed ring of at least 4 points (first = last)`);
  const first = ring_m[0];
  const last = ring_m[ring_m.length - 1];
  if (first[0] !== last[0] || first[1] !== last[1]) throw new RangeError(`${field}: the ring is not closed (first point ${first.join(', ')}, last ${last.join(', ')}); allowed: first = last`);
}

/**
 * Lattice points inside a ring: every (m s, n s) with integers m, n and s the spacing (a lattice fixed to
 * the site, so the same polygon always gives the same points).
 *
 * @param ring_m closed ring [m]
 * @param spacing_m lattice spacing [m], > 0
 * @param field the name to use in messages (e.g. "site.boundary")
 * @throws RangeError when the ring is not closed, the spacing is not positive, or no point falls inside
 * @example latticeInsideRing([[0, 0], [100, 0], [100, 100], [0, 100], [0, 0]], 50) // 4 points (boundary points may fall either way)
 */
export function latticeInsideRing(ring_m: readonly (readonly [number, number])[], spacing_m: number, field = 'site polygon'): [number, number][] {
  checkRing(ring_m, field);
  if (!(spacing_m > 0) || !Number.isFinite(spacing_m)) throw new RangeError(`spacing is ${spacing_m} m; allowed: a finite spacing > 0 m`);
  let west = Infinity;
  let east = -Infinity;
  let south = Infinity;
  let north = -Infinity;
  for (const [x, y] of ring_m) {
    west = Math.min(west, x);
    east = Math.max(east, x);
    south = Math.min(south, y);
    north = Math.max(north, y);
  }
  const count = (Math.floor(east / spacing_m) - Math.ceil(west / spacing_m) + 1) * (Math.floor(north / spacing_m) - Math.ceil(south / spacing_m) + 1);
  if (count > 1_000_000) throw new RangeError(`spacing ${spacing_m} m gives ${count} lattice points over ${field}; allowed: at most 1,000,000 (use a larger spacing)`);
  const points: [number, number][] = [];
  for (let n = Math.ceil(south / spacing_m); n * spacing_m <= north; n++) {
    for (let m = Math.ceil(west / spacing_m); m * spacing_m <= east; m++) {
      const x = m * spacing_m;
      const y = n * spacing_m;
      if (isInsideRing(ring_m, x, y)) points.push([x, y]);
    }
  }
  if (points.length === 0) throw new RangeError(`${field}: no point of a ${spacing_m} m lattice falls inside it; use a smaller spacing`);
  return points;
}

/** 1 for each column whose centre lies inside the ring, index i + nx * j (the site boundary's own rule, siteColumns). */
export function columnsInsideRing(grid: LocalGrid, ring_m: readonly (readonly [number, number])[], field = 'site polygon'): Uint8Array {
  checkRing(ring_m, field);
  return siteColumns(grid, ring_m).onSite;
}

/**
 * The column with the lowest map value, among the masked ones (all columns without a mask); ties go to
 * the first in index order. Returns -1 when the mask holds no column.
 */
export function lowestColumn(map: Float64Array, mask: Uint8Array | null): number {
  let best = -1;
  for (let n = 0; n < map.length; n++) {
    if (mask !== null && mask[n] === 0) continue;
    if (best === -1 || map[n] < map[best]) best = n;
  }
  return best;
}
