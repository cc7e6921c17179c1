/**
 * Plume-in-grid: each stack's young plume (and each area source smaller than a few cells) is carried as
 * the Gaussian plume of the Gaussian mode (same dispersion curves, plume rise, transport wind and
 * first-order losses: ../reference/sourcePlumes.ts) until the grid can take it, then handed to the grid
 * with the mass that is left and the plume's cross-section there. The idea is the plume-in-grid
 * treatment of photochemical grid models (Seigneur et al. 1983, Atmos. Environ. 17:1655; Karamchandani
 * et al. 2000, Environ. Sci. Technol. 34:870; both from memory): a sub-grid plume is carried by its own
 * model until its size is comparable with the grid cells, and only then mixed into them.
 *
 * Handover distance x_h (downwind of the stack, or of an area's centroid): the first distance at which
 * all of these hold (docs/near-field.md says why each is there):
 *
 *   resolved across the wind   sigma_y(x) >= RESOLVED_CELLS dx     (an area: sqrt(sigma_y^2 + W^2 / 12),
 *                                                                   W its crosswind width)
 *   resolved in the vertical   sigma_z(x) >= RESOLVED_CELLS dz(H)  (dz the layer holding the plume),
 *                                                                   or sigma_z beyond the mixing height
 *   old enough for the closure sqrt(2/pi) sigma_z(x) >= H(x)       (the plume has grown down to the
 *                                                                   ground: from there on it is the
 *                                                                   ground-connected plume the stability
 *                                                                   closure's diffusivities describe, see
 *                                                                   ../closures/stabilityDiffusivity.ts)
 *   risen                      x >= the distance of final rise
 *   past the area              x >= an area's downwind half-extent + 2 dx (the band clears it)
 *
 * H(x) is the plume's centreline height there (gradual rise included). The search stops short of the
 * domain's downwind edge (two cells in): a plume still unresolved there is handed over at the edge, and
 * the run's notes say so.
 *
 * How the hand-over is spread: over the cells whose centres lie within b = max(2 dx, sigma_y(x_h)) along
 * the wind of x_h, with a hat weight (1 - |s - x_h| / b) along the wind (smooth in x_h and in the wind
 * direction), the plume's
 * crosswind density at x_h across it (an area's: a band of its width), and its vertical density at x_h
 * (reflected at the ground and under the mixing lid) times each layer's thickness. The weights are
 * normalised, so the grid receives exactly the mass flux that is left: Q exp(-(k + Lambda) x_h / u) times
 * the dry-deposition depletion factor at x_h. Each layer's share is the plume's vertical density times
 * the grid's wind there (a mass flux), and the sub-grid plume travels at the grid's wind averaged over its
 * own profile at x_h, so the concentration is continuous across the hand-over and mass is exact. The
 * sub-grid plume's own concentration is counted where the grid does not yet hold it: fully upwind of the
 * band, then reduced by the share the grid holds, read as the grid's field is read (heldShareAt).
 *
 * The losses on the way (decay, washout, deposition between the source and x_h) are booked in the run's
 * mass budget, integrated along the plume's mass flux Q(x) = Q L(x) D(x): first-order losses
 * (k + Lambda) Q(x) / u, deposition the rest of Q - Q(x_h).
 */
import type { PlacedAreaSource, PlacedPointSource } from '../drivers/types.ts';
import type { LocalGrid } from '../grid/types.ts';
import type { SigmaFunction } from '../reference/dispersionCurves.ts';
import type { GaussianAreaSource } from '../reference/gaussianAreaSource.ts';
import { horizontalBracket } from '../diagnostics/receptorSampling.ts';
import { crosswindDensity_per_m, type GaussianPlume } from '../reference/gaussianPlume.ts';
import { areaSourcePlume, firstOrderRates_per_s, pointSourcePlume } from '../reference/sourcePlumes.ts';
import { windSpeedAtHeight_m_s } from '../wind/powerLaw.ts';
import { gridEmissionFromSources, layerHolding } from './gridEmission.ts';
import { sourcesEmission_g_s, type NearFieldContext, type NearFieldPlan, type NearFieldTreatment, type SourceHandover, type SubGridLosses } from './nearField.ts';

