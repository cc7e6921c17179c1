/**
 * The domain a scenario gets when it gives none, and the memory check every domain passes before
 * anything is allocated for it.
 */
import type { Domain, Receptor, Source } from '../../scenarios/format/types.ts';
import { checkDomain, columnsPerSide } from './localGrid.ts';
import type { LocalProjection } from './types.ts';

/** Smallest derived half-width [m]: near-field screening wants a few km around the site whatever the layout. */
export const MIN_DERIVED_HALF_WIDTH_m = 2000;

/**
 * Derived half-width as a multiple of the farthest source or receptor distance from the site [-]:
 * the margin lets a plume from a source near the edge travel on past the farthest receptor.
 */
export const DERIVED_MARGIN_FACTOR = 1.5;

/**
 * Farthest a source or receptor may lie from the site for a derived domain [m]. Beyond this the
 * position is far more likely a typing slip (a swapped or mistyped coordinate) than a screening
 * layout, and a domain that wide would be too coarse to say anything near the sources.
 */
export const MAX_DERIVED_DISTANCE_m = 50_000;

/** Columns per side the derived spacing aims at [-]: 200 x 200 columns x 24 layers is about a million cells. */
export const TARGET_COLUMNS_PER_SIDE = 200;

/** Round horizontal cell sizes a derived domain may use [m]. */
export const ROUND_SPACINGS_m: readonly number[] = [
  1, 2, 5, 10, 20, 25, 50, 100, 200, 250, 500, 1000, 2000, 2500, 5000,
];

/** Mantissas of the round half-widths (times a power of ten) [-]. */
const ROUND_MANTISSAS: readonly number[] = [1, 1.5, 2, 2.5, 3, 4, 5, 6, 8, 10];

/**
 * Default grid top [m]: above the daytime mixing heights of most screening weather and far above
 * the effective height of a small plant's stack.
 */
export const DEFAULT_DOMAIN_HEIGHT_m = 1000;

/**
 * Default number of layers [-]: with the 3 m ground layer of stretchedLayerFaces, 24 layers fill
 * 1000 m at a growth ratio of 1.19 (under the 1.2 limit), and 200 x 200 x 24 is about a million
 * cells, the size the grid solver is sized for.
 */
export const DEFAULT_DOMAIN_LAYERS = 24;

/**
 * Wind speed for the plausible plume rise of a stack [m/s]: 1 m/s, the calms floor of screening
 * practice (common practice: winds below 1 m/s are treated as 1 m/s), gives the largest rise any
 * run will use, since rise goes as 1 / u.
 */
const PLAUSIBLE_RISE_WIND_m_s = 1;

/** Ambient temperature for the plausible plume rise [K]: 15 C, the standard atmosphere at sea level (common practice). */
const PLAUSIBLE_RISE_AMBIENT_K = 288.15;

/** Gravitational acceleration [m/s2] (standard gravity, common practice). */
const GRAVITY_m_s2 = 9.80665;

/** The grid top stands this far above the tallest plausible effective height [-], so the plume's upward spread fits. */
const HEIGHT_MARGIN_FACTOR = 1.5;

/** Grid tops taller than the default are rounded up to a multiple of this [m]. */
const HEIGHT_ROUNDING_m = 500;

/**
 * Float64-array equivalents the grid solver holds per cell [-]. Measured (peak resident memory less that
 * of a 4000-cell run): the demo's 1 M-cell steady solve takes about 73 B per cell (two padded fields, the
 * float32 Anderson history, sources), and a two-day hourly series on 960 000 cells about 130 B per cell
 * (fields of solves in flight). 16 arrays (128 B per cell) covers both with a margin.
 */
export const GRID_ARRAYS_PER_CELL = 16;

/** Bytes of one float64 [B]. */
const BYTES_PER_FLOAT64 = 8;

/**
 * Largest estimated grid memory a run may take [B]: 4 GiB, half of an ordinary 8 GiB laptop, so the
 * operating system, the server and the browser map keep room. (Node 20 also refuses any single
 * ArrayBuffer above 4 GiB: buffer.constants.MAX_LENGTH = 2^32 on 64-bit, checked here; under this
 * limit each of the 8 arrays stays at or below 512 MiB.)
 */
export const GRID_MEMORY_LIMIT_bytes = 4 * 1024 ** 3;

