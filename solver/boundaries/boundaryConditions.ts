/**
 * Boundary conditions of the grid solver, as parts the model is assembled with.
 *
 * - Lateral (the four sides): `OpenBoundaries(background)` lets mass leave where the wind blows out of the
 *   domain (zero-gradient ghost cells: the outgoing flux is the edge cell's own upwind flux, no diffusion
 *   across) and brings in air at the background concentration where it blows in or is calm (ghost cells at
 *   the background, so diffusion across that side sees it too). `PeriodicBoundaries` wraps the domain (for
 *   verification). `AdjointOpenBoundaries` are the transpose of the open sides, for the adjoint solves of
 *   ../siting/ (see there). Every flux through a side is booked as outflow (negative when it comes in).
 * - Ground: dry deposition, a downward flux v_d C(lowest layer) through the ground, solved implicitly with
 *   the vertical diffusion and booked as dry-deposited; v_d = 0 is a no-flux ground.
 * - Lid: no flux through the layer face nearest min(mixing height, grid top); layers above it still carry
 *   what was put there but exchange nothing with the mixed layer by diffusion.
 */
import { GHOST, type PaddedLayout } from '../fields/paddedLayout.ts';
import type { LocalGrid } from '../grid/types.ts';

export interface OpenLateralBoundaries {
  readonly kind: 'open';
  readonly name: string;
  /** concentration of the air coming in [g/m3] */
  readonly background_g_m3: number;
}

export interface PeriodicLateralBoundaries {
  readonly kind: 'periodic';
  readonly name: string;
}

/**
 * The transpose of `OpenBoundaries(0)` for an adjoint solve, whose wind is the forward wind reversed.
 * The forward sides give, per layer and side (a = |u| / dx, d = K_h / dx^2):
 * - forward inflow (ghost 0): the edge cell's diagonal a + 2d; its transpose is a ghost of 0 on the
 *   adjoint's outflow side;
 * - forward outflow (ghost = edge value, no diffusion across): diagonal a + d; on the adjoint's inflow side
 *   the reversed sweep reads the ghost with weight a + d, so the ghost that gives the transpose is
 *   d / (a + d) times the edge value, i.e. K_h / (|u| dx + K_h): the adjoint's total flux through that side
 *   vanishes (the discrete form of the continuous adjoint condition u psi + K dpsi/dn = 0 at an outflow).
 * Calm sides (u = 0) are ghost 0 both ways. Only the first ghost counts for first-order upwind; the second
 * (read by the limited slopes) is set equal to it.
 */
export interface AdjointOpenLateralBoundaries {
  readonly kind: 'adjointOpen';
  readonly name: string;
  /** per layer: ghost / edge value on the x side the (adjoint) wind blows in through, K_h / (|u| dx + K_h) */
  readonly inflowRatioX: Float64Array;
  /** per layer: the same on the y side, K_h / (|v| dx + K_h) */
  readonly inflowRatioY: Float64Array;
}

export type LateralBoundaries = OpenLateralBoundaries | PeriodicLateralBoundaries | AdjointOpenLateralBoundaries;

/**
 * The adjoint sides of `OpenBoundaries(0)` (see AdjointOpenLateralBoundaries).
 *
 * @param spacing_m horizontal cell size [m]
 * @param horizontal_m2_s horizontal diffusivity per layer [m2/s] (the forward model's)
 * @param u_m_s, v_m_s the wind per layer [m/s] (either sign: only the speeds enter)
 */
export function AdjointOpenBoundaries(spacing_m: number, horizontal_m2_s: Float64Array, u_m_s: Float64Array, v_m_s: Float64Array): AdjointOpenLateralBoundaries {
  const ratio = (diffusivity: number, speed: number): number => {
    const denominator = Math.abs(speed) * spacing_m + diffusivity;
    return denominator > 0 ? diffusivity / denominator : 0;
  };
  const inflowRatioX = Float64Array.from(horizontal_m2_s, (K, k) => ratio(K, u_m_s[k]));
  const inflowRatioY = Float64Array.from(horizontal_m2_s, (K, k) => ratio(K, v_m_s[k]));
  return Object.freeze({ kind: 'adjointOpen', name: 'AdjointOpenBoundaries', inflowRatioX, inflowRatioY });
}

/** Outflow where the wind leaves, inflow at a background concentration [g/m3] (default 0) elsewhere. */
export function OpenBoundaries(background_g_m3 = 0): OpenLateralBoundaries {
  if (!Number.isFinite(background_g_m3) || background_g_m3 < 0) {
    throw new RangeError(`inflow background is ${background_g_m3}; allowed: a finite concentration >= 0 g/m3`);
  }
  return Object.freeze({ kind: 'open', name: `OpenBoundaries(background ${background_g_m3} g/m3)`, background_g_m3 });
}

/** x and y wrap around (verification cases in a periodic box). */
export function PeriodicBoundaries(): PeriodicLateralBoundaries {
  return Object.freeze({ kind: 'periodic', name: 'PeriodicBoundaries' });
}

export interface GroundBoundary {
  readonly name: string;
  /** dry deposition velocity [m/s], >= 0; 0 = no flux through the ground */
  readonly depositionVelocity_m_s: number;
}

/** Dry deposition through the ground at velocity v_d [m/s]. */
export function DryDepositionGround(depositionVelocity_m_s: number): GroundBoundary {
  if (!Number.isFinite(depositionVelocity_m_s) || depositionVelocity_m_s < 0) {
    throw new RangeError(`pollutant.depositionVelocity_m_s is ${depositionVelocity_m_s}; allowed: a finite velocity >= 0 m/s`);
  }
  return Object.freeze({ name: `DryDepositionGround(${depositionVelocity_m_s} m/s)`, depositionVelocity_m_s });
}

