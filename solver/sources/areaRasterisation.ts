/**
 * Area sources on the local grid by exact polygon/cell overlap, so the emission a grid receives
 * is the polygon's emission whatever the grid's spacing or offset.
 *
 * Method: the ring is clipped to each row of cells (the slab between two y faces), and each row
 * piece to each cell of the row (the slab between two x faces), by Sutherland-Hodgman clipping
 * against one axis-aligned half-plane at a time. Clipping any simple polygon, convex or not,
 * against a convex region this way gives a ring whose shoelace area is the exact overlap area:
 * the pieces may carry zero-width "bridge" edges along the clip line, which add no area
 * (Sutherland & Hodgman 1974, Comm. ACM 17(1):32; the area property is common practice of
 * computational geometry). Neighbouring cells cut the same edges at the same face coordinate,
 * so the overlaps add back to the polygon's area to rounding.
 *
 * Cost: rows of the polygon's bounding box times the ring's vertices, plus the row pieces' cells
 * times their vertices; the clipping works in typed arrays allocated once per call.
 */
import type { AreaCellShare } from '../drivers/types.ts';
import { gridEast_m, gridNorth_m } from '../grid/localGrid.ts';
import type { LocalGrid } from '../grid/types.ts';

/**
 * Signed planar area of a closed ring [m2]: positive when counter-clockwise (x east, y north).
 * Shoelace formula about the first vertex, which keeps the products small and the rounding low.
 */
export function ringSignedArea_m2(ring_m: readonly (readonly [number, number])[]): number {
  const originX = ring_m[0][0];
  const originY = ring_m[0][1];
  let twiceArea = 0;
  for (let v = 1; v + 1 < ring_m.length; v++) {
    const ax = ring_m[v][0] - originX;
    const ay = ring_m[v][1] - originY;
    const bx = ring_m[v + 1][0] - originX;
    const by = ring_m[v + 1][1] - originY;
    twiceArea += ax * by - bx * ay;
  }
  return 0.5 * twiceArea;
}

/**
 * Planar area of a closed ring in local metres [m2] (either winding).
 *
 * @example ringArea_m2([[0, 0], [10, 0], [10, 5], [0, 5], [0, 0]]) // 50
 */
export function ringArea_m2(ring_m: readonly (readonly [number, number])[]): number {
  checkRing(ring_m);
  return Math.abs(ringSignedArea_m2(ring_m));
}

/**
 * Area centroid of a closed ring [m], either winding.
 *
 * @example ringCentroid_m([[0, 0], [10, 0], [10, 5], [0, 5], [0, 0]]) // [5, 2.5]
 */
export function ringCentroid_m(ring_m: readonly (readonly [number, number])[]): [number, number] {
  checkRing(ring_m);
  const originX = ring_m[0][0];
  const originY = ring_m[0][1];
  let twiceArea = 0;
  let sumX = 0;
  let sumY = 0;
  for (let v = 1; v + 1 < ring_m.length; v++) {
    const ax = ring_m[v][0] - originX;
    const ay = ring_m[v][1] - originY;
    const bx = ring_m[v + 1][0] - originX;
    const by = ring_m[v + 1][1] - originY;
    const cross = ax * by - bx * ay;
    twiceArea += cross;
    sumX += (ax + bx) * cross;
    sumY += (ay + by) * cross;
  }
  // Centroid of a polygon: (1 / 6A) sum (x_i + x_{i+1}) cross_i (standard result).
  return [originX + sumX / (3 * twiceArea), originY + sumY / (3 * twiceArea)];
}

/**
 * The first place a ring crosses or touches itself, or null for a simple ring.
 * Compares every pair of non-neighbouring edges (and neighbouring edges that fold back on each
 * other); O(n^2) in the vertices, fine for the tens to hundreds of vertices a drawn yard has.
 *
 * @returns the indices of the two edges (edge e runs from vertex e to e + 1), or null
 */
