import { area as turfGeodesicArea, featureCollection, intersect, polygon as turfPolygon } from '@turf/turf';
import { describe, expect, it } from 'vitest';
import type { AreaCellShare } from '../../../solver/drivers/types.ts';
import { buildLocalGrid } from '../../../solver/grid/localGrid.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import type { LocalGrid } from '../../../solver/grid/types.ts';
import {
  rasteriseRing,
  ringArea_m2,
  ringCentroid_m,
  ringSelfIntersection,
} from '../../../solver/sources/areaRasterisation.ts';

type Ring = [number, number][];

// Invented site.
const projection = createLocalProjection({ lat: 52.1375, lon: 5.2875 });

/** A grid of the given spacing whose west/south edges are moved by (shiftX, shiftY) metres. */
function gridWith(spacing_m: number, shiftX_m: number, shiftY_m: number, halfWidth_m = 10_000): LocalGrid {
  const base = buildLocalGrid({ halfWidth_m, spacing_m, height_m: 1000, layers: 10 }, projection);
  return { ...base, xWest_m: base.xWest_m + shiftX_m, ySouth_m: base.ySouth_m + shiftY_m };
}

function shift(ring: Ring, dx: number, dy: number): Ring {
  return ring.map(([x, y]) => [x + dx, y + dy]);
}

function sumOf(shares: AreaCellShare[]): number {
  return shares.reduce((total, share) => total + share.overlap_m2, 0);
}

/** Planar shoelace area of a GeoJSON polygon or multipolygon's rings (holes subtract by winding). */
function planarAreaOfGeometry(geometry: { type: string; coordinates: unknown }): number {
  const polygons = (geometry.type === 'Polygon' ? [geometry.coordinates] : geometry.coordinates) as number[][][][];
  let total = 0;
  for (const rings of polygons) {
    rings.forEach((ring, r) => {
      let twice = 0;
      for (let v = 0; v + 1 < ring.length; v++) twice += ring[v][0] * ring[v + 1][1] - ring[v + 1][0] * ring[v][1];
      total += r === 0 ? Math.abs(twice) / 2 : -Math.abs(twice) / 2;
    });
  }
  return total;
}

// Test polygons in local metres, closed, counter-clockwise unless said.
const RECTANGLE: Ring = [[-130, -70], [245, -70], [245, 160], [-130, 160], [-130, -70]];
const L_SHAPE: Ring = [[0, 0], [400, 0], [400, 120], [130, 120], [130, 350], [0, 350], [0, 0]];
/** Five-pointed star, 10 vertices, strongly non-convex. */
const STAR: Ring = (() => {
  const ring: Ring = [];
  for (let v = 0; v < 10; v++) {
    const angle = Math.PI / 2 + (v * Math.PI) / 5;
    const radius = v % 2 === 0 ? 300 : 115;
    ring.push([radius * Math.cos(angle), radius * Math.sin(angle)]);
  }
  ring.push([ring[0][0], ring[0][1]]);
  return ring;
})();
/** A comb: four teeth, so one row crosses the polygon four times. */
const COMB: Ring = [
  [0, 0], [500, 0], [500, 300], [430, 300], [430, 60], [310, 60], [310, 300], [240, 300],
  [240, 60], [130, 60], [130, 300], [60, 300], [60, 60], [0, 60], [0, 0],
];
const TINY_TRIANGLE: Ring = [[3.1, 2.2], [7.9, 2.6], [5.2, 6.4], [3.1, 2.2]];

