/**
 * A ground-level field as the page holds it: the values on the local grid plus what they are. Fields
 * come from the preview worker or from a run on the server, where they travel as binary: a JSON header
 * and then float32 little-endian values in the order i + nx * j (x east fastest, row j = 0 at the south
 * edge), described in docs/http-api.md and written by server/writers/groundField.ts.
 *
 * Pure: no DOM. `decodeGroundField` is tested against hand-built bytes.
 */

export interface FieldGrid {
  nx: number;
  ny: number;
  /** cell size [m] */
  spacing_m: number;
  /** local x of the west edge [m] */
  xWest_m: number;
  /** local y of the south edge [m] */
  ySouth_m: number;
}

export interface GroundField {
  grid: FieldGrid;
  /** i + nx * j, south row first [ug/m3] */
  values: Float32Array;
  /** what the values are: "concentration" (one steady state) or "mean" (over a series or rose) */
  statistic: string;
  /** "preview" (Gaussian, in the page) or the run's mode */
  origin: string;
  /** height above ground [m] */
  height_m: number;
}

/**
 * The field's value at a local position: the value of the column it falls in (no interpolation: a
 * column holds one value), or null outside the grid.
 *
 * @example valueAt(field, 0, 0) // the value of the site's column
 */
export function valueAt(field: GroundField, x_m: number, y_m: number): number | null {
  const { grid } = field;
  const i = Math.floor((x_m - grid.xWest_m) / grid.spacing_m);
  const j = Math.floor((y_m - grid.ySouth_m) / grid.spacing_m);
  if (!(i >= 0 && i < grid.nx && j >= 0 && j < grid.ny)) return null;
  return field.values[i + grid.nx * j];
}

/** Ground area at or above each level [m2]: the number of columns at or above it times a column's area. */
export function areasAtOrAbove(field: GroundField, levels_ug_m3: readonly number[]): number[] {
  const cell_m2 = field.grid.spacing_m * field.grid.spacing_m;
  const counts = new Array<number>(levels_ug_m3.length).fill(0);
  for (let n = 0; n < field.values.length; n++) {
    const value = field.values[n];
    for (let k = 0; k < levels_ug_m3.length; k++) if (value >= levels_ug_m3[k]) counts[k]++;
  }
  return counts.map((count) => count * cell_m2);
}

/** The header of a binary ground field (server/writers/groundField.ts writes it; docs/http-api.md). */
export interface BinaryFieldHeader {
  format: string;
  nx: number;
  ny: number;
  spacing_m: number;
  /** south-west corner of the grid in local metres */
  origin: { x_m: number; y_m: number };
  statistic?: string;
  height_m?: number;
  units?: string;
  caution?: string;
  [key: string]: unknown;
}

/** The binary format this page reads. */
export const GROUND_FIELD_FORMAT = 'plumeplan.groundfield/1';

/**
 * Decode a binary ground field: a 4-byte little-endian unsigned header length H, H bytes of UTF-8 JSON
 * (the header: format, nx, ny, spacing_m, origin {x_m, y_m} of the south-west corner, statistic,
 * height_m, units, the caution), any padding so the values start on a multiple of 4 bytes, then nx * ny
 * float32 little-endian values in the order i + nx * j.
 *
 * @param bytes the response body
 * @returns the header, the grid in the page's terms and the values (copied into an aligned array)
 * @throws RangeError naming what is wrong (length, header fields, value count, a negative or non-finite value)
 */
export function decodeGroundField(bytes: ArrayBuffer): { header: BinaryFieldHeader; grid: FieldGrid; values: Float32Array } {
  if (bytes.byteLength < 4) throw new RangeError(`ground field: ${bytes.byteLength} bytes is too short for a header length`);
  const view = new DataView(bytes);
  const headerLength = view.getUint32(0, true);
  if (4 + headerLength > bytes.byteLength) {
    throw new RangeError(`ground field: header length ${headerLength} runs past the end (${bytes.byteLength} bytes)`);
  }
  const headerText = new TextDecoder().decode(new Uint8Array(bytes, 4, headerLength));
  let header: BinaryFieldHeader;
  try {
    header = JSON.parse(headerText) as BinaryFieldHeader;
  } catch {
    throw new RangeError('ground field: the header is not JSON');
  }
  if (header === null || typeof header !== 'object') throw new RangeError('ground field: the header is not a JSON object');
  if (header.format !== GROUND_FIELD_FORMAT) {
    throw new RangeError(`ground field header format: ${JSON.stringify(header.format)}; allowed: "${GROUND_FIELD_FORMAT}"`);
  }
  for (const key of ['nx', 'ny'] as const) {
    if (!Number.isInteger(header[key]) || header[key] < 1) throw new RangeError(`ground field header ${key}: ${String(header[key])}; allowed: a positive integer`);
  }
  const finite = (value: unknown) => typeof value === 'number' && Number.isFinite(value);
  if (!finite(header.spacing_m) || header.spacing_m <= 0) throw new RangeError(`ground field header spacing_m: ${String(header.spacing_m)}; allowed: a finite number > 0`);
  if (!finite(header.origin?.x_m) || !finite(header.origin?.y_m)) {
    throw new RangeError(`ground field header origin: ${JSON.stringify(header.origin)}; allowed: { x_m, y_m } in finite metres`);
  }
  const start = 4 + headerLength + ((4 - ((4 + headerLength) % 4)) % 4);
  const count = header.nx * header.ny;
  if (bytes.byteLength - start !== 4 * count) {
    throw new RangeError(`ground field: ${bytes.byteLength - start} bytes of values for ${header.nx} x ${header.ny} = ${count} float32 values (${4 * count} bytes)`);
  }
  const values = new Float32Array(count);
  for (let n = 0; n < count; n++) {
    const value = view.getFloat32(start + 4 * n, true);
    if (!Number.isFinite(value) || value < 0) throw new RangeError(`ground field value ${n}: ${value}; allowed: finite and >= 0`);
    values[n] = value;
  }
  const grid: FieldGrid = { nx: header.nx, ny: header.ny, spacing_m: header.spacing_m, xWest_m: header.origin.x_m, ySouth_m: header.origin.y_m };
  return { header, grid, values };
}