export function ringSelfIntersection(
  ring_m: readonly (readonly [number, number])[],
): [number, number] | null {
  checkRing(ring_m);
  // Repeated consecutive vertices are zero-length edges, not crossings: drop them, keeping a map
  // back to the caller's edge numbers.
  const xs: number[] = [];
  const ys: number[] = [];
  const edgeOf: number[] = [];
  for (let v = 0; v < ring_m.length - 1; v++) {
    const [x, y] = ring_m[v];
    if (xs.length > 0 && x === xs[xs.length - 1] && y === ys[ys.length - 1]) continue;
    xs.push(x);
    ys.push(y);
    edgeOf.push(v);
  }
  while (xs.length > 1 && xs[xs.length - 1] === xs[0] && ys[ys.length - 1] === ys[0]) {
    xs.pop();
    ys.pop();
    edgeOf.pop();
  }
  const n = xs.length;
  if (n < 3) return [0, 0];
  for (let e = 0; e < n; e++) {
    const ax = xs[e];
    const ay = ys[e];
    const bx = xs[(e + 1) % n];
    const by = ys[(e + 1) % n];
    for (let f = e + 1; f < n; f++) {
      const cx = xs[f];
      const cy = ys[f];
      const dx = xs[(f + 1) % n];
      const dy = ys[(f + 1) % n];
      const neighbours = f === e + 1 || (e === 0 && f === n - 1);
      if (neighbours) {
        // Neighbours share one vertex; they are bad only when they run back along each other.
        const [sharedX, sharedY, farEx, farEy, farFx, farFy] =
          f === e + 1 ? [bx, by, ax, ay, dx, dy] : [ax, ay, bx, by, cx, cy];
        const cross = (farEx - sharedX) * (farFy - sharedY) - (farEy - sharedY) * (farFx - sharedX);
        const dot = (farEx - sharedX) * (farFx - sharedX) + (farEy - sharedY) * (farFy - sharedY);
        if (cross === 0 && dot > 0) return [edgeOf[e], edgeOf[f]];
        continue;
      }
      if (segmentsMeet(ax, ay, bx, by, cx, cy, dx, dy)) return [edgeOf[e], edgeOf[f]];
    }
  }
  return null;
}

/**
 * Rasterise a polygon ring onto the grid's columns by exact overlap.
 *
 * @param ring_m closed ring in local metres (first point = last point), simple, either winding,
 *   wholly inside the grid's horizontal extent
 * @param grid the local grid
 * @returns one share per column the polygon overlaps (overlap_m2 > 0), in increasing column
 *   index i + nx * j; the overlaps add up to ringArea_m2(ring_m) to rounding
 * @throws RangeError naming `ring_m` when the ring is not closed, has fewer than 4 positions, has
 *   no area, or reaches outside the grid
 * @example rasteriseRing([[0, 0], [30, 0], [30, 10], [0, 10], [0, 0]], grid)
 */