/** A random star-shaped (hence simple) polygon from a seeded generator. */
function randomStarPolygon(seed: number, vertices: number, radius_m: number): Ring {
  let state = seed >>> 0;
  const random = (): number => {
    // Mulberry32 (a small public-domain PRNG), for determinism.
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const ring: Ring = [];
  for (let v = 0; v < vertices; v++) {
    const angle = (2 * Math.PI * (v + 0.8 * random())) / vertices;
    const r = radius_m * (0.2 + 0.8 * random());
    ring.push([r * Math.cos(angle), r * Math.sin(angle)]);
  }
  ring.push([ring[0][0], ring[0][1]]);
  return ring;
}

describe('ringArea_m2 and ringCentroid_m', () => {
  it('give the exact area and centroid of simple shapes', () => {
    // Exact: rectangle 375 x 230; L = 400 x 120 + 130 x 230.
    expect(ringArea_m2(RECTANGLE)).toBeCloseTo(375 * 230, 9);
    expect(ringArea_m2(L_SHAPE)).toBeCloseTo(400 * 120 + 130 * 230, 9);
    expect(ringArea_m2([...RECTANGLE].reverse())).toBeCloseTo(375 * 230, 9);
    const [cx, cy] = ringCentroid_m(RECTANGLE);
    expect(cx).toBeCloseTo(57.5, 9);
    expect(cy).toBeCloseTo(45, 9);
    // Star: area of 10 triangles 0.5 * R * r * sin(36 deg) each (exact geometry); centroid at the centre.
    expect(ringArea_m2(STAR)).toBeCloseTo(10 * 0.5 * 300 * 115 * Math.sin(Math.PI / 5), 6);
    const [sx, sy] = ringCentroid_m(STAR);
    expect(Math.abs(sx)).toBeLessThan(1e-9);
    expect(Math.abs(sy)).toBeLessThan(1e-9);
  });
});

describe('rasteriseRing', () => {
  const spacings = [7.3, 10, 25, 50, 100, 333.3];
  const shifts: [number, number][] = [[0, 0], [0.37, 0.91], [-3.14159, 2.71828], [12.5, -0.001]];
  const polygons: [string, Ring][] = [
    ['rectangle', RECTANGLE],
    ['L-shape', L_SHAPE],
    ['star', STAR],
    ['comb', COMB],
    ['tiny triangle', TINY_TRIANGLE],
    ['random 40-gon', randomStarPolygon(7, 40, 420)],
    ['random 200-gon', randomStarPolygon(11, 200, 900)],
    ['clockwise star', [...STAR].reverse()],
  ];

  for (const [name, ring] of polygons) {
    it(`conserves the ${name}'s area to 1e-9 relative on grids that cut it arbitrarily`, () => {
      // Conservation check: sum of exact overlaps = the polygon's planar area.
      const exactArea_m2 = ringArea_m2(ring);
      for (const spacing_m of spacings) {
        for (const [shiftX, shiftY] of shifts) {
          const grid = gridWith(spacing_m, shiftX, shiftY);
          // Also away from the origin, where coordinates are large and rounding matters most.
          for (const [dx, dy] of [[0, 0], [8765.4321, -7654.321]]) {
            const shares = rasteriseRing(shift(ring, dx, dy), grid);
            const relative = Math.abs(sumOf(shares) - exactArea_m2) / exactArea_m2;
            expect(relative, `${name}, spacing ${spacing_m}, shift ${shiftX},${shiftY}`).toBeLessThan(1e-9);
          }
        }
      }
    });
  }

  it('gives each cell the exact overlap of an axis-aligned rectangle', () => {
    // Exact solution: overlap of two rectangles = product of the interval overlaps.
    const grid = gridWith(25, 0.37, 0.91);
    const shares = rasteriseRing(RECTANGLE, grid);
    const [x0, y0, x1, y1] = [-130, -70, 245, 160];
    let expectedCells = 0;
    const byColumn = new Map(shares.map((share) => [share.column, share.overlap_m2]));
    for (let j = 0; j < grid.ny; j++) {
      const south = grid.ySouth_m + j * grid.spacing_m;
      const overlapY = Math.min(y1, south + grid.spacing_m) - Math.max(y0, south);
      if (overlapY <= 0) continue;
      for (let i = 0; i < grid.nx; i++) {
        const west = grid.xWest_m + i * grid.spacing_m;
        const overlapX = Math.min(x1, west + grid.spacing_m) - Math.max(x0, west);
        if (overlapX <= 0) continue;
        expectedCells++;
        expect(byColumn.get(i + grid.nx * j)).toBeCloseTo(overlapX * overlapY, 9);
      }
    }
    expect(shares).toHaveLength(expectedCells);
  });

  it('agrees cell by cell with turf polygon intersection for the star and the comb', () => {
    // Reference: turf's intersect (polygon clipping, an independent algorithm) of the polygon
    // with each cell square, its planar area by the shoelace formula.
    for (const ring of [STAR, COMB]) {
      const grid = gridWith(50, 0.37, 0.91);
      const shares = rasteriseRing(ring, grid);
      const byColumn = new Map(shares.map((share) => [share.column, share.overlap_m2]));
      const subject = turfPolygon([ring]);
      let compared = 0;
      for (let j = 0; j < grid.ny; j++) {
        const south = grid.ySouth_m + j * grid.spacing_m;
        if (south > 400 || south + grid.spacing_m < -400) continue;
        for (let i = 0; i < grid.nx; i++) {
          const west = grid.xWest_m + i * grid.spacing_m;
          if (west > 600 || west + grid.spacing_m < -400) continue;
          const [e, n] = [west + grid.spacing_m, south + grid.spacing_m];
          const cell = turfPolygon([[[west, south], [e, south], [e, n], [west, n], [west, south]]]);
          const piece = intersect(featureCollection([subject, cell]));
          const reference_m2 = piece === null ? 0 : planarAreaOfGeometry(piece.geometry);
          expect(Math.abs((byColumn.get(i + grid.nx * j) ?? 0) - reference_m2)).toBeLessThan(1e-6);
          compared++;
        }
      }
      expect(compared).toBeGreaterThan(100);
    }
  });

  it('puts a polygon smaller than a cell wholly into that cell', () => {
    const grid = gridWith(50, 0, 0);
    const shares = rasteriseRing(TINY_TRIANGLE, grid);
    expect(shares).toHaveLength(1);
    expect(shares[0].column).toBe(200 + grid.nx * 200);
    expect(shares[0].overlap_m2).toBeCloseTo(ringArea_m2(TINY_TRIANGLE), 12);
  });

  it('gives no zero shares, each column once, in increasing order, within the bounding box', () => {
    // A rectangle whose edges lie exactly on cell faces touches no cell outside it.
    const grid = gridWith(10, 0, 0);
    const onFaces: Ring = [[-50, -20], [30, -20], [30, 40], [-50, 40], [-50, -20]];
    const shares = rasteriseRing(onFaces, grid);
    expect(shares).toHaveLength(8 * 6);
    for (const share of shares) expect(share.overlap_m2).toBeCloseTo(100, 9);
    for (const [, ring] of polygons) {
      const cut = rasteriseRing(ring, gridWith(7.3, 0.37, 0.91));
      let badShares = 0;
      for (let s = 0; s < cut.length; s++) {
        if (!(cut[s].overlap_m2 > 0)) badShares++;
        if (s > 0 && !(cut[s].column > cut[s - 1].column)) badShares++;
      }
      expect(badShares).toBe(0);
    }
  });

  it('refuses a ring that is open, too short, without area or outside the grid, naming ring_m', () => {
    const grid = gridWith(50, 0, 0, 1000);
    expect(() => rasteriseRing([[0, 0], [10, 0], [10, 10], [0, 10]], grid)).toThrow(/^ring_m: first position/);
    expect(() => rasteriseRing([[0, 0], [10, 0], [0, 0]], grid)).toThrow(/^ring_m: got 3 positions/);
    expect(() => rasteriseRing([[0, 0], [10, 0], [20, 0], [0, 0]], grid)).toThrow(/^ring_m: the ring encloses no area/);
    expect(() => rasteriseRing([[0, 0], [Number.NaN, 0], [10, 10], [0, 0]], grid)).toThrow(/^ring_m\[1\]: got/);
    expect(() => rasteriseRing(shift(RECTANGLE, 900, 0), grid)).toThrow(/^ring_m: the ring spans .* allowed: inside the grid/);
  });
});

describe('ringSelfIntersection', () => {
  it('finds a crossing, a touch and a fold-back, and passes simple rings', () => {
    // Behaviour check against hand-drawn cases.
    expect(ringSelfIntersection([[0, 0], [10, 10], [10, 0], [0, 10], [0, 0]])).not.toBeNull(); // bow-tie
    expect(ringSelfIntersection([[0, 0], [10, 0], [10, 10], [5, 0], [0, 10], [0, 0]])).not.toBeNull(); // vertex on an edge
    expect(ringSelfIntersection([[0, 0], [10, 0], [5, 0], [5, 5], [0, 0]])).not.toBeNull(); // fold-back
    for (const ring of [RECTANGLE, L_SHAPE, STAR, COMB, TINY_TRIANGLE, randomStarPolygon(7, 40, 420)]) {
      expect(ringSelfIntersection(ring)).toBeNull();
    }
    // A repeated vertex is a zero-length edge, not a crossing.
    expect(ringSelfIntersection([[0, 0], [10, 0], [10, 0], [10, 10], [0, 10], [0, 0]])).toBeNull();
  });
});

describe('planar area on the local projection against turf geodesic area', () => {
  // Reference: @turf/area (geodesic area of the lon/lat polygon on a sphere of radius
  // 6371008.8 m). The sphere differs from the WGS 84 ellipsoid by a few parts per thousand,
  // hence the 0.5 % tolerance. Sharper, derived: the ellipsoid's area element is
  // M N cos(lat) dlat dlon against the sphere's R^2 cos(lat) dlat dlon, so planar / turf should be
  // M N / R^2 = (1 - e^2) a^2 / ((1 - e^2 sin^2 lat)^2 R^2) (standard geodesy; WGS 84 a, f
  // common practice), to the transverse Mercator's scale error (< 1e-5 within 10 km).
  const WGS84_a_m = 6378137;
  const WGS84_e2 = (1 / 298.257223563) * (2 - 1 / 298.257223563);
  const TURF_EARTH_RADIUS_m = 6371008.8;
  const ellipsoidOverSphere = (lat: number): number => {
    const s2 = Math.sin((lat * Math.PI) / 180) ** 2;
    return ((1 - WGS84_e2) * WGS84_a_m ** 2) / ((1 - WGS84_e2 * s2) ** 2 * TURF_EARTH_RADIUS_m ** 2);
  };
  const southernProjection = createLocalProjection({ lat: -35.0625, lon: 147.4125 });
  const cases: [string, typeof projection, number, Ring][] = [
    // Invented polygons near the invented sites: a storage yard, a large L-shaped lagoon 7 km
    // out, and a yard in the southern hemisphere.
    [
      'storage yard',
      projection,
      52.14,
      [[5.2905, 52.1391], [5.2951, 52.1391], [5.2951, 52.1412], [5.2905, 52.1412], [5.2905, 52.1391]],
    ],
    [
      'L-shaped lagoon',
      projection,
      52.187,
      [[5.371, 52.176], [5.395, 52.176], [5.395, 52.183], [5.38, 52.183], [5.38, 52.198], [5.371, 52.198], [5.371, 52.176]],
    ],
    [
      'southern yard',
      southernProjection,
      -35.05,
      [[147.401, -35.056], [147.409, -35.055], [147.407, -35.047], [147.404, -35.05], [147.401, -35.046], [147.401, -35.056]],
    ],
  ];
  for (const [name, caseProjection, lat, lonLatRing] of cases) {
    it(`agrees within 0.5 % for the ${name}, and as the ellipsoid/sphere ratio predicts`, () => {
      const ring_m = lonLatRing.map(([lon, lat]) => caseProjection.toLocal(lon, lat));
      ring_m[ring_m.length - 1] = [ring_m[0][0], ring_m[0][1]];
      const planar_m2 = ringArea_m2(ring_m);
      const geodesic_m2 = turfGeodesicArea(turfPolygon([lonLatRing]));
      expect(Math.abs(planar_m2 - geodesic_m2) / geodesic_m2).toBeLessThan(0.005);
      expect(Math.abs(planar_m2 / geodesic_m2 / ellipsoidOverSphere(lat) - 1)).toBeLessThan(1e-4);
      // And the grid receives exactly the planar area.
      const grid = { ...gridWith(25, 0.37, 0.91), projection: caseProjection };
      expect(Math.abs(sumOf(rasteriseRing(ring_m, grid)) - planar_m2) / planar_m2).toBeLessThan(1e-9);
    });
  }
});