/**
 * Most cells a derived domain may have [-]: 4 million, the server's default run limit
 * (server/jobs/runManager.ts, DEFAULT_RUN_LIMITS.maxCellsPerRun), so a scenario without a domain runs
 * the same from the command line and the server. About 512 MB by the memory estimate below.
 */
export const DERIVED_DOMAIN_MAX_CELLS = 4_000_000;

/** A derived domain and, when the cell limit forced coarser cells than the sources' near field takes, why. */
export interface DerivedDomain {
  domain: Domain;
  /** the cell the sources' near field takes [m] (the spacing used unless the cell limit forced coarser) */
  nearSpacing_m: number;
  /** null, or the plain note a run gives when a far receptor (or source) forced coarser cells */
  coarsening: DomainCoarsening | null;
}

export interface DomainCoarsening {
  /** the field that needs the widest domain: `receptors[i]` or `sources[i]...` */
  field: string;
  /** its id */
  id: string;
  distance_m: number;
  nearSpacing_m: number;
  spacing_m: number;
  maxCells: number;
  note: string;
}

/**
 * The domain for a scenario without one: a square centred on the site that covers every source
 * and receptor with a margin, at the cell size the sources' near field takes, 24 stretched layers.
 *
 * - the near box: half-width max(2 km, 1.5 x the farthest source vertex from the site), rounded up to
 *   a round figure (1, 1.5, 2, 2.5, 3, 4, 5, 6 or 8 times a power of ten). The 2 km floor holds the
 *   sources' near field, the nearest receptors and a small plant's footprint;
 * - the near spacing: the round spacing (ROUND_SPACINGS_m) whose column count over the near box is
 *   nearest 200 (nearest in ratio; the finer one on a tie). Receptors do not enter it: a receptor
 *   inside the near box is resolved by it, one beyond it needs no finer cell (its plume is wider);
 * - half-width = max(2 km, 1.5 x the farthest source vertex or receptor), rounded up to a round
 *   figure and then to a whole number of cells: a far receptor adds cells at the same spacing;
 * - only when that grid would have more than `maxCells` cells (DERIVED_DOMAIN_MAX_CELLS) is the
 *   spacing raised, to the finest round spacing that fits, and `coarsening` names the position that
 *   forced it and the old and new cell size (the run's notes carry it);
 * - height = 1000 m, or 1.5 x the tallest plausible effective height (stack plus its Briggs
 *   final rise at the 1 m/s calms floor) rounded up to 500 m when that is more;
 * - layers = 24.
 *
 * @throws RangeError naming `sources[i]` or `receptors[i]` when a position is not finite or lies
 *   more than 50 km from the site
 * @example deriveDomain({ sources, receptors, projection }) // { halfWidth_m: 2000, spacing_m: 20, height_m: 1000, layers: 24 }
 */
export function deriveDomain(input: {
  sources: Source[];
  receptors: Receptor[];
  projection: LocalProjection;
  maxCells?: number;
}): Domain {
  return deriveDomainWithReasons(input).domain;
}

