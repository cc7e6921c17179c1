/**
 * An area source in the Gaussian reference mode, integrated over its exact cell overlaps
 * (AreaCellShare from solver/sources/areaRasterisation.ts), not squeezed into one virtual point.
 *
 * How the integral is taken, and why:
 * - Each element of the source is treated as a crosswind band (the Gaussian averaged analytically across
 *   the element's width, GaussianPlume.bandConcentration_g_m3) at the element's emission-weighted centre.
 *   A square of side w, rotated any way, spreads across the wind with variance w^2 / 12, the same as a
 *   band of width w, so the band is right to second order in w whatever the wind direction.
 * - Elements are chosen by distance, as in a multipole tree: the cells are grouped into a quadtree of
 *   2^k x 2^k blocks; a block no larger than a tenth of its distance from the receptor counts as one
 *   element; nearer, its children are opened; a single cell nearer still is refined the same way, square
 *   by square, down to 0.1 m beside the receptor. Cost per receptor grows with the logarithm of the
 *   source's extent and of the cell size, not with its cell count.
 * - A cell the polygon covers only partly: each final square is sampled 4 x 4 against the polygon and
 *   stands for its inside samples (their mean position, their share of the square), and the cell's
 *   overlap emission is divided over the inside part found, so every cell emits exactly its share. As a
 *   single far element such a cell sits at the mean of its inside samples (16 x 16 per cell, finer for
 *   slivers, the cell centre if none is hit).
 * - Within two element sides of the receptor along the wind, an element is taken as 8 strips across the
 *   wind (the concentration changes too fast there for one midpoint, and an element straddling the
 *   receptor is half upwind).
 * - Blocks wholly upwind of the receptor, or more than 10 sigma_y across the wind from it (a factor
 *   below 2e-22), are skipped.
 */
import type { AreaCellShare, PlacedAreaSource } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import { isInsideRing } from '../grid/siteBoundary.ts';
import type { SigmaFunction } from './dispersionCurves.ts';
import { type GaussianPlume, MINIMUM_SPREAD_DISTANCE_M } from './gaussianPlume.ts';

/** Largest element side as a fraction of its distance from the receptor [-]. */
export const ELEMENT_SIZE_PER_DISTANCE = 0.1;
/**
 * Smallest element [m]. Within 1 m of a release the spreads are held at their 1 m values (sigma_y about
 * 0.1 m), so 0.1 m elements resolve even a receptor at the release height inside the source, where the
 * integrand peaks.
 */
const SMALLEST_ELEMENT_M = 0.1;
/** Samples per side of a final square in a partly covered cell. */
const PARTIAL_SAMPLES_PER_SIDE = 4;
/** Sampling of a partly covered cell's centre: 2^4 = 16 per side, down to 2^7 = 128 for slivers. */
const CENTRE_SAMPLING_LEVEL = 4;
const FINEST_SAMPLING_LEVEL = 7;
/** Along-wind strips of an element right beside the target. */
const NEAR_STRIPS = 8;
/** Crosswind offset beyond which nothing contributes, in sigma_y [-]. */
const CROSSWIND_CUTOFF_SIGMAS = 10;

export class GaussianAreaSource {
  readonly id: string;
  /** the plume of a 1 g/s element; each element's contribution is scaled by its emission */
  private readonly plume: GaussianPlume;
  private readonly sigmas: SigmaFunction;
  private readonly spacing_m: number;
  private readonly ring_m: [number, number][];
  private readonly cellX_m: Float64Array;
  private readonly cellY_m: Float64Array;
  private readonly cellEmission_g_s: Float64Array;
  private readonly partial: Uint8Array;
  /** emission-weighted centre of each cell's overlap (the mean of its inside samples) [m] */
  private readonly cellCentreX_m: Float64Array;
  private readonly cellCentreY_m: Float64Array;
  // quadtree, one entry per node
  private readonly nodeBoxX_m: Float64Array;
  private readonly nodeBoxY_m: Float64Array;
  private readonly nodeHalf_m: Float64Array;
  private readonly nodeCentreX_m: Float64Array;
  private readonly nodeCentreY_m: Float64Array;
  private readonly nodeEmission_g_s: Float64Array;
  private readonly nodeWidth_m: Float64Array;
  /** leaf: the cell index; inner node: -1 */
  private readonly nodeCell: Int32Array;
  private readonly nodeFirstChild: Int32Array;
  private readonly nodeChildCount: Uint8Array;
  private readonly root: number;
  private readonly stack: Int32Array;

