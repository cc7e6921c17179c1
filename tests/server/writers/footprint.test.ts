/**
 * footprint.geojson: fixture comparisons (Turf style: tests/fixtures/footprint/in/*.json fields,
 * out/*.geojson expected, compared after rounding; REGEN=1 rewrites the expected files, CI never does),
 * band areas against the exact areas of a radially symmetric field, RFC 7946 winding, and band nesting.
 */
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { booleanPointInPolygon } from '@turf/turf';
import type { Position } from 'geojson';
import { describe, expect, it } from 'vitest';
import { SCREENING_CAUTION } from '../../../server/writers/caution.ts';
import { assignHoles, checkLevels, defaultFootprintLevels, footprintBands, type FootprintCollection } from '../../../server/writers/footprint.ts';
import { formatFootprint } from '../../../server/writers/writeResultFolder.ts';
import { localAreaOf, localPerimeterOf, makeTestGrid, readFootprintFixture, roundNumbers, shoelaceArea } from './helpers.ts';

const FIXTURES = path.join(import.meta.dirname, '..', '..', 'fixtures', 'footprint');
const fixtureNames = readdirSync(path.join(FIXTURES, 'in'))
  .filter((name) => name.endsWith('.json'))
  .map((name) => name.replace(/\.json$/, ''))
  .sort();

function bandsOfFixture(name: string): FootprintCollection {
  const { fixture, grid, field } = readFootprintFixture(path.join(FIXTURES, 'in', `${name}.json`));
  return footprintBands(field, grid, { levels_ug_m3: fixture.levels_ug_m3, scenarioName: `fixture ${name}` });
}

function polygonsOf(geometry: FootprintCollection['features'][number]['geometry']): Position[][][] {
  return geometry.type === 'Polygon' ? [geometry.coordinates] : geometry.coordinates;
}

describe('footprint fixtures (compared after rounding to 6 decimals, about 10 cm)', () => {
  it('has fixtures to compare', () => {
    expect(fixtureNames.length).toBeGreaterThanOrEqual(6);
  });

  for (const name of fixtureNames) {
    it(`${name} matches out/${name}.geojson`, () => {
      const collection = bandsOfFixture(name);
      const expectedFile = path.join(FIXTURES, 'out', `${name}.geojson`);
      if (process.env.REGEN === '1') writeFileSync(expectedFile, formatFootprint(collection));
      expect(existsSync(expectedFile), `${expectedFile} missing: run REGEN=1 npx vitest run tests/server/writers`).toBe(true);
      const expected = JSON.parse(readFileSync(expectedFile, 'utf8'));
      // Through JSON as the file would be, then rounded: platforms may differ in the last bits of proj4.
      const actual = JSON.parse(formatFootprint(collection));
      expect(roundNumbers(actual, 6)).toEqual(roundNumbers(expected, 6));
    });
  }

  it('the hand-made fixtures have the shapes their descriptions promise', () => {
    const ring = bandsOfFixture('ring-ridge');
    for (const feature of ring.features) {
      for (const polygon of polygonsOf(feature.geometry)) expect(polygon.length).toBe(2); // exterior + hole
    }
    const twoPeaks = bandsOfFixture('two-peaks');
    const top = twoPeaks.features.find((feature) => feature.properties.upper_ug_m3 === null)!;
    expect(top.geometry.type).toBe('MultiPolygon');
    expect(polygonsOf(top.geometry)).toHaveLength(2);
    const lower = twoPeaks.features.find((feature) => feature.properties.lower_ug_m3 === 2)!;
    expect(polygonsOf(lower.geometry)).toHaveLength(1);
    expect(polygonsOf(lower.geometry)[0]).toHaveLength(3); // exterior + two holes
    expect(bandsOfFixture('all-zero').features).toHaveLength(0);
  });
});