export function rasteriseRing(
  ring_m: readonly (readonly [number, number])[],
  grid: LocalGrid,
): AreaCellShare[] {
  checkRing(ring_m);
  const signedArea_m2 = ringSignedArea_m2(ring_m);
  if (!(Math.abs(signedArea_m2) > 0)) {
    throw new RangeError('ring_m: the ring encloses no area; allowed: a polygon with area > 0');
  }
  const orientation = signedArea_m2 > 0 ? 1 : -1;
  const vertexCount = ring_m.length - 1;

  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (let v = 0; v < vertexCount; v++) {
    const [x, y] = ring_m[v];
    if (x < minX) minX = x;
    if (x > maxX) maxX = x;
    if (y < minY) minY = y;
    if (y > maxY) maxY = y;
  }
  const east_m = gridEast_m(grid);
  const north_m = gridNorth_m(grid);
  if (minX < grid.xWest_m || maxX > east_m || minY < grid.ySouth_m || maxY > north_m) {
    throw new RangeError(
      `ring_m: the ring spans x ${minX} to ${maxX} m, y ${minY} to ${maxY} m; allowed: inside the ` +
        `grid, x ${grid.xWest_m} to ${east_m} m, y ${grid.ySouth_m} to ${north_m} m`,
    );
  }

  // Work relative to the bounding box's centre, so every product in the clipping and the
  // shoelace sums stays small (the grid may sit kilometres from the origin).
  const referenceX = 0.5 * (minX + maxX);
  const referenceY = 0.5 * (minY + maxY);
  const polygonX = new Float64Array(vertexCount);
  const polygonY = new Float64Array(vertexCount);
  for (let v = 0; v < vertexCount; v++) {
    polygonX[v] = ring_m[v][0] - referenceX;
    polygonY[v] = ring_m[v][1] - referenceY;
  }
  // Each half-plane clip of an m-vertex ring returns at most 1.5 m vertices (a vertex per edge
  // kept, plus one per crossing into the half-plane; crossings come in pairs), so four clips stay
  // within 1.5^4 m < 5.1 m.
  const capacity = 6 * vertexCount + 16;
  const scratchX = new Float64Array(capacity);
  const scratchY = new Float64Array(capacity);
  const rowX = new Float64Array(capacity);
  const rowY = new Float64Array(capacity);
  const cellX = new Float64Array(capacity);
  const cellY = new Float64Array(capacity);

  const spacing_m = grid.spacing_m;
  const nx = grid.nx;
  const ny = grid.ny;
  // One row (and below, one column) of slack either side: the clipping decides what is inside,
  // the index range only has to include every cell that might be.
  const rowFirst = clampIndex(Math.floor((minY - grid.ySouth_m) / spacing_m) - 1, ny);
  const rowLast = clampIndex(Math.floor((maxY - grid.ySouth_m) / spacing_m) + 1, ny);
  const shares: AreaCellShare[] = [];

  for (let j = rowFirst; j <= rowLast; j++) {
    // Both faces of row j from the same expression its neighbours use, so shared faces agree.
    const southFace = grid.ySouth_m + j * spacing_m - referenceY;
    const northFace = grid.ySouth_m + (j + 1) * spacing_m - referenceY;
    let count = clipHalfPlane(polygonX, polygonY, vertexCount, scratchX, scratchY, 1, southFace, true);
    if (count < 3) continue;
    count = clipHalfPlane(scratchX, scratchY, count, rowX, rowY, 1, northFace, false);
    if (count < 3) continue;
    const rowCount = count;

    let rowMinX = Infinity;
    let rowMaxX = -Infinity;
    for (let v = 0; v < rowCount; v++) {
      if (rowX[v] < rowMinX) rowMinX = rowX[v];
      if (rowX[v] > rowMaxX) rowMaxX = rowX[v];
    }
    const columnFirst = clampIndex(
      Math.floor((rowMinX + referenceX - grid.xWest_m) / spacing_m) - 1,
      nx,
    );
    const columnLast = clampIndex(
      Math.floor((rowMaxX + referenceX - grid.xWest_m) / spacing_m) + 1,
      nx,
    );
    for (let i = columnFirst; i <= columnLast; i++) {
      const westFace = grid.xWest_m + i * spacing_m - referenceX;
      const eastFace = grid.xWest_m + (i + 1) * spacing_m - referenceX;
      let cellCount = clipHalfPlane(rowX, rowY, rowCount, scratchX, scratchY, 0, westFace, true);
      if (cellCount < 3) continue;
      cellCount = clipHalfPlane(scratchX, scratchY, cellCount, cellX, cellY, 0, eastFace, false);
      if (cellCount < 3) continue;
      // Shoelace about the cell's south-west corner: the smallest numbers available.
      let twiceArea = 0;
      for (let v = 0; v < cellCount; v++) {
        const next = v + 1 === cellCount ? 0 : v + 1;
        twiceArea +=
          (cellX[v] - westFace) * (cellY[next] - southFace) -
          (cellX[next] - westFace) * (cellY[v] - southFace);
      }
      const overlap_m2 = 0.5 * orientation * twiceArea;
      // A simple ring's pieces have area >= 0; zero (a touch) or a rounding-sized negative is
      // no share at all.
      if (overlap_m2 > 0) shares.push({ column: i + nx * j, overlap_m2 });
    }
  }
  return shares;
}

/**
 * Sutherland-Hodgman clip of an open vertex list (the closing edge implied) against one
 * axis-aligned half-plane: coordinate `axis` (0 = x, 1 = y) >= bound when keepAbove, else <= bound.
 * Crossing points take the bound exactly on the clip axis. Returns the output vertex count.
 */
