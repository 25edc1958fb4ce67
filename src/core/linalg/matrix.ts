/**
 * Dense matrices as flat row-major Float64Array storage: element (i, j) sits at data[i * cols + j].
 * One buffer per matrix, so a matrix moves to a worker as one transferable ArrayBuffer.
 */
import { transposeBlock } from './kernels.ts';
import { gemmNTAuto as gemmNT } from '../wasm/gemmNT.ts'; // kernels.ts gemmNT's contract and bits, WebAssembly SIMD when sizable
export interface Matrix {
  readonly rows: number;
  readonly cols: number;
  readonly data: Float64Array;
}

/** A rows × cols matrix over `data` (not copied), or zero-filled when `data` is omitted. */
export function matrix(rows: number, cols: number, data?: Float64Array): Matrix {
  if (data && data.length !== rows * cols) {
    throw new RangeError(`matrix: data has length ${data.length}, expected ${rows}×${cols} = ${rows * cols}`);
  }
  return { rows, cols, data: data ?? new Float64Array(rows * cols) };
}

/** Copy of nested row arrays into a Matrix. Rows must all have the same length. */
export function fromRows(rows: ArrayLike<ArrayLike<number>>): Matrix {
  const r = rows.length;
  const c = r === 0 ? 0 : rows[0].length;
  const out = matrix(r, c);
  for (let i = 0; i < r; i++) {
    const row = rows[i];
    if (row.length !== c) throw new RangeError(`fromRows: row ${i} has length ${row.length}, expected ${c}`);
    for (let j = 0; j < c; j++) out.data[i * c + j] = row[j];
  }
  return out;
}

/** Nested plain arrays (for JSON output and tests). */
export function toRows(a: Matrix): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < a.rows; i++) out.push(Array.from(a.data.subarray(i * a.cols, (i + 1) * a.cols)));
  return out;
}

export function identity(n: number): Matrix {
  const out = matrix(n, n);
  for (let i = 0; i < n; i++) out.data[i * n + i] = 1;
  return out;
}

/** Aᵀ as a new matrix (cache-blocked in 32 × 32 tiles). */
export function transpose(a: Matrix): Matrix {
  const out = matrix(a.cols, a.rows);
  transposeBlock(a.rows, a.cols, a.data, 0, a.cols, out.data, 0, a.rows);
  return out;
}

/** Element (i, j). For tests and cold paths; hot loops index `data` directly. */
export function at(a: Matrix, i: number, j: number): number {
  return a.data[i * a.cols + j];
}

/** Diagonal of a square matrix. */
export function diagonal(a: Matrix): Float64Array {
  const n = Math.min(a.rows, a.cols);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = a.data[i * a.cols + i];
  return out;
}

/** y = A x. */
export function matvec(a: Matrix, x: ArrayLike<number>, out = new Float64Array(a.rows)): Float64Array {
  const { rows, cols, data } = a;
  for (let i = 0; i < rows; i++) {
    let s = 0;
    const o = i * cols;
    for (let j = 0; j < cols; j++) s += data[o + j] * x[j];
    out[i] = s;
  }
  return out;
}

/** y = Aᵀ x. */
export function matTvec(a: Matrix, x: ArrayLike<number>, out = new Float64Array(a.cols)): Float64Array {
  const { rows, cols, data } = a;
  out.fill(0);
  for (let i = 0; i < rows; i++) {
    const xi = x[i];
    if (xi === 0) continue;
    const o = i * cols;
    for (let j = 0; j < cols; j++) out[j] += data[o + j] * xi;
  }
  return out;
}

/**
 * C = A B. Small products use an i-k-j loop; larger ones transpose B once and run the
 * register-blocked NT kernel (./kernels.ts). ./products.ts has the other product shapes.
 */
export function matmul(a: Matrix, b: Matrix): Matrix {
  if (a.cols !== b.rows) throw new RangeError(`matmul: ${a.rows}×${a.cols} times ${b.rows}×${b.cols}`);
  const out = matrix(a.rows, b.cols);
  const n = b.cols;
  if (a.rows * a.cols * n > 32768) {
    const bt = new Float64Array(b.rows * n);
    transposeBlock(b.rows, n, b.data, 0, n, bt, 0, b.rows);
    gemmNT(a.rows, n, a.cols, 1, a.data, 0, a.cols, bt, 0, b.rows, out.data, 0, n);
    return out;
  }
  for (let i = 0; i < a.rows; i++) {
    const oi = i * n;
    for (let k = 0; k < a.cols; k++) {
      const aik = a.data[i * a.cols + k];
      if (aik === 0) continue;
      const ok = k * n;
      for (let j = 0; j < n; j++) out.data[oi + j] += aik * b.data[ok + j];
    }
  }
  return out;
}

export function dot(x: ArrayLike<number>, y: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] * y[i];
  return s;
}
