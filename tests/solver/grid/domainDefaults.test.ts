import { describe, expect, it } from 'vitest';
import type { AreaSource, PointSource, Receptor } from '../../../scenarios/format/types.ts';
import {
  DEFAULT_DOMAIN_HEIGHT_m,
  DEFAULT_DOMAIN_LAYERS,
  DERIVED_DOMAIN_MAX_CELLS,
  GRID_ARRAYS_PER_CELL,
  GRID_MEMORY_LIMIT_bytes,
  ROUND_SPACINGS_m,
  checkGridMemory,
  deriveDomain,
  deriveDomainWithReasons,
  estimateGridMemory_bytes,
  plausibleEffectiveHeight_m,
} from '../../../solver/grid/domainDefaults.ts';
import { buildLocalGrid, columnAt } from '../../../solver/grid/localGrid.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';

// Invented site and layout.
const SITE = { lat: 52.1375, lon: 5.2875 };
const projection = createLocalProjection(SITE);

function stack(id: string, lon: number, lat: number, extra: Partial<PointSource> = {}): PointSource {
  return {
    kind: 'point', id, name: id, lon, lat, height_m: 30, diameter_m: 1, exitVelocity_m_s: 12,
    exitTemperature_K: 420, emission_g_s: 1.5, plumeRise: true, ...extra,
  };
}
function yard(id: string, polygon: [number, number][]): AreaSource {
  return { kind: 'area', id, name: id, polygon, releaseHeight_m: 1, emission_g_s: 0.4 };
}
function receptor(id: string, lon: number, lat: number): Receptor {
  return { id, name: id, lon, lat, height_m: 1.5 };
}

/** Every position the layout has, as local metres. */
function positionsOf(sources: (PointSource | AreaSource)[], receptors: Receptor[]): [number, number][] {
  const lonLat: [number, number][] = [];
  for (const source of sources) {
    if (source.kind === 'point') lonLat.push([source.lon, source.lat]);
    else lonLat.push(...source.polygon);
  }
  for (const r of receptors) lonLat.push([r.lon, r.lat]);
  return lonLat.map(([lon, lat]) => projection.toLocal(lon, lat));
}

