/**
 * Sources and receptors from scenario longitude/latitude onto the local grid, in metres, refusing
 * anything that lies outside the grid.
 */
import type { Receptor, Source } from '../../scenarios/format/types.ts';
import type { PlacedReceptor, PlacedSource } from '../drivers/types.ts';
import { gridEast_m, gridNorth_m, isInsideGrid } from '../grid/localGrid.ts';
import type { LocalGrid } from '../grid/types.ts';
import {
  rasteriseRing,
  ringArea_m2,
  ringCentroid_m,
  ringSelfIntersection,
} from './areaRasterisation.ts';

/**
 * Place sources on the grid: a point source at its local (x, y); an area source as its ring in
 * local metres, its planar area and centroid, and its exact overlap with every column it covers.
 * Every other field is carried over unchanged.
 *
 * @throws RangeError whose message starts with the field path (`sources[2]: ...`,
 *   `sources[1].polygon[3]: ...`) when a position is not finite or lies outside the grid (an
 *   area polygon must lie wholly inside), or a polygon is not closed, crosses itself or has no area
 * @example placeSources(scenario.sources, grid)[0] // { kind: 'point', id: 'stack-1', x_m: 141.2, ... }
 */
export function placeSources(sources: Source[], grid: LocalGrid): PlacedSource[] {
  return sources.map((source, index): PlacedSource => {
    const field = `sources[${index}]`;
    if (source.kind === 'point') {
      const [x_m, y_m] = placePosition(field, source.lon, source.lat, grid, `point source '${source.id}'`);
      return {
        kind: 'point',
        id: source.id,
        x_m,
        y_m,
        height_m: source.height_m,
        diameter_m: source.diameter_m,
        exitVelocity_m_s: source.exitVelocity_m_s,
        exitTemperature_K: source.exitTemperature_K,
        emission_g_s: source.emission_g_s,
        plumeRise: source.plumeRise,
      };
    }
    const polygon = source.polygon;
    if (!Array.isArray(polygon) || polygon.length < 4) {
      throw new RangeError(
        `${field}.polygon: got ${Array.isArray(polygon) ? `${polygon.length} positions` : String(polygon)}; ` +
          'allowed: a closed GeoJSON ring of at least 4 [lon, lat] positions (first = last)',
      );
    }
    const first = polygon[0];
    const last = polygon[polygon.length - 1];
    if (!Array.isArray(first) || !Array.isArray(last) || first[0] !== last[0] || first[1] !== last[1]) {
      throw new RangeError(
        `${field}.polygon: first position ${JSON.stringify(first)} differs from last ` +
          `${JSON.stringify(last)}; allowed: a closed ring (first = last)`,
      );
    }
    const ring_m = polygon.map(([lon, lat], vertex): [number, number] =>
      placePosition(`${field}.polygon[${vertex}]`, lon, lat, grid, `vertex of area source '${source.id}'`),
    );
    // The same lon/lat projects to the same metres, but say so in the data: the ring is closed.
    ring_m[ring_m.length - 1] = [ring_m[0][0], ring_m[0][1]];
    const crossing = ringSelfIntersection(ring_m);
    if (crossing !== null) {
      throw new RangeError(
        `${field}.polygon: edges ${crossing[0]} and ${crossing[1]} cross or touch; allowed: a ` +
          'simple ring that does not cross itself',
      );
    }
    const area_m2 = ringArea_m2(ring_m);
    if (!(area_m2 > 0)) {
      throw new RangeError(`${field}.polygon: the ring encloses no area; allowed: a polygon with area > 0`);
    }
    const [x_m, y_m] = ringCentroid_m(ring_m);
    return {
      kind: 'area',
      id: source.id,
      ring_m,
      area_m2,
      x_m,
      y_m,
      releaseHeight_m: source.releaseHeight_m,
      emission_g_s: source.emission_g_s,
      shares: rasteriseRing(ring_m, grid),
    };
  });
}

/**
 * Place receptors on the grid at their local (x, y), keeping id and height.
 *
 * @throws RangeError starting `receptors[i]: ` when a position is not finite or lies outside
 *   the grid, or the height is not a finite number >= 0 at or below the grid top
 */
export function placeReceptors(receptors: Receptor[], grid: LocalGrid): PlacedReceptor[] {
  const top_m = grid.zFaces_m[grid.nz];
  return receptors.map((receptor, index): PlacedReceptor => {
    const field = `receptors[${index}]`;
    const [x_m, y_m] = placePosition(field, receptor.lon, receptor.lat, grid, `receptor '${receptor.id}'`);
    const height_m = receptor.height_m;
    if (!Number.isFinite(height_m) || height_m < 0 || height_m > top_m) {
      throw new RangeError(
        `${field}.height_m: got ${String(height_m)}; allowed: a finite height from 0 to the grid top ${top_m} m`,
      );
    }
    return { id: receptor.id, x_m, y_m, height_m };
  });
}

/** lon/lat [deg] -> local [x_m, y_m], refusing non-finite input and positions off the grid. */
function placePosition(
  field: string,
  lon: number,
  lat: number,
  grid: LocalGrid,
  what: string,
): [number, number] {
  if (!Number.isFinite(lon) || !Number.isFinite(lat) || lat < -90 || lat > 90) {
    throw new RangeError(
      `${field}: got lon ${String(lon)}, lat ${String(lat)}; allowed: finite WGS 84 degrees ` +
        '(lat from -90 to 90)',
    );
  }
  const [x_m, y_m] = grid.projection.toLocal(lon, lat);
  if (!isInsideGrid(grid, x_m, y_m)) {
    throw new RangeError(
      `${field}: ${what} at lon ${lon}, lat ${lat} is at x ${x_m.toFixed(1)} m, y ${y_m.toFixed(1)} m ` +
        `from the site, outside the domain; allowed: x ${grid.xWest_m} to ${gridEast_m(grid)} m, ` +
        `y ${grid.ySouth_m} to ${gridNorth_m(grid)} m (enlarge domain.halfWidth_m or move it)`,
    );
  }
  return [x_m, y_m];
}