  /**
   * @param source the placed area source (ring, area, emission, exact cell shares)
   * @param grid the grid its shares refer to
   * @param plume the plume of a 1 g/s element at the source's release height
   * @param sigmas the same dispersion curve the plume uses (for the crosswind cut-off)
   */
  constructor(source: PlacedAreaSource, grid: LocalGrid, plume: GaussianPlume, sigmas: SigmaFunction) {
    if (!(source.area_m2 > 0) || !Number.isFinite(source.area_m2)) {
      throw new RangeError(`source ${source.id}: area_m2 is ${source.area_m2}; allowed: a finite area > 0 m2`);
    }
    if (!(plume.emission_g_s === 1)) throw new RangeError('GaussianAreaSource: the element plume must emit 1 g/s');
    this.id = source.id;
    this.plume = plume;
    this.sigmas = sigmas;
    this.spacing_m = grid.spacing_m;
    this.ring_m = source.ring_m;
    const shares: AreaCellShare[] = source.shares;
    const cellCount = shares.length;
    this.cellX_m = new Float64Array(cellCount);
    this.cellY_m = new Float64Array(cellCount);
    this.cellEmission_g_s = new Float64Array(cellCount);
    this.partial = new Uint8Array(cellCount);
    this.cellCentreX_m = new Float64Array(cellCount);
    this.cellCentreY_m = new Float64Array(cellCount);
    const cellI = new Int32Array(cellCount);
    const cellJ = new Int32Array(cellCount);
    const cellArea_m2 = grid.spacing_m * grid.spacing_m;
    const columns = grid.nx * grid.ny;
    let minI = Infinity;
    let minJ = Infinity;
    let maxI = -Infinity;
    let maxJ = -Infinity;
    for (let c = 0; c < cellCount; c++) {
      const { column, overlap_m2 } = shares[c];
      if (!Number.isInteger(column) || column < 0 || column >= columns) {
        throw new RangeError(`source ${source.id}: shares[${c}].column is ${column}; allowed: an integer 0..${columns - 1}`);
      }
      if (!Number.isFinite(overlap_m2) || overlap_m2 < 0 || overlap_m2 > cellArea_m2 * (1 + 1e-9)) {
        throw new RangeError(`source ${source.id}: shares[${c}].overlap_m2 is ${overlap_m2}; allowed: 0..${cellArea_m2} m2`);
      }
      const i = column % grid.nx;
      const j = (column - i) / grid.nx;
      cellI[c] = i;
      cellJ[c] = j;
      minI = Math.min(minI, i);
      minJ = Math.min(minJ, j);
      maxI = Math.max(maxI, i);
      maxJ = Math.max(maxJ, j);
      // cell centre convention of solver/grid/types.ts
      this.cellX_m[c] = grid.xWest_m + (i + 0.5) * grid.spacing_m;
      this.cellY_m[c] = grid.ySouth_m + (j + 0.5) * grid.spacing_m;
      this.cellEmission_g_s[c] = (source.emission_g_s * overlap_m2) / source.area_m2;
      this.partial[c] = overlap_m2 < cellArea_m2 * (1 - 1e-9) ? 1 : 0;
    }

    // Quadtree over the cells' index box.
    let size = 1;
    while (size < Math.max(maxI - minI + 1, maxJ - minJ + 1)) size *= 2;
    const byIndex = new Map<number, number>();
    for (let c = 0; c < cellCount; c++) byIndex.set((cellJ[c] - minJ) * size + (cellI[c] - minI), c);
    const maxNodes = Math.max(1, 2 * cellCount + 64 * Math.ceil(Math.log2(size + 1)) + 64);
    const boxX = new Float64Array(maxNodes);
    const boxY = new Float64Array(maxNodes);
    const half = new Float64Array(maxNodes);
    const centreX = new Float64Array(maxNodes);
    const centreY = new Float64Array(maxNodes);
    const emission = new Float64Array(maxNodes);
    const covered = new Float64Array(maxNodes);
    const nodeCell = new Int32Array(maxNodes).fill(-1);
    const firstChild = new Int32Array(maxNodes);
    const childCount = new Uint8Array(maxNodes);
    const children: number[] = [];
    let nodeCount = 0;
    const s = grid.spacing_m;
    const build = (i0: number, j0: number, blockSize: number): number => {
      if (blockSize === 1) {
        const c = byIndex.get(j0 * size + i0);
        if (c === undefined || this.cellEmission_g_s[c] === 0) return -1;
        const node = nodeCount++;
        nodeCell[node] = c;
        boxX[node] = this.cellX_m[c];
        boxY[node] = this.cellY_m[c];
        half[node] = 0.5 * s;
        emission[node] = this.cellEmission_g_s[c];
        covered[node] = (this.cellEmission_g_s[c] * source.area_m2) / source.emission_g_s;
        const [cx, cy] = this.partial[c] === 1 ? this.insideMean(c) : [this.cellX_m[c], this.cellY_m[c]];
        this.cellCentreX_m[c] = cx;
        this.cellCentreY_m[c] = cy;
        centreX[node] = cx;
        centreY[node] = cy;
        return node;
      }
      const childSize = blockSize / 2;
      const found: number[] = [];
      for (const [di, dj] of [[0, 0], [1, 0], [0, 1], [1, 1]]) {
        const i = i0 + di * childSize;
        const j = j0 + dj * childSize;
        if (i > maxI - minI || j > maxJ - minJ) continue;
        const child = build(i, j, childSize);
        if (child >= 0) found.push(child);
      }
      if (found.length === 0) return -1;
      if (found.length === 1 && blockSize > 1) {
        // a block with one occupied child is that child with a larger box; keep the child itself
        return found[0];
      }
      const node = nodeCount++;
      let total = 0;
      let sumX = 0;
      let sumY = 0;
      let area = 0;
      for (const child of found) {
        total += emission[child];
        sumX += emission[child] * centreX[child];
        sumY += emission[child] * centreY[child];
        area += covered[child];
      }
      emission[node] = total;
      centreX[node] = sumX / total;
      centreY[node] = sumY / total;
      covered[node] = area;
      boxX[node] = grid.xWest_m + (minI + i0 + 0.5 * blockSize) * s;
      boxY[node] = grid.ySouth_m + (minJ + j0 + 0.5 * blockSize) * s;
      half[node] = 0.5 * blockSize * s;
      firstChild[node] = children.length;
      childCount[node] = found.length;
      children.push(...found);
      return node;
    };
    const root = cellCount > 0 ? build(0, 0, size) : -1;
    this.root = root;
    this.nodeBoxX_m = boxX.slice(0, nodeCount);
    this.nodeBoxY_m = boxY.slice(0, nodeCount);
    this.nodeHalf_m = half.slice(0, nodeCount);
    this.nodeCentreX_m = centreX.slice(0, nodeCount);
    this.nodeCentreY_m = centreY.slice(0, nodeCount);
    this.nodeEmission_g_s = emission.slice(0, nodeCount);
    // the side of a square of the block's covered area: its crosswind band width
    this.nodeWidth_m = covered.slice(0, nodeCount).map(Math.sqrt);
    this.nodeCell = nodeCell.slice(0, nodeCount);
    this.nodeChildCount = childCount.slice(0, nodeCount);
    // children listed by position in `children`; firstChild indexes into it
    const childList = Int32Array.from(children);
    this.nodeFirstChild = firstChild.slice(0, nodeCount);
    this.childList = childList;
    this.stack = new Int32Array(4 * (Math.log2(size) + 2) + 8);
  }

