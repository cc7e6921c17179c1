/**
 * Shared pieces of the result-writer tests: a local grid about a site without the grid module's
 * layer stretching (the writers use only the ground plane), fixture reading, and ring geometry.
 */
import { readFileSync } from 'node:fs';
import type { Position } from 'geojson';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import type { Scenario } from '../../../scenarios/format/types.ts';
import type { ScenarioRunResult } from '../../../solver/drivers/types.ts';
import type { LocalGrid } from '../../../solver/grid/types.ts';

/** A local grid with uniform layers, enough for the writers (which read the ground plane only). */
export function makeTestGrid(options: {
  site: { lat: number; lon: number };
  nx: number;
  ny: number;
  spacing_m: number;
  xWest_m: number;
  ySouth_m: number;
  nz?: number;
  height_m?: number;
}): LocalGrid {
  const nz = options.nz ?? 4;
  const height_m = options.height_m ?? 400;
  const zFaces_m = new Float64Array(nz + 1);
  for (let k = 0; k <= nz; k += 1) zFaces_m[k] = (height_m * k) / nz;
  const zCentres_m = new Float64Array(nz);
  const dz_m = new Float64Array(nz);
  for (let k = 0; k < nz; k += 1) {
    zCentres_m[k] = 0.5 * (zFaces_m[k] + zFaces_m[k + 1]);
    dz_m[k] = zFaces_m[k + 1] - zFaces_m[k];
  }
  return {
    nx: options.nx,
    ny: options.ny,
    nz,
    spacing_m: options.spacing_m,
    xWest_m: options.xWest_m,
    ySouth_m: options.ySouth_m,
    zFaces_m,
    zCentres_m,
    dz_m,
    projection: createLocalProjection(options.site),
  };
}

export interface FootprintFixture {
  description: string;
  site: { lat: number; lon: number };
  grid: { nx: number; ny: number; spacing_m: number; xWest_m: number; ySouth_m: number };
  levels_ug_m3?: number[];
  /** rows of the field, row 0 at the south edge */
  field_ug_m3_rows_south_to_north: number[][];
}

export function readFootprintFixture(file: string): { fixture: FootprintFixture; grid: LocalGrid; field: Float64Array } {
  const fixture = JSON.parse(readFileSync(file, 'utf8')) as FootprintFixture;
  const grid = makeTestGrid({ site: fixture.site, ...fixture.grid });
  const field = Float64Array.from(fixture.field_ug_m3_rows_south_to_north.flat());
  if (field.length !== grid.nx * grid.ny) throw new Error(`${file}: field has ${field.length} values, grid ${grid.nx * grid.ny}`);
  return { fixture, grid, field };
}

/** Signed planar area by the shoelace formula; positive = counter-clockwise. */
export function shoelaceArea(ring: readonly Position[]): number {
  let sum = 0;
  for (let p = 0; p + 1 < ring.length; p += 1) sum += ring[p][0] * ring[p + 1][1] - ring[p + 1][0] * ring[p][1];
  return sum / 2;
}

/** Planar area [m2] of a (Multi)Polygon given in lon/lat, measured in the local metres of `grid`. */
export function localAreaOf(coordinates: Position[][][], grid: LocalGrid): number {
  let area = 0;
  for (const polygon of coordinates) {
    polygon.forEach((ring, r) => {
      const local = ring.map(([lon, lat]) => grid.projection.toLocal(lon, lat));
      const magnitude = Math.abs(shoelaceArea(local));
      area += r === 0 ? magnitude : -magnitude;
    });
  }
  return area;
}

/** Total length [m] of the rings of a (Multi)Polygon given in lon/lat, measured in local metres. */
export function localPerimeterOf(coordinates: Position[][][], grid: LocalGrid): number {
  let length = 0;
  for (const polygon of coordinates) {
    for (const ring of polygon) {
      const local = ring.map(([lon, lat]) => grid.projection.toLocal(lon, lat));
      for (let p = 0; p + 1 < local.length; p += 1) length += Math.hypot(local[p + 1][0] - local[p][0], local[p + 1][1] - local[p][1]);
    }
  }
  return length;
}

/** Round every number in a JSON value, for comparing geometry that may differ in the last bits. */
export function roundNumbers(value: unknown, decimals: number): unknown {
  if (typeof value === 'number') {
    const scale = 10 ** decimals;
    const rounded = Math.round(value * scale) / scale;
    return rounded === 0 ? 0 : rounded;
  }
  if (Array.isArray(value)) return value.map((entry) => roundNumbers(entry, decimals));
  if (value !== null && typeof value === 'object') {
    return Object.fromEntries(Object.entries(value).map(([key, entry]) => [key, roundNumbers(entry, decimals)]));
  }
  return value;
}

/** A small parsed scenario for the writers: two receptors, one point source, steady weather. */
export function makeTestScenario(receptorNames: [string, string] = ['Primary school', 'Care home']): Scenario {
  return {
    format: 'plumeplan.scenario/1',
    name: 'Writers test, invented site',
    site: { lat: 54.1234, lon: -2.4567, landUse: 'rural' },
    domain: { halfWidth_m: 500, spacing_m: 100, height_m: 400, layers: 4 },
    pollutant: { name: 'NOx', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 },
    weather: {
      kind: 'steady',
      windSpeed_m_s: 5,
      windFrom_deg: 270,
      stability: 'D',
      mixingHeight_m: 800,
      rain_mm_h: 0,
      airTemperature_K: 288.15,
      anemometerHeight_m: 10,
    },
    dispersion: { kind: 'stability', curves: 'briggs' },
    solver: { mode: 'gaussian', hourlyMethod: 'independentHours' },
    windProfile: 'powerLaw',
    sources: [
      {
        kind: 'point',
        id: 'stack-1',
        name: 'Boiler stack',
        lat: 54.1234,
        lon: -2.4567,
        height_m: 30,
        diameter_m: 1,
        exitVelocity_m_s: 12,
        exitTemperature_K: 420,
        emission_g_s: 1.5,
        plumeRise: true,
      },
    ],
    receptors: [
      { id: 'school', name: receptorNames[0], lat: 54.1241, lon: -2.4531, height_m: 1.5 },
      { id: 'care-home', name: receptorNames[1], lat: 54.1222, lon: -2.4544, height_m: 0 },
    ],
  };
}

/** A steady run result on a 10 x 10 grid with one known maximum at cell (7, 4). */
export function makeTestRunResult(grid: LocalGrid, overrides: Partial<ScenarioRunResult> = {}): ScenarioRunResult {
  const field = new Float64Array(grid.nx * grid.ny);
  for (let index = 0; index < field.length; index += 1) field[index] = 0.01 * (index % 7);
  field[7 + grid.nx * 4] = 12.345678;
  return {
    mode: 'gaussian',
    weatherKind: 'steady',
    grid,
    sources: [{ id: 'stack-1', x_m: 0, y_m: 0, effectiveHeight_m: 61.2345 }],
    massBudget_g: null,
    steps: 1,
    wallSeconds: 0.0123456,
    footprint_ug_m3: field,
    footprintStatistic: 'concentration',
    receptorColumns: [{ key: 'concentration_ug_m3', values: Float64Array.of(3.14159, 0.000123456) }],
    notes: ['dry deposition not applied (depositionVelocity_m_s is 0)'],
    extraSummary: {},
    ...overrides,
  };
}
