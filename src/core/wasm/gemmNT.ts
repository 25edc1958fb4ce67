/**
 * C += α A Bᵀ with the WebAssembly SIMD kernel of ./wat/gemm.wat: the same arguments, contract
 * (including `lower` / `diag`) and results, bit for bit, as gemmNT in src/core/linalg/kernels.ts,
 * which it falls back to when WebAssembly SIMD is missing. Sums are cut at the same depth KC as
 * gemmNT (the cut decides the rounding; the column chunking does not).
 *
 * Per KC-deep pass: A's rows are packed once in groups of 4, B's rows in chunks of NC (tiles of 4),
 * the kernel writes the sums S, and C += α S is applied here — only j ≤ i + diag with `lower`.
 * Everything is copied per call; nothing stays resident.
 */
import { gemmNT, KC, NC } from '../linalg/kernels.ts';
import { GEMM_WASM } from './modules.ts';
import { ensureBytes, instantiateKernel, simdSupported, type KernelInstance } from './runtime.ts';

type GemmFn = (ap: number, bp: number, s: number, tcount: number, groups: number, kk: number, tiles: number) => void;

let kernel: KernelInstance<GemmFn> | null | undefined;

function getKernel(): KernelInstance<GemmFn> | null {
  if (!simdSupported()) return null;
  if (kernel === undefined) kernel = instantiateKernel<GemmFn>(GEMM_WASM, 'gemmPass');
  return kernel;
}

/** Whether wasmGemmNT runs the WebAssembly kernel (else it is gemmNT). */
export function wasmGemmAvailable(): boolean {
  return getKernel() !== null;
}

/** See gemmNT (src/core/linalg/kernels.ts): C[i][j] += α Σ_p A[i][p] B[j][p], optionally lower only. */
export function wasmGemmNT(
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
  const kern = getKernel();
  if (kern === null) return gemmNT(m, n, k, alpha, a, ao, lda, b, bo, ldb, c, co, ldc, lower, diag);
  if (m <= 0 || n <= 0 || k <= 0) return;
  const groups = (m + 3) >> 2;
  const maxTiles = (Math.min(n, NC) + 3) >> 2;
  const kc = Math.min(KC, k);
  // Layout (bytes): ap | bp | s | tcount.
  const apBytes = 32 * kc * groups;
  const bpOff = apBytes;
  const sOff = bpOff + 32 * kc * maxTiles;
  const tOff = sOff + 8 * 4 * groups * 4 * maxTiles;
  ensureBytes(kern.memory, tOff + 4 * groups);
  const f = new Float64Array(kern.memory.buffer);
  const tcount = new Int32Array(kern.memory.buffer, tOff, groups);
  for (let pc = 0; pc < k; pc += KC) {
    const kk = Math.min(KC, k - pc);
    // A[:, pc:pc+kk] in groups of 4 rows, interleaved by p; rows past m are zero.
    for (let g = 0; g < groups; g++) {
      const base = 4 * kk * g;
      for (let r = 0; r < 4; r++) {
        const i = 4 * g + r;
        if (i < m) {
          const src = ao + i * lda + pc;
          for (let p = 0; p < kk; p++) f[base + 4 * p + r] = a[src + p];
        } else {
          for (let p = 0; p < kk; p++) f[base + 4 * p + r] = 0;
        }
      }
    }
    for (let jc = 0; jc < n; jc += NC) {
      const jcEnd = Math.min(n, jc + NC);
      const nw = jcEnd - jc;
      const tiles = (nw + 3) >> 2;
      const b0 = bpOff / 8;
      for (let t = 0; t < tiles; t++) {
        const base = b0 + 4 * kk * t;
        for (let q = 0; q < 4; q++) {
          const j = jc + 4 * t + q;
          if (j < jcEnd) {
            const src = bo + j * ldb + pc;
            for (let p = 0; p < kk; p++) f[base + 4 * p + q] = b[src + p];
          } else {
            for (let p = 0; p < kk; p++) f[base + 4 * p + q] = 0;
          }
        }
      }
      // Lower: group g needs the tiles whose first column jc + 4t ≤ 4g + 3 + diag.
      for (let g = 0; g < groups; g++) {
        tcount[g] = lower ? Math.max(0, Math.min(tiles, Math.floor((4 * g + 3 + diag - jc) / 4) + 1)) : tiles;
      }
      kern.run(0, bpOff, sOff, tOff, groups, kk, tiles);
      const s0 = sOff / 8;
      const sw = 4 * tiles;
      for (let i = 0; i < m; i++) {
        const jEnd = lower ? Math.min(jcEnd, i + 1 + diag) : jcEnd;
        const ci = co + i * ldc;
        const si = s0 + i * sw - jc;
        for (let j = jc; j < jEnd; j++) c[ci + j] += alpha * f[si + j];
      }
    }
  }
}

/**
 * Below this depth, or this many multiply-adds, a call stays in JavaScript: the WebAssembly route
 * copies A's and B's rows and adds α S into C in JavaScript, which costs about as much as the
 * JavaScript kernel's own work on thin products (a choice, not measured finely: both give the same
 * bits, so the switch only affects speed).
 */
export const WASM_GEMM_MIN_DEPTH = 16;
export const WASM_GEMM_MIN_WORK = 32768;

/** gemmNT's contract and bits: the WebAssembly kernel for sizable products, gemmNT otherwise. */
export function gemmNTAuto(...args: Parameters<typeof gemmNT>): void {
  const [m, n, k] = args;
  if (k < WASM_GEMM_MIN_DEPTH || m * n * k < WASM_GEMM_MIN_WORK) return gemmNT(...args);
  wasmGemmNT(...args);
}
