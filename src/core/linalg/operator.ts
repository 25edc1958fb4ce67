/**
 * The forward operator G (M data × N cells), dense or sparse, and every product with it: G v, Gᵀ v,
 * G X, G C for a symmetric C, A Gᵀ, G Bᵀ, G C Gᵀ, G Gᵀ, rows, column sums. This is the one module that
 * looks at how G is stored; code that needs the storage itself (file writers, copies for transfer)
 * goes through {@link matchOperator}, so a new kind of operator is added here and wherever tsc's
 * exhaustiveness checks point.
 *
 * Each product keeps the loop order it had where it was written first, so results are unchanged bit for
 * bit: sparse products sum each row's stored entries in storage order, dense ones use the
 * register-blocked kernels of ./products.ts.
 */
import { assertNever } from '../errors.ts';
import { matrix, type Matrix } from './matrix.ts';
import { denseTimesSparseTranspose, sparseTimesDense, type SparseMatrix } from './sparse.ts';
import { mirrorLowerToUpper, multiply, multiplyNT, symmetricProductNT, symmetrise } from './products.ts';

export type Operator = { readonly kind: 'dense'; readonly matrix: Matrix } | { readonly kind: 'sparse'; readonly matrix: SparseMatrix };

export function operatorShape(g: Operator): { rows: number; cols: number } {
  return { rows: g.matrix.rows, cols: g.matrix.cols };
}

/** The storage of G by kind (file writers, copies for transfer): `cases[g.kind](g.matrix)`. */
export function matchOperator<T>(g: Operator, cases: { readonly dense: (a: Matrix) => T; readonly sparse: (s: SparseMatrix) => T }): T {
  switch (g.kind) {
    case 'dense':
      return cases.dense(g.matrix);
    case 'sparse':
      return cases.sparse(g.matrix);
    default:
      return assertNever(g);
  }
}

/** The stored numbers of G (shared, do not write): all M·N entries when dense, the stored non-zeros when sparse. */
export function operatorEntries(g: Operator): Float64Array {
  return matchOperator(g, { dense: (a) => a.data, sparse: (s) => s.values });
}

/** y = G x. */
export function applyOperator(g: Operator, x: ArrayLike<number>): Float64Array {
  const out = new Float64Array(g.matrix.rows);
  switch (g.kind) {
    case 'dense': {
      const { rows, cols, data } = g.matrix;
      for (let i = 0; i < rows; i++) {
        let s = 0;
        const o = i * cols;
        for (let j = 0; j < cols; j++) s += data[o + j] * x[j];
        out[i] = s;
      }
      return out;
    }
    case 'sparse': {
      const { rows, rowPtr, colIdx, values } = g.matrix;
      for (let i = 0; i < rows; i++) {
        let s = 0;
        for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) s += values[p] * x[colIdx[p]];
        out[i] = s;
      }
      return out;
    }
    default:
      return assertNever(g);
  }
}

/** y = Gᵀ x. */
export function applyOperatorTranspose(g: Operator, x: ArrayLike<number>): Float64Array {
  const out = new Float64Array(g.matrix.cols);
  switch (g.kind) {
    case 'dense': {
      const { rows, cols, data } = g.matrix;
      for (let i = 0; i < rows; i++) {
        const xi = x[i];
        const o = i * cols;
        for (let j = 0; j < cols; j++) out[j] += data[o + j] * xi;
      }
      return out;
    }
    case 'sparse': {
      const { rows, rowPtr, colIdx, values } = g.matrix;
      for (let i = 0; i < rows; i++) {
        const xi = x[i];
        for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) out[colIdx[p]] += values[p] * xi;
      }
      return out;
    }
    default:
      return assertNever(g);
  }
}

/** Row i of G written into `out` (length N), which is returned. */
export function operatorRowInto(g: Operator, i: number, out: Float64Array): Float64Array {
  switch (g.kind) {
    case 'dense':
      out.set(g.matrix.data.subarray(i * g.matrix.cols, (i + 1) * g.matrix.cols));
      return out;
    case 'sparse': {
      out.fill(0);
      const { rowPtr, colIdx, values } = g.matrix;
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) out[colIdx[p]] += values[p];
      return out;
    }
    default:
      return assertNever(g);
  }
}

/** Row i of G as a new dense vector of length N. */
export function operatorRow(g: Operator, i: number): Float64Array {
  return operatorRowInto(g, i, new Float64Array(g.matrix.cols));
}

/** out[offset + j] += c G_ij for every column j (dense) or every stored entry of row i (sparse). */
export function addOperatorRow(g: Operator, i: number, c: number, out: Float64Array, offset = 0): void {
  switch (g.kind) {
    case 'dense': {
      const { cols, data } = g.matrix;
      for (let j = 0; j < cols; j++) out[offset + j] += c * data[i * cols + j];
      return;
    }
    case 'sparse': {
      const { rowPtr, colIdx, values } = g.matrix;
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) out[offset + colIdx[p]] += c * values[p];
      return;
    }
    default:
      assertNever(g);
  }
}