/** A ground no mass passes through. */
export const NoFluxGround: GroundBoundary = Object.freeze({ name: 'NoFluxGround', depositionVelocity_m_s: 0 });

export interface MixingLid {
  readonly name: string;
  /** height of the lid [m]; above the grid top the top itself is the lid */
  readonly height_m: number;
}

/** A no-flux lid at a height [m] (the mixing height). */
export function MixingLid(height_m: number): MixingLid {
  if (!(height_m > 0) || Number.isNaN(height_m)) {
    throw new RangeError(`weather.mixingHeight_m is ${height_m}; allowed: a height > 0 m`);
  }
  return Object.freeze({ name: `MixingLid(${height_m} m)`, height_m });
}

/** The lid at the grid top. */
export const GridTopLid: MixingLid = Object.freeze({ name: 'GridTopLid', height_m: Infinity });

export interface BoundaryConditions {
  readonly lateral: LateralBoundaries;
  readonly ground: GroundBoundary;
  readonly lid: MixingLid;
}

/**
 * Index of the layer face that acts as the lid: the face nearest min(lid height, grid top), at least face 1
 * (one layer always stays open to the ground).
 */
export function lidFaceIndex(grid: LocalGrid, lid: MixingLid): number {
  const top = grid.zFaces_m[grid.nz];
  if (!(lid.height_m < top)) return grid.nz;
  let best = 1;
  for (let f = 1; f <= grid.nz; f++) {
    if (Math.abs(grid.zFaces_m[f] - lid.height_m) < Math.abs(grid.zFaces_m[best] - lid.height_m)) best = f;
  }
  return best;
}

/**
 * Write the x ghost cells of rows [jFrom - 2, jTo) (clipped to the grid) in every layer, plus the south
 * ghost rows when jFrom = 0 and the north ones when jTo = ny (y ghosts). Reads interior values only, so
 * slabs of rows can fill their own ghosts in parallel; the two rows below a slab are included because its
 * first row's slopes read their x ghosts (their owner writes the same values).
 *
 * @param u_m_s, v_m_s layer wind components [m/s] (their signs pick the outflow sides)
 */
export function fillGhostCells(
  layout: PaddedLayout,
  field: Float64Array,
  lateral: LateralBoundaries,
  u_m_s: Float64Array,
  v_m_s: Float64Array,
  jFrom: number,
  jTo: number,
): void {
  const { nx, ny, nz, rowStride, planeStride } = layout;
  const periodic = lateral.kind === 'periodic';
  const background = lateral.kind === 'open' ? lateral.background_g_m3 : 0;
  const adjoint = lateral.kind === 'adjointOpen' ? lateral : null;
  for (let k = 0; k < nz; k++) {
    const plane = k * planeStride;
    const westOutflow = u_m_s[k] < 0;
    const eastOutflow = u_m_s[k] > 0;
    // Adjoint sides: ghost = ratio x edge where the wind blows in, 0 where it blows out (see above).
    const ratioX = adjoint ? adjoint.inflowRatioX[k] : 0;
    const ratioY = adjoint ? adjoint.inflowRatioY[k] : 0;
    for (let j = Math.max(0, jFrom - 2); j < jTo; j++) {
      const first = plane + rowStride * (j + GHOST) + GHOST;
      const last = first + nx - 1;
      if (periodic) {
        field[first - 1] = field[last];
        field[first - 2] = field[nx >= 2 ? last - 1 : last];
        field[last + 1] = field[first];
        field[last + 2] = field[nx >= 2 ? first + 1 : first];
      } else if (adjoint) {
        const west = eastOutflow ? ratioX * field[first] : 0;
        field[first - 1] = west;
        field[first - 2] = west;
        const east = westOutflow ? ratioX * field[last] : 0;
        field[last + 1] = east;
        field[last + 2] = east;
      } else {
        const west = westOutflow ? field[first] : background;
        field[first - 1] = west;
        field[first - 2] = west;
        const east = eastOutflow ? field[last] : background;
        field[last + 1] = east;
        field[last + 2] = east;
      }
    }
    const southOutflow = v_m_s[k] < 0;
    const northOutflow = v_m_s[k] > 0;
    const firstRow = plane + rowStride * GHOST + GHOST;
    const lastRow = firstRow + rowStride * (ny - 1);
    if (jFrom === 0) {
      for (let i = 0; i < nx; i++) {
        if (periodic) {
          field[firstRow - rowStride + i] = field[lastRow + i];
          field[firstRow - 2 * rowStride + i] = field[(ny >= 2 ? lastRow - rowStride : lastRow) + i];
        } else if (adjoint) {
          const south = northOutflow ? ratioY * field[firstRow + i] : 0;
          field[firstRow - rowStride + i] = south;
          field[firstRow - 2 * rowStride + i] = south;
        } else {
          const south = southOutflow ? field[firstRow + i] : background;
          field[firstRow - rowStride + i] = south;
          field[firstRow - 2 * rowStride + i] = south;
        }
      }
    }
    if (jTo === ny) {
      for (let i = 0; i < nx; i++) {
        if (periodic) {
          field[lastRow + rowStride + i] = field[firstRow + i];
          field[lastRow + 2 * rowStride + i] = field[(ny >= 2 ? firstRow + rowStride : firstRow) + i];
        } else if (adjoint) {
          const north = southOutflow ? ratioY * field[lastRow + i] : 0;
          field[lastRow + rowStride + i] = north;
          field[lastRow + 2 * rowStride + i] = north;
        } else {
          const north = northOutflow ? field[lastRow + i] : background;
          field[lastRow + rowStride + i] = north;
          field[lastRow + 2 * rowStride + i] = north;
        }
      }
    }
  }
}