describe('deriveDomain', () => {
  const layouts: [string, (PointSource | AreaSource)[], Receptor[]][] = [
    ['a compact plant', [stack('s', 5.289, 52.138), yard('y', [[5.29, 52.139], [5.293, 52.139], [5.293, 52.141], [5.29, 52.141], [5.29, 52.139]])], [receptor('r', 5.3, 52.14)]],
    ['a receptor 6 km east', [stack('s', 5.2875, 52.1375)], [receptor('r', 5.375, 52.1375)]],
    ['a yard 3 km south-west and a receptor 12 km north', [yard('y', [[5.25, 52.11], [5.26, 52.11], [5.26, 52.118], [5.25, 52.11]])], [receptor('r', 5.2875, 52.245)]],
    ['nothing but the site', [], []],
  ];

  for (const [name, sources, receptors] of layouts) {
    it(`covers every source and receptor with the stated margin: ${name}`, () => {
      // Behaviour check of the rule stated in domainDefaults.ts.
      const domain = deriveDomain({ sources, receptors, projection });
      const positions = positionsOf(sources, receptors);
      const farthest_m = Math.max(0, ...positions.map(([x, y]) => Math.hypot(x, y)));
      expect(domain.halfWidth_m).toBeGreaterThanOrEqual(2000);
      expect(domain.halfWidth_m).toBeGreaterThanOrEqual(1.5 * farthest_m);
      expect(ROUND_SPACINGS_m).toContain(domain.spacing_m);
      // A whole (even) number of cells: the grid is exactly the domain asked for.
      expect(Number.isInteger(domain.halfWidth_m / domain.spacing_m)).toBe(true);
      const columns = (2 * domain.halfWidth_m) / domain.spacing_m;
      expect(columns).toBeGreaterThanOrEqual(140);
      // Within the cell limit, and at the finest round spacing from the near field's on that fits it.
      expect(columns ** 2 * domain.layers).toBeLessThanOrEqual(DERIVED_DOMAIN_MAX_CELLS);
      const { nearSpacing_m, coarsening } = deriveDomainWithReasons({ sources, receptors, projection });
      expect(domain.spacing_m).toBeGreaterThanOrEqual(nearSpacing_m);
      expect(coarsening === null).toBe(domain.spacing_m === nearSpacing_m);
      const finer = ROUND_SPACINGS_m[ROUND_SPACINGS_m.indexOf(domain.spacing_m) - 1];
      if (domain.spacing_m > nearSpacing_m) {
        const finerColumns = 2 * Math.ceil(domain.halfWidth_m / finer - 1e-9);
        expect(finerColumns ** 2 * domain.layers).toBeGreaterThan(DERIVED_DOMAIN_MAX_CELLS);
      }
      expect(domain.height_m).toBe(DEFAULT_DOMAIN_HEIGHT_m);
      expect(domain.layers).toBe(DEFAULT_DOMAIN_LAYERS);
      const grid = buildLocalGrid(domain, projection);
      expect(grid.nx * grid.spacing_m).toBe(2 * domain.halfWidth_m);
      for (const [x, y] of positions) expect(columnAt(grid, x, y)).toBeGreaterThanOrEqual(0);
    });
  }

  it('chooses round figures: 2 km at 20 m for a compact plant, 10 km at 50 m for a receptor 6 km out', () => {
    expect(deriveDomain({ sources: layouts[0][1], receptors: layouts[0][2], projection })).toEqual({
      halfWidth_m: 2000, spacing_m: 20, height_m: 1000, layers: 24,
    });
    // The stack is at the site: near box 2 km, 4 km / 200 = 20 m. The receptor: 1.5 x 6.0 km = 9.0 km -> 10 km;
    // at 20 m that is 1000^2 x 24 = 24 M cells, at 25 m 800^2 x 24 = 15.4 M, at 50 m 400^2 x 24 = 3.84 M <= 4 M.
    expect(deriveDomain({ sources: layouts[1][1], receptors: layouts[1][2], projection })).toMatchObject({
      halfWidth_m: 10_000, spacing_m: 50,
    });
  });

  it('gives a far receptor more cells at the same spacing while the cell limit allows', () => {
    // Compact plant: 2 km at 20 m. A receptor 1.9 km north (1.5 x 1.9 = 2.85 -> 3 km): 300^2 x 24 = 2.16 M cells.
    const [, sources, receptors] = layouts[0];
    const north = receptor('far', 5.2875, 52.1375 + 1900 / 111_250);
    const derived = deriveDomainWithReasons({ sources, receptors: [...receptors, north], projection });
    expect(derived.domain).toEqual({ halfWidth_m: 3000, spacing_m: 20, height_m: 1000, layers: 24 });
    expect(derived.coarsening).toBeNull();
  });

  it('coarsens only when the cell limit forces it, and says which receptor forced it and the old and new cells', () => {
    const derived = deriveDomainWithReasons({ sources: layouts[1][1], receptors: layouts[1][2], projection });
    expect(derived.nearSpacing_m).toBe(20);
    expect(derived.coarsening).toMatchObject({ field: 'receptors[0]', id: 'r', nearSpacing_m: 20, spacing_m: 50, maxCells: DERIVED_DOMAIN_MAX_CELLS });
    expect(derived.coarsening!.note).toMatch(
      /^derived domain: receptors\[0\] \('r', 6\.0 km from the site\).* 1000 x 1000 x 24 = 24000000 cells, above the 4000000 .*the cells are 50 m instead of 20 m/,
    );
    // A lower limit (a server configured for fewer cells) coarsens further: 200^2 x 24 = 0.96 M at 100 m.
    expect(deriveDomain({ sources: layouts[1][1], receptors: layouts[1][2], projection, maxCells: 1_000_000 }).spacing_m).toBe(100);
  });

  it('raises the grid top above a tall buoyant stack', () => {
    const big = stack('big', 5.2875, 52.1375, { height_m: 250, diameter_m: 8, exitVelocity_m_s: 20, exitTemperature_K: 400 });
    const effective_m = plausibleEffectiveHeight_m(big);
    // Briggs neutral final rise for F >= 55 at u = 1 m/s: 38.71 F^(3/5) (REFERENCES.md, from memory);
    // F = g v d^2 (Ts - Ta) / (4 Ts) with Ta = 288.15 K.
    const flux = (9.80665 * 20 * 64 * (400 - 288.15)) / (4 * 400);
    expect(effective_m).toBeCloseTo(250 + 38.71 * flux ** 0.6, 6);
    const domain = deriveDomain({ sources: [big], receptors: [], projection });
    expect(domain.height_m).toBeGreaterThan(1.5 * effective_m - 1e-9);
    expect(domain.height_m % 500).toBe(0);
    // A cold release without rise keeps its height.
    expect(plausibleEffectiveHeight_m({ ...big, plumeRise: false })).toBe(250);
  });

  it('refuses a position far from the site, naming its field', () => {
    // 5.2875 + 1 deg of longitude is about 68 km away at 52 N: more likely a typing slip.
    expect(() => deriveDomain({ sources: [stack('s', 6.2875, 52.1375)], receptors: [], projection })).toThrow(
      /^sources\[0\]: lon 6\.2875, lat 52\.1375 is 68\.\d km from the site; allowed without a domain: within 50 km/,
    );
    expect(() =>
      deriveDomain({ sources: [yard('y', [[5.29, 52.139], [5.29, 53.5], [5.3, 52.139], [5.29, 52.139]])], receptors: [], projection }),
    ).toThrow(/^sources\[0\]\.polygon\[1\]: /);
    expect(() => deriveDomain({ sources: [], receptors: [receptor('a', 5.29, 52.14), receptor('b', Number.NaN, 52)], projection })).toThrow(
      /^receptors\[1\]: got lon NaN/,
    );
  });
});

