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
  // Counting sort by row (stable, O(nnz + rows)), then each row's entries by column with the entry
  // number as tie-break: the same order as a stable sort by (row, column), so duplicates are summed
  // in file order and the result is bit-identical to it, without a comparator sort over all entries
  // (about 1 s for 10⁶ entries).
  const start = new Int32Array(rows + 1);
  for (let k = 0; k < nnz; k++) {
    const r = ri[k];
    if (!(r >= 0 && r < rows && Number.isInteger(r)))
      throw new RangeError(`sparseFromCoordinates: row ${r} of entry ${k} outside 0…${rows - 1}`);
    start[r + 1]++;
  }
  for (let i = 0; i < rows; i++) start[i + 1] += start[i];
  const order = new Int32Array(nnz);
  const fill = start.slice(0, rows);
  for (let k = 0; k < nnz; k++) order[fill[ri[k]]++] = k;
  const byColumn = (a: number, b: number) => ci[a] - ci[b] || a - b;
  for (let i = 0; i < rows; i++) {
    const a = start[i];
    const b = start[i + 1];
    let sorted = true;
    for (let p = a + 1; p < b && sorted; p++) sorted = ci[order[p - 1]] <= ci[order[p]];
    if (!sorted) order.subarray(a, b).sort(byColumn);
  }
  const rowPtr = new Int32Array(rows + 1);
  const colIdx = new Int32Array(nnz);
  const values = new Float64Array(nnz);
  let out = 0;
  for (let i = 0; i < rows; i++) {
    let lastC = -1;
    for (let p = start[i]; p < start[i + 1]; p++) {
      const k = order[p];
      const c = ci[k];
      if (c === lastC) {
        values[out - 1] += v[k];
        continue;
      }
      colIdx[out] = c;
      values[out] = v[k];
      out++;
      lastC = c;
    }
    rowPtr[i + 1] = out;
  }
  return { rows, cols, rowPtr, colIdx: colIdx.slice(0, out), values: values.slice(0, out) };
}

export function sparseToDense(s: SparseMatrix): Matrix {
  const out = matrix(s.rows, s.cols);
  for (let i = 0; i < s.rows; i++) {
    for (let p = s.rowPtr[i]; p < s.rowPtr[i + 1]; p++) out.data[i * s.cols + s.colIdx[p]] += s.values[p];
  }
  return out;
}

export function denseToSparse(a: Matrix): SparseMatrix {
  const ri: number[] = [];
  const ci: number[] = [];
  const v: number[] = [];
  for (let i = 0; i < a.rows; i++) {
    for (let j = 0; j < a.cols; j++) {
      const x = a.data[i * a.cols + j];
      if (x !== 0) {
        ri.push(i);
        ci.push(j);
        v.push(x);
      }
    }
  }
  return sparseFromCoordinates(a.rows, a.cols, ri, ci, v);
}

/** C = S X for S sparse M × N and X dense N × k: each row of C sums rows of X (contiguous axpys). */
export function sparseTimesDense(s: SparseMatrix, x: Matrix): Matrix {
  if (x.rows !== s.cols)
    throw new RangeError(`sparseTimesDense: S is ${s.rows}×${s.cols}, X is ${x.rows}×${x.cols} (expected ${s.cols} rows)`);
  const k = x.cols;
  const out = matrix(s.rows, k);
  const c = out.data;
  const xd = x.data;
  const { rowPtr, colIdx, values } = s;
  for (let i = 0; i < s.rows; i++) {
    const oi = i * k;
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      const v = values[p];
      const ox = colIdx[p] * k;
      for (let j = 0; j < k; j++) c[oi + j] += v * xd[ox + j];
    }
  }
  return out;
}

/**
 * C = A Sᵀ for A dense r × N and S sparse M × N (e.g. B = Cm Gᵀ): C[i][m] = Σ_p A[i][col_p] v_p over
 * the entries of row m of S, so each row of A is gathered from while it sits in cache.
 */
export function denseTimesSparseTranspose(a: Matrix, s: SparseMatrix): Matrix {
  if (a.cols !== s.cols)
    throw new RangeError(`denseTimesSparseTranspose: A is ${a.rows}×${a.cols}, S is ${s.rows}×${s.cols} (expected ${a.cols} columns)`);
  const n = a.cols;
  const m = s.rows;
  const out = matrix(a.rows, m);
  const c = out.data;
  const ad = a.data;
  const { rowPtr, colIdx, values } = s;
  for (let i = 0; i < a.rows; i++) {
    const oa = i * n;
    const oc = i * m;
    for (let r = 0; r < m; r++) {
      let acc = 0;
      for (let p = rowPtr[r]; p < rowPtr[r + 1]; p++) acc += ad[oa + colIdx[p]] * values[p];
      c[oc + r] = acc;
    }
  }
  return out;
}