/** Column sums of |G|, Σ_i |G_ij| (length N): how strongly the data see each cell. */
export function operatorColumnAbsSums(g: Operator): Float64Array {
  const out = new Float64Array(g.matrix.cols);
  switch (g.kind) {
    case 'dense': {
      const { rows, cols, data } = g.matrix;
      for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) out[j] += Math.abs(data[i * cols + j]);
      return out;
    }
    case 'sparse': {
      const { rowPtr, colIdx, values, rows } = g.matrix;
      for (let i = 0; i < rows; i++) for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) out[colIdx[p]] += Math.abs(values[p]);
      return out;
    }
    default:
      return assertNever(g);
  }
}

/**
 * For each row of G, the smallest and largest column holding a stored entry (last = −1 for a sparse
 * row with none). A dense row stores every column: 0 and N − 1.
 */
export function operatorRowExtents(g: Operator): { readonly first: Int32Array; readonly last: Int32Array } {
  const { rows, cols } = g.matrix;
  const first = new Int32Array(rows);
  const last = new Int32Array(rows);
  switch (g.kind) {
    case 'dense':
      last.fill(cols - 1);
      break;
    case 'sparse': {
      const { rowPtr, colIdx } = g.matrix;
      for (let i = 0; i < rows; i++) {
        let a = cols;
        let b = -1;
        for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
          const c = colIdx[p];
          if (c < a) a = c;
          if (c > b) b = c;
        }
        first[i] = b < 0 ? 0 : a;
        last[i] = b;
      }
      break;
    }
    default:
      assertNever(g);
  }
  return { first, last };
}

/** G as a dense M × N matrix (a copy). */
export function operatorToDense(g: Operator): Matrix {
  const { rows, cols } = g.matrix;
  const out = matrix(rows, cols);
  const row = new Float64Array(cols);
  for (let i = 0; i < rows; i++) out.data.set(operatorRowInto(g, i, row), i * cols);
  return out;
}

/** G as a dense M × N matrix: G's own storage when it is dense (do not write to it), else a copy. */
export function operatorAsDense(g: Operator): Matrix {
  return g.kind === 'dense' ? g.matrix : operatorToDense(g);
}

/** G X for X dense N × k (M × k result). */
export function operatorTimesDense(g: Operator, x: Matrix): Matrix {
  switch (g.kind) {
    case 'dense':
      return multiply(g.matrix, x);
    case 'sparse':
      return sparseTimesDense(g.matrix, x);
    default:
      return assertNever(g);
  }
}

/**
 * G C (M × N) for a symmetric N × N matrix C, e.g. Bᵀ = G Cm. Dense G: G Cᵀ by the NT kernel, which
 * reads both operands along rows and needs no transpose of C; sparse G: row k is Σ_j G_kj (row j of C).
 */
export function operatorTimesSymmetric(g: Operator, c: Matrix): Matrix {
  switch (g.kind) {
    case 'dense':
      return multiplyNT(g.matrix, c);
    case 'sparse':
      return sparseTimesDense(g.matrix, c);
    default:
      return assertNever(g);
  }
}

/** A Gᵀ for A dense r × N (r × M result), e.g. B = Cm Gᵀ. */
export function denseTimesOperatorTranspose(a: Matrix, g: Operator): Matrix {
  switch (g.kind) {
    case 'dense':
      return multiplyNT(a, g.matrix);
    case 'sparse':
      return denseTimesSparseTranspose(a, g.matrix);
    default:
      return assertNever(g);
  }
}

/** G Bᵀ (M × k) for B dense k × N: entry (a, q) = g_a · b_q. */
export function operatorTimesTransposed(g: Operator, b: Matrix): Matrix {
  const { rows: m, cols: n } = g.matrix;
  if (b.cols !== n) throw new RangeError(`operatorTimesTransposed: G is ${m}×${n}, B is ${b.rows}×${b.cols} (expected ${n} columns)`);
  switch (g.kind) {
    case 'dense':
      return multiplyNT(g.matrix, b);
    case 'sparse': {
      const k = b.rows;
      const out = matrix(m, k);
      const od = out.data;
      const bd = b.data;
      const { rowPtr, colIdx, values } = g.matrix;
      for (let a = 0; a < m; a++) {
        const p0 = rowPtr[a];
        const p1 = rowPtr[a + 1];
        for (let q = 0; q < k; q++) {
          const o = q * n;
          let sum = 0;
          for (let p = p0; p < p1; p++) sum += values[p] * bd[o + colIdx[p]];
          od[a * k + q] = sum;
        }
      }
      return out;
    }
    default:
      return assertNever(g);
  }
}

