import { describe, expect, it } from 'vitest';
import {
  GROUND_LAYER_TARGET_m,
  MAX_LAYER_GROWTH_RATIO,
  buildLocalGrid,
  cellCentreX_m,
  cellCentreY_m,
  columnAt,
  layerAt,
  layerGrowthRatio,
  stretchedLayerFaces,
} from '../../../solver/grid/localGrid.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';

// Invented site.
const projection = createLocalProjection({ lat: 52.1375, lon: 5.2875 });

describe('stretchedLayerFaces', () => {
  const cases: [number, number][] = [
    [1000, 30],
    [1000, 24],
    [3000, 24],
    [200, 12],
    [50, 10],
    [20, 10],
    [1000, 1],
  ];
  for (const [height_m, layers] of cases) {
    it(`${height_m} m in ${layers} layers: faces rise from 0 to the top, thinnest at the ground, thicknesses monotone`, () => {
      const faces = stretchedLayerFaces(height_m, layers);
      expect(faces).toHaveLength(layers + 1);
      expect(faces[0]).toBe(0);
      expect(faces[layers]).toBe(height_m);
      const thickness = Array.from({ length: layers }, (_, k) => faces[k + 1] - faces[k]);
      for (let k = 0; k < layers; k++) expect(thickness[k]).toBeGreaterThan(0);
      for (let k = 1; k < layers; k++) {
        // Non-decreasing upward (uniform layers allowed up to rounding), never above the growth limit.
        expect(thickness[k]).toBeGreaterThanOrEqual(thickness[k - 1] * (1 - 1e-12));
        expect(thickness[k] / thickness[k - 1]).toBeLessThanOrEqual(MAX_LAYER_GROWTH_RATIO * (1 + 1e-12));
      }
      expect(Math.min(...thickness)).toBe(thickness[0]);
    });
  }

  it('is geometric with the stated ground layer where the growth limit allows', () => {
    // The rule in localGrid.ts: dz_0 = 3 m, dz_k = dz_0 r^k, r solved to fill the height.
    for (const [height_m, layers] of [[1000, 30], [1000, 24], [100, 20]] as const) {
      const faces = stretchedLayerFaces(height_m, layers);
      const ratio = layerGrowthRatio(height_m, layers);
      expect(ratio).toBeGreaterThan(1);
      expect(ratio).toBeLessThan(MAX_LAYER_GROWTH_RATIO);
      expect(faces[1]).toBeCloseTo(GROUND_LAYER_TARGET_m, 9);
      for (let k = 1; k < layers; k++) {
        const ratioHere = (faces[k + 1] - faces[k]) / (faces[k] - faces[k - 1]);
        expect(Math.abs(ratioHere - ratio)).toBeLessThan(1e-9);
      }
    }
    // 1000 m / 30 layers: sum_{k<30} 3 r^k = 1000 at r = 1.13654 (solved independently below).
    const r = layerGrowthRatio(1000, 30);
    let sum = 0;
    for (let k = 0; k < 30; k++) sum += 3 * r ** k;
    expect(sum).toBeCloseTo(1000, 9);
  });

  it('thickens the ground layer instead of exceeding the growth limit for a tall grid', () => {
    // 3000 m / 24 layers would need r = 1.26 at 3 m; the rule caps r at 1.2.
    expect(layerGrowthRatio(3000, 24)).toBe(MAX_LAYER_GROWTH_RATIO);
    const faces = stretchedLayerFaces(3000, 24);
    // dz_0 = H (r - 1) / (r^n - 1) for the capped ratio (geometric series).
    expect(faces[1]).toBeCloseTo((3000 * 0.2) / (1.2 ** 24 - 1), 9);
    expect(faces[1]).toBeGreaterThan(GROUND_LAYER_TARGET_m);
  });

  it('uses uniform layers when they are already no thicker than the ground-layer target', () => {
    const faces = stretchedLayerFaces(20, 10);
    for (let k = 0; k <= 10; k++) expect(faces[k]).toBeCloseTo(2 * k, 12);
  });

  it('refuses bad arguments, naming them', () => {
    expect(() => stretchedLayerFaces(0, 10)).toThrow(/^height_m: got 0; allowed/);
    expect(() => stretchedLayerFaces(Number.NaN, 10)).toThrow(/^height_m: got NaN/);
    expect(() => stretchedLayerFaces(1000, 2.5)).toThrow(/^layers: got 2\.5; allowed: a whole number/);
    expect(() => stretchedLayerFaces(1000, 0)).toThrow(RangeError);
  });
});

