import { describe, expect, it } from 'vitest';
import { FileFormatError } from '../../../src/core/io/errors.ts';
import { npyToMatrix, parseNpy, writeNpy, writeNpyMatrix } from '../../../src/core/io/npy.ts';
import { matrix } from '../../../src/core/linalg/matrix.ts';
import { expectFileError } from './expectError.ts';
import { mutateBytes, randInt, rng } from './random.ts';

/**
 * A .npy file built by hand from the layout in NumPy's numpy.lib.format documentation: magic,
 * version, little-endian header length (2 bytes in 1.0, 4 in 2.0/3.0), header dict, then data.
 */
function build(version: 1 | 2 | 3, header: string, items: number[], type: 'f8' | 'f4', little: boolean): Uint8Array {
  const head = new TextEncoder().encode(header + '\n');
  const lenBytes = version === 1 ? 2 : 4;
  const size = type === 'f8' ? 8 : 4;
  const out = new Uint8Array(8 + lenBytes + head.length + items.length * size);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, version, 0]);
  const v = new DataView(out.buffer);
  if (version === 1) v.setUint16(8, head.length, true);
  else v.setUint32(8, head.length, true);
  out.set(head, 8 + lenBytes);
  const o = 8 + lenBytes + head.length;
  items.forEach((x, k) => (type === 'f8' ? v.setFloat64(o + k * 8, x, little) : v.setFloat32(o + k * 4, x, little)));
  return out;
}

describe('parseNpy', () => {
  const values = [1.5, -2, 3.25, 4, 5e-300, -6e300];
  it.each([
    [1, '<f8', true, false],
    [1, '>f8', false, false],
    [2, '<f8', true, true],
    [3, '>f8', false, true],
  ] as const)('version %i, %s, fortran=%s (2 × 3)', (version, descr, little, fortran) => {
    // C order: row-major items; Fortran order: the same matrix column-major.
    const items = fortran ? [values[0], values[3], values[1], values[4], values[2], values[5]] : values;
    const header = `{'descr': '${descr}', 'fortran_order': ${fortran ? 'True' : 'False'}, 'shape': (2, 3), }`;
    const a = parseNpy('a.npy', build(version, header, items, 'f8', little));
    expect(a.shape).toEqual([2, 3]);
    expect(Array.from(a.data)).toEqual(values);
  });
  it('reads float32 little and big endian, widened exactly', () => {
    const f32 = [0.1, -3.5, 1e10].map(Math.fround);
    for (const [descr, little] of [
      ['<f4', true],
      ['>f4', false],
    ] as const) {
      const a = parseNpy('a.npy', build(1, `{'descr': '${descr}', 'fortran_order': False, 'shape': (3,), }`, f32, 'f4', little));
      expect(a.shape).toEqual([3]);
      expect(Array.from(a.data)).toEqual(f32);
    }
  });
  it('reads a scalar, keys in any order, double quotes and a UTF-8 (3.0) header', () => {
    const a = parseNpy('a.npy', build(3, `{"shape": (), "fortran_order": False, "descr": "<f8"}   `, [42], 'f8', true));
    expect(a.shape).toEqual([]);
    expect(Array.from(a.data)).toEqual([42]);
  });
  it.each([
    [new Uint8Array([1, 2, 3]), 'a.npy: is not a NumPy .npy file (it does not start with the bytes "\\x93NUMPY")'],
    [
      build(1, "{'descr': '<i8', 'fortran_order': False, 'shape': (1,), }", [0], 'f8', true),
      "a.npy: header descr must be a float64 or float32 type ('<f8', '>f8', '<f4', '>f4'), got \"<i8\"",
    ],
    [
      build(1, "{'descr': [('a', '<f8')], 'fortran_order': False, 'shape': (1,), }", [0], 'f8', true),
      "a.npy: header descr must be a float64 or float32 type ('<f8', '>f8', '<f4', '>f4'), got a structured type",
    ],
    [
      build(1, "{'descr': '<f8', 'fortran_order': False, 'shape': (1, 1, 1, 1), }", [0], 'f8', true),
      'a.npy: array must have 0, 1, 2 or 3 dimensions, got shape (1, 1, 1, 1)',
    ],
    [
      build(1, "{'descr': '<f8', 'fortran_order': False, 'shape': (3,), }", [1, 2], 'f8', true),
      'a.npy: data must be 24 bytes for shape (3,) of <f8, got 16 (the file is truncated)',
    ],
    [
      build(1, "{'descr': '<f8', 'fortran_order': False, 'shape': (2,), }", [1, NaN], 'f8', true),
      'a.npy: element [1] must be finite, got NaN',
    ],
    [
      build(1, "{'descr': '<f8', 'fortran_order': 0, 'shape': (2,), }", [1, 2], 'f8', true),
      "a.npy: header is not a valid .npy header dict: expected a string, True, False or a tuple at character 35 of \"{'descr': '<f8', 'fortran_order': 0, 'shape': (2,), }\"",
    ],
  ])('rejects case %#', (bytes, message) => {
    expectFileError(() => parseNpy('a.npy', bytes), message);
  });
  it('rejects version 4.0', () => {
    const b = build(1, "{'descr': '<f8', 'fortran_order': False, 'shape': (1,), }", [1], 'f8', true);
    b[6] = 4;
    expectFileError(() => parseNpy('a.npy', b), 'a.npy: .npy version must be 1.0, 2.0 or 3.0, got 4.0');
  });
  it('npyToMatrix refuses 1-D arrays', () => {
    const a = parseNpy('a.npy', writeNpy([2], [1, 2]));
    expectFileError(() => npyToMatrix('a.npy', a), 'a.npy: must hold a 2-dimensional array, got shape (2,)');
  });
});