/**
 * Spreads (sigma) a plume must have, in cells, before the grid takes it [-]: two cells. At sigma = 2 dx a
 * Gaussian is sampled by about ten cells across its +-2.5 sigma core, and the limited-slope advection's
 * spreading of a profile that smooth is small (measured: docs/near-field.md). Plumeplan's choice.
 */
export const RESOLVED_CELLS = 2;

/**
 * Smallest crosswind spread sigma_y a plume is handed to the grid with, whatever the cell size [m]: 100 m
 * (two of the demo's 50 m cells). Measured (docs/near-field.md): handed over narrower than this, the
 * grid's stability closure keeps a young plume too narrow near the ground, and the figures then move with
 * the cell size through the hand-over distance. Plumeplan's choice.
 */
export const MINIMUM_HANDOVER_SPREAD_m = 100;

/**
 * An area source is carried below the grid when its largest extent is at most this many cells [-];
 * larger areas are resolved by their cell overlaps and go straight into the grid. Plumeplan's choice.
 */
export const SMALL_AREA_CELLS = 3;

/**
 * An area source is also carried below the grid, whatever the cell, when its largest extent is at most
 * this many times the hand-over's least spread (MINIMUM_HANDOVER_SPREAD_m) [-]: sqrt(12), the width of
 * a uniform band whose standard deviation is that spread (W / sqrt(12) = sigma). A narrower area's
 * plume starts narrower than the grid is trusted with, so it is the sub-grid plume's at every cell size;
 * with the cell-count rule alone the demo's 85 m fuel yard went straight into 20 m cells but below the
 * grid at 50 m, and the houses' figures moved by 57 % in class F between the two (docs/near-field.md).
 */
export const SMALL_AREA_SPREADS = Math.sqrt(12);

/**
 * Least half-width of the hand-over band along the wind, in cells [-]; the band is sigma_y(x_h) wide
 * when that is more. Measured (docs/near-field.md): with a band of one cell the limited-slope advection's
 * reading of the steep ramp left the figures within the band 11-13 % off at 50 m cells; with two cells
 * within 4 % of the 12.5 m figures; under constant K at 25 m cells two cells (50 m) left 8 % at one
 * receptor in the band, sigma_y (100 m) 2.6 %.
 */
export const BAND_HALF_WIDTH_CELLS = 2;

/** Mean height of a ground-reflected Gaussian per unit sigma_z: sqrt(2 / pi) [-]. */
const MEAN_HEIGHT_PER_SIGMA_Z = Math.sqrt(2 / Math.PI);

/** Geometric step of the hand-over search and of the loss integrals [-]. */
const SEARCH_RATIO = 1.01;

/** Crosswind reach of a sub-grid plume, in spreads [-] (exp(-0.5 * 36) = 1.5e-8 of the axis value). */
const CROSSWIND_REACH_SIGMAS = 6;

/** Options of the sub-grid plume treatment. */
export interface SubGridPlumeOptions {
  /** spreads in cells before hand-over, default RESOLVED_CELLS (2) */
  resolvedCells?: number;
  /** areas up to this many cells across (or sqrt(12) x minimumSpread_m, when more) are carried below the grid, default SMALL_AREA_CELLS (3) */
  smallAreaCells?: number;
  /** smallest crosswind spread handed to the grid whatever the cell [m], default MINIMUM_HANDOVER_SPREAD_m (100) */
  minimumSpread_m?: number;
}

/** One source carried below the grid. */
interface CarriedSource {
  id: string;
  kind: 'point' | 'area';
  originX_m: number;
  originY_m: number;
  plume: GaussianPlume;
  /** the area's integrated plume (areas only) */
  area: GaussianAreaSource | null;
  handover_m: number;
  /** half-width of the hand-over band along the wind [m] */
  band_m: number;
  /** downwind distances of the hand-over band's column centres, ascending [m] */
  heldAlong_m: Float64Array;
  /** share of the flux handed to the grid at or upwind of each of those distances [-] */
  heldShare: Float64Array;
  /** crosswind reach of the plume up to the hand-over [m] */
  crosswindReach_m: number;
  /** upwind reach (an area extends upwind of its centroid) [m] */
  upwindReach_m: number;
}

