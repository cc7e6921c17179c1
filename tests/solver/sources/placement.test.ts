import { describe, expect, it } from 'vitest';
import type { AreaSource, PointSource, Receptor } from '../../../scenarios/format/types.ts';
import type { PlacedAreaSource } from '../../../solver/drivers/types.ts';
import { buildLocalGrid } from '../../../solver/grid/localGrid.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import { ringArea_m2 } from '../../../solver/sources/areaRasterisation.ts';
import { placeReceptors, placeSources } from '../../../solver/sources/placement.ts';

// Invented site and layout.
const projection = createLocalProjection({ lat: 52.1375, lon: 5.2875 });
const grid = buildLocalGrid({ halfWidth_m: 2000, spacing_m: 20, height_m: 1000, layers: 24 }, projection);

const STACK: PointSource = {
  kind: 'point', id: 'stack-1', name: 'Boiler stack', lon: 5.2891, lat: 52.1382, height_m: 30,
  diameter_m: 1, exitVelocity_m_s: 12, exitTemperature_K: 420, emission_g_s: 1.5, plumeRise: true,
};
const YARD: AreaSource = {
  kind: 'area', id: 'yard', name: 'Storage yard', releaseHeight_m: 1, emission_g_s: 0.4,
  // An L-shaped yard, counter-clockwise in lon/lat.
  polygon: [[5.2905, 52.1391], [5.2951, 52.1391], [5.2951, 52.1399], [5.2922, 52.1399], [5.2922, 52.1412], [5.2905, 52.1412], [5.2905, 52.1391]],
};

describe('placeSources', () => {
  it('places a point source at its projected position, keeping its other fields', () => {
    const [placed] = placeSources([STACK], grid);
    const [x_m, y_m] = projection.toLocal(STACK.lon, STACK.lat);
    expect(placed).toEqual({
      kind: 'point', id: 'stack-1', x_m, y_m, height_m: 30, diameter_m: 1, exitVelocity_m_s: 12,
      exitTemperature_K: 420, emission_g_s: 1.5, plumeRise: true,
    });
  });

  it('places an area source as its local ring, area, centroid and exact shares', () => {
    const placed = placeSources([STACK, YARD], grid)[1] as PlacedAreaSource;
    expect(placed.kind).toBe('area');
    expect(placed.ring_m).toHaveLength(YARD.polygon.length);
    YARD.polygon.forEach(([lon, lat], v) => {
      const [x, y] = projection.toLocal(lon, lat);
      expect(placed.ring_m[v][0]).toBeCloseTo(x, 9);
      expect(placed.ring_m[v][1]).toBeCloseTo(y, 9);
    });
    expect(placed.ring_m[placed.ring_m.length - 1]).toEqual(placed.ring_m[0]);
    expect(placed.area_m2).toBeCloseTo(ringArea_m2(placed.ring_m), 9);
    // Conservation: the shares add up to the polygon's area, so the grid gets all of emission_g_s.
    const total_m2 = placed.shares.reduce((sum, share) => sum + share.overlap_m2, 0);
    expect(Math.abs(total_m2 - placed.area_m2) / placed.area_m2).toBeLessThan(1e-12);
    // The centroid of an L lies inside its bounding box, nearer the long arm (a behaviour check).
    const xs = placed.ring_m.map(([x]) => x);
    const ys = placed.ring_m.map(([, y]) => y);
    expect(placed.x_m).toBeGreaterThan(Math.min(...xs));
    expect(placed.x_m).toBeLessThan(Math.max(...xs));
    expect(placed.y_m).toBeGreaterThan(Math.min(...ys));
    expect(placed.y_m).toBeLessThan(0.5 * (Math.min(...ys) + Math.max(...ys)));
    expect(placed.releaseHeight_m).toBe(1);
    expect(placed.emission_g_s).toBe(0.4);
  });

  it('refuses a source outside the domain, naming its field path', () => {
    // 0.04 deg of longitude is about 2.7 km at 52 N: outside a 2 km half-width.
    const far = { ...STACK, lon: 5.3275 };
    expect(() => placeSources([STACK, far], grid)).toThrow(RangeError);
    expect(() => placeSources([STACK, far], grid)).toThrow(
      /^sources\[1\]: point source 'stack-1' at lon 5\.3275, lat 52\.1382 is at x 27\d\d\.\d m, .* outside the domain; allowed: x -2000 to 2000 m/,
    );
    // An area source must lie wholly inside: one vertex out is enough to refuse it.
    const straddling: AreaSource = { ...YARD, polygon: [[5.28, 52.13], [5.32, 52.13], [5.32, 52.14], [5.28, 52.13]] };
    expect(() => placeSources([straddling], grid)).toThrow(/^sources\[0\]\.polygon\[1\]: vertex of area source 'yard'/);
  });

  it('refuses a polygon that is open or crosses itself, and a non-finite position', () => {
    const open: AreaSource = { ...YARD, polygon: YARD.polygon.slice(0, -1) };
    expect(() => placeSources([open], grid)).toThrow(/^sources\[0\]\.polygon: first position .* allowed: a closed ring/);
    const bowTie: AreaSource = { ...YARD, polygon: [[5.29, 52.139], [5.295, 52.141], [5.295, 52.139], [5.29, 52.141], [5.29, 52.139]] };
    expect(() => placeSources([bowTie], grid)).toThrow(/^sources\[0\]\.polygon: edges 0 and 2 cross or touch/);
    expect(() => placeSources([{ ...STACK, lat: Number.POSITIVE_INFINITY }], grid)).toThrow(/^sources\[0\]: got lon 5\.2891, lat Infinity/);
  });
});

describe('placeReceptors', () => {
  const school: Receptor = { id: 'school', name: 'Primary school', lon: 5.301, lat: 52.1421, height_m: 1.5 };

  it('places receptors at their projected positions with their heights', () => {
    const [placed] = placeReceptors([school], grid);
    const [x_m, y_m] = projection.toLocal(school.lon, school.lat);
    expect(placed).toEqual({ id: 'school', x_m, y_m, height_m: 1.5 });
  });

  it('refuses a receptor outside the domain or with a bad height, naming the field', () => {
    expect(() => placeReceptors([{ ...school, lat: 52.2 }], grid)).toThrow(/^receptors\[0\]: receptor 'school' .* outside the domain/);
    expect(() => placeReceptors([school, { ...school, height_m: -1 }], grid)).toThrow(/^receptors\[1\]\.height_m: got -1/);
    expect(() => placeReceptors([{ ...school, height_m: 1200 }], grid)).toThrow(/^receptors\[0\]\.height_m: got 1200; allowed: .* grid top 1000 m/);
  });
});
