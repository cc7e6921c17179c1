/**
 * The colour scale of the concentration overlay: a perceptually uniform ramp whose lightness rises
 * steadily from dark violet to pale yellow, so that "more" reads as "lighter" for every reader,
 * including those with a red-green or blue-yellow colour-vision deficiency (lightness alone orders it).
 *
 * The ramp is generated from ten control points of the viridis colour map (van der Walt and Smith,
 * matplotlib 2.0, 2015), viridis sampled at t = 0, 1/9, ..., 1; the hex values are quoted from memory
 * and checked in the tests against the five-stop list (t = 0, 0.25, 0.5, 0.75, 1) that is commonly
 * published with it. Between control points the sRGB components are interpolated linearly: the points
 * lie close enough that the error is about one unit in 255.
 *
 * Values map to t in [0, 1] on a log scale by default (concentrations span decades), or linearly.
 * Values below the scale's floor are not drawn at all (transparent), so the quiet background stays visible
 * where the plume is negligible.
 */

/** viridis at t = 0, 1/9, 2/9, ..., 1 (from memory; see the module comment). */
export const RAMP_CONTROL_POINTS: readonly string[] = [
  '#440154',
  '#482878',
  '#3e4989',
  '#31688e',
  '#26828e',
  '#1f9e89',
  '#35b779',
  '#6ece58',
  '#b5de2b',
  '#fde725',
];

export type ScaleKind = 'log' | 'linear';

/** A colour as red, green, blue in 0..255. */
export type Rgb = [number, number, number];

export interface ColourScaleOptions {
  /** "log" (default) or "linear" */
  kind?: ScaleKind;
}

/** Parse "#rrggbb" into [r, g, b]. */
export function hexToRgb(hex: string): Rgb {
  const match = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
  if (match === null) throw new RangeError(`colour: ${JSON.stringify(hex)} is not allowed; give #rrggbb`);
  return [parseInt(match[1], 16), parseInt(match[2], 16), parseInt(match[3], 16)];
}

/** Format [r, g, b] (0..255) as "#rrggbb". */
export function rgbToHex(rgb: Rgb): string {
  return '#' + rgb.map((c) => Math.round(c).toString(16).padStart(2, '0')).join('');
}

const CONTROL_RGB: readonly Rgb[] = RAMP_CONTROL_POINTS.map(hexToRgb);

/**
 * The ramp's colour at a position t in [0, 1] (clamped).
 *
 * @example rampColour(0) // [68, 1, 84], dark violet; rampColour(1) // [253, 231, 37], pale yellow
 */
export function rampColour(t: number): Rgb {
  return interpolate(CONTROL_RGB, t);
}

/**
 * The diverging ramp of a difference overlay (scenario A minus scenario B): ColorBrewer's PuOr with
 * eleven classes (Brewer and Harrower, colorbrewer2.org, marked there as colour-blind safe; hex values
 * from memory), orange-brown where A is higher, purple where B is higher, near-white around zero. It runs
 * from purple (t = 0, B much higher) through white (t = 0.5) to brown (t = 1, A much higher).
 */
export const DIVERGING_CONTROL_POINTS: readonly string[] = [
  '#2d004b',
  '#542788',
  '#8073ac',
  '#b2abd2',
  '#d8daeb',
  '#f7f7f7',
  '#fee0b6',
  '#fdb863',
  '#e08214',
  '#b35806',
  '#7f3b08',
];

const DIVERGING_RGB: readonly Rgb[] = DIVERGING_CONTROL_POINTS.map(hexToRgb);

/** The diverging ramp's colour at t in [0, 1] (clamped): 0 purple, 0.5 white, 1 brown. */
export function divergingColour(t: number): Rgb {
  return interpolate(DIVERGING_RGB, t);
}

function interpolate(points: readonly Rgb[], t: number): Rgb {
  const clamped = Number.isFinite(t) ? Math.min(1, Math.max(0, t)) : 0;
  const scaled = clamped * (points.length - 1);
  const lower = Math.min(points.length - 2, Math.floor(scaled));
  const f = scaled - lower;
  const a = points[lower];
  const b = points[lower + 1];
  return [a[0] + (b[0] - a[0]) * f, a[1] + (b[1] - a[1]) * f, a[2] + (b[2] - a[2]) * f];
}

/**
 * Maps a difference [ug/m3] to the diverging ramp, linearly and symmetrically: -limit -> 0, 0 -> 0.5,
 * +limit -> 1. Differences smaller in size than `floor` are not drawn (they would only tint the map).
 */
export class DifferenceScale {
  readonly kind = 'difference' as const;

  /**
   * @param limit size of the difference at the ends of the ramp [ug/m3], > 0
   * @param floor smallest size drawn [ug/m3], >= 0 and below limit
   */
  constructor(
    readonly limit: number,
    readonly floor = 0,
  ) {
    if (!Number.isFinite(limit) || limit <= 0) throw new RangeError(`difference scale limit: ${limit} is not allowed; give a finite value > 0`);
    if (!Number.isFinite(floor) || floor < 0 || floor >= limit) throw new RangeError(`difference scale floor: ${floor} is not allowed; give 0 <= floor < limit ${limit}`);
  }

  position(difference: number): number {
    if (!Number.isFinite(difference) || Math.abs(difference) < this.floor || difference === 0) return Number.NaN;
    return Math.min(1, Math.max(0, 0.5 + (0.5 * difference) / this.limit));
  }