/** Distance along the downwind ray from (x, y) to the domain's edge [m]. */
function distanceToEdge_m(grid: LocalGrid, x_m: number, y_m: number, downwindX: number, downwindY: number): number {
  const east = grid.xWest_m + grid.nx * grid.spacing_m;
  const north = grid.ySouth_m + grid.ny * grid.spacing_m;
  let distance = Infinity;
  if (downwindX > 1e-12) distance = Math.min(distance, (east - x_m) / downwindX);
  if (downwindX < -1e-12) distance = Math.min(distance, (grid.xWest_m - x_m) / downwindX);
  if (downwindY > 1e-12) distance = Math.min(distance, (north - y_m) / downwindY);
  if (downwindY < -1e-12) distance = Math.min(distance, (grid.ySouth_m - y_m) / downwindY);
  return Math.max(distance, 0);
}

/**
 * The share of the flux the grid holds at a column centre at downwind distance s [-]: everything handed
 * to columns upwind of it, and half of what its own distance receives (the limited-slope advection reads
 * a cell's value as the value at its centre, so cells receiving mass hold half of it there).
 *
 * @param along_m band column distances, ascending; share the running share up to and including each
 */
function heldShareAt(along_m: Float64Array, share: Float64Array, s_m: number): number {
  const count = along_m.length;
  if (count === 0 || s_m < along_m[0]) return 0;
  if (s_m > along_m[count - 1]) return 1;
  // first index with along >= s, and first with along > s
  let low = 0;
  let high = count;
  while (low < high) {
    const middle = (low + high) >> 1;
    if (along_m[middle] < s_m) low = middle + 1;
    else high = middle;
  }
  const before = low === 0 ? 0 : share[low - 1];
  let end = low;
  while (end < count && along_m[end] <= s_m) end++;
  const through = end === 0 ? 0 : share[end - 1];
  return 0.5 * (before + through);
}

/**
 * The sub-grid plume treatment (file comment).
 *
 * @example const plan = new SubGridPlume().plan({ grid, sources, releaseHeights_m, weather, pollutant, dispersion, landUse, windProfile });
 */
export class SubGridPlume implements NearFieldTreatment {
  readonly name: string;
  private readonly resolvedCells: number;
  private readonly smallAreaCells: number;
  private readonly minimumSpread_m: number;

  constructor(options: SubGridPlumeOptions = {}) {
    this.resolvedCells = options.resolvedCells ?? RESOLVED_CELLS;
    this.minimumSpread_m = options.minimumSpread_m ?? MINIMUM_HANDOVER_SPREAD_m;
    if (!(this.minimumSpread_m >= 0) || !Number.isFinite(this.minimumSpread_m)) {
      throw new RangeError(`minimumSpread_m is ${this.minimumSpread_m}; allowed: a finite spread >= 0 m`);
    }
    this.smallAreaCells = options.smallAreaCells ?? SMALL_AREA_CELLS;
    if (!(this.resolvedCells > 0) || !Number.isFinite(this.resolvedCells)) {
      throw new RangeError(`resolvedCells is ${this.resolvedCells}; allowed: a finite number of cells > 0`);
    }
    if (!(this.smallAreaCells >= 0) || !Number.isFinite(this.smallAreaCells)) {
      throw new RangeError(`smallAreaCells is ${this.smallAreaCells}; allowed: a finite number of cells >= 0`);
    }
    this.name = `SubGridPlume (hand-over at sigma_y >= max(${this.resolvedCells} cells, ${this.minimumSpread_m} m), areas up to ${this.smallAreaCells} cells or ${(SMALL_AREA_SPREADS * this.minimumSpread_m).toFixed(0)} m)`;
  }

  /** Largest extent of an area carried below the grid [m]: smallAreaCells cells, or sqrt(12) least spreads when more. */
  private smallAreaLimit_m(dx: number): number {
    return Math.max(this.smallAreaCells * dx, SMALL_AREA_SPREADS * this.minimumSpread_m);
  }

