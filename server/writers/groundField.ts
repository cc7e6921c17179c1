/**
 * The ground-level field as compact binary for the map page: a small JSON header, then the values as
 * float32, little-endian, row-major with index i + nx * j (x east fastest, then y north; j = 0 is the
 * southmost row), exactly the layout of the solver's ground arrays.
 *
 * Bytes:
 *   0..3        header length H, uint32 little-endian
 *   4..4+H-1    the header, UTF-8 JSON, padded with spaces so that 4 + H is a multiple of 4
 *               (the values can then be viewed in place as a Float32Array)
 *   4+H..       nx * ny float32 values [ug/m3]
 *
 * Values are not rounded (the map colours them; it does not print them as results), and the header
 * carries the screening caution like every other output.
 */
import type { Scenario } from '../../scenarios/format/types.ts';
import type { FootprintStatistic, ScenarioRunResult } from '../../solver/drivers/types.ts';
import { SCREENING_CAUTION } from './caution.ts';

export const GROUND_FIELD_FORMAT = 'plumeplan.groundfield/1';
export const GROUND_FIELD_FILE = 'ground-field.bin';
export const GROUND_FIELD_CONTENT_TYPE = 'application/vnd.plumeplan.groundfield';

export interface GroundFieldHeader {
  format: typeof GROUND_FIELD_FORMAT;
  nx: number;
  ny: number;
  /** cell size, the same in x and y [m] */
  spacing_m: number;
  /** the grid's south-west corner (west edge, south edge) in local metres east and north of the site;
   * cell (i, j) has its centre at origin + ((i + 0.5), (j + 0.5)) * spacing_m */
  origin: { x_m: number; y_m: number };
  /** the site, origin of the local metres (WGS 84 degrees) */
  site: { lon: number; lat: number };
  /** proj4 definition of the local transverse Mercator: local metres <-> WGS 84 */
  projection: string;
  units: 'ug/m3';
  /** "concentration" (steady weather), "mean" (an hourly series or a wind rose) or "maximum" (the screening weather set's highest hourly value) */
  statistic: FootprintStatistic;
  /** height of the field above ground [m] */
  height_m: number;
  /** smallest and largest value [ug/m3] */
  min_ug_m3: number;
  max_ug_m3: number;
  valueType: 'float32';
  byteOrder: 'little-endian';
  indexOrder: 'i + nx * j';
  caution: string;
}

/**
 * Encode a run's ground-level field.
 * @param scenario the scenario run (for the site)
 * @param result the run's result (grid and footprint field)
 * @param height_m height of the field above ground [m]
 * @returns the bytes described at the top of this file
 * @example const bytes = encodeGroundField(scenario, result, 1.5);
 */
export function encodeGroundField(scenario: Scenario, result: ScenarioRunResult, height_m: number): Uint8Array {
  const { grid } = result;
  const values = result.footprint_ug_m3;
  if (values.length !== grid.nx * grid.ny) {
    throw new RangeError(`ground field: ${values.length} values for a ${grid.nx} x ${grid.ny} grid`);
  }
  let min = Infinity;
  let max = -Infinity;
  for (let index = 0; index < values.length; index++) {
    const value = values[index];
    if (value < min) min = value;
    if (value > max) max = value;
  }
  const header: GroundFieldHeader = {
    format: GROUND_FIELD_FORMAT,
    nx: grid.nx,
    ny: grid.ny,
    spacing_m: grid.spacing_m,
    origin: { x_m: grid.xWest_m, y_m: grid.ySouth_m },
    site: { lon: scenario.site.lon, lat: scenario.site.lat },
    projection: grid.projection.definition,
    units: 'ug/m3',
    statistic: result.footprintStatistic,
    height_m,
    min_ug_m3: Math.fround(min),
    max_ug_m3: Math.fround(max),
    valueType: 'float32',
    byteOrder: 'little-endian',
    indexOrder: 'i + nx * j',
    caution: SCREENING_CAUTION,
  };
  let headerBytes = new TextEncoder().encode(JSON.stringify(header));
  const padding = (4 - ((4 + headerBytes.length) % 4)) % 4;
  if (padding > 0) headerBytes = new TextEncoder().encode(JSON.stringify(header) + ' '.repeat(padding));

  const bytes = new Uint8Array(4 + headerBytes.length + values.length * 4);
  const view = new DataView(bytes.buffer);
  view.setUint32(0, headerBytes.length, true);
  bytes.set(headerBytes, 4);
  const valuesOffset = 4 + headerBytes.length;
  for (let index = 0; index < values.length; index++) view.setFloat32(valuesOffset + index * 4, values[index], true);
  return bytes;
}

/**
 * Read bytes written by `encodeGroundField` (for tests and for any Node-side reader).
 * @returns the header and the values
 * @throws RangeError when the bytes are not a ground field
 */
export function decodeGroundField(bytes: Uint8Array): { header: GroundFieldHeader; values: Float32Array } {
  if (bytes.byteLength < 4) throw new RangeError('ground field: shorter than its header length');
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const headerLength = view.getUint32(0, true);
  if (4 + headerLength > bytes.byteLength) throw new RangeError('ground field: header runs past the end');
  const header = JSON.parse(new TextDecoder().decode(bytes.subarray(4, 4 + headerLength))) as GroundFieldHeader;
  if (header.format !== GROUND_FIELD_FORMAT) throw new RangeError(`ground field: format ${JSON.stringify(header.format)}`);
  const count = header.nx * header.ny;
  const valuesOffset = 4 + headerLength;
  if (valuesOffset + count * 4 !== bytes.byteLength) throw new RangeError('ground field: value count does not match nx * ny');
  const values = new Float32Array(count);
  for (let index = 0; index < count; index++) values[index] = view.getFloat32(valuesOffset + index * 4, true);
  return { header, values };
}
