/**
 * The emitter's byte encodings against published values, and against the engine's own decoder.
 */
import { describe, expect, it } from 'vitest';
import { float64Bytes, nameBytes, signedLeb128, unsignedLeb128 } from '../../../src/core/wasm/encoding.ts';
import { encodeModule, FunctionBuilder, ValType } from '../../../src/core/wasm/emitter.ts';

const hex = (bytes: number[]) => bytes.map((b) => b.toString(16).padStart(2, '0')).join(' ');

describe('LEB128', () => {
  // DWARF Debugging Information Format, version 4 (2010), §7.6, Figure 22 "Examples of unsigned
  // LEB128 encodings" (values from memory of the table).
  it.each([
    [2, '02'],
    [127, '7f'],
    [128, '80 01'],
    [129, '81 01'],
    [130, '82 01'],
    [12857, 'b9 64'],
  ])('unsigned %d → %s (DWARF 4, Figure 22)', (v, bytes) => expect(hex(unsignedLeb128(v))).toBe(bytes));

  // Same standard, Figure 23 "Examples of signed LEB128 encodings" (from memory).
  it.each([
    [2, '02'],
    [-2, '7e'],
    [127, 'ff 00'],
    [-127, '81 7f'],
    [128, '80 01'],
    [-128, '80 7f'],
    [129, '81 01'],
    [-129, 'ff 7e'],
  ])('signed %d → %s (DWARF 4, Figure 23)', (v, bytes) => expect(hex(signedLeb128(v))).toBe(bytes));

  // The worked examples of the Wikipedia article "LEB128" (from memory): 624485 and −123456.
  it('unsigned 624485 → e5 8e 26 and signed −123456 → c0 bb 78 (Wikipedia, LEB128)', () => {
    expect(hex(unsignedLeb128(624485))).toBe('e5 8e 26');
    expect(hex(signedLeb128(-123456))).toBe('c0 bb 78');
  });

  // The ends of the u32 / s32 ranges, derived by hand from the definition (5 groups of 7 bits):
  // 2³²−1 = four groups of 1111111 then 1111; −2³¹ = four zero groups then 1111000 (sign bit set).
  it('range ends: 2^32−1 → ff ff ff ff 0f, −2^31 → 80 80 80 80 78, 2^31−1 → ff ff ff ff 07', () => {
    expect(hex(unsignedLeb128(0xffffffff))).toBe('ff ff ff ff 0f');
    expect(hex(signedLeb128(-0x80000000))).toBe('80 80 80 80 78');
    expect(hex(signedLeb128(0x7fffffff))).toBe('ff ff ff ff 07');
    expect(hex(unsignedLeb128(0))).toBe('00');
    expect(hex(signedLeb128(0))).toBe('00');
    expect(hex(signedLeb128(-1))).toBe('7f');
    expect(hex(signedLeb128(63))).toBe('3f');
    expect(hex(signedLeb128(64))).toBe('c0 00'); // 64 has bit 6 set: needs a second byte for the sign
    expect(hex(signedLeb128(-64))).toBe('40');
    expect(hex(signedLeb128(-65))).toBe('bf 7f');
  });

  it('rejects values outside the 32-bit ranges and non-integers, naming the value', () => {
    expect(() => unsignedLeb128(-1)).toThrow(/got -1/);
    expect(() => unsignedLeb128(2 ** 32)).toThrow(/got 4294967296/);
    expect(() => signedLeb128(2 ** 31)).toThrow(/got 2147483648/);
    expect(() => signedLeb128(1.5)).toThrow(/got 1.5/);
  });

  // The engine's decoder as the outside reader: i32.const v returned by a function must be v.
  it('V8 decodes our i32.const immediates back to the same values', () => {
    const values = [0, 1, -1, 63, 64, -64, -65, 127, 128, -128, 8191, 8192, -8193, 2 ** 20 + 7, -(2 ** 27), 2 ** 31 - 1, -(2 ** 31)];
    const functions = values.map((v, i) => {
      const f = new FunctionBuilder([], [ValType.i32]);
      f.i32Const(v);
      return { name: `c${i}`, fn: f };
    });
    const inst = new WebAssembly.Instance(new WebAssembly.Module(encodeModule({ functions })));
    values.forEach((v, i) => expect((inst.exports[`c${i}`] as () => number)()).toBe(v));
  });
});

describe('other encodings', () => {
  it('f64 is IEEE-754 binary64 little-endian: 1.0 = 3ff0000000000000 (IEEE 754-2008, §3.4)', () => {
    expect(hex(float64Bytes(1))).toBe('00 00 00 00 00 00 f0 3f');
    expect(hex(float64Bytes(-2))).toBe('00 00 00 00 00 00 00 c0');
  });
  it('names are length-prefixed UTF-8', () => {
    expect(hex(nameBytes('env'))).toBe('03 65 6e 76');
    expect(hex(nameBytes('é'))).toBe('02 c3 a9');
  });
  it('a module starts with the magic \\0asm and version 1 (WebAssembly Core Specification, §5.5.16)', () => {
    const bytes = encodeModule({ functions: [] });
    expect(hex(Array.from(bytes.subarray(0, 8)))).toBe('00 61 73 6d 01 00 00 00');
    expect(WebAssembly.validate(bytes)).toBe(true);
  });
});