/** deriveDomain with the near spacing and, when the cell limit forced coarser cells, the reason. */
export function deriveDomainWithReasons(input: {
  sources: Source[];
  receptors: Receptor[];
  projection: LocalProjection;
  maxCells?: number;
}): DerivedDomain {
  const { sources, receptors, projection } = input;
  const maxCells = input.maxCells ?? DERIVED_DOMAIN_MAX_CELLS;
  let farthestSource_m = 0;
  let farthest_m = 0;
  let farthestField = '';
  let farthestId = '';
  const distanceOf = (field: string, lon: number, lat: number): number => {
    if (!Number.isFinite(lon) || !Number.isFinite(lat)) {
      throw new RangeError(
        `${field}: got lon ${String(lon)}, lat ${String(lat)}; allowed: finite WGS 84 degrees`,
      );
    }
    const [x_m, y_m] = projection.toLocal(lon, lat);
    const distance_m = Math.hypot(x_m, y_m);
    if (!(distance_m <= MAX_DERIVED_DISTANCE_m)) {
      throw new RangeError(
        `${field}: lon ${lon}, lat ${lat} is ${(distance_m / 1000).toFixed(1)} km from the site; ` +
          `allowed without a domain: within ${MAX_DERIVED_DISTANCE_m / 1000} km of the site ` +
          '(check the coordinates, or give a domain)',
      );
    }
    return distance_m;
  };
  const consider = (field: string, id: string, distance_m: number): void => {
    if (distance_m > farthest_m) {
      farthest_m = distance_m;
      farthestField = field;
      farthestId = id;
    }
  };
  sources.forEach((source, index) => {
    if (source.kind === 'point') {
      const distance_m = distanceOf(`sources[${index}]`, source.lon, source.lat);
      farthestSource_m = Math.max(farthestSource_m, distance_m);
      consider(`sources[${index}]`, source.id, distance_m);
    } else {
      source.polygon.forEach(([lon, lat], vertex) => {
        const distance_m = distanceOf(`sources[${index}].polygon[${vertex}]`, lon, lat);
        farthestSource_m = Math.max(farthestSource_m, distance_m);
        consider(`sources[${index}]`, source.id, distance_m);
      });
    }
  });
  receptors.forEach((receptor, index) =>
    consider(`receptors[${index}]`, receptor.id, distanceOf(`receptors[${index}]`, receptor.lon, receptor.lat)),
  );

  const nearHalfWidth_m = roundUpToRoundFigure(Math.max(MIN_DERIVED_HALF_WIDTH_m, DERIVED_MARGIN_FACTOR * farthestSource_m));
  const nearSpacing_m = roundSpacingFor(nearHalfWidth_m);
  const roundHalfWidth_m = roundUpToRoundFigure(Math.max(MIN_DERIVED_HALF_WIDTH_m, DERIVED_MARGIN_FACTOR * farthest_m));
  const halfWidthAt = (spacing: number): number => Math.ceil(roundHalfWidth_m / spacing - 1e-9) * spacing;
  const cellsAt = (spacing: number): number => ((2 * halfWidthAt(spacing)) / spacing) ** 2 * DEFAULT_DOMAIN_LAYERS;
  let spacing_m = nearSpacing_m;
  for (const candidate of ROUND_SPACINGS_m) {
    if (candidate < nearSpacing_m) continue;
    spacing_m = candidate;
    if (cellsAt(candidate) <= maxCells) break;
  }
  const halfWidth_m = halfWidthAt(spacing_m);
  let tallest_m = 0;
  for (const source of sources) {
    if (source.kind === 'point') tallest_m = Math.max(tallest_m, plausibleEffectiveHeight_m(source));
  }
  const height_m = Math.max(
    DEFAULT_DOMAIN_HEIGHT_m,
    Math.ceil((HEIGHT_MARGIN_FACTOR * tallest_m) / HEIGHT_ROUNDING_m) * HEIGHT_ROUNDING_m,
  );
  const domain: Domain = { halfWidth_m, spacing_m, height_m, layers: DEFAULT_DOMAIN_LAYERS };
  let coarsening: DomainCoarsening | null = null;
  if (spacing_m > nearSpacing_m) {
    const wanted = cellsAt(nearSpacing_m);
    const columns = (2 * halfWidthAt(nearSpacing_m)) / nearSpacing_m;
    coarsening = {
      field: farthestField,
      id: farthestId,
      distance_m: farthest_m,
      nearSpacing_m,
      spacing_m,
      maxCells,
      note:
        `derived domain: ${farthestField} ('${farthestId}', ${(farthest_m / 1000).toFixed(1)} km from the site) needs a half-width of ` +
        `${roundHalfWidth_m} m; at the ${nearSpacing_m} m cells the sources' near field takes that is ${columns} x ${columns} x ` +
        `${DEFAULT_DOMAIN_LAYERS} = ${wanted} cells, above the ${maxCells} a derived domain may have, so the cells are ` +
        `${spacing_m} m instead of ${nearSpacing_m} m. The figures at the other receptors can then differ from those of a run ` +
        'without it by more than the resolution check\'s 10 %: give a domain, or check them with plumeplan run --resolution-check',
    };
  }
  return { domain, nearSpacing_m, coarsening };
}

/**
 * A generous effective height for a stack [m]: its height plus the larger of the Briggs final
 * buoyant rise in neutral air and the momentum rise, both at the 1 m/s calms floor. Used only to
 * size the grid top, never as the run's plume rise (that depends on the weather).
 *
 * Buoyancy flux F = g v d^2 (Ts - Ta) / (4 Ts) [m4/s3]; neutral final rise 21.425 F^(3/4) / u for
 * F < 55 and 38.71 F^(3/5) / u for F >= 55 (Briggs 1969, 1975; coefficients from memory, as in
 * ../shared/REFERENCES.md); momentum rise 3 d v / u (Briggs 1969, from memory).
 */
