/**
 * Cholesky factorisation A = L Lᵀ of a symmetric matrix, and solves with the factor.
 * Failure of the factorisation is the positive-definiteness test (Higham 2002, Thm 10.7).
 *
 * CONTRACT (other modules rely on it): `cholesky` reads only the lower triangle of `a`, never
 * modifies `a` unless `inPlace`, and returns L with a zeroed strict upper triangle.
 */
import { matrix, type Matrix } from './matrix.ts';
import { transposeBlock, trsmRowsLowerT } from './kernels.ts';
import { gemmNTAuto as gemmNT } from '../wasm/gemmNT.ts'; // kernels.ts gemmNT's contract and bits, WebAssembly SIMD when sizable

export type CholeskyResult =
  | { readonly ok: true; readonly factor: Matrix }
  | { readonly ok: false; readonly pivot: number; readonly value: number };

export interface CholeskyOptions {
  /** Overwrite `a` with the factor (saves one N² buffer). */
  readonly inPlace?: boolean;
  /** Added to every diagonal element before factoring (with `inPlace`, into `a` itself). */
  readonly jitter?: number;
}

/** Block size of the blocked factorisation (columns per panel); chosen by measurement (test/bench). */
export const CHOLESKY_BLOCK = 64;

/** Columns per chunk of the panel solve (the rest of the panel work goes through the NT kernel). */
const PANEL_CHUNK = 16;

/**
 * Lower Cholesky factor of `a`, or the zero-based pivot where a non-positive (or NaN) pivot
 * `value` appeared (the Schur complement's diagonal entry, jitter included).
 *
 * Blocked left-looking order (Golub & Van Loan, 4th ed., §4.2, block Cholesky; memory): for each panel of
 * CHOLESKY_BLOCK columns J, (1) A[J:, J] −= L[J:, :J] L[J, :J]ᵀ with the register-blocked NT kernel
 * (./kernels.ts), (2) factor the diagonal block unblocked, (3) solve the panel below it against the
 * diagonal block's factor, four rows at a time. Reads only the lower triangle; the strict upper
 * triangle of the result is zero.
 */
export function cholesky(a: Matrix, options: CholeskyOptions = {}): CholeskyResult {
  const n = a.rows;
  if (a.cols !== n) throw new RangeError(`cholesky: matrix is ${a.rows}×${a.cols}, expected square`);
  const L = options.inPlace ? a : matrix(n, n, a.data.slice());
  const d = L.data;
  const jitter = options.jitter ?? 0;
  if (jitter !== 0) for (let i = 0; i < n; i++) d[i * n + i] += jitter;
  const nb = CHOLESKY_BLOCK;
  for (let j0 = 0; j0 < n; j0 += nb) {
    const jb = Math.min(nb, n - j0);
    const diagOff = j0 * n + j0;
    // (1) Left-looking update of block column J from all finished columns.
    if (j0 > 0) gemmNT(n - j0, jb, j0, -1, d, j0 * n, n, d, j0 * n, n, d, diagOff, n, true, 0);
    // (2) Diagonal block: unblocked, row-oriented.
    for (let i = 0; i < jb; i++) {
      const oi = diagOff + i * n;
      for (let j = 0; j <= i; j++) {
        const oj = diagOff + j * n;
        let s = d[oi + j];
        for (let p = 0; p < j; p++) s -= d[oi + p] * d[oj + p];
        if (i === j) {
          if (!(s > 0)) {
            zeroStrictUpper(d, n);
            return { ok: false, pivot: j0 + i, value: s };
          }
          d[oi + i] = Math.sqrt(s);
        } else {
          d[oi + j] = s / d[oj + j];
        }
      }
    }
    // (3) Panel rows i ≥ j0 + jb: solve X L_JJᵀ = A_IJ in column chunks of PANEL_CHUNK: the chunk's
    // columns first lose the earlier chunks' contribution (NT kernel), then a small triangle
    // solve, four rows sharing each row of L_JJ.
    const r0 = j0 + jb;
    for (let c0 = 0; c0 < jb; c0 += PANEL_CHUNK) {
      const c1 = Math.min(jb, c0 + PANEL_CHUNK);
      if (c0 > 0 && r0 < n) gemmNT(n - r0, c1 - c0, c0, -1, d, r0 * n + j0, n, d, (j0 + c0) * n + j0, n, d, r0 * n + j0 + c0, n);
      if (r0 < n) trsmRowsLowerT(d, r0 * n + j0, n, n - r0, d, diagOff, n, c0, c1);
    }
  }
  zeroStrictUpper(d, n);
  return { ok: true, factor: L };
}

function zeroStrictUpper(d: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) d.fill(0, i * n + i + 1, (i + 1) * n);
}

/**
 * Reference (unblocked, row-oriented) Cholesky with the same contract as {@link cholesky}: the
 * oracle for the blocked version's unit tests and the baseline of the benchmark.
 */