describe('band areas of a radially symmetric field', () => {
  // Exact solution: for C(r) = P exp(-r^2 / (2 s^2)) the level L is the circle r_L^2 = 2 s^2 ln(P / L),
  // so the band between levels a < b is an annulus of area pi (r_a^2 - r_b^2) = 2 pi s^2 ln(b / a), and
  // the top band a disc of area 2 pi s^2 ln(P / a) (derived from the field's formula).
  // The contours interpolate linearly between cell centres, an O(h^2) approximation, so the error must
  // be small and fall about fourfold when the spacing halves.
  const sigma_m = 400;
  const peak_ug_m3 = 100;
  const levels = [1, 2, 5, 10, 20, 50];

  function relativeAreaErrors(spacing_m: number): number[] {
    const half_m = 2000;
    const n = Math.round((2 * half_m) / spacing_m);
    const grid = makeTestGrid({ site: { lat: 54.1234, lon: -2.4567 }, nx: n, ny: n, spacing_m, xWest_m: -half_m, ySouth_m: -half_m });
    const field = new Float64Array(n * n);
    for (let j = 0; j < n; j += 1) {
      for (let i = 0; i < n; i += 1) {
        const x = -half_m + (i + 0.5) * spacing_m;
        const y = -half_m + (j + 0.5) * spacing_m;
        field[i + n * j] = peak_ug_m3 * Math.exp(-(x * x + y * y) / (2 * sigma_m * sigma_m));
      }
    }
    const collection = footprintBands(field, grid, { levels_ug_m3: levels });
    expect(collection.features.map((feature) => feature.properties.lower_ug_m3)).toEqual(levels);
    return collection.features.map((feature) => {
      const upper = feature.properties.upper_ug_m3 ?? peak_ug_m3;
      const exact_m2 = 2 * Math.PI * sigma_m ** 2 * Math.log(upper / feature.properties.lower_ug_m3);
      // Areas measured in local metres after the round trip lon/lat -> local through the projection.
      return (localAreaOf(polygonsOf(feature.geometry), grid) - exact_m2) / exact_m2;
    });
  }

  it('match the exact annulus areas within 0.1 % on a 20 m grid (s = 20 cells), converging at second order', () => {
    const coarse = relativeAreaErrors(40).map(Math.abs);
    const fine = relativeAreaErrors(20).map(Math.abs);
    for (const error of fine) expect(error).toBeLessThan(1e-3);
    // Second order: halving the spacing divides the error by about 4; ask for at least 3.
    expect(Math.max(...coarse) / Math.max(...fine)).toBeGreaterThan(3);
  });
});

describe('RFC 7946 form', () => {
  for (const name of fixtureNames) {
    it(`${name}: closed rings, exterior counter-clockwise, holes clockwise, 7 decimals at most`, () => {
      const collection = bandsOfFixture(name);
      for (const feature of collection.features) {
        for (const polygon of polygonsOf(feature.geometry)) {
          polygon.forEach((ring, r) => {
            expect(ring.length).toBeGreaterThanOrEqual(4);
            expect(ring[0]).toEqual(ring[ring.length - 1]);
            if (r === 0) expect(shoelaceArea(ring)).toBeGreaterThan(0);
            else expect(shoelaceArea(ring)).toBeLessThan(0);
            for (const [lon, lat] of ring) {
              expect(Math.round(lon * 1e7) / 1e7).toBe(lon);
              expect(Math.round(lat * 1e7) / 1e7).toBe(lat);
            }
          });
        }
      }
    });
  }

  it('carries the caution, the statistic and the units in the collection properties', () => {
    const collection = bandsOfFixture('single-peak');
    expect(collection.type).toBe('FeatureCollection');
    expect(collection.properties.caution).toBe(SCREENING_CAUTION);
    expect(collection.properties.statistic).toBe('concentration');
    expect(collection.properties.units).toBe('ug/m3');
    expect(collection.properties.levelsChosen).toBe('default');
  });
});

describe('band nesting', () => {
  // Behaviour check: marching squares puts each cell centre inside the region at or above a level
  // exactly when its value is at or above that level, so every cell centre must fall in the one band
  // whose [lower, upper) holds its value, and in no band when it is below the lowest level. Centres
  // within 0.1 % of a level are skipped: the boundary passes within centimetres of them.
  for (const name of fixtureNames.filter((fixture) => fixture !== 'exact-levels')) {
    it(`${name}: every cell centre lies in exactly the band its value belongs to`, () => {
      const { fixture, grid, field } = readFootprintFixture(path.join(FIXTURES, 'in', `${name}.json`));
      const collection = footprintBands(field, grid, { levels_ug_m3: fixture.levels_ug_m3 });
      const levels = collection.properties.levels_ug_m3;
      let checked = 0;
      for (let j = 0; j < grid.ny; j += 1) {
        for (let i = 0; i < grid.nx; i += 1) {
          const value = field[i + grid.nx * j];
          if (levels.some((level) => Math.abs(value - level) <= 1e-3 * level)) continue;
          const [lon, lat] = grid.projection.toLonLat(grid.xWest_m + (i + 0.5) * grid.spacing_m, grid.ySouth_m + (j + 0.5) * grid.spacing_m);
          const containing = collection.features.filter((feature) => booleanPointInPolygon([lon, lat], feature));
          const expected = collection.features.filter(
            (feature) => value >= feature.properties.lower_ug_m3 && (feature.properties.upper_ug_m3 === null || value < feature.properties.upper_ug_m3),
          );
          expect(containing.map((feature) => feature.properties.label), `cell (${i}, ${j}) value ${value}`).toEqual(
            expected.map((feature) => feature.properties.label),
          );
          checked += 1;
        }
      }
      expect(checked).toBeGreaterThan(0);
    });
  }

  for (const name of fixtureNames.filter((fixture) => fixture !== 'all-zero')) {
    it(`${name}: bands do not overlap, their areas add up to the area at or above the lowest level`, () => {
      const { fixture, grid, field } = readFootprintFixture(path.join(FIXTURES, 'in', `${name}.json`));
      const bands = footprintBands(field, grid, { levels_ug_m3: fixture.levels_ug_m3 });
      const lowest = bands.properties.levels_ug_m3[0];
      const all = footprintBands(field, grid, { levels_ug_m3: [lowest] });
      const sum = bands.features.reduce((total, feature) => total + localAreaOf(polygonsOf(feature.geometry), grid), 0);
      const whole = localAreaOf(polygonsOf(all.features[0].geometry), grid);
      // Conservation of area. Rounding to 7 decimals moves a vertex by at most 0.5e-7 degree (under
      // 0.6 cm), so each band's area may change by at most its rings' length times 0.6 cm.
      const allowed_m2 = [...bands.features, ...all.features].reduce(
        (total, feature) => total + localPerimeterOf(polygonsOf(feature.geometry), grid) * 0.006,
        0,
      );
      expect(Math.abs(sum - whole)).toBeLessThanOrEqual(allowed_m2);
      expect(allowed_m2 / whole).toBeLessThan(1e-3);
    });
  }
});

