/**
 * Reading the binary ground field (docs/http-api.md): bytes built by hand here, byte by byte as the
 * format describes them, so the decoder is checked against the description and not against itself.
 */
import { describe, expect, it } from 'vitest';
import { areasAtOrAbove, decodeGroundField, valueAt, type GroundField } from '../../../web/field/groundField.ts';

/** Build a field's bytes: uint32 LE header length, JSON header padded with spaces to 4-byte alignment, float32 LE values. */
function fieldBytes(header: Record<string, unknown>, values: number[], options: { pad?: boolean } = {}): ArrayBuffer {
  let json = JSON.stringify(header);
  if (options.pad !== false) while ((4 + json.length) % 4 !== 0) json += ' ';
  const headerBytes = new TextEncoder().encode(json);
  const start = 4 + headerBytes.length + ((4 - ((4 + headerBytes.length) % 4)) % 4);
  const buffer = new ArrayBuffer(start + 4 * values.length);
  const view = new DataView(buffer);
  view.setUint32(0, headerBytes.length, true);
  new Uint8Array(buffer, 4, headerBytes.length).set(headerBytes);
  values.forEach((value, n) => view.setFloat32(start + 4 * n, value, true));
  return buffer;
}

const HEADER = { format: 'plumeplan.groundfield/1', nx: 3, ny: 2, spacing_m: 50, origin: { x_m: -75, y_m: -50 }, statistic: 'concentration', height_m: 1.5, units: 'ug/m3' };

describe('decodeGroundField', () => {
  it('reads the header and the values in the order i + nx * j', () => {
    const { header, grid, values } = decodeGroundField(fieldBytes(HEADER, [0, 1, 2, 10, 11, 12.5]));
    expect(header.statistic).toBe('concentration');
    expect(grid).toEqual({ nx: 3, ny: 2, spacing_m: 50, xWest_m: -75, ySouth_m: -50 });
    expect(Array.from(values)).toEqual([0, 1, 2, 10, 11, 12.5]);
  });

  it('reads little-endian float32 exactly as the bytes say (0x3FC00000 is 1.5)', () => {
    const buffer = fieldBytes({ ...HEADER, nx: 1, ny: 1 }, [0]);
    const view = new DataView(buffer);
    const start = buffer.byteLength - 4;
    // 1.5 as IEEE 754 single precision is 0x3FC00000; little-endian puts 00 00 C0 3F.
    [0x00, 0x00, 0xc0, 0x3f].forEach((byte, n) => view.setUint8(start + n, byte));
    expect(decodeGroundField(buffer).values[0]).toBe(1.5);
  });

  it('finds the values after an unpadded header too', () => {
    const { values } = decodeGroundField(fieldBytes({ ...HEADER, nx: 2, ny: 1, extra: 'x' }, [4, 5], { pad: false }));
    expect(Array.from(values)).toEqual([4, 5]);
  });

  it('refuses wrong counts, headers and values with a message naming them', () => {
    expect(() => decodeGroundField(new ArrayBuffer(2))).toThrow(/too short/);
    expect(() => decodeGroundField(fieldBytes(HEADER, [1, 2, 3]))).toThrow(/for 3 x 2 = 6 float32 values/);
    expect(() => decodeGroundField(fieldBytes({ ...HEADER, format: 'other/1' }, [0, 0, 0, 0, 0, 0]))).toThrow(/format/);
    expect(() => decodeGroundField(fieldBytes({ ...HEADER, nx: 0 }, []))).toThrow(/nx/);
    expect(() => decodeGroundField(fieldBytes({ ...HEADER, origin: { x_m: 'w' } }, [0, 0, 0, 0, 0, 0]))).toThrow(/origin/);
    expect(() => decodeGroundField(fieldBytes(HEADER, [0, 0, -1, 0, 0, 0]))).toThrow(/value 2: -1/);
    expect(() => decodeGroundField(fieldBytes(HEADER, [0, 0, Number.NaN, 0, 0, 0]))).toThrow(/value 2: NaN/);
    const broken = fieldBytes(HEADER, [0, 0, 0, 0, 0, 0]);
    new DataView(broken).setUint32(0, 1e6, true);
    expect(() => decodeGroundField(broken)).toThrow(/runs past the end/);
  });
});

describe('reading a field', () => {
  const field: GroundField = {
    grid: { nx: 3, ny: 2, spacing_m: 50, xWest_m: -75, ySouth_m: -50 },
    values: Float32Array.from([0, 1, 2, 10, 11, 12]),
    statistic: 'concentration',
    origin: 'test',
    height_m: 1.5,
  };

  it('valueAt gives the value of the column a position falls in, null outside', () => {
    expect(valueAt(field, 0, 0)).toBe(11); // i = 1, j = 1
    expect(valueAt(field, -74, -49)).toBe(0);
    expect(valueAt(field, 74, -1)).toBe(2);
    expect(valueAt(field, 76, 0)).toBeNull();
    expect(valueAt(field, 0, 50)).toBeNull();
  });

  it('areasAtOrAbove counts columns of 50 m x 50 m (2500 m2 each)', () => {
    expect(areasAtOrAbove(field, [1, 10, 12, 13])).toEqual([5 * 2500, 3 * 2500, 1 * 2500, 0]);
  });
});