  private readonly childList: Int32Array;
  /** scratch stack of squares for refining one cell: centres and half sides [m] */
  private readonly squareX_m = new Float64Array(256);
  private readonly squareY_m = new Float64Array(256);
  private readonly squareHalf_m = new Float64Array(256);

  /** Mean position of the inside samples of a partly covered cell [m]. */
  private insideMean(cell: number): [number, number] {
    for (let level = CENTRE_SAMPLING_LEVEL; level <= FINEST_SAMPLING_LEVEL; level++) {
      const perSide = 1 << level;
      const step = this.spacing_m / perSide;
      const x0 = this.cellX_m[cell] - 0.5 * this.spacing_m;
      const y0 = this.cellY_m[cell] - 0.5 * this.spacing_m;
      let count = 0;
      let sumX = 0;
      let sumY = 0;
      for (let a = 0; a < perSide; a++) {
        const x = x0 + (a + 0.5) * step;
        for (let b = 0; b < perSide; b++) {
          const y = y0 + (b + 0.5) * step;
          if (isInsideRing(this.ring_m, x, y)) {
            count++;
            sumX += x;
            sumY += y;
          }
        }
      }
      if (count > 0) return [sumX / count, sumY / count];
    }
    return [this.cellX_m[cell], this.cellY_m[cell]];
  }