  /**
   * Share of a carried plume the grid does not yet hold at a point [-]: one minus what the grid's own
   * field holds there, read the way the grid's field is read (bilinear between column centres), so that
   * grid field plus sub-grid plume count the plume's flux once across the hand-over band.
   */
  private subGridShare(grid: LocalGrid, c: CarriedSource, x_m: number, y_m: number, downwindX: number, downwindY: number): number {
    const dx = grid.spacing_m;
    const [i0, wx] = horizontalBracket((x_m - grid.xWest_m) / dx - 0.5, grid.nx);
    const [j0, wy] = horizontalBracket((y_m - grid.ySouth_m) / dx - 0.5, grid.ny);
    const i1 = Math.min(i0 + 1, grid.nx - 1);
    const j1 = Math.min(j0 + 1, grid.ny - 1);
    const held = (i: number, j: number): number => {
      const along = (grid.xWest_m + (i + 0.5) * dx - c.originX_m) * downwindX + (grid.ySouth_m + (j + 0.5) * dx - c.originY_m) * downwindY;
      return heldShareAt(c.heldAlong_m, c.heldShare, along);
    };
    const gridHeld = (1 - wy) * ((1 - wx) * held(i0, j0) + wx * held(i1, j0)) + wy * ((1 - wx) * held(i0, j1) + wx * held(i1, j1));
    return gridHeld >= 1 ? 0 : 1 - gridHeld;
  }