export function plausibleEffectiveHeight_m(source: {
  height_m: number;
  diameter_m: number;
  exitVelocity_m_s: number;
  exitTemperature_K: number;
  plumeRise: boolean;
}): number {
  if (!source.plumeRise) return source.height_m;
  const u = PLAUSIBLE_RISE_WIND_m_s;
  const excess_K = Math.max(0, source.exitTemperature_K - PLAUSIBLE_RISE_AMBIENT_K);
  const buoyancyFlux_m4_s3 =
    source.exitTemperature_K > 0
      ? (GRAVITY_m_s2 * source.exitVelocity_m_s * source.diameter_m ** 2 * excess_K) /
        (4 * source.exitTemperature_K)
      : 0;
  const buoyantRise_m =
    buoyancyFlux_m4_s3 < 55
      ? (21.425 * Math.pow(buoyancyFlux_m4_s3, 0.75)) / u
      : (38.71 * Math.pow(buoyancyFlux_m4_s3, 0.6)) / u;
  const momentumRise_m = (3 * source.diameter_m * source.exitVelocity_m_s) / u;
  return source.height_m + Math.max(buoyantRise_m, momentumRise_m);
}

/**
 * Estimated memory the grid solver needs for a domain [B]:
 * nx * ny * nz cells x GRID_ARRAYS_PER_CELL (16) float64 arrays x 8 bytes.
 */
export function estimateGridMemory_bytes(domain: Domain): number {
  const columns = columnsPerSide(domain);
  return columns * columns * domain.layers * GRID_ARRAYS_PER_CELL * BYTES_PER_FLOAT64;
}

/**
 * Refuse a domain whose grid would take more than GRID_MEMORY_LIMIT_bytes. Computes from the
 * domain's numbers only, so it runs before anything is allocated.
 *
 * @throws RangeError starting "domain: " naming the cells, the bytes and the limit
 */
export function checkGridMemory(domain: Domain): void {
  checkDomain(domain);
  const columns = columnsPerSide(domain);
  const cells = columns * columns * domain.layers;
  const bytes = estimateGridMemory_bytes(domain);
  if (bytes > GRID_MEMORY_LIMIT_bytes) {
    throw new RangeError(
      `domain: halfWidth_m ${domain.halfWidth_m}, spacing_m ${domain.spacing_m}, layers ${domain.layers} ` +
        `make ${columns} x ${columns} x ${domain.layers} = ${cells} cells, about ` +
        `${formatGibibytes(bytes)} (${bytes} bytes at ${GRID_ARRAYS_PER_CELL} float64 arrays per cell); ` +
        `allowed: at most ${formatGibibytes(GRID_MEMORY_LIMIT_bytes)} (${GRID_MEMORY_LIMIT_bytes} bytes). ` +
        'Use a larger spacing_m, a smaller halfWidth_m or fewer layers',
    );
  }
}

function formatGibibytes(bytes: number): string {
  return `${(bytes / 1024 ** 3).toPrecision(3)} GiB`;
}

/** Smallest round figure (ROUND_MANTISSAS times a power of ten) >= value [m]. */
function roundUpToRoundFigure(value: number): number {
  let decade = Math.pow(10, Math.floor(Math.log10(value)));
  for (;;) {
    for (const mantissa of ROUND_MANTISSAS) {
      const candidate = mantissa * decade;
      // A relative slack of 1e-12 keeps a value already round (up to rounding error) as it is.
      if (candidate >= value * (1 - 1e-12)) return candidate;
    }
    decade *= 10;
  }
}

/** The round spacing whose columns per side come nearest TARGET_COLUMNS_PER_SIDE, in ratio [m]. */
function roundSpacingFor(halfWidth_m: number): number {
  let best = ROUND_SPACINGS_m[0];
  let bestMisfit = Infinity;
  for (const spacing_m of ROUND_SPACINGS_m) {
    const misfit = Math.abs(Math.log((2 * halfWidth_m) / spacing_m / TARGET_COLUMNS_PER_SIDE));
    // Strictly smaller: on a tie the finer spacing, met first, stays.
    if (misfit < bestMisfit - 1e-12) {
      best = spacing_m;
      bestMisfit = misfit;
    }
  }
  return best;
}
