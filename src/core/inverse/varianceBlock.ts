/**
 * The posterior-variance block of the structured path, in plain JavaScript: the reference kernel
 * (and the fallback) of the WebAssembly SIMD one in ../wasm/varianceBlock.ts, which gives the same
 * bits. Kept apart from ./structured.ts so the WebAssembly module can import it without a cycle.
 *
 * PUBLIC API: VARIANCE_BLOCK, structuredVarianceBlock (re-exported by ./structured.ts).
 */
import type { Matrix } from '../linalg/matrix.ts';

/** Default column-block width of the triangular solve (M × width doubles stay in cache). */
export const VARIANCE_BLOCK = 64;

/**
 * Posterior variances of cells [c0, c1): var_j = Cm_jj − Σ_k W_kj², W = L⁻¹ Bᵀ restricted to the
 * block, by blocked forward substitution (Golub & Van Loan, Matrix Computations, §3.1, memory):
 * rows of W in groups of 4, X[i-group] −= L[i-group, :i0] · W[:i0] with a 4 × 4 register-blocked
 * kernel, then the 4 × 4 diagonal triangle. Writes out[j − c0]. A pure function of its inputs
 * (the unit of work for a worker); every column gets the same operations in the same order
 * whatever c0 and c1 are, so split runs equal one run bit for bit.
 */
export function structuredVarianceBlock(
  L: Matrix,
  Bt: Matrix,
  priorVariance: Float64Array,
  c0: number,
  c1: number,
  out: Float64Array = new Float64Array(c1 - c0),
): Float64Array {
  const m = L.rows;
  const n = Bt.cols;
  const w = c1 - c0;
  const x = new Float64Array(m * w);
  const bt = Bt.data;
  const l = L.data;
  for (let k = 0; k < m; k++) x.set(bt.subarray(k * n + c0, k * n + c1), k * w);
  const lt = new Float64Array(4 * m); // L[i0..i0+3, p] interleaved by p: lt[4p + r]
  const w4 = w - (w % 4);
  for (let i0 = 0; i0 < m; i0 += 4) {
    const rows = Math.min(4, m - i0);
    for (let p = 0; p < i0; p++) for (let r = 0; r < 4; r++) lt[4 * p + r] = r < rows ? l[(i0 + r) * m + p] : 0;
    if (rows === 4 && i0 > 0) {
      const o0 = i0 * w;
      const o1 = o0 + w;
      const o2 = o1 + w;
      const o3 = o2 + w;
      for (let j = 0; j < w4; j += 4) {
        let a00 = x[o0 + j],
          a01 = x[o0 + j + 1],
          a02 = x[o0 + j + 2],
          a03 = x[o0 + j + 3];
        let a10 = x[o1 + j],
          a11 = x[o1 + j + 1],
          a12 = x[o1 + j + 2],
          a13 = x[o1 + j + 3];
        let a20 = x[o2 + j],
          a21 = x[o2 + j + 1],
          a22 = x[o2 + j + 2],
          a23 = x[o2 + j + 3];
        let a30 = x[o3 + j],
          a31 = x[o3 + j + 1],
          a32 = x[o3 + j + 2],
          a33 = x[o3 + j + 3];
        for (let p = 0, op = j; p < i0; p++, op += w) {
          const y0 = x[op],
            y1 = x[op + 1],
            y2 = x[op + 2],
            y3 = x[op + 3];
          const l0 = lt[4 * p],
            l1 = lt[4 * p + 1],
            l2 = lt[4 * p + 2],
            l3 = lt[4 * p + 3];
          a00 -= l0 * y0;
          a01 -= l0 * y1;
          a02 -= l0 * y2;
          a03 -= l0 * y3;
          a10 -= l1 * y0;
          a11 -= l1 * y1;
          a12 -= l1 * y2;
          a13 -= l1 * y3;
          a20 -= l2 * y0;
          a21 -= l2 * y1;
          a22 -= l2 * y2;
          a23 -= l2 * y3;
          a30 -= l3 * y0;
          a31 -= l3 * y1;
          a32 -= l3 * y2;
          a33 -= l3 * y3;
        }
        x[o0 + j] = a00;
        x[o0 + j + 1] = a01;
        x[o0 + j + 2] = a02;
        x[o0 + j + 3] = a03;
        x[o1 + j] = a10;
        x[o1 + j + 1] = a11;
        x[o1 + j + 2] = a12;
        x[o1 + j + 3] = a13;
        x[o2 + j] = a20;
        x[o2 + j + 1] = a21;
        x[o2 + j + 2] = a22;
        x[o2 + j + 3] = a23;
        x[o3 + j] = a30;
        x[o3 + j + 1] = a31;
        x[o3 + j + 2] = a32;
        x[o3 + j + 3] = a33;
      }
      for (let j = w4; j < w; j++) {
        for (let r = 0; r < 4; r++) {
          let a0 = x[(i0 + r) * w + j];
          for (let p = 0; p < i0; p++) a0 -= lt[4 * p + r] * x[p * w + j];
          x[(i0 + r) * w + j] = a0;
        }
      }
    } else if (i0 > 0) {
      for (let r = 0; r < rows; r++) {
        const oi = (i0 + r) * w;
        for (let j = 0; j < w; j++) {
          let a0 = x[oi + j];
          for (let p = 0; p < i0; p++) a0 -= lt[4 * p + r] * x[p * w + j];
          x[oi + j] = a0;
        }
      }
    }
    // The diagonal triangle of the group.
    for (let r = 0; r < rows; r++) {
      const i = i0 + r;
      const oi = i * w;
      for (let q = 0; q < r; q++) {
        const liq = l[i * m + i0 + q];
        const oq = (i0 + q) * w;
        for (let j = 0; j < w; j++) x[oi + j] -= liq * x[oq + j];
      }
      const inv = 1 / l[i * m + i];
      for (let j = 0; j < w; j++) x[oi + j] *= inv;
    }
  }
  for (let j = 0; j < w; j++) out[j] = priorVariance[c0 + j];
  for (let k = 0; k < m; k++) {
    const o = k * w;
    for (let j = 0; j < w; j++) out[j] -= x[o + j] * x[o + j];
  }
  // Round-off can leave a tiny negative where the data fix a cell almost exactly: clamp to 0.
  for (let j = 0; j < w; j++) if (out[j] < 0) out[j] = 0;
  return out;
}