  /**
   * Concentration of the whole area source at a target [g/m3].
   * @param targetX_m, targetY_m target position in local metres
   * @param targetZ_m target height [m]
   * @param downwindX, downwindY unit vector the wind blows toward
   */
  concentration_g_m3(targetX_m: number, targetY_m: number, targetZ_m: number, downwindX: number, downwindY: number): number {
    if (this.root < 0) return 0;
    const plume = this.plume;
    const sigmas = this.sigmas;
    const reachFactor = Math.abs(downwindX) + Math.abs(downwindY);
    const stack = this.stack;
    let top = 0;
    stack[top++] = this.root;
    let total = 0;
    while (top > 0) {
      const node = stack[--top];
      const half = this.nodeHalf_m[node];
      const rx = targetX_m - this.nodeBoxX_m[node];
      const ry = targetY_m - this.nodeBoxY_m[node];
      const along = rx * downwindX + ry * downwindY;
      const reach = half * reachFactor;
      const maxAlong = along + reach;
      if (maxAlong <= 0) continue; // the target is upwind of the whole block
      const cross = -rx * downwindY + ry * downwindX;
      const crossGap = Math.abs(cross) - reach;
      if (crossGap > 0 && crossGap > CROSSWIND_CUTOFF_SIGMAS * sigmas.sigmaY_m(maxAlong > MINIMUM_SPREAD_DISTANCE_M ? maxAlong : MINIMUM_SPREAD_DISTANCE_M)) continue;
      const gapX = Math.abs(rx) > half ? Math.abs(rx) - half : 0;
      const gapY = Math.abs(ry) > half ? Math.abs(ry) - half : 0;
      const gap = Math.sqrt(gapX * gapX + gapY * gapY);
      const cell = this.nodeCell[node];
      if (2 * half <= ELEMENT_SIZE_PER_DISTANCE * gap) {
        // far enough: the block (or cell) is one element at its emission-weighted centre
        const px = targetX_m - this.nodeCentreX_m[node];
        const py = targetY_m - this.nodeCentreY_m[node];
        total +=
          this.nodeEmission_g_s[node] *
          plume.bandConcentration_g_m3(px * downwindX + py * downwindY, -px * downwindY + py * downwindX, targetZ_m, this.nodeWidth_m[node]);
        continue;
      }
      if (cell < 0) {
        const first = this.nodeFirstChild[node];
        for (let k = 0; k < this.nodeChildCount[node]; k++) stack[top++] = this.childList[first + k];
        continue;
      }
      total += this.cellConcentration_g_m3(cell, targetX_m, targetY_m, targetZ_m, downwindX, downwindY);
    }
    return total;
  }

  /**
   * One sub-element of side w at (along, cross) from the target [g/m3 per g/s]. Within two sides of the
   * target along the wind the concentration changes too fast across the element for one midpoint (and
   * an element straddling the target is half upwind), so there it is taken as 8 strips across the wind,
   * each a band of width w (the element treated as wind-aligned, a second-order difference for the
   * few smallest elements beside the target).
   */
  private element_g_m3(along_m: number, cross_m: number, z_m: number, width_m: number): number {
    if (along_m >= 2 * width_m) return this.plume.bandConcentration_g_m3(along_m, cross_m, z_m, width_m);
    if (along_m + 0.5 * width_m <= 0) return 0;
    const strip = width_m / NEAR_STRIPS;
    let sum = 0;
    for (let k = 0; k < NEAR_STRIPS; k++) {
      sum += this.plume.bandConcentration_g_m3(along_m - 0.5 * width_m + (k + 0.5) * strip, cross_m, z_m, width_m);
    }
    return sum / NEAR_STRIPS;
  }

