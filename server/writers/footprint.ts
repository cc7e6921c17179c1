/**
 * footprint.geojson: isopleth bands of the ground-level field as an RFC 7946 FeatureCollection.
 *
 * The split follows d3-contour's: contouring works on the flat row-major field in grid units, and only
 * the last step converts to local metres and then to WGS 84 longitude/latitude through the projection.
 *
 * Grid units, stated once: the field is indexed i + nx * j with row j = 0 at the SOUTH edge. d3-contour
 * puts value i + nx * j at the point (i + 0.5, j + 0.5) and treats everything outside the grid as below
 * every level, so a band that reaches the edge of the grid is closed along the edge itself (u = 0 or nx,
 * v = 0 or ny). Its second coordinate grows with j, which is northward here, so grid units map to
 * local metres without a flip: x = xWest_m + u * spacing_m, y = ySouth_m + v * spacing_m.
 *
 * Bands: with levels l0 < l1 < ... < l(n-1), band k holds the ground where lk <= C < l(k+1), and the top
 * band holds C >= l(n-1). The top band is open-ended: its `upper_ug_m3` is null (the peak itself is in
 * the collection's properties and in summary.json).
 */
import { contours } from 'd3-contour';
import { difference, featureCollection, multiPolygon } from '@turf/turf';
import type { Feature, MultiPolygon, Polygon, Position } from 'geojson';
import { GROUND_LEVEL_HEIGHT_m } from '../../solver/drivers/steadyScenario.ts';
import { sitePeak, type SiteColumns } from '../../solver/grid/siteBoundary.ts';
import type { LocalGrid } from '../../solver/grid/types.ts';
import type { FootprintStatistic } from '../../solver/drivers/types.ts';
import { SCREENING_CAUTION } from './caution.ts';
import { LON_LAT_DECIMALS, roundDecimals, roundSignificant } from './rounding.ts';

/** The part of the local grid a ground-level field needs. */
export type GroundGrid = Pick<LocalGrid, 'nx' | 'ny' | 'spacing_m' | 'xWest_m' | 'ySouth_m' | 'projection'>;

/** Most default levels: 7 levels give 7 bands, enough to read and few enough to tell apart. */
export const DEFAULT_MAXIMUM_LEVELS = 7;

/** Mantissas of the round-number series used for default levels: 1, 2, 5, 10, 20, 50, ... */
const ROUND_MANTISSAS = [1, 2, 5] as const;

export interface FootprintBandProperties {
  /** lower bound of the band, included [ug/m3] */
  lower_ug_m3: number;
  /** upper bound of the band, excluded [ug/m3]; null for the open-ended top band */
  upper_ug_m3: number | null;
  /** plain label, e.g. "10 to 20 ug/m3" or "50 ug/m3 and above" */
  label: string;
  /** the screening caution, on every band: GIS software shows a feature's fields, not the collection's */
  caution: string;
}

export interface FootprintCollectionProperties {
  caution: string;
  scenario: string;
  /**
   * what the field is: "concentration" (steady weather), "mean" (hourly series, wind rose), "maximum"
   * (the screening weather set) or "standard" (a standard's statistic: see `standard`)
   */
  statistic: FootprintStatistic | 'standard';
  /** the standard whose statistic the field is, when statistic is "standard" */
  standard?: FootprintStandard;
  units: 'ug/m3';
  /** height of the ground-level field above the ground [m] */
  height_m: number;
  /** the levels the bands were drawn at, ascending [ug/m3] */
  levels_ug_m3: number[];
  /** how the levels were chosen */
  levelsChosen: 'default' | 'given';
  /** ground-level maximum of the field off the site (or anywhere, without a boundary), rounded [ug/m3] */
  peak_ug_m3: number;
  /** where peak_ug_m3 was looked for: off the site, or anywhere (then it may be on the site) */
  peakWhere: string;
  /** the maximum on the site, rounded [ug/m3]; only when the scenario gives site.boundary */
  peakOnSite_ug_m3?: number;
  topBand: string;
}

export interface FootprintCollection {
  type: 'FeatureCollection';
  properties: FootprintCollectionProperties;
  features: Feature<Polygon | MultiPolygon, FootprintBandProperties>[];
}

/** The standard a map of a standard's statistic shows. */
export interface FootprintStandard {
  name: string;
  limit_ug_m3: number;
  /** how the figure was formed (StandardFieldBasis): "statistic", "upperBound" or "oneWeatherHour" */
  basis: string;
  /** the levels as percentages of the limit [%] */
  levelsPercentOfLimit: number[];
}

