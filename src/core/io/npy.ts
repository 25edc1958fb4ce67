/**
 * NumPy .npy files (format described in NumPy's `numpy.lib.format` documentation, versions 1.0,
 * 2.0 and 3.0):
 *
 *   bytes 0–5   magic "\x93NUMPY"
 *   byte 6, 7   major, minor version (1.0, 2.0 or 3.0)
 *   then        header length: uint16 little-endian (1.0) or uint32 little-endian (2.0, 3.0)
 *   then        header: a Python dict literal {'descr': '<f8', 'fortran_order': False, 'shape': (3, 4), }
 *               (latin-1 in 1.0/2.0, UTF-8 in 3.0), space-padded, ending in '\n'
 *   then        the array data, shape[0]·shape[1]·… items, C (row-major) or Fortran (column-major) order
 *
 * Read: float64 and float32 ('<f8', '>f8', '<f4', '>f4'), little or big endian, C or Fortran order,
 * 0-, 1- or 2-dimensional; data always comes back as float64 in C order. Write: float64
 * little-endian C order, version 1.0, header padded so the data starts at a multiple of 64 bytes.
 */
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { formatValue } from '../errors.ts';
import { checkFileSize, FileFormatError } from './errors.ts';

export interface NpyArray {
  /** [] (a scalar), [n] or [rows, cols]. */
  readonly shape: readonly number[];
  /** Items in C (row-major) order. */
  readonly data: Float64Array;
}

export interface NpyReadOptions {
  /** Refuse NaN and ±Infinity items (default true). */
  readonly finite?: boolean;
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]; // \x93 N U M P Y

type PyValue = string | boolean | number[] | { readonly unsupported: string };

/** The header's dict literal → its entries. Accepts only what the format writes. */
function parseHeaderDict(file: string, header: string): Map<string, PyValue> {
  let p = 0;
  const n = header.length;
  const bad = (what: string): never => {
    throw new FileFormatError(
      file,
      `header is not a valid .npy header dict: ${what} at character ${p + 1} of ${JSON.stringify(header.trim().slice(0, 200))}`,
    );
  };
  const ws = () => {
    while (p < n && /\s/.test(header[p])) p++;
  };
  const str = (): string => {
    const q = header[p];
    if (q !== "'" && q !== '"') return bad('expected a quoted string');
    const end = header.indexOf(q, p + 1);
    if (end < 0) return bad('unterminated string');
    const s = header.slice(p + 1, end);
    if (s.includes('\\')) return bad('escapes are not supported');
    p = end + 1;
    return s;
  };
  const value = (): PyValue => {
    ws();
    const c = header[p];
    if (c === "'" || c === '"') return str();
    if (header.startsWith('True', p)) {
      p += 4;
      return true;
    }
    if (header.startsWith('False', p)) {
      p += 5;
      return false;
    }
    if (c === '(') {
      p++;
      const items: number[] = [];
      for (;;) {
        ws();
        if (header[p] === ')') {
          p++;
          return items;
        }
        const m = /^\d+L?/.exec(header.slice(p, p + 40));
        if (!m) return bad('expected a non-negative integer in the shape');
        items.push(Number(m[0].replace('L', '')));
        p += m[0].length;
        ws();
        if (header[p] === ',') p++;
        else if (header[p] !== ')') return bad("expected ',' or ')' in the shape");
      }
    }
    if (c === '[' || c === '{') {
      // A structured dtype (list of fields) or nested dict: skip to the matching bracket.
      const open = c;
      const close = c === '[' ? ']' : '}';
      let depth = 0;
      const start = p;
      for (; p < n; p++) {
        if (header[p] === open) depth++;
        else if (header[p] === close && --depth === 0) {
          p++;
          return { unsupported: header.slice(start, p) };
        }
      }
      return bad('unbalanced brackets');
    }
    return bad('expected a string, True, False or a tuple');
  };
  const out = new Map<string, PyValue>();
  ws();
  if (header[p] !== '{') bad("expected '{'");
  p++;
  for (;;) {
    ws();
    if (header[p] === '}') {
      p++;
      break;
    }
    const key = str();
    ws();
    if (header[p] !== ':') bad("expected ':'");
    p++;
    out.set(key, value());
    ws();
    if (header[p] === ',') p++;
    else if (header[p] !== '}') bad("expected ',' or '}'");
  }
  ws();
  if (p !== n) bad('unexpected text after the dict');
  return out;
}

