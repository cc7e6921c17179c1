/**
 * The fused transport step over a slab of rows (all layers): one pass up the layers doing the explicit
 * horizontal part (limited flux-form advection in x and y, horizontal diffusion), explicit vertical
 * advection when there is a vertical velocity, the sources, and the forward elimination of the implicit
 * vertical diffusion; then one pass down doing the back substitution with the exact first-order loss
 * factor folded in. Reads `previous` (ghost cells filled), writes `next`; slabs of different rows can run
 * at the same time on shared memory, since each reads only `previous` and writes only its own rows.
 *
 * Flux form throughout: each face flux is computed once per face and used for both cells, so interior
 * fluxes cancel exactly and the only mass that crosses a side is booked as outflow.
 *
 * Index order and signs: padded index (i + 2) + rowStride * ((j + 2) + columnRows * k) (see
 * ../fields/paddedLayout.ts); fluxes positive toward +x, +y, +z.
 */
import type { StepPlan } from './stepPlan.ts';
import { MAX_SLABS, instantiateTransportRow, kernelScratchOffset, type KernelMemory, type TransportRowFunction } from './simd/transportRowModule.ts';

/** Per-slab work arrays (allocated once, reused every step: no allocation in the loops). */
export interface SlabScratch {
  /** the WebAssembly SIMD row kernel on the memory that holds the fields and these rows, or null */
  row: TransportRowFunction | null;
  /** limited y slope of the current row, per column */
  slopeY: Float64Array;
  /** y flux through the south face of the current row, per column */
  fluxY: Float64Array;
  /** vertical advective flux through the bottom face of the current layer, per cell of the slab [g/m2] */
  fluxZ: Float64Array;
}

/**
 * Work arrays for a slab of `rows` rows. With a kernel memory, the y rows live in it (slab number `slab`)
 * and the SIMD row kernel is instantiated on it.
 */
export function createSlabScratch(nx: number, rows: number, kernel: KernelMemory | null = null, slab = 0): SlabScratch {
  if (kernel !== null) {
    if (kernel.nx !== nx || slab < 0 || slab >= MAX_SLABS) throw new RangeError(`slab ${slab} does not fit the kernel memory (nx ${kernel.nx}, ${MAX_SLABS} slabs)`);
    const offset = kernelScratchOffset(kernel, slab);
    return {
      row: instantiateTransportRow(kernel),
      slopeY: new Float64Array(kernel.memory.buffer, offset, nx),
      fluxY: new Float64Array(kernel.memory.buffer, offset + 8 * nx, nx),
      fluxZ: new Float64Array(nx * rows),
    };
  }
  return { row: null, slopeY: new Float64Array(nx), fluxY: new Float64Array(nx), fluxZ: new Float64Array(nx * rows) };
}

/** What a slab step books, added into `tally` at `offset`: [outflow g, mass after g, ground-layer mass after g]. */
export const TALLY_OUTFLOW = 0;
export const TALLY_MASS = 1;
export const TALLY_GROUND_SUM = 2;
export const TALLY_LENGTH = 4;

/**
 * Added to the limiter's denominators [g/m3] so 0/0 cannot happen and the shared denominator of two slopes
 * stays a finite non-zero double; differences below it are treated as flat (first order), far below any
 * concentration that matters.
 */
const SLOPE_FLOOR = 1e-150;

/**
 * van Leer's limited slope (van Leer 1974, J. Comput. Phys. 14:361), the harmonic mean of the backward and
 * forward differences when they agree in sign and 0 otherwise: (a|b| + |a|b) / (|a| + |b|). Branch-free (no
 * mispredicted branches on rough fields); at most twice either difference, so face values stay between
 * neighbouring cell values (Sweby 1984).
 */
function limitedSlope(backward: number, forward: number): number {
  const absBackward = Math.abs(backward);
  const absForward = Math.abs(forward);
  return (backward * absForward + absBackward * forward) / (absBackward + absForward + SLOPE_FLOOR);
}

/**
 * The van Leer y slope of the cell north of `m`, computed as the main loop of `transportSlab` computes it
 * while at cell m (sharing one division with the x slope of the cell east of m).
 */
function northSlopeAsSwept(previous: Float64Array, m: number, rowStride: number): number {
  const c0 = previous[m];
  const cE = previous[m + 1];
  const cN = previous[m + rowStride];
  const dE = cE - c0;
  const dEE = previous[m + 2] - cE;
  const dN = cN - c0;
  const dNN = previous[m + rowStride + rowStride] - cN;
  const absE = Math.abs(dE);
  const absEE = Math.abs(dEE);
  const absN = Math.abs(dN);
  const absNN = Math.abs(dNN);
  const sumX = absE + absEE + SLOPE_FLOOR;
  const sumY = absN + absNN + SLOPE_FLOOR;
  const inverse = 1 / (sumX * sumY);
  return (dN * absNN + absN * dNN) * sumX * inverse;
}

