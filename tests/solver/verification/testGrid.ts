/**
 * Small local grids for solver tests, built as LocalGrid literals (uniform or given layer faces).
 */
import type { LocalGrid, LocalProjection } from '../../../solver/grid/types.ts';

const identityProjection: LocalProjection = {
  definition: '+proj=tmerc +lat_0=0 +lon_0=0 +k=1 +x_0=0 +y_0=0 +ellps=WGS84 +units=m +no_defs',
  toLocal: (lon, lat) => [lon, lat],
  toLonLat: (x, y) => [x, y],
};

export interface TestGridOptions {
  nx: number;
  ny: number;
  /** layer faces [m] from 0 up, or a uniform layer count with `height_m` */
  zFaces_m?: number[];
  nz?: number;
  height_m?: number;
  spacing_m: number;
  /** west and south edges [m]; default: centred on 0 */
  xWest_m?: number;
  ySouth_m?: number;
}

export function testGrid(options: TestGridOptions): LocalGrid {
  const faces =
    options.zFaces_m ??
    Array.from({ length: (options.nz ?? 1) + 1 }, (_, f) => ((options.height_m ?? 100) * f) / (options.nz ?? 1));
  const zFaces = Float64Array.from(faces);
  const nz = zFaces.length - 1;
  const zCentres = new Float64Array(nz);
  const dz = new Float64Array(nz);
  for (let k = 0; k < nz; k++) {
    zCentres[k] = 0.5 * (zFaces[k] + zFaces[k + 1]);
    dz[k] = zFaces[k + 1] - zFaces[k];
  }
  return {
    nx: options.nx,
    ny: options.ny,
    nz,
    spacing_m: options.spacing_m,
    xWest_m: options.xWest_m ?? (-options.nx * options.spacing_m) / 2,
    ySouth_m: options.ySouth_m ?? (-options.ny * options.spacing_m) / 2,
    zFaces_m: zFaces,
    zCentres_m: zCentres,
    dz_m: dz,
    projection: identityProjection,
  };
}

/** Cell centre coordinates [m]. */
export const centreX = (grid: LocalGrid, i: number): number => grid.xWest_m + (i + 0.5) * grid.spacing_m;
export const centreY = (grid: LocalGrid, j: number): number => grid.ySouth_m + (j + 0.5) * grid.spacing_m;
