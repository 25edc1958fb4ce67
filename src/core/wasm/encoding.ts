/**
 * Byte encodings of the WebAssembly binary format (WebAssembly Core Specification 2.0, §5.2
 * "Values", memory): LEB128 integers, IEEE-754 little-endian floats and length-prefixed vectors.
 *
 * LEB128 (DWARF Debugging Information Format, version 4, §7.6, memory): a value is cut into 7-bit
 * groups, least significant first; every byte but the last has its high bit (0x80) set. The
 * unsigned form stops when the remaining value is 0; the signed form stops when the remaining value
 * is 0 or −1 and the sign bit (0x40) of the last byte agrees with it.
 */

/** Unsigned LEB128 of an integer 0 ≤ value < 2³² (u32: indices, sizes, counts, memarg fields). */
export function unsignedLeb128(value: number): number[] {
  if (!Number.isInteger(value) || value < 0 || value > 0xffffffff) {
    throw new RangeError(`unsignedLeb128: value must be an integer in [0, 2^32), got ${value}`);
  }
  const out: number[] = [];
  let v = value;
  do {
    const byte = v % 128;
    v = Math.floor(v / 128);
    out.push(v !== 0 ? byte | 0x80 : byte);
  } while (v !== 0);
  return out;
}

/** Signed LEB128 of an integer −2³¹ ≤ value < 2³¹ (the immediate of i32.const). */
export function signedLeb128(value: number): number[] {
  if (!Number.isInteger(value) || value < -0x80000000 || value > 0x7fffffff) {
    throw new RangeError(`signedLeb128: value must be an integer in [-2^31, 2^31), got ${value}`);
  }
  const out: number[] = [];
  let v = value;
  for (;;) {
    const byte = v & 0x7f;
    v >>= 7; // arithmetic shift keeps the sign
    const done = (v === 0 && (byte & 0x40) === 0) || (v === -1 && (byte & 0x40) !== 0);
    out.push(done ? byte : byte | 0x80);
    if (done) return out;
  }
}

/** The 8 little-endian bytes of an IEEE-754 binary64 (the immediate of f64.const). */
export function float64Bytes(value: number): number[] {
  const b = new Uint8Array(8);
  new DataView(b.buffer).setFloat64(0, value, true);
  return Array.from(b);
}

/** UTF-8 name as a vector: byte length (u32 LEB128) then the bytes (spec §5.2.4). */
export function nameBytes(name: string): number[] {
  const utf8 = Array.from(new TextEncoder().encode(name));
  return [...unsignedLeb128(utf8.length), ...utf8];
}

/** A vector of already-encoded items: element count (u32 LEB128) then the items (spec §5.1.3). */
export function vectorBytes(items: readonly (readonly number[])[]): number[] {
  const out = unsignedLeb128(items.length);
  for (const item of items) out.push(...item);
  return out;
}
