/**
 * Cholesky factorisation A = L Lᵀ of a symmetric matrix, and solves with the factor.
 * Failure of the factorisation is the positive-definiteness test (Higham 2002, Thm 10.7).
 *
 * CONTRACT (other modules rely on it): `cholesky` reads only the lower triangle of `a`, never
 * modifies `a` unless `inPlace`, and returns L with a zeroed strict upper triangle.
 */
import { matrix, type Matrix } from './matrix.ts';

export type CholeskyResult =
  | { readonly ok: true; readonly factor: Matrix }
  | { readonly ok: false; readonly pivot: number; readonly value: number };

export interface CholeskyOptions {
  /** Overwrite `a` with the factor (saves one N² buffer). */
  readonly inPlace?: boolean;
  /** Added to every diagonal element before factoring. */
  readonly jitter?: number;
}

/**
 * Lower Cholesky factor of `a`, or the zero-based pivot where a non-positive (or NaN) pivot
 * `value` appeared. Reference (unblocked, row-oriented) version; see the blocked kernel below.
 */
export function cholesky(a: Matrix, options: CholeskyOptions = {}): CholeskyResult {
  const n = a.rows;
  if (a.cols !== n) throw new RangeError(`cholesky: matrix is ${a.rows}×${a.cols}, expected square`);
  const L = options.inPlace ? a : matrix(n, n, a.data.slice());
  const d = L.data;
  const jitter = options.jitter ?? 0;
  for (let i = 0; i < n; i++) {
    const oi = i * n;
    for (let j = 0; j <= i; j++) {
      const oj = j * n;
      let s = d[oi + j]! + (i === j ? jitter : 0);
      for (let k = 0; k < j; k++) s -= d[oi + k]! * d[oj + k]!;
      if (i === j) {
        if (!(s > 0)) return { ok: false, pivot: i, value: s };
        d[oi + i] = Math.sqrt(s);
      } else {
        d[oi + j] = s / d[oj + j]!;
      }
    }
    for (let j = i + 1; j < n; j++) d[oi + j] = 0;
  }
  return { ok: true, factor: L };
}

/** Solve L x = b (forward substitution). Returns a new vector. */
export function solveLower(L: Matrix, b: ArrayLike<number>): Float64Array {
  const n = L.rows;
  const x = Float64Array.from(b);
  const d = L.data;
  for (let i = 0; i < n; i++) {
    let s = x[i]!;
    const oi = i * n;
    for (let k = 0; k < i; k++) s -= d[oi + k]! * x[k]!;
    x[i] = s / d[oi + i]!;
  }
  return x;
}

/** Solve Lᵀ x = b (back substitution with the lower factor). Returns a new vector. */
export function solveLowerTranspose(L: Matrix, b: ArrayLike<number>): Float64Array {
  const n = L.rows;
  const x = Float64Array.from(b);
  const d = L.data;
  for (let i = n - 1; i >= 0; i--) {
    const xi = x[i]! / d[i * n + i]!;
    x[i] = xi;
    for (let k = 0; k < i; k++) x[k] -= d[i * n + k]! * xi;
  }
  return x;
}

/** Solve A x = b given the lower Cholesky factor L of A. */
export function choleskySolve(L: Matrix, b: ArrayLike<number>): Float64Array {
  return solveLowerTranspose(L, solveLower(L, b));
}

/**
 * Solve L X = B for X where B is n × k (row-major), i.e. forward substitution on k right-hand
 * sides at once. Returns a new n × k matrix.
 */
export function solveLowerMatrix(L: Matrix, B: Matrix): Matrix {
  const n = L.rows;
  const k = B.cols;
  if (B.rows !== n) throw new RangeError(`solveLowerMatrix: L is ${n}×${n}, B is ${B.rows}×${k}`);
  const X = matrix(n, k, B.data.slice());
  const x = X.data;
  const d = L.data;
  for (let i = 0; i < n; i++) {
    const oi = i * k;
    for (let p = 0; p < i; p++) {
      const lip = d[i * n + p]!;
      if (lip === 0) continue;
      const op = p * k;
      for (let j = 0; j < k; j++) x[oi + j] -= lip * x[op + j]!;
    }
    const inv = 1 / d[i * n + i]!;
    for (let j = 0; j < k; j++) x[oi + j] *= inv;
  }
  return X;
}

/** log det A = 2 Σ log L_ii. */
export function logDetFromCholesky(L: Matrix): number {
  let s = 0;
  for (let i = 0; i < L.rows; i++) s += Math.log(L.data[i * L.rows + i]!);
  return 2 * s;
}