/**
 * Advance rows [jFrom, jTo) of every layer by one step.
 *
 * @param plan coefficients of the step
 * @param previous field at the start of the step, ghosts filled [g/m3]
 * @param next field at the end of the step (rows [jFrom, jTo) written) [g/m3]
 * @param tally budget accumulators (see TALLY_*), added to at offset
 */
export function transportSlab(
  plan: StepPlan,
  previous: Float64Array,
  next: Float64Array,
  jFrom: number,
  jTo: number,
  scratch: SlabScratch,
  tally: Float64Array,
  offset: number,
): void {
  const { nx, ny, nz, rowStride, planeStride } = plan;
  const slopeY = scratch.slopeY;
  const fluxY = scratch.fluxY;
  const fluxZ = scratch.fluxZ;
  const sourceCells = plan.sourceCells;
  const sourceIncrements = plan.sourceIncrements;
  const sourceCount = sourceCells.length;
  let sourcePointer = 0;
  let outflow_g = 0;
  const twoRows = rowStride + rowStride;
  const verticalAdvection = plan.verticalAdvection;
  // The SIMD row kernel does two cells at a time and has no vertical advection: even nx, w = 0.
  const row = scratch.row;
  const useRowKernel = row !== null && !verticalAdvection && (nx & 1) === 0 && previous.buffer === scratch.slopeY.buffer && next.buffer === previous.buffer;

  for (let k = 0; k < nz; k++) {
    const cxPlus = plan.xPlus[k];
    const cxMinus = plan.xMinus[k];
    const ax = plan.xSlope[k];
    const dxn = plan.xDiffusion[k];
    const cyPlus = plan.yPlus[k];
    const cyMinus = plan.yMinus[k];
    const ay = plan.ySlope[k];
    const dyn = plan.yDiffusion[k];
    const lower = plan.lower[k];
    const inversePivot = plan.inversePivot[k];
    const planeBase = k * planeStride + 2;
    let layerOutflow = 0;

    // y fluxes through the south face of the slab's first row. The slopes are computed exactly as the
    // main loop computes them for the rows below (same shared division), so a face on a slab boundary
    // gets the same value to the last bit from both slabs and the threaded step equals the serial one.
    {
      const base = planeBase + rowStride * (jFrom + 2);
      let southSum = 0;
      for (let i = 0; i < nx; i++) {
        const n = base + i;
        const cS = previous[n - rowStride];
        const c0 = previous[n];
        const sS = northSlopeAsSwept(previous, n - twoRows, rowStride);
        const s0 = northSlopeAsSwept(previous, n - rowStride, rowStride);
        const flux = cyPlus * (cS + ay * sS) + cyMinus * (c0 - ay * s0) - dyn * (c0 - cS);
        fluxY[i] = flux;
        slopeY[i] = s0;
        southSum += flux;
      }
      if (jFrom === 0) layerOutflow -= southSum;
    }

    for (let j = jFrom; j < jTo; j++) {
      const base = planeBase + rowStride * (j + 2);
      let cW = previous[base - 1];
      let c0 = previous[base];
      let cE = previous[base + 1];
      const sW = limitedSlope(cW - previous[base - 2], c0 - cW);
      let s0 = limitedSlope(c0 - cW, cE - c0);
      let fluxW = cxPlus * (cW + ax * sW) + cxMinus * (c0 - ax * s0) - dxn * (c0 - cW);
      layerOutflow -= fluxW;
      // Forward elimination of the implicit vertical diffusion fused in: row k of the tridiagonal system
      // gives next_k = (explicit_k + lower_k next_{k-1}) / pivot_k.
      // In the ground layer there is no layer below: read this cell of `previous` (finite) times 0.
      const below = k === 0 ? 0 : lower;
      const belowSource = k === 0 ? previous : next;
      const belowOffset = k === 0 ? 0 : planeStride;
      if (useRowKernel) {
        const belowAddress = k === 0 ? previous.byteOffset + 8 * base : next.byteOffset + 8 * (base - planeStride);
        fluxW = row!(
          previous.byteOffset + 8 * base,
          next.byteOffset + 8 * base,
          belowAddress,
          slopeY.byteOffset,
          fluxY.byteOffset,
          nx >> 1,
          8 * rowStride,
          cxPlus,
          cxMinus,
          ax,
          dxn,
          cyPlus,
          cyMinus,
          ay,
          dyn,
          below,
          inversePivot,
          s0,
          fluxW,
        );
      } else {
        for (let i = 0; i < nx; i++) {
          const n = base + i;
          const cEE = previous[n + 2];
          const cN = previous[n + rowStride];
          const dE = cE - c0;
          const dEE = cEE - cE;
          const dN = cN - c0;
          const dNN = previous[n + twoRows] - cN;
          // van Leer slopes of the east and north neighbours, (a|b| + |a|b) / (|a| + |b|), with one division
          // for both: 1/X = Y / (X Y). SLOPE_FLOOR keeps X Y finite and non-zero.
          const absE = Math.abs(dE);
          const absEE = Math.abs(dEE);
          const absN = Math.abs(dN);
          const absNN = Math.abs(dNN);
          const sumX = absE + absEE + SLOPE_FLOOR;
          const sumY = absN + absNN + SLOPE_FLOOR;
          const inverse = 1 / (sumX * sumY);
          const sE = (dE * absEE + absE * dEE) * sumY * inverse;
          const sN = (dN * absNN + absN * dNN) * sumX * inverse;
          const fluxE = cxPlus * (c0 + ax * s0) + cxMinus * (cE - ax * sE) - dxn * dE;
          const fluxN = cyPlus * (c0 + ay * slopeY[i]) + cyMinus * (cN - ay * sN) - dyn * dN;
          const explicit = c0 - (fluxE - fluxW) - (fluxN - fluxY[i]);
          next[n] = verticalAdvection ? explicit : (explicit + below * belowSource[n - belowOffset]) * inversePivot;
          fluxY[i] = fluxN;
          slopeY[i] = sN;
          fluxW = fluxE;
          c0 = cE;
          cE = cEE;
          s0 = sE;
        }
      }
      layerOutflow += fluxW;
      if (j === ny - 1) {
        for (let i = 0; i < nx; i++) layerOutflow += fluxY[i];
      }

      if (verticalAdvection) {
        const wPlusTop = plan.zPlus[k + 1];
        const wMinusTop = plan.zMinus[k + 1];
        const azBelow = plan.zSlopeBelow[k + 1];
        const azAbove = plan.zSlopeAbove[k + 1];
        const inverseDz = plan.inverseDz_per_m[k];
        const slabRow = nx * (j - jFrom);
        for (let i = 0; i < nx; i++) {
          const n = base + i;
          let fluxTop = 0;
          if (k < nz - 1) {
            const c0z = previous[n];
            const cUp = previous[n + planeStride];
            const sHere = k > 0 ? limitedSlope(c0z - previous[n - planeStride], cUp - c0z) : 0;
            const sUp = k < nz - 2 ? limitedSlope(cUp - c0z, previous[n + 2 * planeStride] - cUp) : 0;
            fluxTop = wPlusTop * (c0z + azBelow * sHere) + wMinusTop * (cUp - azAbove * sUp);
          }
          const fluxBottom = k > 0 ? fluxZ[slabRow + i] : 0;
          next[n] -= (fluxTop - fluxBottom) * inverseDz;
          fluxZ[slabRow + i] = fluxTop;
        }
      }

      if (verticalAdvection) {
        // Forward elimination after the vertical advective fluxes were added.
        for (let i = 0; i < nx; i++) {
          const n = base + i;
          next[n] = (next[n] + below * belowSource[n - belowOffset]) * inversePivot;
        }
      }
      const rowEnd = base + nx;
      while (sourcePointer < sourceCount && sourceCells[sourcePointer] < rowEnd) {
        const cell = sourceCells[sourcePointer];
        if (cell >= base) next[cell] += sourceIncrements[sourcePointer];
        sourcePointer++;
      }
    }
    outflow_g += layerOutflow * plan.cellVolume_m3[k];
  }

  // Back substitution, top layer down, with the loss factor folded in:
  // c_k = f (d_k + u_k c*_{k+1}) = f d_k + u_k (f c*_{k+1}), u_k = hi_k / pivot_k (the upper coupling).
  const lossFactor = plan.lossFactor;
  let mass_g = 0;
  let groundSum = 0;
  for (let k = nz - 1; k >= 0; k--) {
    const upper = plan.upperFactor[k];
    let layerSum = 0;
    for (let j = jFrom; j < jTo; j++) {
      const base = k * planeStride + 2 + rowStride * (j + 2);
      if (k === nz - 1) {
        for (let i = 0; i < nx; i++) {
          const value = next[base + i] * lossFactor;
          next[base + i] = value;
          layerSum += value;
        }
      } else {
        for (let i = 0; i < nx; i++) {
          const n = base + i;
          const value = next[n] * lossFactor + upper * next[n + planeStride];
          next[n] = value;
          layerSum += value;
        }
      }
    }
    mass_g += layerSum * plan.cellVolume_m3[k];
    if (k === 0) groundSum = layerSum;
  }
  tally[offset + TALLY_OUTFLOW] += outflow_g;
  tally[offset + TALLY_MASS] += mass_g;
  tally[offset + TALLY_GROUND_SUM] += groundSum;
}