describe('writeNpy', () => {
  it('writes the documented layout: version 1.0, header padded to 64 bytes, little-endian <f8', () => {
    const b = writeNpyMatrix(matrix(2, 2, Float64Array.of(1, 2, 3, 4)));
    expect(Array.from(b.subarray(0, 8))).toEqual([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]);
    const headerLength = b[8] + 256 * b[9];
    expect((10 + headerLength) % 64).toBe(0);
    const header = new TextDecoder().decode(b.subarray(10, 10 + headerLength));
    expect(header.trimEnd()).toBe("{'descr': '<f8', 'fortran_order': False, 'shape': (2, 2), }");
    expect(header.endsWith('\n')).toBe(true);
    expect(new DataView(b.buffer).getFloat64(10 + headerLength + 8, true)).toBe(2);
  });
  it('round-trips random shapes and values exactly', () => {
    const r = rng(5);
    for (let trial = 0; trial < 20; trial++) {
      const shape = trial % 3 === 0 ? [randInt(r, 5)] : [1 + randInt(r, 4), randInt(r, 5)];
      const n = shape.reduce((a, b) => a * b, 1);
      const data = Float64Array.from({ length: n }, () => (r() - 0.5) * 10 ** (randInt(r, 600) - 300));
      const a = parseNpy('w.npy', writeNpy(shape, data));
      expect(a.shape).toEqual(shape);
      expect(Array.from(a.data)).toEqual(Array.from(data));
    }
  });
});

describe('parseNpy on mutated input (seeded)', () => {
  it('either parses or throws a FileFormatError', () => {
    const r = rng(31);
    const base = writeNpy([2, 3], [1, 2, 3, 4, 5, 6]);
    let parsed = 0;
    let refused = 0;
    for (let trial = 0; trial < 2000; trial++) {
      const b = mutateBytes(r, base);
      try {
        const a = parseNpy('m.npy', b);
        expect(a.data.length).toBe(a.shape.reduce((x, y) => x * y, 1));
        parsed++;
      } catch (e) {
        if (!(e instanceof FileFormatError)) throw new Error(`non-FileFormatError for [${Array.from(b).join(',')}]: ${String(e)}`);
        refused++;
      }
    }
    expect(parsed).toBeGreaterThan(30);
    expect(refused).toBeGreaterThan(30);
  });
});