  valueAt(t: number): number {
    return (t - 0.5) * 2 * this.limit;
  }
}

/**
 * Maps a concentration to its colour between a floor and a ceiling.
 */
export class ColourScale {
  readonly kind: ScaleKind;
  /** lowest value drawn [ug/m3]; below it nothing is drawn */
  readonly floor: number;
  /** value at the top of the ramp [ug/m3]; above it the top colour */
  readonly ceiling: number;

  /**
   * @param floor lowest value drawn [ug/m3]; > 0 on a log scale, >= 0 on a linear one
   * @param ceiling top of the ramp [ug/m3], > floor
   * @param options scale kind (default "log")
   * @throws RangeError naming floor or ceiling when they do not make a scale
   */
  constructor(floor: number, ceiling: number, options: ColourScaleOptions = {}) {
    this.kind = options.kind ?? 'log';
    if (!Number.isFinite(floor) || floor < 0 || (this.kind === 'log' && floor === 0)) {
      throw new RangeError(`colour scale floor: ${floor} is not allowed; give a finite value ${this.kind === 'log' ? '> 0 on a log scale' : '>= 0'}`);
    }
    if (!Number.isFinite(ceiling) || ceiling <= floor) {
      throw new RangeError(`colour scale ceiling: ${ceiling} is not allowed; give a finite value above the floor ${floor}`);
    }
    this.floor = floor;
    this.ceiling = ceiling;
  }

  /** Position of a value on the ramp, t in [0, 1]; NaN for values below the floor (not drawn). */
  position(value: number): number {
    if (!(value >= this.floor) || (this.kind === 'linear' && value <= 0)) return Number.NaN;
    if (value >= this.ceiling) return 1;
    if (this.kind === 'log') return Math.log(value / this.floor) / Math.log(this.ceiling / this.floor);
    return (value - this.floor) / (this.ceiling - this.floor);
  }

  /** Value at a ramp position t in [0, 1]: the inverse of position(). */
  valueAt(t: number): number {
    if (this.kind === 'log') return this.floor * (this.ceiling / this.floor) ** t;
    return this.floor + (this.ceiling - this.floor) * t;
  }

  /** Colour of a value, or null below the floor. */
  colour(value: number): Rgb | null {
    const t = this.position(value);
    return Number.isNaN(t) ? null : rampColour(t);
  }
}

/**
 * Paint a ground-level field into RGBA pixels, one pixel per column, NORTH row first (image order), as a
 * canvas ImageData wants them. The field's own order is i + nx * j with row j = 0 at the south edge.
 *
 * @param field_ug_m3 ground-level field, i + nx * j, south row first [ug/m3]
 * @param nx columns west to east
 * @param ny rows south to north
 * @param scale the colour scale
 * @param pixels output, length 4 * nx * ny (reused between calls: no allocation per paint)
 */
export function paintField(
  field_ug_m3: ArrayLike<number>,
  nx: number,
  ny: number,
  scale: { position(value: number): number; readonly kind: string },
  pixels: Uint8ClampedArray,
): void {
  if (field_ug_m3.length !== nx * ny) throw new RangeError(`field: ${field_ug_m3.length} values for a ${nx} x ${ny} grid`);
  if (pixels.length !== 4 * nx * ny) throw new RangeError(`pixels: length ${pixels.length}; allowed: 4 x ${nx} x ${ny}`);
  // A lookup table of 256 colours keeps the per-pixel work to one position and one index.
  const table = colourTable(scale.kind === 'difference' ? 'diverging' : 'sequential');
  for (let j = 0; j < ny; j++) {
    const imageRow = ny - 1 - j;
    for (let i = 0; i < nx; i++) {
      const t = scale.position(field_ug_m3[i + nx * j]);
      const p = 4 * (i + nx * imageRow);
      if (Number.isNaN(t)) {
        pixels[p + 3] = 0;
        continue;
      }
      const entry = 3 * Math.round(t * 255);
      pixels[p] = table[entry];
      pixels[p + 1] = table[entry + 1];
      pixels[p + 2] = table[entry + 2];
      pixels[p + 3] = 255;
    }
  }
}

const cachedTables = new Map<string, Uint8Array>();

/** A ramp sampled at 256 positions, r g b each. */
function colourTable(ramp: 'sequential' | 'diverging'): Uint8Array {
  const cached = cachedTables.get(ramp);
  if (cached !== undefined) return cached;
  const colourAt = ramp === 'diverging' ? divergingColour : rampColour;
  const table = new Uint8Array(256 * 3);
  for (let n = 0; n < 256; n++) {
    const [r, g, b] = colourAt(n / 255);
    table[3 * n] = Math.round(r);
    table[3 * n + 1] = Math.round(g);
    table[3 * n + 2] = Math.round(b);
  }
  cachedTables.set(ramp, table);
  return table;
}

/**
 * CIE L* (lightness, 0..100) of an sRGB colour with the D65 white: the sRGB transfer curve (IEC 61966-2-1)
 * and L* = 116 f(Y) - 16 (CIE 1976). Used to check that the ramp's lightness rises monotonically.
 */
export function lightness(rgb: Rgb): number {
  const linear = rgb.map((c) => {
    const v = c / 255;
    return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
  });
  const y = 0.2126 * linear[0] + 0.7152 * linear[1] + 0.0722 * linear[2];
  const f = y > (6 / 29) ** 3 ? Math.cbrt(y) : y / (3 * (6 / 29) ** 2) + 4 / 29;
  return 116 * f - 16;
}