  /**
   * One cell, refined like the block tree: a square is split in four until its side is at most a tenth
   * of its own distance from the target, and no less than SMALLEST_ELEMENT_M. In a partly covered cell
   * each final square is sampled 4 x 4 against the polygon and stands for its inside samples (their
   * mean position, their share of the square); the cell's overlap emission is then divided over the
   * inside part found, so the cell emits exactly its share.
   */
  private cellConcentration_g_m3(
    cell: number,
    targetX_m: number,
    targetY_m: number,
    targetZ_m: number,
    downwindX: number,
    downwindY: number,
  ): number {
    const s = this.spacing_m;
    const emission = this.cellEmission_g_s[cell];
    const partial = this.partial[cell] === 1;
    const stackX = this.squareX_m;
    const stackY = this.squareY_m;
    const stackHalf = this.squareHalf_m;
    let top = 0;
    stackX[top] = this.cellX_m[cell];
    stackY[top] = this.cellY_m[cell];
    stackHalf[top] = 0.5 * s;
    top++;
    let sum = 0;
    let weightFound = 0;
    while (top > 0) {
      top--;
      const half = stackHalf[top];
      const x = stackX[top];
      const y = stackY[top];
      const rx = targetX_m - x;
      const ry = targetY_m - y;
      const gapX = Math.abs(rx) > half ? Math.abs(rx) - half : 0;
      const gapY = Math.abs(ry) > half ? Math.abs(ry) - half : 0;
      const gap = Math.sqrt(gapX * gapX + gapY * gapY);
      const side = 2 * half;
      if (side <= ELEMENT_SIZE_PER_DISTANCE * gap || side <= SMALLEST_ELEMENT_M) {
        if (!partial) {
          sum += side * side * this.element_g_m3(rx * downwindX + ry * downwindY, -rx * downwindY + ry * downwindX, targetZ_m, side);
          continue;
        }
        const step = side / PARTIAL_SAMPLES_PER_SIDE;
        let count = 0;
        let sumX = 0;
        let sumY = 0;
        for (let p = 0; p < PARTIAL_SAMPLES_PER_SIDE; p++) {
          const sx = x - half + (p + 0.5) * step;
          for (let q = 0; q < PARTIAL_SAMPLES_PER_SIDE; q++) {
            const sy = y - half + (q + 0.5) * step;
            if (isInsideRing(this.ring_m, sx, sy)) {
              count++;
              sumX += sx;
              sumY += sy;
            }
          }
        }
        if (count === 0) continue;
        const fraction = count / (PARTIAL_SAMPLES_PER_SIDE * PARTIAL_SAMPLES_PER_SIDE);
        const px = targetX_m - sumX / count;
        const py = targetY_m - sumY / count;
        const weight = side * side * fraction;
        weightFound += weight;
        sum += weight * this.element_g_m3(px * downwindX + py * downwindY, -px * downwindY + py * downwindX, targetZ_m, side * Math.sqrt(fraction));
        continue;
      }
      const quarter = 0.5 * half;
      stackX[top] = x - quarter;
      stackY[top] = y - quarter;
      stackHalf[top] = quarter;
      stackX[top + 1] = x + quarter;
      stackY[top + 1] = y - quarter;
      stackHalf[top + 1] = quarter;
      stackX[top + 2] = x - quarter;
      stackY[top + 2] = y + quarter;
      stackHalf[top + 2] = quarter;
      stackX[top + 3] = x + quarter;
      stackY[top + 3] = y + quarter;
      stackHalf[top + 3] = quarter;
      top += 4;
    }
    if (!partial) return (emission * sum) / (s * s);
    if (weightFound > 0) return (emission * sum) / weightFound;
    // a sliver no sample hit: its whole share from the cell's inside mean, as one small element
    const px = targetX_m - this.cellCentreX_m[cell];
    const py = targetY_m - this.cellCentreY_m[cell];
    return emission * this.element_g_m3(px * downwindX + py * downwindY, -px * downwindY + py * downwindX, targetZ_m, SMALLEST_ELEMENT_M);
  }
}
