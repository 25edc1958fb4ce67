/**
 * Sparse matrices in compressed-row (CSR) form, built from coordinates with duplicates summed.
 */
import { matrix, type Matrix } from './matrix.ts';

export interface SparseMatrix {
  readonly rows: number;
  readonly cols: number;
  /** rowPtr[i] … rowPtr[i+1]-1 index the entries of row i; length rows + 1. */
  readonly rowPtr: Int32Array;
  readonly colIdx: Int32Array;
  readonly values: Float64Array;
}

/** CSR from zero-based coordinates; duplicate (row, col) pairs are summed, columns sorted per row. */
export function sparseFromCoordinates(
  rows: number,
  cols: number,
  ri: ArrayLike<number>,
  ci: ArrayLike<number>,
  v: ArrayLike<number>,
): SparseMatrix {
  const nnz = v.length;
  const order = Array.from({ length: nnz }, (_, k) => k);
  order.sort((a, b) => ri[a]! - ri[b]! || ci[a]! - ci[b]!);
  const rowPtr = new Int32Array(rows + 1);
  const colIdx: number[] = [];
  const values: number[] = [];
  let lastR = -1;
  let lastC = -1;
  for (const k of order) {
    const r = ri[k]!;
    const c = ci[k]!;
    if (r === lastR && c === lastC) {
      values[values.length - 1]! += v[k]!;
      continue;
    }
    colIdx.push(c);
    values.push(v[k]!);
    rowPtr[r + 1]!++;
    lastR = r;
    lastC = c;
  }
  for (let i = 0; i < rows; i++) rowPtr[i + 1]! += rowPtr[i]!;
  return { rows, cols, rowPtr, colIdx: Int32Array.from(colIdx), values: Float64Array.from(values) };
}

export function sparseToDense(s: SparseMatrix): Matrix {
  const out = matrix(s.rows, s.cols);
  for (let i = 0; i < s.rows; i++) {
    for (let p = s.rowPtr[i]!; p < s.rowPtr[i + 1]!; p++) out.data[i * s.cols + s.colIdx[p]!] += s.values[p]!;
  }
  return out;
}

export function denseToSparse(a: Matrix): SparseMatrix {
  const ri: number[] = [];
  const ci: number[] = [];
  const v: number[] = [];
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) {
      const x = a.data[i * a.cols + j]!;
      if (x !== 0) {
        ri.push(i);
        ci.push(j);
        v.push(x);
      }
    }
  }
  return sparseFromCoordinates(a.rows, a.cols, ri, ci, v);
}
