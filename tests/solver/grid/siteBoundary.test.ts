/**
 * The site boundary on the grid: which columns are on the site (checked against Turf's
 * booleanPointInPolygon, an outside implementation of the same test) and the peaks split off and on it.
 */
import { booleanPointInPolygon, point, polygon } from '@turf/turf';
import { describe, expect, it } from 'vitest';
import { buildLocalGrid } from '../../../solver/grid/localGrid.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import {
  isInsideRing,
  PEAK_MAY_BE_ON_SITE,
  PEAK_OFF_SITE,
  placeSiteBoundary,
  siteColumns,
  sitePeak,
} from '../../../solver/grid/siteBoundary.ts';

const projection = createLocalProjection({ lat: 54.0612, lon: -2.2841 });
const grid = buildLocalGrid({ halfWidth_m: 500, spacing_m: 20, height_m: 500, layers: 5 }, projection);
/** An invented, concave boundary (an L-shaped yard) about the site. */
const boundary: [number, number][] = [
  [-2.2858, 54.0602],
  [-2.2822, 54.0602],
  [-2.2822, 54.0610],
  [-2.2840, 54.0610],
  [-2.2840, 54.0620],
  [-2.2858, 54.0620],
  [-2.2858, 54.0602],
];

describe('site columns', () => {
  const ring_m = placeSiteBoundary(boundary, projection);
  const site = siteColumns(grid, ring_m);

  it('a column is on the site exactly when its centre is inside the ring (same answer as Turf)', () => {
    const turfRing = polygon([ring_m.map(([x, y]) => [x, y])]);
    let agree = 0;
    for (let j = 0; j < grid.ny; j++) {
      for (let i = 0; i < grid.nx; i++) {
        const x = grid.xWest_m + (i + 0.5) * grid.spacing_m;
        const y = grid.ySouth_m + (j + 0.5) * grid.spacing_m;
        expect(site.onSite[i + grid.nx * j], `column ${i}, ${j}`).toBe(booleanPointInPolygon(point([x, y]), turfRing) ? 1 : 0);
        agree++;
      }
    }
    expect(agree).toBe(grid.nx * grid.ny);
    expect(site.count).toBeGreaterThan(50);
  });

  it('the columns on the site cover the ring area within one cell perimeter', () => {
    // Shoelace area of the ring [m2]; the centre rule errs by at most half a cell along each edge.
    let twiceArea = 0;
    for (let v = 1; v < ring_m.length; v++) twiceArea += ring_m[v - 1][0] * ring_m[v][1] - ring_m[v][0] * ring_m[v - 1][1];
    let perimeter = 0;
    for (let v = 1; v < ring_m.length; v++) perimeter += Math.hypot(ring_m[v][0] - ring_m[v - 1][0], ring_m[v][1] - ring_m[v - 1][1]);
    const area = Math.abs(twiceArea) / 2;
    expect(Math.abs(site.count * grid.spacing_m ** 2 - area)).toBeLessThan((perimeter * grid.spacing_m) / 2);
  });

  it('points on an edge count as inside; the notch of the L is outside', () => {
    expect(isInsideRing([[0, 0], [10, 0], [10, 10], [0, 10], [0, 0]], 10, 5)).toBe(true);
    expect(isInsideRing([[0, 0], [10, 0], [10, 10], [0, 10], [0, 0]], 10.001, 5)).toBe(false);
    const [notchX, notchY] = projection.toLocal(-2.2830, 54.0616);
    expect(isInsideRing(ring_m, notchX, notchY)).toBe(false);
  });

  it('peaks: off the site with the on-site maximum labelled; without a boundary, said to be anywhere', () => {
    const field = new Float64Array(grid.nx * grid.ny);
    const [sx, sy] = projection.toLocal(-2.2850, 54.0612); // on the site
    const [ox, oy] = projection.toLocal(-2.2800, 54.0630); // off it
    const column = (x: number, y: number) =>
      Math.floor((x - grid.xWest_m) / grid.spacing_m) + grid.nx * Math.floor((y - grid.ySouth_m) / grid.spacing_m);
    field[column(sx, sy)] = 40;
    field[column(ox, oy)] = 7;
    const split = sitePeak(grid, field, site);
    expect(split.value_ug_m3).toBe(7);
    expect(split.where).toBe(PEAK_OFF_SITE);
    expect(split.onSite?.value_ug_m3).toBe(40);
    expect(Math.abs(split.x_m - ox)).toBeLessThanOrEqual(grid.spacing_m / 2);
    const anywhere = sitePeak(grid, field, null);
    expect(anywhere.value_ug_m3).toBe(40);
    expect(anywhere.where).toBe(PEAK_MAY_BE_ON_SITE);
    expect(anywhere.onSite).toBeUndefined();
  });

  it('refuses a ring that is not closed, naming site.boundary', () => {
    expect(() => placeSiteBoundary(boundary.slice(0, -1), projection)).toThrow(/^site\.boundary/);
  });
});