describe('holes go to the exterior they lie in', () => {
  // Rings of one level never cross, so a hole belongs to the smallest exterior around it. The
  // integer-plateaus fixture is a field where d3-contour's own grouping gets this wrong (its band
  // areas then fail the conservation check above); these cases state the rule on plain squares.
  const square = (west: number, south: number, side: number): Position[] => [
    [west, south], [west + side, south], [west + side, south + side], [west, south + side], [west, south],
  ];
  const hole = (ring: Position[]): Position[] => [...ring].reverse();

  it('moves a hole given to the wrong exterior', () => {
    // A 10 x 10 square, a separate 2 x 2 island east of it, and a hole inside the big square that was
    // handed to the island.
    const big = square(0, 0, 10);
    const island = square(20, 0, 2);
    const inner = hole(square(4, 4, 2));
    expect(assignHoles([[big], [island, inner]])).toEqual([[big, inner], [island]]);
  });

  it('gives a hole to the smallest exterior around it (an island inside a crater inside a ridge)', () => {
    const ridge = square(0, 0, 20);
    const crater = hole(square(2, 2, 16));
    const island = square(5, 5, 10);
    const islandHole = hole(square(8, 8, 4));
    expect(assignHoles([[ridge, crater, islandHole], [island]])).toEqual([[ridge, crater], [island, islandHole]]);
  });
});

describe('levels', () => {
  function fieldFromZeroTo(peak: number): Float64Array {
    return Float64Array.from({ length: 100 }, (_, index) => (peak * index) / 99);
  }

  it('default: the 1-2-5 series below the peak, seven at most, ascending', () => {
    expect(defaultFootprintLevels(fieldFromZeroTo(37))).toEqual([0.2, 0.5, 1, 2, 5, 10, 20]);
    // A peak that is itself a round number is not a level: the top band would be one point.
    expect(defaultFootprintLevels(fieldFromZeroTo(5))).toEqual([0.02, 0.05, 0.1, 0.2, 0.5, 1, 2]);
    expect(defaultFootprintLevels(fieldFromZeroTo(0.0037))).toEqual([0.00002, 0.00005, 0.0001, 0.0002, 0.0005, 0.001, 0.002]);
  });

  it('default: no level at or below the field minimum, none for a zero or flat field', () => {
    const narrow = Float64Array.from({ length: 50 }, (_, index) => 3 + index * 0.5); // 3 .. 27.5
    expect(defaultFootprintLevels(narrow)).toEqual([5, 10, 20]);
    expect(defaultFootprintLevels(new Float64Array(20))).toEqual([]);
    expect(defaultFootprintLevels(new Float64Array(20).fill(7))).toEqual([]);
  });

  it('given levels are checked: positive, finite, strictly increasing, named in the message', () => {
    expect(() => checkLevels([], '--levels')).toThrow(/--levels: no levels/);
    expect(() => checkLevels([1, 0.5], '--levels')).toThrow(/--levels\[1\]: 0.5 does not exceed/);
    expect(() => checkLevels([-1], '--levels')).toThrow(/--levels\[0\]: -1 is not allowed/);
    expect(() => checkLevels([1, Number.NaN])).toThrow(/levels_ug_m3\[1\]: NaN/);
    expect(() => checkLevels([1, 2, 5])).not.toThrow();
  });

  it('refuses a field that does not fit the grid or holds a negative or non-finite value', () => {
    const grid = makeTestGrid({ site: { lat: 54.1234, lon: -2.4567 }, nx: 3, ny: 2, spacing_m: 10, xWest_m: -15, ySouth_m: -10 });
    expect(() => footprintBands(new Float64Array(5), grid)).toThrow(/length 5 does not match/);
    expect(() => footprintBands(Float64Array.of(0, 1, -2, 0, 0, 0), grid)).toThrow(/field\[2\]: -2/);
    expect(() => footprintBands(Float64Array.of(0, 1, Number.NaN, 0, 0, 0), grid)).toThrow(/field\[2\]: NaN/);
  });
});
