/**
 * The site boundary on the local grid, and peaks of a ground field split into off the site and on it.
 *
 * Why: nobody of the public stands inside the site fence, so a screening peak on the site (the fuel
 * yard of the demo, say) is not the figure a consultant compares with a standard. With a boundary
 * (`site.boundary`, a closed [lon, lat] ring) every ground peak is reported off the site and the on-site
 * maximum is kept beside it, labelled; without one the output says the peak may be on the site.
 *
 * Rule, stated once: a ground column is on the site when its cell CENTRE lies inside the boundary
 * (even-odd rule; a centre exactly on an edge counts as inside). Columns along the fence whose centre is
 * outside are off the site, so the off-site peak is the fence-line value at the grid's resolution.
 */
import type { LocalGrid, LocalProjection } from './types.ts';

/** The site boundary placed on a grid. */
export interface SiteColumns {
  /** the boundary ring in local metres, closed */
  ring_m: readonly (readonly [number, number])[];
  /** 1 where the column's centre is on the site, else 0; index i + nx * j */
  onSite: Uint8Array;
  /** number of columns on the site */
  count: number;
}

/**
 * The boundary ring in local metres.
 * @param boundary the GeoJSON [lon, lat] ring, closed
 * @param projection the local projection about the site
 * @throws RangeError starting `site.boundary` when the ring is not closed or has fewer than 4 positions
 */
export function placeSiteBoundary(boundary: readonly [number, number][], projection: LocalProjection): [number, number][] {
  const first = boundary[0];
  const last = boundary[boundary.length - 1];
  if (boundary.length < 4 || first[0] !== last[0] || first[1] !== last[1]) {
    throw new RangeError(`site.boundary: got ${boundary.length} positions; allowed: a closed ring of at least 4 [lon, lat] positions (first = last)`);
  }
  const ring_m = boundary.map(([lon, lat]) => projection.toLocal(lon, lat));
  ring_m[ring_m.length - 1] = [ring_m[0][0], ring_m[0][1]];
  return ring_m;
}

/**
 * Whether a point lies inside a closed ring (even-odd crossing rule; points on an edge count as inside).
 * @param ring_m closed ring [m]
 */
export function isInsideRing(ring_m: readonly (readonly [number, number])[], x_m: number, y_m: number): boolean {
  // Hot: the Gaussian area source samples every cell it partly covers with it, for every target.
  let inside = false;
  let x0 = ring_m[0][0];
  let y0 = ring_m[0][1];
  for (let v = 1; v < ring_m.length; v++) {
    const x1 = ring_m[v][0];
    const y1 = ring_m[v][1];
    // On the edge: within its extent (cheap, tried first) and collinear.
    if (((x_m >= x0 && x_m <= x1) || (x_m <= x0 && x_m >= x1)) && ((y_m >= y0 && y_m <= y1) || (y_m <= y0 && y_m >= y1))) {
      const cross = (x1 - x0) * (y_m - y0) - (y1 - y0) * (x_m - x0);
      const scale = Math.abs(x1 - x0) + Math.abs(y1 - y0);
      if (Math.abs(cross) <= 1e-9 * scale * scale) return true;
    }
    if (y0 > y_m !== y1 > y_m) {
      const xCrossing = x0 + ((y_m - y0) * (x1 - x0)) / (y1 - y0);
      if (x_m < xCrossing) inside = !inside;
    }
    x0 = x1;
    y0 = y1;
  }
  return inside;
}

/**
 * Which ground columns are on the site.
 * @param grid the local grid
 * @param ring_m the boundary in local metres (placeSiteBoundary)
 * @example siteColumns(grid, placeSiteBoundary(scenario.site.boundary, grid.projection)).count
 */