describe('grid memory', () => {
  it('estimates cells x 16 arrays x 8 bytes', () => {
    // 200 x 200 x 24 cells, 16 float64 arrays each (the stated factor).
    expect(GRID_ARRAYS_PER_CELL).toBe(16);
    expect(estimateGridMemory_bytes({ halfWidth_m: 5000, spacing_m: 50, height_m: 1000, layers: 24 })).toBe(
      200 * 200 * 24 * 16 * 8,
    );
    expect(GRID_MEMORY_LIMIT_bytes).toBe(4 * 1024 ** 3);
  });

  it('accepts an ordinary domain and refuses a huge one, naming cells, bytes and the limit', () => {
    expect(() => checkGridMemory({ halfWidth_m: 5000, spacing_m: 50, height_m: 1000, layers: 30 })).not.toThrow();
    // 20 km at 5 m spacing: 4000 x 4000 x 30 = 4.8e8 cells, 30.7e9 bytes.
    const huge = { halfWidth_m: 10_000, spacing_m: 5, height_m: 1000, layers: 30 };
    expect(() => checkGridMemory(huge)).toThrow(RangeError);
    expect(() => checkGridMemory(huge)).toThrow(
      /^domain: .*4000 x 4000 x 30 = 480000000 cells, about 57\.2 GiB \(61440000000 bytes .*allowed: at most 4\.00 GiB \(4294967296 bytes\)/,
    );
    // Just under and just over the limit: 4 GiB / 128 B = 2^25 cells = 2048 x 2048 x 8.
    expect(() => checkGridMemory({ halfWidth_m: 1024, spacing_m: 1, height_m: 100, layers: 8 })).not.toThrow();
    expect(() => checkGridMemory({ halfWidth_m: 1024, spacing_m: 1, height_m: 100, layers: 9 })).toThrow(/^domain: /);
  });

  it('checks the domain fields first, naming them', () => {
    expect(() => checkGridMemory({ halfWidth_m: 5000, spacing_m: Number.NaN, height_m: 1000, layers: 30 })).toThrow(
      /^domain\.spacing_m: got NaN/,
    );
  });
});
