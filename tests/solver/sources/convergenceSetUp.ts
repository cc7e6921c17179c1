/**
 * The set-up of the grid-convergence check (docs/near-field.md, ./gridConvergence.test.ts): a 20 m stack
 * with plume rise and a 30 m x 30 m ground-level area source, class B, wind 5 m/s at 10 m from 240 or
 * 270 degrees, 1 g/s, receptors at 1.5 m on the plume axis 250 m to 1 km downwind and one 100 m off it.
 * The grid is a rectangle around the plume's path (150 m upwind to 1150 m downwind, 450 m either side),
 * its edges on multiples of 100 m so every cell size shares them, 1000 m deep in the default 24 layers.
 */
import type { PlacedSource, SteadyRunInput } from '../../../solver/drivers/types.ts';
import { buildLocalGrid } from '../../../solver/grid/localGrid.ts';
import { createLocalProjection } from '../../../solver/grid/projection.ts';
import type { LocalGrid } from '../../../solver/grid/types.ts';
import { rasteriseRing } from '../../../solver/sources/areaRasterisation.ts';

export const CELL_SIZES_m = [100, 50, 25, 12.5];
export const RECEPTOR_DISTANCES_m = [250, 400, 600, 800, 1000];
/** one receptor off the axis: 800 m downwind, 100 m to the left of the wind */
export const OFF_AXIS_m = { along: 800, across: 100 };

const projection = createLocalProjection({ lat: 54, lon: -2 });

function downwind(windFrom_deg: number): [number, number] {
  const theta = (windFrom_deg * Math.PI) / 180;
  return [-Math.sin(theta), -Math.cos(theta)];
}

/** A rectangle of cells around the plume's path, edges on multiples of 100 m. */
export function plumeGrid(windFrom_deg: number, spacing_m: number): LocalGrid {
  const [dX, dY] = downwind(windFrom_deg);
  const corners: [number, number][] = [];
  for (const along of [-150, 1150]) for (const across of [-450, 450]) corners.push([along * dX - across * dY, along * dY + across * dX]);
  const west = Math.floor(Math.min(...corners.map((c) => c[0])) / 100) * 100;
  const east = Math.ceil(Math.max(...corners.map((c) => c[0])) / 100) * 100;
  const south = Math.floor(Math.min(...corners.map((c) => c[1])) / 100) * 100;
  const north = Math.ceil(Math.max(...corners.map((c) => c[1])) / 100) * 100;
  const base = buildLocalGrid({ halfWidth_m: 100, spacing_m, height_m: 1000, layers: 24 }, projection);
  return { ...base, nx: Math.round((east - west) / spacing_m), ny: Math.round((north - south) / spacing_m), xWest_m: west, ySouth_m: south };
}

export type SourceKind = 'stack' | 'area';

function source(kind: SourceKind, grid: LocalGrid): PlacedSource {
  if (kind === 'stack') {
    return { kind: 'point', id: 'stack', x_m: 0, y_m: 0, height_m: 20, diameter_m: 1, exitVelocity_m_s: 10, exitTemperature_K: 400, emission_g_s: 1, plumeRise: true };
  }
  const ring: [number, number][] = [[-15, -15], [15, -15], [15, 15], [-15, 15], [-15, -15]];
  return { kind: 'area', id: 'yard', ring_m: ring, area_m2: 900, x_m: 0, y_m: 0, releaseHeight_m: 1, emission_g_s: 1, shares: rasteriseRing(ring, grid) };
}

/** The steady input of one case. */
export function convergenceInput(kind: SourceKind, windFrom_deg: number, spacing_m: number): SteadyRunInput {
  const grid = plumeGrid(windFrom_deg, spacing_m);
  const [dX, dY] = downwind(windFrom_deg);
  const receptors = RECEPTOR_DISTANCES_m.map((d) => ({ id: `x${d}`, x_m: d * dX, y_m: d * dY, height_m: 1.5 }));
  const { along, across } = OFF_AXIS_m;
  receptors.push({ id: `x${along}-y${across}`, x_m: along * dX - across * dY, y_m: along * dY + across * dX, height_m: 1.5 });
  return {
    grid,
    sources: [source(kind, grid)],
    receptors,
    pollutant: { name: 'tracer', halfLife_h: null, washout: null, depositionVelocity_m_s: 0 },
    weather: { windSpeed_m_s: 5, windFrom_deg, stability: 'B', mixingHeight_m: 1200, rain_mm_h: 0, airTemperature_K: 288, anemometerHeight_m: 10, calm: false },
    dispersion: { kind: 'stability', curves: 'briggs' },
    landUse: 'rural',
    windProfile: 'powerLaw',
    groundLevelHeight_m: 1.5,
  };
}