/**
 * K = G Bᵀ (M × M) when the caller knows K is symmetric, as for B = G Cm with Cm symmetric
 * (K = G Cm Gᵀ): the lower triangle is computed and mirrored onto the upper one. Dense G: the
 * register-blocked NT kernel. Sparse G: {@link sparseGramLowerInto} over every column. With `bRows`, row c of B is B's row bRows[c] (B may have more rows: the
 * rule of src/core/tuning/startPrior.ts takes a subset of the rows of a whole problem's Bᵀ without a copy).
 */
export function operatorTimesTransposedSymmetric(g: Operator, b: Matrix, bRows?: ArrayLike<number>): Matrix {
  const { rows: m, cols: n } = g.matrix;
  if (bRows !== undefined) {
    if (bRows.length !== m || b.cols !== n) {
      throw new RangeError(`operatorTimesTransposedSymmetric: G is ${m}×${n}, B is ${b.rows}×${b.cols} with ${bRows.length} rows chosen`);
    }
    for (let c = 0; c < m; c++)
      if (!(bRows[c] >= 0 && bRows[c] < b.rows && Number.isInteger(bRows[c])))
        throw new RangeError(`operatorTimesTransposedSymmetric: row ${bRows[c]} of a B with ${b.rows} rows`);
  } else if (b.rows !== m || b.cols !== n) {
    throw new RangeError(`operatorTimesTransposedSymmetric: G is ${m}×${n}, B is ${b.rows}×${b.cols} (expected equal shapes)`);
  }
  switch (g.kind) {
    case 'dense': {
      if (bRows === undefined) return symmetricProductNT(g.matrix, b);
      const sub = matrix(m, n);
      for (let c = 0; c < m; c++) sub.data.set(b.data.subarray(bRows[c] * n, (bRows[c] + 1) * n), c * n);
      return symmetricProductNT(g.matrix, sub);
    }
    case 'sparse': {
      const K = matrix(m, m);
      const cols = new Int32Array(m);
      for (let c = 0; c < m; c++) cols[c] = c;
      sparseGramLowerInto(g.matrix, b.data, bRows === undefined ? null : bRows, cols, K.data);
      return mirrorLowerToUpper(K);
    }
    default:
      return assertNever(g);
  }
}

/**
 * The entries K[a, c] = Σ_p g_ap B[c, p] (a ≥ c) of the lower triangle of K = G Bᵀ, for the columns c in `cols`
 * (ascending), into `kd` (M × M, row-major); G sparse, B row-major with N columns in `bd`, row c at
 * (bRows?.[c] ?? c)·N. Eight columns per sweep of G's rows a ≥ the group's first column, so each stored index
 * and value is loaded once for eight sums (10 ms instead of 14 with four, at 20³ with M = 500; 100 ms instead
 * of 120 at 32³ with M = 1,000), then the last cols.length mod 8 one at a time. Each entry is the same sum over p
 * ascending from 0 whatever the other columns of its group, so any split of the columns (the threads of
 * src/core/parallel/products.ts each take their own rows of Bᵀ) fills the same bits as all columns at once.
 */
export function sparseGramLowerInto(
  g: SparseMatrix,
  bd: Float64Array,
  bRows: ArrayLike<number> | null,
  cols: ArrayLike<number>,
  kd: Float64Array,
): void {
  const { rows: m, cols: n, rowPtr, colIdx, values } = g;
  const at = (c: number) => (bRows === null ? c : bRows[c]) * n;
  let i = 0;
  for (; i + 8 <= cols.length; i += 8) {
    const c0 = cols[i];
    const c1 = cols[i + 1];
    const c2 = cols[i + 2];
    const c3 = cols[i + 3];
    const c4 = cols[i + 4];
    const c5 = cols[i + 5];
    const c6 = cols[i + 6];
    const c7 = cols[i + 7];
    const o0 = at(c0);
    const o1 = at(c1);
    const o2 = at(c2);
    const o3 = at(c3);
    const o4 = at(c4);
    const o5 = at(c5);
    const o6 = at(c6);
    const o7 = at(c7);
    for (let a = c0; a < m; a++) {
      let s0 = 0,
        s1 = 0,
        s2 = 0,
        s3 = 0,
        s4 = 0,
        s5 = 0,
        s6 = 0,
        s7 = 0;
      for (let p = rowPtr[a], p1 = rowPtr[a + 1]; p < p1; p++) {
        const v = values[p];
        const j = colIdx[p];
        s0 += v * bd[o0 + j];
        s1 += v * bd[o1 + j];
        s2 += v * bd[o2 + j];
        s3 += v * bd[o3 + j];
        s4 += v * bd[o4 + j];
        s5 += v * bd[o5 + j];
        s6 += v * bd[o6 + j];
        s7 += v * bd[o7 + j];
      }
      const ka = a * m;
      kd[ka + c0] = s0;
      if (a >= c1) kd[ka + c1] = s1;
      if (a >= c2) kd[ka + c2] = s2;
      if (a >= c3) kd[ka + c3] = s3;
      if (a >= c4) kd[ka + c4] = s4;
      if (a >= c5) kd[ka + c5] = s5;
      if (a >= c6) kd[ka + c6] = s6;
      if (a >= c7) kd[ka + c7] = s7;
    }
  }
  for (; i < cols.length; i++) {
    const c = cols[i];
    const o = at(c);
    for (let a = c; a < m; a++) {
      let sum = 0;
      for (let p = rowPtr[a], p1 = rowPtr[a + 1]; p < p1; p++) sum += values[p] * bd[o + colIdx[p]];
      kd[a * m + c] = sum;
    }
  }
}