export function choleskyUnblocked(a: Matrix, options: CholeskyOptions = {}): CholeskyResult {
  const n = a.rows;
  if (a.cols !== n) throw new RangeError(`cholesky: matrix is ${a.rows}×${a.cols}, expected square`);
  const L = options.inPlace ? a : matrix(n, n, a.data.slice());
  const d = L.data;
  const jitter = options.jitter ?? 0;
  for (let i = 0; i < n; i++) {
    const oi = i * n;
    for (let j = 0; j <= i; j++) {
      const oj = j * n;
      let s = d[oi + j] + (i === j ? jitter : 0);
      for (let k = 0; k < j; k++) s -= d[oi + k] * d[oj + k];
      if (i === j) {
        if (!(s > 0)) {
          zeroStrictUpper(d, n);
          return { ok: false, pivot: i, value: s };
        }
        d[oi + i] = Math.sqrt(s);
      } else {
        d[oi + j] = s / d[oj + j];
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
    let s = x[i];
    const oi = i * n;
    for (let k = 0; k < i; k++) s -= d[oi + k] * x[k];
    x[i] = s / d[oi + i];
  }
  return x;
}

/** Solve Lᵀ x = b (back substitution with the lower factor). Returns a new vector. */
export function solveLowerTranspose(L: Matrix, b: ArrayLike<number>): Float64Array {
  const n = L.rows;
  const x = Float64Array.from(b);
  const d = L.data;
  for (let i = n - 1; i >= 0; i--) {
    const xi = x[i] / d[i * n + i];
    x[i] = xi;
    for (let k = 0; k < i; k++) x[k] -= d[i * n + k] * xi;
  }
  return x;
}

/** Solve A x = b given the lower Cholesky factor L of A. */
export function choleskySolve(L: Matrix, b: ArrayLike<number>): Float64Array {
  return solveLowerTranspose(L, solveLower(L, b));
}

/** Rows per block of the blocked triangular solves. */
const SOLVE_BLOCK = 32;

function checkFactor(L: Matrix, who: string): number {
  if (L.rows !== L.cols) throw new RangeError(`${who}: factor is ${L.rows}×${L.cols}, expected square`);
  return L.rows;
}

/**
 * Forward substitution on every row of X (k × n, overwritten): row r becomes L⁻¹ x_r.
 * Blocked by SOLVE_BLOCK columns: X[:, I] −= X[:, :I] L[I, :I]ᵀ (NT kernel), then the small
 * triangle of block I, four right-hand sides at a time (Golub & Van Loan §3.1, memory).
 */
export function solveLowerRowsInPlace(L: Matrix, X: Matrix): Matrix {
  const n = checkFactor(L, 'solveLowerRowsInPlace');
  if (X.cols !== n)
    throw new RangeError(`solveLowerRowsInPlace: L is ${n}×${n}, right-hand sides are ${X.rows}×${X.cols} (expected ${n} columns)`);
  const k = X.rows;
  const l = L.data;
  const x = X.data;
  for (let i0 = 0; i0 < n; i0 += SOLVE_BLOCK) {
    const ib = Math.min(SOLVE_BLOCK, n - i0);
    if (i0 > 0) gemmNT(k, ib, i0, -1, x, 0, n, l, i0 * n, n, x, i0, n);
    trsmRowsLowerT(x, 0, n, k, l, 0, n, i0, i0 + ib);
  }
  return X;
}

/**
 * Back substitution with Lᵀ on every row of X (k × n, overwritten): row r becomes L⁻ᵀ x_r.
 * Blocks run from the bottom: X[:, I] −= X[:, I⁺] (L[I⁺, I]) with I⁺ the rows below I; the column
 * block of L is packed transposed so the NT kernel reads it along rows.
 */
export function solveLowerTransposeRowsInPlace(L: Matrix, X: Matrix): Matrix {
  const n = checkFactor(L, 'solveLowerTransposeRowsInPlace');
  if (X.cols !== n)
    throw new RangeError(
      `solveLowerTransposeRowsInPlace: L is ${n}×${n}, right-hand sides are ${X.rows}×${X.cols} (expected ${n} columns)`,
    );
  const k = X.rows;
  const l = L.data;
  const x = X.data;
  const pack = new Float64Array(SOLVE_BLOCK * n);
  const lastStart = Math.floor((n - 1) / SOLVE_BLOCK) * SOLVE_BLOCK;
  for (let i0 = lastStart; i0 >= 0; i0 -= SOLVE_BLOCK) {
    const ib = Math.min(SOLVE_BLOCK, n - i0);
    const i1 = i0 + ib;
    // pack[i][p] = L[i0 + p][i0 + i] for p < n − i0 (diagonal block and everything below it).
    const w = n - i0;
    transposeBlock(w, ib, l, i0 * n + i0, n, pack, 0, w);
    if (i1 < n) gemmNT(k, ib, n - i1, -1, x, i1, n, pack, ib, w, x, i0, n);
    let r = 0;
    for (; r + 4 <= k; r += 4) {
      const o0 = r * n;
      const o1 = o0 + n;
      const o2 = o1 + n;
      const o3 = o2 + n;
      for (let i = i1 - 1; i >= i0; i--) {
        const pi = (i - i0) * w - i0;
        let s0 = x[o0 + i],
          s1 = x[o1 + i],
          s2 = x[o2 + i],
          s3 = x[o3 + i];
        for (let p = i + 1; p < i1; p++) {
          const lp = pack[pi + p];
          s0 -= x[o0 + p] * lp;
          s1 -= x[o1 + p] * lp;
          s2 -= x[o2 + p] * lp;
          s3 -= x[o3 + p] * lp;
        }
        const inv = 1 / pack[pi + i];
        x[o0 + i] = s0 * inv;
        x[o1 + i] = s1 * inv;
        x[o2 + i] = s2 * inv;
        x[o3 + i] = s3 * inv;
      }
    }
    for (; r < k; r++) {
      const o = r * n;
      for (let i = i1 - 1; i >= i0; i--) {
        const pi = (i - i0) * w - i0;
        let s = x[o + i];
        for (let p = i + 1; p < i1; p++) s -= x[o + p] * pack[pi + p];
        x[o + i] = s / pack[pi + i];
      }
    }
  }
  return X;
}

/** Row r of the result is L⁻¹ b_r for each row b_r of B (k × n). Returns a new k × n matrix. */
export function solveLowerRows(L: Matrix, B: Matrix): Matrix {
  return solveLowerRowsInPlace(L, matrix(B.rows, B.cols, B.data.slice()));
}

/**
 * Solve L X = B for X where B is n × k (row-major), i.e. forward substitution on k right-hand
 * sides at once. Returns a new n × k matrix. (Works on Bᵀ internally so the kernel reads rows.)
 */
export function solveLowerMatrix(L: Matrix, B: Matrix): Matrix {
  const n = L.rows;
  const k = B.cols;
  if (B.rows !== n) throw new RangeError(`solveLowerMatrix: L is ${n}×${n}, B is ${B.rows}×${k}`);
  const bt = matrix(k, n);
  transposeBlock(n, k, B.data, 0, k, bt.data, 0, n);
  solveLowerRowsInPlace(L, bt);
  const X = matrix(n, k);
  transposeBlock(k, n, bt.data, 0, n, X.data, 0, k);
  return X;
}

/**
 * Solve L X = Bᵀ where B is given k × n row-major (e.g. W = L⁻¹ (Cm Gᵀ)ᵀ with B = Cm Gᵀ).
 * Returns X, n × k. When Xᵀ is as useful, {@link solveLowerRows} saves the final transpose.
 */
export function solveLowerMatrixTransposed(L: Matrix, B: Matrix): Matrix {
  const n = L.rows;
  if (B.cols !== n) throw new RangeError(`solveLowerMatrixTransposed: L is ${n}×${n}, B is ${B.rows}×${B.cols} (expected ${n} columns)`);
  const xt = solveLowerRows(L, B);
  const X = matrix(n, B.rows);
  transposeBlock(B.rows, n, xt.data, 0, n, X.data, 0, B.rows);
  return X;
}

/** Solve Lᵀ X = B for B n × k. Returns a new n × k matrix. */
export function solveLowerTransposeMatrix(L: Matrix, B: Matrix): Matrix {
  const n = L.rows;
  const k = B.cols;
  if (B.rows !== n) throw new RangeError(`solveLowerTransposeMatrix: L is ${n}×${n}, B is ${B.rows}×${k}`);
  const bt = matrix(k, n);
  transposeBlock(n, k, B.data, 0, k, bt.data, 0, n);
  solveLowerTransposeRowsInPlace(L, bt);
  const X = matrix(n, k);
  transposeBlock(k, n, bt.data, 0, n, X.data, 0, k);
  return X;
}

/** Solve A X = B (B n × k) given the lower Cholesky factor L of A. Returns a new n × k matrix. */
export function choleskySolveMatrix(L: Matrix, B: Matrix): Matrix {
  const n = L.rows;
  const k = B.cols;
  if (B.rows !== n) throw new RangeError(`choleskySolveMatrix: L is ${n}×${n}, B is ${B.rows}×${k}`);
  const bt = matrix(k, n);
  transposeBlock(n, k, B.data, 0, k, bt.data, 0, n);
  solveLowerRowsInPlace(L, bt);
  solveLowerTransposeRowsInPlace(L, bt);
  const X = matrix(n, k);
  transposeBlock(k, n, bt.data, 0, n, X.data, 0, k);
  return X;
}

/** log det A = 2 Σ log L_ii. */
export function logDetFromCholesky(L: Matrix): number {
  let s = 0;
  for (let i = 0; i < L.rows; i++) s += Math.log(L.data[i * L.rows + i]);
  return 2 * s;
}