function clipHalfPlane(
  inX: Float64Array,
  inY: Float64Array,
  count: number,
  outX: Float64Array,
  outY: Float64Array,
  axis: 0 | 1,
  bound: number,
  keepAbove: boolean,
): number {
  if (count === 0) return 0;
  const along = axis === 0 ? inX : inY;
  const across = axis === 0 ? inY : inX;
  const outAlong = axis === 0 ? outX : outY;
  const outAcross = axis === 0 ? outY : outX;
  let written = 0;
  let previousAlong = along[count - 1];
  let previousAcross = across[count - 1];
  let previousInside = keepAbove ? previousAlong >= bound : previousAlong <= bound;
  for (let v = 0; v < count; v++) {
    const currentAlong = along[v];
    const currentAcross = across[v];
    const currentInside = keepAbove ? currentAlong >= bound : currentAlong <= bound;
    if (currentInside !== previousInside) {
      // The edge crosses the bound strictly between its ends, so the division is safe.
      const t = (bound - previousAlong) / (currentAlong - previousAlong);
      outAlong[written] = bound;
      outAcross[written] = previousAcross + t * (currentAcross - previousAcross);
      written++;
    }
    if (currentInside) {
      outAlong[written] = currentAlong;
      outAcross[written] = currentAcross;
      written++;
    }
    previousAlong = currentAlong;
    previousAcross = currentAcross;
    previousInside = currentInside;
  }
  return written;
}

function clampIndex(index: number, size: number): number {
  return index < 0 ? 0 : index > size - 1 ? size - 1 : index;
}

/** Orientation of (a, b, c): > 0 counter-clockwise, < 0 clockwise, 0 collinear. */
function orient(ax: number, ay: number, bx: number, by: number, cx: number, cy: number): number {
  return (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
}

/** True when collinear point c lies within the bounding box of segment a-b. */
function onSegment(ax: number, ay: number, bx: number, by: number, cx: number, cy: number): boolean {
  return (
    Math.min(ax, bx) <= cx && cx <= Math.max(ax, bx) && Math.min(ay, by) <= cy && cy <= Math.max(ay, by)
  );
}

/** True when segments a-b and c-d cross or touch (standard orientation test). */
function segmentsMeet(
  ax: number,
  ay: number,
  bx: number,
  by: number,
  cx: number,
  cy: number,
  dx: number,
  dy: number,
): boolean {
  const abc = orient(ax, ay, bx, by, cx, cy);
  const abd = orient(ax, ay, bx, by, dx, dy);
  const cda = orient(cx, cy, dx, dy, ax, ay);
  const cdb = orient(cx, cy, dx, dy, bx, by);
  if (((abc > 0 && abd < 0) || (abc < 0 && abd > 0)) && ((cda > 0 && cdb < 0) || (cda < 0 && cdb > 0))) {
    return true;
  }
  if (abc === 0 && onSegment(ax, ay, bx, by, cx, cy)) return true;
  if (abd === 0 && onSegment(ax, ay, bx, by, dx, dy)) return true;
  if (cda === 0 && onSegment(cx, cy, dx, dy, ax, ay)) return true;
  if (cdb === 0 && onSegment(cx, cy, dx, dy, bx, by)) return true;
  return false;
}

/** Check a ring's shape: an array of >= 4 finite [x, y] positions, first = last. */
function checkRing(ring_m: readonly (readonly [number, number])[]): void {
  if (!Array.isArray(ring_m) || ring_m.length < 4) {
    throw new RangeError(
      `ring_m: got ${Array.isArray(ring_m) ? `${ring_m.length} positions` : String(ring_m)}; ` +
        'allowed: a closed ring of at least 4 [x, y] positions (first = last)',
    );
  }
  for (let v = 0; v < ring_m.length; v++) {
    const position = ring_m[v];
    if (
      !Array.isArray(position) ||
      position.length < 2 ||
      !Number.isFinite(position[0]) ||
      !Number.isFinite(position[1])
    ) {
      throw new RangeError(
        `ring_m[${v}]: got ${JSON.stringify(position)}; allowed: [x_m, y_m] with finite numbers`,
      );
    }
  }
  const first = ring_m[0];
  const last = ring_m[ring_m.length - 1];
  if (first[0] !== last[0] || first[1] !== last[1]) {
    throw new RangeError(
      `ring_m: first position ${JSON.stringify(first)} differs from last ${JSON.stringify(last)}; ` +
        'allowed: a closed ring (first = last)',
    );
  }
}
