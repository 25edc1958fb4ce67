/**
 * Posterior variances of a column block with the WebAssembly SIMD kernel of ./wat/variance.wat:
 * var_j = Cm_jj − Σ_k W_kj², W = L⁻¹ Bᵀ[:, c0:c1], clamped at 0 — the same contract, arguments and
 * results (bit for bit) as structuredVarianceBlock in src/core/inverse/varianceBlock.ts, which it
 * falls back to when WebAssembly or its 128-bit SIMD is missing.
 *
 * One kernel instance (module, instance, WebAssembly.Memory) per JS realm — each worker has its own —
 * created on first use. Per call, the block of Bᵀ is copied in, in column tiles of 4 (the last padded
 * with zero columns, which change no real column; layout in ./wat/variance.wat), and the w results copied out. L is packed into
 * the kernel's layout once and kept resident while the same L.data is passed again (re-packing per
 * call of 64 columns at M = 400 costs ≈ 25 %, test/bench/cases/wasm.ts). Factors are replaced, not
 * mutated, in the core; as a guard against an in-place change the diagonal and the last row of L
 * (O(M) per call) are compared with those packed, and any difference re-packs.
 */
import { structuredVarianceBlock } from '../inverse/varianceBlock.ts';
import type { Matrix } from '../linalg/matrix.ts';
import { ensureBytes, forceWasmOffForTesting, instantiateKernel, simdSupported } from './runtime.ts';
import { VARIANCE_WASM } from './modules.ts';

type KernelFn = (lt: number, diag: number, x: number, out: number, groups: number, wp: number, rows: number) => void;

interface Kernel {
  readonly memory: WebAssembly.Memory;
  readonly run: KernelFn;
  /** The L.data whose packed form is at offset 0, its order, and a copy of its diagonal and last row. */
  packedFrom: Float64Array | null;
  packedRows: number;
  packedCheck: Float64Array;
}

let kernel: Kernel | null | undefined; // undefined: not tried yet; null: unavailable

/** Whether this realm compiles WebAssembly with 128-bit SIMD (validates a one-instruction probe). */
export function wasmAvailable(): boolean {
  return getKernel() !== null;
}

function getKernel(): Kernel | null {
  if (!simdSupported()) return null;
  if (kernel === undefined) {
    const k = instantiateKernel<KernelFn>(VARIANCE_WASM, 'variance');
    kernel = k === null ? null : { ...k, packedFrom: null, packedRows: -1, packedCheck: new Float64Array(0) };
  }
  return kernel;
}

/** Test hook: pretend WebAssembly is missing (true) or probe for it again (false); affects all kernels. */
export function disableWasmForTesting(disabled: boolean): void {
  forceWasmOffForTesting(disabled);
}

/** Byte offsets of the regions in the kernel memory for M rows and padded width wp. */
function layout(m: number, wp: number) {
  const groups = m >> 2;
  const lt = 0;
  const diag = lt + 64 * groups * Math.max(0, groups - 1);
  const x = diag + 128 * groups;
  const out = x + 8 * m * wp;
  return { groups, lt, diag, x, out, end: out + 8 * wp };
}

/** Packs the groups of 4 rows of L (see ./wat/variance.wat for the layout). */
function packLower(f: Float64Array, l: Float64Array, m: number, lt: number, diag: number): void {
  const groups = m >> 2;
  for (let g = 0; g < groups; g++) {
    const i0 = 4 * g;
    const base = lt / 8 + 8 * g * (g - 1);
    for (let r = 0; r < 4; r++) {
      const row = (i0 + r) * m;
      for (let p = 0; p < i0; p++) f[base + 4 * p + r] = l[row + p];
    }
    const d = diag / 8 + 16 * g;
    for (let r = 0; r < 4; r++) f[d + r] = 1 / l[(i0 + r) * m + i0 + r];
    f[d + 4] = l[(i0 + 1) * m + i0];
    f[d + 5] = l[(i0 + 2) * m + i0];
    f[d + 6] = l[(i0 + 2) * m + i0 + 1];
    f[d + 7] = l[(i0 + 3) * m + i0];
    f[d + 8] = l[(i0 + 3) * m + i0 + 1];
    f[d + 9] = l[(i0 + 3) * m + i0 + 2];
  }
}