describe('buildLocalGrid', () => {
  const domain = { halfWidth_m: 5000, spacing_m: 50, height_m: 1000, layers: 30 };

  it('centres a square of round(2 halfWidth / spacing) columns on the site', () => {
    const grid = buildLocalGrid(domain, projection);
    expect(grid.nx).toBe(200);
    expect(grid.ny).toBe(200);
    expect(grid.nz).toBe(30);
    expect(grid.xWest_m).toBe(-5000);
    expect(grid.ySouth_m).toBe(-5000);
    expect(grid.projection).toBe(projection);
    expect(cellCentreX_m(grid, 0)).toBe(-4975);
    expect(cellCentreX_m(grid, 199)).toBe(4975);
    expect(cellCentreY_m(grid, 100)).toBe(25);
    for (let k = 0; k < grid.nz; k++) {
      expect(grid.dz_m[k]).toBeCloseTo(grid.zFaces_m[k + 1] - grid.zFaces_m[k], 12);
      expect(grid.zCentres_m[k]).toBeCloseTo(0.5 * (grid.zFaces_m[k] + grid.zFaces_m[k + 1]), 12);
    }
    // The ground layer's centre is at the default receptor height, 1.5 m (the rule's purpose).
    expect(grid.zCentres_m[0]).toBeCloseTo(1.5, 9);
  });

  it('rounds a half-width that is not a whole number of half cells, staying centred', () => {
    // 2 * 1000 / 30 = 66.7 -> 67 columns; the grid's half-width is 67 * 30 / 2 = 1005 m.
    const grid = buildLocalGrid({ halfWidth_m: 1000, spacing_m: 30, height_m: 500, layers: 10 }, projection);
    expect(grid.nx).toBe(67);
    expect(grid.xWest_m).toBe(-1005);
    expect(grid.xWest_m + grid.nx * grid.spacing_m).toBe(1005);
  });

  it('finds the column and layer of a point, and -1 outside', () => {
    const grid = buildLocalGrid(domain, projection);
    for (const [i, j] of [[0, 0], [17, 123], [199, 199], [100, 99]]) {
      expect(columnAt(grid, cellCentreX_m(grid, i), cellCentreY_m(grid, j))).toBe(i + grid.nx * j);
    }
    // Faces belong to the cell east/north of them; the far edges to the last cell.
    expect(columnAt(grid, 0, 0)).toBe(100 + 200 * 100);
    expect(columnAt(grid, 5000, 5000)).toBe(199 + 200 * 199);
    expect(columnAt(grid, -5000, -5000)).toBe(0);
    expect(columnAt(grid, 5000.001, 0)).toBe(-1);
    expect(columnAt(grid, 0, -5000.001)).toBe(-1);
    expect(columnAt(grid, Number.NaN, 0)).toBe(-1);

    expect(layerAt(grid, 0)).toBe(0);
    expect(layerAt(grid, 1.5)).toBe(0);
    expect(layerAt(grid, grid.zFaces_m[1])).toBe(1);
    expect(layerAt(grid, 1000)).toBe(29);
    for (let k = 0; k < grid.nz; k++) expect(layerAt(grid, grid.zCentres_m[k])).toBe(k);
    expect(layerAt(grid, -0.01)).toBe(-1);
    expect(layerAt(grid, 1000.01)).toBe(-1);
  });

  it('refuses a bad domain, naming the field', () => {
    expect(() => buildLocalGrid({ ...domain, spacing_m: 0 }, projection)).toThrow(
      /^domain\.spacing_m: got 0; allowed: a finite number > 0/,
    );
    expect(() => buildLocalGrid({ ...domain, halfWidth_m: -1 }, projection)).toThrow(/^domain\.halfWidth_m: got -1/);
    expect(() => buildLocalGrid({ ...domain, height_m: Infinity }, projection)).toThrow(/^domain\.height_m/);
    expect(() => buildLocalGrid({ ...domain, layers: 0 }, projection)).toThrow(/^domain\.layers: got 0/);
    expect(() => buildLocalGrid({ ...domain, spacing_m: 20000 }, projection)).toThrow(
      /^domain\.spacing_m: got 20000 m; allowed: at most the domain width/,
    );
  });
});