export interface FootprintOptions {
  /** the standard, for a map of a standard's statistic */
  standard?: FootprintStandard;
  /** levels to draw, positive and strictly increasing [ug/m3]; default: defaultFootprintLevels(field) */
  levels_ug_m3?: number[];
  /** scenario name written into the collection's properties; default "" */
  scenarioName?: string;
  /** statistic the field holds; default "concentration" */
  statistic?: FootprintStatistic | 'standard';
  /** height of the ground-level field [m]; default GROUND_LEVEL_HEIGHT_m (1.5) */
  height_m?: number;
  /** the site boundary's columns: the peak is reported off the site; default none */
  site?: SiteColumns | null;
}

/**
 * Check a list of levels: at least one, every one finite and positive, strictly increasing.
 *
 * @param levels_ug_m3 the levels [ug/m3]
 * @param name what to call the list in the message (a command-line option or a field path)
 * @throws RangeError naming the list, the bad value and what is allowed
 */
export function checkLevels(levels_ug_m3: readonly number[], name = 'levels_ug_m3'): void {
  if (levels_ug_m3.length === 0) {
    throw new RangeError(`${name}: no levels given; give one or more positive, increasing levels in ug/m3`);
  }
  levels_ug_m3.forEach((level, index) => {
    if (!Number.isFinite(level) || level <= 0) {
      throw new RangeError(`${name}[${index}]: ${level} is not allowed; every level must be a positive number of ug/m3`);
    }
    if (index > 0 && level <= levels_ug_m3[index - 1]) {
      throw new RangeError(
        `${name}[${index}]: ${level} does not exceed the level before it (${levels_ug_m3[index - 1]}); levels must increase strictly`,
      );
    }
  });
}

/**
 * Default isopleth levels: the round numbers of the 1-2-5 series (..., 1, 2, 5, 10, 20, ...) that lie
 * strictly between the field's minimum and its peak, the highest `maximumLevels` of them. Every band is
 * then non-empty and none covers the whole grid. A field that is zero or flat everywhere gets no levels.
 *
 * @param field_ug_m3 ground-level field [ug/m3]
 * @param maximumLevels most levels to return; default DEFAULT_MAXIMUM_LEVELS (7)
 * @returns ascending levels [ug/m3], e.g. a field from 0 to 37 gives [0.2, 0.5, 1, 2, 5, 10, 20]
 */
export function defaultFootprintLevels(
  field_ug_m3: ArrayLike<number>,
  maximumLevels = DEFAULT_MAXIMUM_LEVELS,
): number[] {
  const { minimum, peak } = fieldRange(field_ug_m3);
  if (!(peak > 0)) return [];
  const levels: number[] = [];
  let exponent = Math.floor(Math.log10(peak)) + 1;
  while (levels.length < maximumLevels) {
    for (let m = ROUND_MANTISSAS.length - 1; m >= 0 && levels.length < maximumLevels; m -= 1) {
      const level = Number((ROUND_MANTISSAS[m] * 10 ** exponent).toPrecision(1));
      if (level >= peak) continue;
      if (level <= minimum) return levels.reverse();
      levels.push(level);
    }
    exponent -= 1;
    // A field spanning more than 300 decades cannot occur with doubles; this only guards the loop.
    if (exponent < -330) break;
  }
  return levels.reverse();
}

/**
 * Isopleth bands of a ground-level field as an RFC 7946 FeatureCollection in WGS 84 lon/lat.
 *
 * @param field_ug_m3 ground-level field, index i + nx * j, row j = 0 at the south edge [ug/m3]
 * @param grid the grid the field lives on (size, spacing, south-west corner, projection)
 * @param options levels, scenario name, statistic, field height (see FootprintOptions)
 * @returns bands in ascending order; exterior rings counter-clockwise, holes clockwise, coordinates
 *   rounded to 7 decimals; the caution in the collection's properties
 * @example
 *   const collection = footprintBands(result.footprint_ug_m3, result.grid, { levels_ug_m3: [1, 5, 10] });
 */