/** The diagonal and the last row of the M × M factor (2M values). */
function checkValues(l: Float64Array, m: number): Float64Array {
  const c = new Float64Array(2 * m);
  for (let i = 0; i < m; i++) c[i] = l[i * m + i];
  c.set(l.subarray((m - 1) * m, m * m), m);
  return c;
}

function sameCheck(c: Float64Array, l: Float64Array, m: number): boolean {
  if (c.length !== 2 * m) return false;
  for (let i = 0; i < m; i++) if (!Object.is(c[i], l[i * m + i])) return false;
  const o = (m - 1) * m;
  for (let j = 0; j < m; j++) if (!Object.is(c[m + j], l[o + j])) return false;
  return true;
}

/**
 * Posterior variances of cells [c0, c1) (see structuredVarianceBlock): L the M × M lower Cholesky
 * factor of G Cm Gᵀ + Cd, Bt = G Cm (M × N), priorVariance = diag(Cm). Writes and returns out.
 */
export function wasmVarianceBlock(
  L: Matrix,
  Bt: Matrix,
  priorVariance: Float64Array,
  c0: number,
  c1: number,
  out: Float64Array = new Float64Array(c1 - c0),
): Float64Array {
  const k = getKernel();
  if (k === null) return structuredVarianceBlock(L, Bt, priorVariance, c0, c1, out);
  const m = L.rows;
  const n = Bt.cols;
  const w = c1 - c0;
  if (w <= 0) return out;
  const wp = (w + 3) & ~3;
  const lay = layout(m, wp);
  if (ensureBytes(k.memory, lay.end)) k.packedFrom = null; // growth keeps the contents; re-pack to keep the rule simple
  const f = new Float64Array(k.memory.buffer);
  const l = L.data;
  if (k.packedFrom !== l || k.packedRows !== m || !sameCheck(k.packedCheck, l, m)) {
    packLower(f, l, m, lay.lt, lay.diag);
    k.packedFrom = l;
    k.packedRows = m;
    k.packedCheck = checkValues(l, m);
  }
  // X = Bᵀ[:, c0:c1] in tiles of 4 columns (X[r, 4t + c] at 4mt + 4r + c), zero columns up to wp.
  const bt = Bt.data;
  const x0 = lay.x / 8;
  const ts = 4 * m;
  // Tile by tile (down the rows of 4 columns): half the time of row by row here.
  for (let j = 0; j < wp; j += 4) {
    const cols = Math.min(4, w - j);
    let o = x0 + ts * (j >> 2);
    let b = c0 + j;
    if (cols === 4) {
      for (let r = 0; r < m; r++, o += 4, b += n) {
        f[o] = bt[b];
        f[o + 1] = bt[b + 1];
        f[o + 2] = bt[b + 2];
        f[o + 3] = bt[b + 3];
      }
    } else {
      for (let r = 0; r < m; r++, o += 4, b += n) for (let c = 0; c < 4; c++) f[o + c] = c < cols ? bt[b + c] : 0;
    }
  }
  const o0 = lay.out / 8;
  f.set(priorVariance.subarray(c0, c1), o0);
  for (let j = w; j < wp; j++) f[o0 + j] = 0;
  k.run(lay.lt, lay.diag, lay.x, lay.out, lay.groups, wp, m);
  // Rows past the last group of 4: the same operations in the same order as the JS kernel.
  for (let i = 4 * lay.groups; i < m; i++) {
    const inv = 1 / l[i * m + i];
    for (let j = 0; j < w; j++) {
      const t = x0 + ts * (j >> 2) + (j & 3); // X[0, j]; X[p, j] at t + 4p
      let s = f[t + 4 * i];
      for (let p = 0; p < i; p++) s -= l[i * m + p] * f[t + 4 * p];
      s *= inv;
      f[t + 4 * i] = s;
      f[o0 + j] -= s * s;
    }
  }
  for (let j = 0; j < w; j++) {
    const v = f[o0 + j];
    out[j] = v < 0 ? 0 : v;
  }
  return out;
}