/** Parse a .npy file. */
export function parseNpy(file: string, bytes: Uint8Array, options: NpyReadOptions = {}): NpyArray {
  checkFileSize(file, bytes.byteLength);
  if (bytes.byteLength < 10 || MAGIC.some((b, k) => bytes[k] !== b)) {
    throw new FileFormatError(file, 'is not a NumPy .npy file (it does not start with the bytes "\\x93NUMPY")', { offset: 0 });
  }
  const major = bytes[6];
  const minor = bytes[7];
  if (!((major === 1 || major === 2 || major === 3) && minor === 0)) {
    throw new FileFormatError(file, `.npy version must be 1.0, 2.0 or 3.0, got ${major}.${minor}`, { offset: 6 });
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const lengthBytes = major === 1 ? 2 : 4;
  if (bytes.byteLength < 8 + lengthBytes) throw new FileFormatError(file, 'ends inside the header length', { offset: 8 });
  const headerLength = major === 1 ? view.getUint16(8, true) : view.getUint32(8, true);
  const headerStart = 8 + lengthBytes;
  const dataStart = headerStart + headerLength;
  if (dataStart > bytes.byteLength) {
    throw new FileFormatError(file, `header length ${headerLength} runs past the end of the file (${bytes.byteLength} bytes)`, {
      offset: 8,
    });
  }
  const headerBytes = bytes.subarray(headerStart, dataStart);
  let header: string;
  if (major === 3) {
    try {
      header = new TextDecoder('utf-8', { fatal: true }).decode(headerBytes);
    } catch {
      throw new FileFormatError(file, 'header is not UTF-8 text', { offset: headerStart });
    }
  } else {
    header = Array.from(headerBytes, (b) => String.fromCharCode(b)).join('');
  }
  if (!header.endsWith('\n')) {
    throw new FileFormatError(file, 'header must end with a line break (the file is truncated or not written by NumPy)', {
      offset: dataStart,
    });
  }
  const dict = parseHeaderDict(file, header);
  for (const key of dict.keys()) {
    if (key !== 'descr' && key !== 'fortran_order' && key !== 'shape') {
      throw new FileFormatError(file, `header has the unknown key ${formatValue(key)} (expected descr, fortran_order, shape)`);
    }
  }
  const descr = dict.get('descr');
  const fortran = dict.get('fortran_order');
  const shapeValue = dict.get('shape');
  if (typeof descr !== 'string') {
    throw new FileFormatError(
      file,
      `header descr must be a float64 or float32 type ('<f8', '>f8', '<f4', '>f4'), got ${typeof descr === 'object' ? 'a structured type' : formatValue(descr)}`,
      { field: 'descr' },
    );
  }
  const m = /^([<>])f([48])$/.exec(descr);
  if (!m) {
    throw new FileFormatError(
      file,
      `header descr must be a float64 or float32 type ('<f8', '>f8', '<f4', '>f4'), got ${formatValue(descr)}`,
      { field: 'descr' },
    );
  }
  const little = m[1] === '<';
  const itemSize = m[2] === '8' ? 8 : 4;
  if (typeof fortran !== 'boolean')
    throw new FileFormatError(file, `header fortran_order must be True or False, got ${formatValue(fortran)}`, { field: 'fortran_order' });
  if (!Array.isArray(shapeValue)) throw new FileFormatError(file, 'header shape must be a tuple of integers', { field: 'shape' });
  const shape = shapeValue;
  if (shape.length > 3) {
    throw new FileFormatError(file, `array must have 0, 1, 2 or 3 dimensions, got shape (${shape.join(', ')})`, { field: 'shape' });
  }
  const count = shape.reduce((a, b) => a * b, 1);
  const expectedBytes = count * itemSize;
  const available = bytes.byteLength - dataStart;
  if (available !== expectedBytes) {
    throw new FileFormatError(
      file,
      `data must be ${expectedBytes} bytes for shape (${shape.join(', ')}${shape.length === 1 ? ',' : ''}) of ${descr}, got ${available}${available < expectedBytes ? ' (the file is truncated)' : ''}`,
      { offset: dataStart },
    );
  }
  const raw = new Float64Array(count);
  for (let k = 0; k < count; k++) {
    const o = dataStart + k * itemSize;
    raw[k] = itemSize === 8 ? view.getFloat64(o, little) : view.getFloat32(o, little);
  }
  let data = raw;
  if (fortran && shape.length === 2) {
    const [r, c] = shape as [number, number];
    data = new Float64Array(count);
    for (let j = 0; j < c; j++) for (let i = 0; i < r; i++) data[i * c + j] = raw[j * r + i];
  } else if (fortran && shape.length === 3) {
    // Element (i0, i1, i2) sits at i0 + s0·(i1 + s1·i2) in Fortran order, at (i0·s1 + i1)·s2 + i2 in C order.
    const [s0, s1, s2] = shape as [number, number, number];
    data = new Float64Array(count);
    for (let i2 = 0; i2 < s2; i2++)
      for (let i1 = 0; i1 < s1; i1++) for (let i0 = 0; i0 < s0; i0++) data[(i0 * s1 + i1) * s2 + i2] = raw[i0 + s0 * (i1 + s1 * i2)];
  }
  if (options.finite ?? true) {
    const cols = shape.length === 2 ? shape[1] : 0;
    for (let k = 0; k < count; k++) {
      if (!Number.isFinite(data[k])) {
        const at =
          shape.length === 3
            ? `[${Math.floor(k / (shape[1]! * shape[2]!))}, ${Math.floor(k / shape[2]!) % shape[1]!}, ${k % shape[2]!}]`
            : shape.length === 2
              ? `[${Math.floor(k / cols)}, ${k % cols}]`
              : shape.length === 1
                ? `[${k}]`
                : '';
        throw new FileFormatError(file, `element${at ? ' ' + at : ''} must be finite, got ${formatValue(data[k])}`, { field: at });
      }
    }
  }
  return { shape, data };
}

/** A 2-D .npy array as a Matrix (1-D arrays are refused: a row or a column would be a guess). */
export function npyToMatrix(file: string, a: NpyArray): Matrix {
  if (a.shape.length !== 2) {
    throw new FileFormatError(
      file,
      `must hold a 2-dimensional array, got shape (${a.shape.join(', ')}${a.shape.length === 1 ? ',' : ''})`,
      { field: 'shape' },
    );
  }
  return matrix(a.shape[0], a.shape[1], a.data);
}

/** The .npy header dict as NumPy writes it, e.g. "{'descr': '<f8', 'fortran_order': False, 'shape': (3,), }". */
function headerText(shape: readonly number[]): string {
  const dims = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  return `{'descr': '<f8', 'fortran_order': False, 'shape': ${dims}, }`;
}

/**
 * The header of a float64 little-endian C-order .npy (version 1.0, or 2.0 when the header needs it):
 * magic, version, length and the dict padded so the data start on a 64-byte boundary. The data
 * follow as `shape`'s product of float64 values, little-endian.
 */
export function npyHeader(shape: readonly number[]): Uint8Array {
  const dict = headerText(shape);
  let major = 1;
  let prefix = 10;
  let total = Math.ceil((prefix + dict.length + 1) / 64) * 64;
  if (total - prefix > 0xffff) {
    major = 2;
    prefix = 12;
    total = Math.ceil((prefix + dict.length + 1) / 64) * 64;
  }
  const headerLength = total - prefix;
  const out = new Uint8Array(total);
  out.set(MAGIC, 0);
  out[6] = major;
  out[7] = 0;
  const view = new DataView(out.buffer);
  if (major === 1) view.setUint16(8, headerLength, true);
  else view.setUint32(8, headerLength, true);
  const padded = dict.padEnd(headerLength - 1, ' ') + '\n';
  for (let k = 0; k < padded.length; k++) out[prefix + k] = padded.charCodeAt(k);
  return out;
}

/** `data` as float64 little-endian bytes (the body of a .npy). */
export function float64Bytes(data: ArrayLike<number>): Uint8Array {
  const out = new Uint8Array(data.length * 8);
  const view = new DataView(out.buffer);
  for (let k = 0; k < data.length; k++) view.setFloat64(k * 8, data[k], true);
  return out;
}

/** A float64 little-endian C-order .npy: {@link npyHeader} then the values. */
export function writeNpy(shape: readonly number[], data: ArrayLike<number>): Uint8Array {
  const count = shape.reduce((a, b) => a * b, 1);
  if (data.length !== count) throw new RangeError(`writeNpy: ${data.length} values for shape (${shape.join(', ')})`);
  const header = npyHeader(shape);
  const out = new Uint8Array(header.length + count * 8);
  out.set(header, 0);
  out.set(float64Bytes(data), header.length);
  return out;
}

export function writeNpyMatrix(m: Matrix): Uint8Array {
  return writeNpy([m.rows, m.cols], m.data);
}
