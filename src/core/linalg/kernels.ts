/**
 * Unchecked inner kernels over flat row-major Float64Array storage with offsets and leading
 * dimensions (row strides). Callers validate shapes; these only loop.
 *
 * The one hot kernel is the "NT" product C += α A Bᵀ, i.e. C[i][j] += α Σ_p A[i][p] B[j][p]: both
 * operands are read along their rows, so every inner loop is a contiguous dot product. It is
 * register blocked in 4 × 2 tiles (eight running sums, six loads per eight multiply-adds) and blocked
 * over p in chunks of KC so the four A rows stay in L1 cache. Tile shape and KC were chosen by
 * measurement on the project machine (test/bench); blocking for registers and cache is common
 * practice (Goto & van de Geijn 2008, ACM TOMS 34(3), memory).
 */

/** Depth of one pass over p; 4·KC doubles of A stay in L1 while a strip of B streams from L2. */
export const KC = 256;

/** Rows of B per pass, so an NC × KC strip of B (512 KiB) stays in L2 while A's rows sweep it. */
export const NC = 256;

/**
 * C[i][j] += α Σ_{p<k} A[i][p] B[j][p] for 0 ≤ i < m, 0 ≤ j < n; with `lower`, only j ≤ i + diag
 * is written (entries above are neither read nor written), where `diag` shifts the diagonal
 * (use 0 when C's block starts on the diagonal of a symmetric matrix).
 */
export function gemmNT(
  m: number,
  n: number,
  k: number,
  alpha: number,
  a: Float64Array,
  ao: number,
  lda: number,
  b: Float64Array,
  bo: number,
  ldb: number,
  c: Float64Array,
  co: number,
  ldc: number,
  lower = false,
  diag = 0,
): void {
  for (let pc = 0; pc < k; pc += KC) {
    const kk = Math.min(KC, k - pc);
    for (let jc = 0; jc < n; jc += NC) {
      const jcEnd = Math.min(n, jc + NC);
      gemmNTPanel(m, jc, jcEnd, kk, pc, alpha, a, ao, lda, b, bo, ldb, c, co, ldc, lower, diag);
    }
  }
}

/** One KC-deep pass of {@link gemmNT} over columns jc ≤ j < jcEnd of C. */
function gemmNTPanel(
  m: number,
  jc: number,
  jcEnd: number,
  kk: number,
  pc: number,
  alpha: number,
  a: Float64Array,
  ao: number,
  lda: number,
  b: Float64Array,
  bo: number,
  ldb: number,
  c: Float64Array,
  co: number,
  ldc: number,
  lower: boolean,
  diag: number,
): void {
  {
    let i = lower ? Math.max(0, (jc - diag - 3) & ~3) : 0;
    for (; i + 4 <= m; i += 4) {
      const jEnd = lower ? Math.min(jcEnd, i + 4 + diag) : jcEnd;
      const pa0 = ao + i * lda + pc;
      const pa1 = pa0 + lda;
      const pa2 = pa1 + lda;
      const pa3 = pa2 + lda;
      let j = jc;
      for (; j + 2 <= jEnd; j += 2) {
        const pb0 = bo + j * ldb + pc;
        const pb1 = pb0 + ldb;
        let s00 = 0,
          s01 = 0,
          s10 = 0,
          s11 = 0,
          s20 = 0,
          s21 = 0,
          s30 = 0,
          s31 = 0;
        for (let p = 0; p < kk; p++) {
          const b0 = b[pb0 + p];
          const b1 = b[pb1 + p];
          const a0 = a[pa0 + p];
          s00 += a0 * b0;
          s01 += a0 * b1;
          const a1 = a[pa1 + p];
          s10 += a1 * b0;
          s11 += a1 * b1;
          const a2 = a[pa2 + p];
          s20 += a2 * b0;
          s21 += a2 * b1;
          const a3 = a[pa3 + p];
          s30 += a3 * b0;
          s31 += a3 * b1;
        }
        const c0 = co + i * ldc + j;
        if (!lower || j + 1 <= i + diag) {
          c[c0] += alpha * s00;
          c[c0 + 1] += alpha * s01;
          c[c0 + ldc] += alpha * s10;
          c[c0 + ldc + 1] += alpha * s11;
          c[c0 + 2 * ldc] += alpha * s20;
          c[c0 + 2 * ldc + 1] += alpha * s21;
          c[c0 + 3 * ldc] += alpha * s30;
          c[c0 + 3 * ldc + 1] += alpha * s31;
        } else {
          // Tile straddles the diagonal: write only j ≤ i + diag.
          const s = [s00, s01, s10, s11, s20, s21, s30, s31];
          for (let r = 0; r < 4; r++) {
            for (let q = 0; q < 2; q++) if (j + q <= i + r + diag) c[c0 + r * ldc + q] += alpha * s[2 * r + q];
          }
        }
      }
      // Leftover column (odd count): one row at a time.
      for (; j < jEnd; j++) {
        const pb = bo + j * ldb + pc;
        for (let r = 0; r < 4; r++) {
          if (lower && j > i + r + diag) continue;
          const pa = pa0 + r * lda;
          let s = 0;
          for (let p = 0; p < kk; p++) s += a[pa + p] * b[pb + p];
          c[co + (i + r) * ldc + j] += alpha * s;
        }
      }
    }
    // Leftover rows (m not a multiple of 4).
    for (; i < m; i++) {
      const jEnd = lower ? Math.min(jcEnd, i + 1 + diag) : jcEnd;
      const pa = ao + i * lda + pc;
      for (let j = jc; j < jEnd; j++) {
        const pb = bo + j * ldb + pc;
        let s = 0;
        for (let p = 0; p < kk; p++) s += a[pa + p] * b[pb + p];
        c[co + i * ldc + j] += alpha * s;
      }
    }
  }
}