/**
 * P = G C Gᵀ (M × M) for a symmetric N × N matrix C. Dense G: the blocked NT kernels, G C = G Cᵀ, then
 * P = (G C) Gᵀ with the lower half mirrored. Sparse G: G C by sparse row sums, then row i of P is
 * G (G C)_i·ᵀ (C symmetric), symmetrised by averaging so that round-off does not leave P
 * unsymmetric; nnz(G)·N + M·nnz(G) flops.
 */
export function projectCovariance(g: Operator, c: Matrix): Matrix {
  const n = g.matrix.cols;
  if (c.rows !== n || c.cols !== n) throw new RangeError(`projectCovariance: G has ${n} columns, C is ${c.rows}×${c.cols}`);
  if (g.kind === 'dense') return symmetricProductNT(multiplyNT(g.matrix, c), g.matrix);
  const gc = sparseTimesDense(g.matrix, c);
  const m = gc.rows;
  const p = matrix(m, m);
  for (let i = 0; i < m; i++) p.data.set(applyOperator(g, gc.data.subarray(i * n, (i + 1) * n)), i * m);
  symmetrise(p);
  return p;
}

/**
 * G Gᵀ (M × M), the projection of the identity covariance (the nugget's shape in data space). A sparse
 * G is never densified: each row is scattered into a length-N scratch row, then dotted with the stored
 * entries of every earlier row (M·nnz(G) flops, N doubles of memory); with columns sorted and unique in
 * each row (as ./sparse.ts builds them) the sums are those of the dense loop.
 */
export function operatorGram(g: Operator): Matrix {
  const { rows: m, cols: n } = g.matrix;
  const out = matrix(m, m);
  const od = out.data;
  switch (g.kind) {
    case 'dense': {
      const gd = g.matrix.data;
      for (let i = 0; i < m; i++) {
        for (let k = 0; k <= i; k++) {
          let s = 0;
          for (let j = 0; j < n; j++) s += gd[i * n + j] * gd[k * n + j];
          od[i * m + k] = s;
          od[k * m + i] = s;
        }
      }
      return out;
    }
    case 'sparse': {
      const { rowPtr, colIdx, values } = g.matrix;
      const row = new Float64Array(n);
      for (let i = 0; i < m; i++) {
        for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) row[colIdx[p]] += values[p];
        for (let k = 0; k <= i; k++) {
          let s = 0;
          for (let p = rowPtr[k]; p < rowPtr[k + 1]; p++) s += values[p] * row[colIdx[p]];
          od[i * m + k] = s;
          od[k * m + i] = s;
        }
        for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) row[colIdx[p]] = 0;
      }
      return out;
    }
    default:
      return assertNever(g);
  }
}

/** G restricted to the given rows, in their order (a new operator of rows.length × N, the same kind as G). */
export function operatorRowSubset(g: Operator, rows: readonly number[]): Operator {
  const cols = g.matrix.cols;
  if (g.kind === 'dense') {
    const data = new Float64Array(rows.length * cols);
    rows.forEach((i, k) => data.set(g.matrix.data.subarray(i * cols, (i + 1) * cols), k * cols));
    return { kind: 'dense', matrix: { rows: rows.length, cols, data } };
  }
  const { rowPtr, colIdx, values } = g.matrix;
  const ptr = new Int32Array(rows.length + 1);
  rows.forEach((i, k) => {
    ptr[k + 1] = ptr[k] + rowPtr[i + 1] - rowPtr[i];
  });
  const ci = new Int32Array(ptr[rows.length]);
  const v = new Float64Array(ptr[rows.length]);
  rows.forEach((i, k) => {
    ci.set(colIdx.subarray(rowPtr[i], rowPtr[i + 1]), ptr[k]);
    v.set(values.subarray(rowPtr[i], rowPtr[i + 1]), ptr[k]);
  });
  return { kind: 'sparse', matrix: { rows: rows.length, cols, rowPtr: ptr, colIdx: ci, values: v } };
}