  plan(context: NearFieldContext): NearFieldPlan {
    const { grid, sources, releaseHeights_m, weather } = context;
    if (releaseHeights_m.length !== sources.length) {
      throw new RangeError(`releaseHeights_m has ${releaseHeights_m.length} entries; there are ${sources.length} sources`);
    }
    const dx = grid.spacing_m;
    const theta = (weather.windFrom_deg * Math.PI) / 180;
    const downwindX = -Math.sin(theta);
    const downwindY = -Math.cos(theta);
    const domainDiagonal_m = Math.hypot(grid.nx * dx, grid.ny * dx);
    const { decay_per_s, washout_per_s } = firstOrderRates_per_s(context);

    const direct: PlacedAreaSource[] = [];
    const directHeights: number[] = [];
    const carried: CarriedSource[] = [];
    const handovers: SourceHandover[] = [];
    const notes: string[] = [];
    const perCell = new Map<number, number>();
    const losses: SubGridLosses = { decayed: 0, washedOut: 0, dryDeposited: 0 };
    let heldMass_g = 0;

    sources.forEach((source, n) => {
      if (!Number.isFinite(source.emission_g_s) || source.emission_g_s < 0) {
        throw new RangeError(`sources[${n}] (${source.id}).emission_g_s is ${source.emission_g_s}; allowed: a finite rate >= 0 g/s`);
      }
      let build: (transportWind_m_s?: number) => { plume: GaussianPlume; sigmas: SigmaFunction; area: GaussianAreaSource | null };
      let crossWidth_m = 0;
      let crossCentre_m = 0;
      let downwindHalf_m = 0;
      let upwindHalf_m = 0;
      let finalRiseDistance_m = 0;
      if (source.kind === 'area') {
        let minAlong = Infinity;
        let maxAlong = -Infinity;
        let minCross = Infinity;
        let maxCross = -Infinity;
        let minX = Infinity;
        let maxX = -Infinity;
        let minY = Infinity;
        let maxY = -Infinity;
        for (const [x, y] of source.ring_m) {
          const rx = x - source.x_m;
          const ry = y - source.y_m;
          const along = rx * downwindX + ry * downwindY;
          const cross = -rx * downwindY + ry * downwindX;
          minAlong = Math.min(minAlong, along);
          maxAlong = Math.max(maxAlong, along);
          minCross = Math.min(minCross, cross);
          maxCross = Math.max(maxCross, cross);
          minX = Math.min(minX, x);
          maxX = Math.max(maxX, x);
          minY = Math.min(minY, y);
          maxY = Math.max(maxY, y);
        }
        const extent_m = Math.max(maxX - minX, maxY - minY);
        if (extent_m > this.smallAreaLimit_m(dx)) {
          direct.push(source);
          directHeights.push(releaseHeights_m[n]);
          handovers.push({ id: source.id, handoverDistance_m: 0, handedOverFraction: 1, transportWind_m_s: null });
          return;
        }
        build = (wind) => areaSourcePlume(source, grid, context, 2 * domainDiagonal_m + 1000, wind);
        crossWidth_m = maxCross - minCross;
        crossCentre_m = 0.5 * (maxCross + minCross);
        downwindHalf_m = Math.max(maxAlong, 0);
        upwindHalf_m = Math.max(-minAlong, 0);
      } else {
        const point = source as PlacedPointSource;
        build = (wind) => ({ ...pointSourcePlume(point, context, 2 * domainDiagonal_m + 1000, wind), area: null });
        finalRiseDistance_m = point.plumeRise ? (pointSourcePlume(point, context, 1000).rise?.distanceToFinalRise_m ?? 0) : 0;
      }
      const gaussianMode = build();
      let plume = gaussianMode.plume;
      const sigmas = gaussianMode.sigmas;
      const emission_g_s = source.emission_g_s;
      const originX = source.x_m;
      const originY = source.y_m;
      const spreadY = (x: number): number => Math.sqrt(sigmas.sigmaY_m(x) ** 2 + (crossWidth_m * crossWidth_m) / 12);
      const lid_m = plume.lidApplied ? weather.mixingHeight_m : Infinity;

      // The hand-over distance: the first distance meeting every criterion, short of the domain's edge.
      const toEdge_m = distanceToEdge_m(grid, originX, originY, downwindX, downwindY);
      const edge_m = toEdge_m - (BAND_HALF_WIDTH_CELLS + 1) * dx;
      const earliest_m = Math.max(downwindHalf_m + BAND_HALF_WIDTH_CELLS * dx, finalRiseDistance_m, 1);
      const ready = (x: number): boolean => {
        const height = plume.heightAt_m(x);
        const sigmaZ = sigmas.sigmaZ_m(x);
        const layer = layerHolding(grid, Math.min(height, grid.zFaces_m[grid.nz]));
        return (
          spreadY(x) >= Math.max(this.resolvedCells * dx, this.minimumSpread_m) &&
          (sigmaZ >= this.resolvedCells * grid.dz_m[layer] || sigmaZ >= lid_m) &&
          (MEAN_HEIGHT_PER_SIGMA_Z * sigmaZ >= height || sigmaZ >= lid_m)
        );
      };
      let handover_m = earliest_m;
      while (handover_m < edge_m && !ready(handover_m)) handover_m *= SEARCH_RATIO;
      let atEdge = false;
      if (handover_m >= edge_m) {
        atEdge = !ready(Math.max(edge_m, earliest_m));
        handover_m = Math.max(Math.min(handover_m, edge_m), Math.min(earliest_m, dx));
      }

      const layerWeights = new Float64Array(grid.nz);
      let layerSum = 0;
      let profileSum = 0;
      for (let k = 0; k < grid.nz; k++) {
        if (grid.zCentres_m[k] > lid_m) break;
        // mass flux through the layer: the plume's concentration profile times the grid's wind there
        const layerWind_m_s = windSpeedAtHeight_m_s(weather, grid.zCentres_m[k], context.landUse, context.windProfile);
        const share = plume.verticalDensity_per_m(handover_m, grid.zCentres_m[k]) * grid.dz_m[k];
        layerWeights[k] = share * layerWind_m_s;
        layerSum += layerWeights[k];
        profileSum += share;
      }
      if (!(layerSum > 0)) {
        layerWeights[layerHolding(grid, Math.min(plume.heightAt_m(handover_m), grid.zFaces_m[grid.nz]))] = 1;
      }
      // The sub-grid plume travels at the grid's wind averaged over its own profile at the hand-over, so
      // the concentration is continuous there and the grid receives the same mass flux.
      const transportWind_m_s = layerSum > 0 && profileSum > 0 ? layerSum / profileSum : plume.windSpeed_m_s;
      const carriedPlume = build(transportWind_m_s);
      plume = carriedPlume.plume;
      const area = carriedPlume.area;

      // Losses on the way, along the mass flux Q(x) = Q L(x) D(x) (trapezoids on a geometric mesh).
      const u = plume.windSpeed_m_s;
      const flux = (x: number): number => emission_g_s * plume.lossFactor(x) * plume.depletionFactor(x);
      let firstOrder = 0;
      let held = 0;
      let previousX = 0;
      let previousFlux = emission_g_s;
      for (let x = Math.min(1, handover_m); ; x = Math.min(x * SEARCH_RATIO, handover_m)) {
        const current = flux(x);
        const mean = 0.5 * (current + previousFlux);
        held += (mean * (x - previousX)) / u;
        firstOrder += ((decay_per_s + washout_per_s) * mean * (x - previousX)) / u;
        previousX = x;
        previousFlux = current;
        if (x >= handover_m) break;
      }
      const remaining_g_s = flux(handover_m);
      firstOrder = Math.min(firstOrder, emission_g_s - remaining_g_s);
      const firstOrderRate = decay_per_s + washout_per_s;
      if (firstOrderRate > 0) {
        losses.decayed += (firstOrder * decay_per_s) / firstOrderRate;
        losses.washedOut += (firstOrder * washout_per_s) / firstOrderRate;
      }
      losses.dryDeposited += Math.max(0, emission_g_s - remaining_g_s - firstOrder);
      heldMass_g += held;

      // The hand-over band: hat along the wind, the plume's cross-section at x_h across it.
      const sigmaY_h = sigmas.sigmaY_m(handover_m);
      const crossReach_m = CROSSWIND_REACH_SIGMAS * sigmaY_h + 0.5 * crossWidth_m + Math.abs(crossCentre_m);
      const bandX = originX + handover_m * downwindX;
      const bandY = originY + handover_m * downwindY;
      // half-width of the band: the plume's sigma_y, at least two cells, clear of the area and the edge
      const band_m = Math.max(BAND_HALF_WIDTH_CELLS * dx, Math.min(sigmaY_h, handover_m - downwindHalf_m, toEdge_m - handover_m - dx));
      const reachX = band_m * Math.abs(downwindX) + crossReach_m * Math.abs(downwindY);
      const reachY = band_m * Math.abs(downwindY) + crossReach_m * Math.abs(downwindX);
      const iLow = Math.max(0, Math.floor((bandX - reachX - grid.xWest_m) / dx));
      const iHigh = Math.min(grid.nx - 1, Math.ceil((bandX + reachX - grid.xWest_m) / dx));
      const jLow = Math.max(0, Math.floor((bandY - reachY - grid.ySouth_m) / dx));
      const jHigh = Math.min(grid.ny - 1, Math.ceil((bandY + reachY - grid.ySouth_m) / dx));
      const columnWeights: [number, number][] = [];
      const bandAlong: number[] = [];
      let columnSum = 0;
      for (let j = jLow; j <= jHigh; j++) {
        for (let i = iLow; i <= iHigh; i++) {
          const rx = grid.xWest_m + (i + 0.5) * dx - originX;
          const ry = grid.ySouth_m + (j + 0.5) * dx - originY;
          const along = rx * downwindX + ry * downwindY;
          const hat = 1 - Math.abs(along - handover_m) / band_m;
          if (!(hat > 0)) continue;
          const cross = -rx * downwindY + ry * downwindX;
          const weight = hat * crosswindDensity_per_m(cross - crossCentre_m, sigmaY_h, crossWidth_m);
          if (weight > 0) {
            columnWeights.push([i + grid.nx * j, weight]);
            bandAlong.push(along);
            columnSum += weight;
          }
        }
      }
      if (!(columnSum > 0)) {
        // The band fell outside the grid (a source at the downwind edge): the nearest column takes it.
        const i = Math.min(grid.nx - 1, Math.max(0, Math.floor((bandX - grid.xWest_m) / dx)));
        const j = Math.min(grid.ny - 1, Math.max(0, Math.floor((bandY - grid.ySouth_m) / dx)));
        columnWeights.push([i + grid.nx * j, 1]);
        bandAlong.push(handover_m);
        columnSum = 1;
      }
      // What the grid holds at each distance along the band (heldShareAt).
      const order = bandAlong.map((_, n) => n).sort((a, b) => bandAlong[a] - bandAlong[b]);
      const heldAlong_m = Float64Array.from(order, (n) => bandAlong[n]);
      const heldShare = new Float64Array(order.length);
      let running = 0;
      order.forEach((n, m) => {
        running += columnWeights[n][1] / columnSum;
        heldShare[m] = running;
      });
      const layerTotal = layerSum > 0 ? layerSum : 1;
      const nxy = grid.nx * grid.ny;
      for (let k = 0; k < grid.nz; k++) {
        if (layerWeights[k] === 0) continue;
        const layerRate = (remaining_g_s * layerWeights[k]) / layerTotal;
        for (const [column, weight] of columnWeights) {
          const cell = column + nxy * k;
          perCell.set(cell, (perCell.get(cell) ?? 0) + (layerRate * weight) / columnSum);
        }
      }

      carried.push({
        id: source.id,
        kind: source.kind,
        originX_m: originX,
        originY_m: originY,
        plume,
        area,
        handover_m,
        band_m,
        heldAlong_m,
        heldShare,
        crosswindReach_m: CROSSWIND_REACH_SIGMAS * spreadY(handover_m + dx) + Math.abs(crossCentre_m) + 0.5 * crossWidth_m,
        upwindReach_m: upwindHalf_m + dx,
      });
      const handedOverFraction = emission_g_s > 0 ? remaining_g_s / emission_g_s : 1;
      handovers.push({ id: source.id, handoverDistance_m: handover_m, handedOverFraction, transportWind_m_s });
      notes.push(
        `near field: source ${source.id} carried as a sub-grid Gaussian plume for ${handover_m.toFixed(0)} m downwind` +
          ` (sigma_y ${sigmaY_h.toFixed(0)} m, sigma_z ${sigmas.sigmaZ_m(handover_m).toFixed(0)} m there), then handed to the grid` +
          (handedOverFraction < 1 ? ` with ${(100 * handedOverFraction).toPrecision(3)} % of its emission (the rest lost on the way)` : '') +
          (atEdge ? '; the plume reached the domain edge before the grid could resolve it, so it was handed over there' : ''),
      );
    });

    const directEmission = gridEmissionFromSources(grid, direct, directHeights);
    for (let n = 0; n < directEmission.cells.length; n++) {
      const cell = directEmission.cells[n];
      perCell.set(cell, (perCell.get(cell) ?? 0) + directEmission.rates_g_s[n]);
    }
    if (direct.length > 0) {
      notes.push(
        `near field: area source${direct.length > 1 ? 's' : ''} ${direct.map((s) => s.id).join(', ')} larger than ${this.smallAreaCells} cells ` +
          `and ${this.smallAreaLimit_m(0).toFixed(0)} m, released straight into the grid by cell overlaps`,
      );
    }
    const cells = Int32Array.from([...perCell.keys()].sort((a, b) => a - b));
    const rates = Float64Array.from(cells, (cell) => perCell.get(cell) ?? 0);

    const concentration_g_m3 = (x_m: number, y_m: number, z_m: number): number => {
      let sum = 0;
      for (let n = 0; n < carried.length; n++) {
        const c = carried[n];
        const rx = x_m - c.originX_m;
        const ry = y_m - c.originY_m;
        const along = rx * downwindX + ry * downwindY;
        if (along >= c.handover_m + c.band_m + 1.5 * dx || along <= -c.upwindReach_m) continue;
        const cross = -rx * downwindY + ry * downwindX;
        if (Math.abs(cross) > c.crosswindReach_m) continue;
        const share = this.subGridShare(grid, c, x_m, y_m, downwindX, downwindY);
        if (share <= 0) continue;
        if (c.area !== null) sum += share * c.area.concentration_g_m3(x_m, y_m, z_m, downwindX, downwindY);
        else sum += share * c.plume.concentration_g_m3(along, cross, z_m);
      }
      return sum;
    };

    return {
      emission: { name: `${this.name}: ${sources.length} sources`, cells, rates_g_s: rates },
      emitted_g_s: sourcesEmission_g_s(sources),
      losses_g_s: losses,
      heldMass_g,
      handovers,
      notes,
      holdsConcentration: carried.length > 0,
      concentration_g_m3,
    };
  }
}