export function footprintBands(
  field_ug_m3: ArrayLike<number>,
  grid: GroundGrid,
  options: FootprintOptions = {},
): FootprintCollection {
  const { nx, ny } = grid;
  if (field_ug_m3.length !== nx * ny) {
    throw new RangeError(`footprint field: length ${field_ug_m3.length} does not match the grid's ${nx} x ${ny} = ${nx * ny} columns`);
  }
  for (let index = 0; index < field_ug_m3.length; index += 1) {
    const value = field_ug_m3[index];
    if (!Number.isFinite(value) || value < 0) {
      throw new RangeError(
        `footprint field[${index}]: ${value} is not allowed; concentrations must be finite and non-negative`,
      );
    }
  }
  const levelsChosen = options.levels_ug_m3 === undefined ? 'default' : 'given';
  const levels = options.levels_ug_m3 ?? defaultFootprintLevels(field_ug_m3);
  if (options.levels_ug_m3 !== undefined) checkLevels(levels);

  // d3-contour indexes with [] only, so a typed array serves as well as a plain one.
  const values = field_ug_m3 as unknown as number[];
  const generator = contours().size([nx, ny]).smooth(true);
  const atOrAbove = levels.map((level) => assignHoles(generator.contour(values, level).coordinates));

  const features: Feature<Polygon | MultiPolygon, FootprintBandProperties>[] = [];
  levels.forEach((lower, k) => {
    const upper = k + 1 < levels.length ? levels[k + 1] : null;
    const bandInGridUnits = upper === null ? atOrAbove[k] : subtract(atOrAbove[k], atOrAbove[k + 1]);
    const polygons = bandInGridUnits
      .map((polygon) => toLonLatPolygon(polygon, grid))
      .filter((polygon): polygon is Position[][] => polygon !== null);
    if (polygons.length === 0) return;
    const geometry: Polygon | MultiPolygon =
      polygons.length === 1
        ? { type: 'Polygon', coordinates: polygons[0] }
        : { type: 'MultiPolygon', coordinates: polygons };
    features.push({
      type: 'Feature',
      properties: {
        lower_ug_m3: lower,
        upper_ug_m3: upper,
        label: upper === null ? `${lower} ug/m3 and above` : `${lower} to ${upper} ug/m3`,
        caution: SCREENING_CAUTION,
      },
      geometry,
    });
  });

  const peak = sitePeak(grid, field_ug_m3, options.site ?? null);
  return {
    type: 'FeatureCollection',
    properties: {
      caution: SCREENING_CAUTION,
      scenario: options.scenarioName ?? '',
      statistic: options.statistic ?? 'concentration',
      ...(options.standard !== undefined ? { standard: options.standard } : {}),
      units: 'ug/m3',
      height_m: options.height_m ?? GROUND_LEVEL_HEIGHT_m,
      levels_ug_m3: [...levels],
      levelsChosen,
      peak_ug_m3: roundSignificant(peak.value_ug_m3, 3),
      peakWhere: peak.where,
      ...(peak.onSite !== undefined ? { peakOnSite_ug_m3: roundSignificant(peak.onSite.value_ug_m3, 3) } : {}),
      topBand: 'open-ended: the top band holds every value at or above its lower level, so its upper_ug_m3 is null',
    },
    features,
  };
}

/** Smallest and largest value of a field. */
function fieldRange(field: ArrayLike<number>): { minimum: number; peak: number } {
  let minimum = Infinity;
  let peak = -Infinity;
  for (let index = 0; index < field.length; index += 1) {
    const value = field[index];
    if (value < minimum) minimum = value;
    if (value > peak) peak = value;
  }
  return { minimum, peak };
}

/**
 * Give each hole to the exterior it really lies in. d3-contour hands a hole to the first exterior whose
 * ring contains it, which for nested islands (a peak inside a crater inside a ridge) can be an outer
 * exterior rather than the island around the hole. Rings of one level never cross, so the exteriors
 * containing a hole are nested, and its own is the smallest of them.
 */
export function assignHoles(polygons: Position[][][]): Position[][][] {
  const exteriors = polygons.map((polygon) => ({ ring: polygon[0], area: Math.abs(signedArea(polygon[0])), box: boundingBox(polygon[0]) }));
  const holes = polygons.flatMap((polygon) => polygon.slice(1));
  const regrouped: Position[][][] = exteriors.map((exterior) => [exterior.ring]);
  const bySize = exteriors.map((_, index) => index).sort((a, b) => exteriors[a].area - exteriors[b].area);
  for (const hole of holes) {
    const holeArea = Math.abs(signedArea(hole));
    const holeBox = boundingBox(hole);
    const owner = bySize.find((index) => {
      const exterior = exteriors[index];
      return exterior.area >= holeArea && boxInside(holeBox, exterior.box) && ringInsideRing(hole, exterior.ring);
    });
    // A hole inside no exterior cannot come out of marching squares; keep d3's choice rather than drop it.
    if (owner === undefined) {
      const original = polygons.findIndex((polygon) => polygon.includes(hole));
      regrouped[original].push(hole);
    } else {
      regrouped[owner].push(hole);
    }
  }
  return regrouped;
}

type Box = [number, number, number, number];

