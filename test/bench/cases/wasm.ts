/**
 * Posterior standard-deviation kernel, JS vs WebAssembly SIMD (not a timed test): all column blocks
 * of var_j = Cm_jj − Σ_k W_kj², W = L⁻¹ Bᵀ, for M = 400 data at the 64² and 128² grid sizes
 * (N = 4096 / 16384), blocks of VARIANCE_BLOCK columns as structuredPosteriorStd runs them.
 * Flops: the forward substitution is M² N / 2 multiply-adds (Golub & Van Loan, §3.1, memory), i.e.
 * M² N flops; the sum of squares (2 M N) is left out. The scipy counterpart (`solve_lower_rows`,
 * scipy.linalg.solve_triangular on the same sizes) times the triangular solve alone.
 *
 * "wasm, L re-packed per block" alternates two copies of L so the packed factor is never resident:
 * the price of copying L into the kernel memory on every call.
 *
 * The NT product C −= A Bᵀ (2 m n k flops; the lower-triangle case as the Cholesky's left-looking
 * update uses it, counted in full), JS gemmNT vs wasmGemmNT, with numpy's `a @ b.T` beside the square one.
 */
import { structuredVarianceBlock, VARIANCE_BLOCK } from '../../../src/core/inverse/structured.ts';
import { matrix, type Matrix } from '../../../src/core/linalg/matrix.ts';
import { cholesky } from '../../../src/core/linalg/cholesky.ts';
import { gemmNT } from '../../../src/core/linalg/kernels.ts';
import { wasmGemmAvailable, wasmGemmNT } from '../../../src/core/wasm/gemmNT.ts';
import { wasmAvailable, wasmVarianceBlock } from '../../../src/core/wasm/varianceBlock.ts';
import { benchSpd } from './linalg.ts';
import type { BenchCase } from '../types.ts';

type Kernel = typeof structuredVarianceBlock;

/** Uniform [−1, 1) (integer hash; common practice, no source). */
function randomDense(rows: number, cols: number, seed: number): Matrix {
  let s = seed >>> 0;
  const m = matrix(rows, cols);
  for (let i = 0; i < m.data.length; i++) {
    s = (s + 0x9e3779b9) >>> 0;
    let z = Math.imul(s ^ (s >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    m.data[i] = ((z ^ (z >>> 16)) >>> 0) / 2 ** 31 - 1;
  }
  return m;
}

function varianceCase(label: 'js' | 'wasm' | 'wasm-repack', grid: number): BenchCase {
  const m = 400;
  const n = grid * grid;
  const name =
    label === 'js'
      ? 'JS kernel'
      : label === 'wasm'
        ? `wasm SIMD${wasmAvailable() ? '' : ' (unavailable: JS fallback)'}`
        : 'wasm, L re-packed per block';
  return {
    name: `variance ${name}: ${grid}², M=${m}, N=${n}`,
    params: { m, n },
    flops: m * m * n,
    ...(label === 'wasm' ? { scipyOp: 'solve_lower_rows' } : {}),
    runs: grid >= 128 ? 5 : 9,
    setup: () => {
      const r = cholesky(benchSpd(m));
      if (!r.ok) throw new Error(`benchmark matrix not SPD (pivot ${r.pivot})`);
      const L = r.factor;
      const L2 = matrix(m, m, L.data.slice());
      const Bt = randomDense(m, n, 5);
      const pv = new Float64Array(n).fill(1e3);
      const out = new Float64Array(n);
      const kernel: Kernel = label === 'js' ? structuredVarianceBlock : wasmVarianceBlock;
      return () => {
        for (let c0 = 0, b = 0; c0 < n; c0 += VARIANCE_BLOCK, b++) {
          const c1 = Math.min(n, c0 + VARIANCE_BLOCK);
          kernel(label === 'wasm-repack' && b % 2 === 1 ? L2 : L, Bt, pv, c0, c1, out.subarray(c0, c1));
        }
        return out;
      };
    },
  };
}

function gemmCase(label: 'js' | 'wasm', m: number, n: number, k: number, lower: boolean): BenchCase {
  const name = label === 'js' ? 'JS gemmNT' : `wasmGemmNT${wasmGemmAvailable() ? '' : ' (unavailable: JS fallback)'}`;
  return {
    name: `gemm NT ${name}: m=${m}, n=${n}, k=${k}${lower ? ', lower' : ''}`,
    params: { m, n, k },
    flops: 2 * m * n * k,
    ...(label === 'wasm' && !lower ? { scipyOp: 'matmul_nt' } : {}),
    runs: 5,
    setup: () => {
      const a = randomDense(m, k, 3).data;
      const b = randomDense(n, k, 4).data;
      const c = new Float64Array(m * n);
      const kernel = label === 'js' ? gemmNT : wasmGemmNT;
      return () => kernel(m, n, k, -1, a, 0, k, b, 0, k, c, 0, n, lower, 0);
    },
  };
}

export const cases: BenchCase[] = [
  ...[64, 128].flatMap((grid) => (['js', 'wasm', 'wasm-repack'] as const).map((label) => varianceCase(label, grid))),
  ...(
    [
      [1000, 1000, 1000, false],
      [1936, 64, 1000, true],
    ] as const
  ).flatMap(([m, n, k, lower]) => (['js', 'wasm'] as const).map((label) => gemmCase(label, m, n, k, lower))),
];
