/**
 * Fast dense products for the posterior formulas (Tarantola 2005, §3.2, eq. numbers memory):
 * B = Cm Gᵀ, S = G B + Cd (symmetric), W = L⁻¹ Bᵀ and the posterior variances Cm_ii − Σ_k W_ki².
 * All run on the register-blocked NT kernel of ./kernels.ts (C += A Bᵀ with both operands read
 * along rows); plain products transpose their right operand once first (O(kn) against O(mkn)). The mean's
 * base + Bᵀᵀ w ({@link plusRowCombination}) is a plain loop, four rows per pass.
 */
import { matrix, type Matrix } from './matrix.ts';
import { transposeBlock } from './kernels.ts';
import { gemmNTAuto as gemmNT } from '../wasm/gemmNT.ts'; // kernels.ts gemmNT's contract and bits, WebAssembly SIMD when sizable

/** C = A Bᵀ for A m × k and B n × k (row-major). */
export function multiplyNT(a: Matrix, b: Matrix): Matrix {
  if (a.cols !== b.cols)
    throw new RangeError(`multiplyNT: A is ${a.rows}×${a.cols}, B is ${b.rows}×${b.cols} (expected ${a.cols} columns)`);
  const c = matrix(a.rows, b.rows);
  gemmNT(a.rows, b.rows, a.cols, 1, a.data, 0, a.cols, b.data, 0, b.cols, c.data, 0, b.rows);
  return c;
}

/** C = A B for A m × k and B k × n (row-major). */
export function multiply(a: Matrix, b: Matrix): Matrix {
  if (a.cols !== b.rows) throw new RangeError(`multiply: A is ${a.rows}×${a.cols}, B is ${b.rows}×${b.cols} (expected ${a.cols} rows)`);
  return multiplyNT(a, transposeOf(b));
}

/**
 * K = A Bᵀ when the caller knows K is symmetric (e.g. W Wᵀ, or G Cm Gᵀ with A = G and
 * B = (Cm Gᵀ)ᵀ = G Cm): only the lower triangle is computed (half the work), then mirrored into the upper one.
 */
export function symmetricProductNT(a: Matrix, b: Matrix): Matrix {
  if (a.cols !== b.cols || a.rows !== b.rows) {
    throw new RangeError(`symmetricProductNT: A is ${a.rows}×${a.cols}, B is ${b.rows}×${b.cols} (expected equal shapes)`);
  }
  const m = a.rows;
  const c = matrix(m, m);
  gemmNT(m, m, a.cols, 1, a.data, 0, a.cols, b.data, 0, b.cols, c.data, 0, m, true, 0);
  mirrorLowerToUpper(c);
  return c;
}

/**
 * K = G B for G m × n and B n × m when K is known to be symmetric, as in G (Cm Gᵀ) with B = Cm Gᵀ:
 * lower triangle computed, upper mirrored.
 */
export function symmetricProduct(g: Matrix, b: Matrix): Matrix {
  if (g.cols !== b.rows || b.cols !== g.rows) {
    throw new RangeError(`symmetricProduct: G is ${g.rows}×${g.cols}, B is ${b.rows}×${b.cols} (expected ${g.cols}×${g.rows})`);
  }
  return symmetricProductNT(g, transposeOf(b));
}

/** out[j] = Σ_i W[i][j]² (sum of squares down each column). */
export function columnSumsOfSquares(w: Matrix, out = new Float64Array(w.cols)): Float64Array {
  const { rows, cols, data } = w;
  out.fill(0);
  for (let i = 0; i < rows; i++) {
    const o = i * cols;
    for (let j = 0; j < cols; j++) {
      const v = data[o + j];
      out[j] += v * v;
    }
  }
  return out;
}

/** out[i] = Σ_j W[i][j]² (sum of squares along each row). */
export function rowSumsOfSquares(w: Matrix, out = new Float64Array(w.rows)): Float64Array {
  const { rows, cols, data } = w;
  for (let i = 0; i < rows; i++) {
    const o = i * cols;
    let s = 0;
    for (let j = 0; j < cols; j++) s += data[o + j] * data[o + j];
    out[i] = s;
  }
  return out;
}

/** Aᵀ as a new matrix (cache-blocked). */
export function transposeOf(a: Matrix): Matrix {
  const t = matrix(a.cols, a.rows);
  transposeBlock(a.rows, a.cols, a.data, 0, a.cols, t.data, 0, a.rows);
  return t;
}

/** A ← (A + Aᵀ)/2 in place (square A). */
export function symmetrise(a: Matrix): void {
  const n = a.rows;
  const d = a.data;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      const v = 0.5 * (d[i * n + j] + d[j * n + i]);
      d[i * n + j] = v;
      d[j * n + i] = v;
    }
  }
}

/** Copy the strict lower triangle of a square matrix onto its upper triangle (in place). */
export function mirrorLowerToUpper(a: Matrix): Matrix {
  const n = a.rows;
  if (a.cols !== n) throw new RangeError(`mirrorLowerToUpper: matrix is ${a.rows}×${a.cols}, expected square`);
  const d = a.data;
  const T = 32;
  for (let i0 = 0; i0 < n; i0 += T) {
    for (let j0 = 0; j0 <= i0; j0 += T) {
      const i1 = Math.min(n, i0 + T);
      for (let i = i0; i < i1; i++) {
        const j1 = Math.min(i, j0 + T);
        for (let j = j0; j < j1; j++) d[j * n + i] = d[i * n + j];
      }
    }
  }
  return a;
}

/**
 * base + Σ_k w_k · row k of `rows` (M × N, row-major), i.e. base + Bᵀᵀ w for Bᵀ = rows: the posterior mean
 * m0 + Bᵀᵀ α of both routes and the dense route's draws. The rows are first scaled in place by `scale` when it is
 * not 1 (the FFT route's Bᵀ of the covariance shape becomes the prior's), four at a time just before they are read.
 * Four rows per pass over the result, each entry's four terms summed left to right before they join it: 2.7 ms
 * instead of 7.2 ms a row at a time at M = 500, N = 8,000 (Node 20, one thread), where the result's store and load
 * per term dominated.
 */
export function plusRowCombination(base: ArrayLike<number>, rows: Float64Array, w: ArrayLike<number>, n: number, scale = 1): Float64Array {
  const m = w.length;
  const out = Float64Array.from(base);
  let k = 0;
  for (; k + 4 <= m; k += 4) {
    const a0 = w[k];
    const a1 = w[k + 1];
    const a2 = w[k + 2];
    const a3 = w[k + 3];
    const o0 = k * n;
    const o1 = o0 + n;
    const o2 = o1 + n;
    const o3 = o2 + n;
    if (scale !== 1) {
      for (let i = 0; i < n; i++) {
        rows[o0 + i] *= scale;
        rows[o1 + i] *= scale;
        rows[o2 + i] *= scale;
        rows[o3 + i] *= scale;
      }
    }
    for (let i = 0; i < n; i++) out[i] += a0 * rows[o0 + i] + a1 * rows[o1 + i] + a2 * rows[o2 + i] + a3 * rows[o3 + i];
  }
  for (; k < m; k++) {
    const ak = w[k];
    const o = k * n;
    if (scale !== 1) for (let i = 0; i < n; i++) rows[o + i] *= scale;
    for (let i = 0; i < n; i++) out[i] += ak * rows[o + i];
  }
  return out;
}