function boundingBox(ring: Position[]): Box {
  let west = Infinity;
  let south = Infinity;
  let east = -Infinity;
  let north = -Infinity;
  for (const [u, v] of ring) {
    if (u < west) west = u;
    if (u > east) east = u;
    if (v < south) south = v;
    if (v > north) north = v;
  }
  return [west, south, east, north];
}

function boxInside(inner: Box, outer: Box): boolean {
  return inner[0] >= outer[0] && inner[1] >= outer[1] && inner[2] <= outer[2] && inner[3] <= outer[3];
}

/**
 * Whether ring `inner` lies inside ring `outer`, given that the two do not cross. The first vertex of
 * `inner` not on `outer` decides; rings drawn through cells exactly at the level can share vertices.
 */
function ringInsideRing(inner: Position[], outer: Position[]): boolean {
  for (const point of inner) {
    const where = pointInRing(point, outer);
    if (where !== 'boundary') return where === 'inside';
  }
  return false;
}

/** Crossing-number test, with points on an edge reported as such (grid units, tolerance 1e-9). */
function pointInRing(point: Position, ring: Position[]): 'inside' | 'outside' | 'boundary' {
  const [u, v] = point;
  let inside = false;
  for (let p = 0, q = ring.length - 1; p < ring.length; q = p, p += 1) {
    const [u1, v1] = ring[q];
    const [u2, v2] = ring[p];
    const cross = (u2 - u1) * (v - v1) - (v2 - v1) * (u - u1);
    const withinSegment = (u - u1) * (u - u2) <= 1e-18 && (v - v1) * (v - v2) <= 1e-18;
    if (Math.abs(cross) <= 1e-9 * Math.hypot(u2 - u1, v2 - v1) && withinSegment) return 'boundary';
    if (v1 > v !== v2 > v && u < u1 + ((v - v1) * (u2 - u1)) / (v2 - v1)) inside = !inside;
  }
  return inside ? 'inside' : 'outside';
}

/** The region of `outer` not inside `inner`, both MultiPolygon coordinates in grid units. */
function subtract(outer: Position[][][], inner: Position[][][]): Position[][][] {
  if (outer.length === 0) return [];
  if (inner.length === 0) return outer;
  const remainder = difference(featureCollection([multiPolygon(outer), multiPolygon(inner)]));
  if (remainder === null) return [];
  const geometry = remainder.geometry;
  return geometry.type === 'Polygon' ? [geometry.coordinates] : geometry.coordinates;
}

/**
 * One polygon from grid units to rounded lon/lat with RFC 7946 winding (exterior counter-clockwise,
 * holes clockwise). Rounding can merge neighbouring vertices, so repeats are dropped afterwards and a
 * ring left with fewer than three distinct corners or with no area is dropped (with its holes, if it is
 * the exterior).
 */
function toLonLatPolygon(polygon: Position[][], grid: GroundGrid): Position[][] | null {
  const rings: Position[][] = [];
  for (let r = 0; r < polygon.length; r += 1) {
    const ring = toLonLatRing(polygon[r], grid);
    // Rings drawn through cells exactly at a level can enclose nothing: such a ring is no boundary.
    if (ring === null || signedArea(ring) === 0) {
      if (r === 0) return null;
      continue;
    }
    const counterClockwise = signedArea(ring) > 0;
    const wantCounterClockwise = r === 0;
    rings.push(counterClockwise === wantCounterClockwise ? ring : ring.reverse());
  }
  return rings;
}

function toLonLatRing(ring: Position[], grid: GroundGrid): Position[] | null {
  const out: Position[] = [];
  for (const [u, v] of ring) {
    const [lon, lat] = grid.projection.toLonLat(grid.xWest_m + u * grid.spacing_m, grid.ySouth_m + v * grid.spacing_m);
    const position = [roundDecimals(lon, LON_LAT_DECIMALS), roundDecimals(lat, LON_LAT_DECIMALS)];
    const previous = out[out.length - 1];
    if (previous !== undefined && previous[0] === position[0] && previous[1] === position[1]) continue;
    out.push(position);
  }
  // Close the ring exactly (first position = last position).
  const first = out[0];
  const last = out[out.length - 1];
  if (first !== undefined && (first[0] !== last[0] || first[1] !== last[1])) out.push([first[0], first[1]]);
  if (out.length < 4) return null;
  return out;
}

/** Signed planar area of a closed ring by the shoelace formula; positive = counter-clockwise. */
export function signedArea(ring: readonly Position[]): number {
  let sum = 0;
  for (let p = 0; p + 1 < ring.length; p += 1) {
    sum += ring[p][0] * ring[p + 1][1] - ring[p + 1][0] * ring[p][1];
  }
  return sum / 2;
}