export function siteColumns(grid: Pick<LocalGrid, 'nx' | 'ny' | 'spacing_m' | 'xWest_m' | 'ySouth_m'>, ring_m: readonly (readonly [number, number])[]): SiteColumns {
  const { nx, ny, spacing_m, xWest_m, ySouth_m } = grid;
  const onSite = new Uint8Array(nx * ny);
  let xMin = Infinity;
  let xMax = -Infinity;
  let yMin = Infinity;
  let yMax = -Infinity;
  for (const [x, y] of ring_m) {
    xMin = Math.min(xMin, x);
    xMax = Math.max(xMax, x);
    yMin = Math.min(yMin, y);
    yMax = Math.max(yMax, y);
  }
  // Only the columns under the ring's bounding box can be inside it.
  const iFirst = Math.max(0, Math.floor((xMin - xWest_m) / spacing_m - 0.5));
  const iLast = Math.min(nx - 1, Math.ceil((xMax - xWest_m) / spacing_m - 0.5));
  const jFirst = Math.max(0, Math.floor((yMin - ySouth_m) / spacing_m - 0.5));
  const jLast = Math.min(ny - 1, Math.ceil((yMax - ySouth_m) / spacing_m - 0.5));
  let count = 0;
  for (let j = jFirst; j <= jLast; j++) {
    const y_m = ySouth_m + (j + 0.5) * spacing_m;
    for (let i = iFirst; i <= iLast; i++) {
      const x_m = xWest_m + (i + 0.5) * spacing_m;
      if (isInsideRing(ring_m, x_m, y_m)) {
        onSite[i + nx * j] = 1;
        count++;
      }
    }
  }
  return { ring_m, onSite, count };
}

/** One ground peak: its value and the centre of its cell. */
export interface GroundPeak {
  value_ug_m3: number;
  /** centre of the cell holding the maximum, local metres */
  x_m: number;
  y_m: number;
}

/** Where a reported peak was looked for, in words for the result files. */
export const PEAK_OFF_SITE = 'off the site (outside site.boundary)';
export const PEAK_MAY_BE_ON_SITE = 'anywhere on the grid: no site boundary was given, so this peak may be on the site itself';
export const PEAK_ON_SITE_LABEL = 'on the site (inside site.boundary): not where the public is; kept for reference';

/**
 * The peak of a ground field as summary files report it: off the site when a boundary is given (the
 * on-site maximum kept beside it, labelled), anywhere otherwise (said so).
 */
export interface SitePeak extends GroundPeak {
  /** PEAK_OFF_SITE or PEAK_MAY_BE_ON_SITE */
  where: string;
  /** the maximum on the site, when a boundary is given and covers at least one column */
  onSite?: GroundPeak & { label: string };
}

/**
 * The peak of a ground field off the site, and on it.
 * @param grid the local grid
 * @param field ground field, index i + nx * j [ug/m3]
 * @param site the site's columns, or null when no boundary was given
 * @returns the off-site peak (or the peak anywhere without a boundary) and the on-site one
 */
export function sitePeak(
  grid: Pick<LocalGrid, 'nx' | 'spacing_m' | 'xWest_m' | 'ySouth_m'>,
  field: ArrayLike<number>,
  site: SiteColumns | null,
): SitePeak {
  let offBest = -1;
  let onBest = -1;
  for (let c = 0; c < field.length; c++) {
    if (site !== null && site.onSite[c] === 1) {
      if (onBest < 0 || field[c] > field[onBest]) onBest = c;
    } else if (offBest < 0 || field[c] > field[offBest]) {
      offBest = c;
    }
  }
  const at = (column: number): GroundPeak => {
    if (column < 0) return { value_ug_m3: 0, x_m: 0, y_m: 0 };
    const i = column % grid.nx;
    const j = (column - i) / grid.nx;
    return {
      value_ug_m3: field[column],
      x_m: grid.xWest_m + (i + 0.5) * grid.spacing_m,
      y_m: grid.ySouth_m + (j + 0.5) * grid.spacing_m,
    };
  };
  const where =
    site === null
      ? PEAK_MAY_BE_ON_SITE
      : offBest < 0
        ? 'off the site: every column of the grid is on the site, so there is no off-site figure (0 shown)'
        : PEAK_OFF_SITE;
  const peak: SitePeak = { ...at(offBest), where };
  if (site !== null && onBest >= 0) peak.onSite = { ...at(onBest), label: PEAK_ON_SITE_LABEL };
  return peak;
}