/** Transpose of the m × n block at (src, so, lds) into dst (n × m at do_, ldd). */
export function transposeBlock(
  m: number,
  n: number,
  src: Float64Array,
  so: number,
  lds: number,
  dst: Float64Array,
  do_: number,
  ldd: number,
): void {
  const T = 32;
  for (let i0 = 0; i0 < m; i0 += T) {
    const i1 = Math.min(m, i0 + T);
    for (let j0 = 0; j0 < n; j0 += T) {
      const j1 = Math.min(n, j0 + T);
      for (let i = i0; i < i1; i++) {
        const si = so + i * lds;
        for (let j = j0; j < j1; j++) dst[do_ + j * ldd + i] = src[si + j];
      }
    }
  }
}

/**
 * Triangle solve on a band of rows, in place: for each of `rows` rows r of X (row r starts at
 * xOff + r·ldx) and each column j in [c0, c1),
 *   X[r][j] ← (X[r][j] − Σ_{p ∈ [c0, j)} X[r][p] · L[j][p]) / L[j][j],
 * where L[j][p] = l[lOff + j·ldl + p]. That is X[:, c0:c1] ← X[:, c0:c1] · L[c0:c1, c0:c1]⁻ᵀ, the
 * diagonal-block step of a blocked forward substitution or Cholesky panel (Golub & Van Loan §3.1,
 * §4.2, memory). Four rows share each read of L. `x` and `l` may be the same array when the two
 * regions do not overlap (the Cholesky panel below its diagonal block).
 */
export function trsmRowsLowerT(
  x: Float64Array,
  xOff: number,
  ldx: number,
  rows: number,
  l: Float64Array,
  lOff: number,
  ldl: number,
  c0: number,
  c1: number,
): void {
  let r = 0;
  for (; r + 4 <= rows; r += 4) {
    const o0 = xOff + r * ldx;
    const o1 = o0 + ldx;
    const o2 = o1 + ldx;
    const o3 = o2 + ldx;
    for (let j = c0; j < c1; j++) {
      const oj = lOff + j * ldl;
      let s0 = x[o0 + j],
        s1 = x[o1 + j],
        s2 = x[o2 + j],
        s3 = x[o3 + j];
      for (let p = c0; p < j; p++) {
        const lp = l[oj + p];
        s0 -= x[o0 + p] * lp;
        s1 -= x[o1 + p] * lp;
        s2 -= x[o2 + p] * lp;
        s3 -= x[o3 + p] * lp;
      }
      const inv = 1 / l[oj + j];
      x[o0 + j] = s0 * inv;
      x[o1 + j] = s1 * inv;
      x[o2 + j] = s2 * inv;
      x[o3 + j] = s3 * inv;
    }
  }
  for (; r < rows; r++) {
    const o = xOff + r * ldx;
    for (let j = c0; j < c1; j++) {
      const oj = lOff + j * ldl;
      let s = x[o + j];
      for (let p = c0; p < j; p++) s -= x[o + p] * l[oj + p];
      x[o + j] = s / l[oj + j];
    }
  }
}
