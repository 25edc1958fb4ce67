/**
 * Benchmarks of the FFT route on 3-D grids (issue targets; not timed tests):
 *   - 20 × 20 × 20 (8,000 cells), M = 500 straight rays: posterior mean + std, against the dense scipy route on
 *     the same problem (test/bench/cases/fft3.py, Cm from scipy.spatial.distance.cdist); target ratio ≤ 0.1; and the
 *     std step alone (W = L⁻¹Bᵀ) against scipy's solve_triangular on the same L and Bᵀ, the floor of that ratio;
 *   - 32 × 32 × 32 (32,768 cells; a dense Cm would need 8.6 GB), M = 1,000 rays: mean + std in a child process,
 *     targets ≤ 5 s and peak RSS ≤ 1 GB (the child's wall time and maxRSS, medians over the runs);
 *   - one realisation on 64³ (≤ 0.4 s) and 128³ (≤ 3 s), with the embedding's set-up and (64³) without;
 *   - the positive-definiteness verdict at 64³ (≤ 2 s).
 * The survey is invented: rays between opposite faces of the block (the face pair turning with the ray's number),
 * end points from a seeded generator; path lengths by midpoint sampling at 1/20 of a cell (enough for a timing
 * problem; kept so the timings stay comparable with earlier runs, though the exact walk of src/core/problems/rays.ts
 * now runs in 3-D too), Matérn ν = 1.5, length n/8, σ = 0.5.
 */
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { circulantSampler } from '../../../src/core/fft/realisations.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { diagnoseStructured } from '../../../src/core/prior/structuredDiagnostics.ts';
import { prepareStructuredPosterior, structuredPosteriorStd, structuredProblem } from '../../../src/core/inverse/structured.ts';
import { sparseFromCoordinates } from '../../../src/core/linalg/sparse.ts';
import { lagRowsInto } from '../../../src/core/inverse/lagProducts.ts';
import { lagTable } from '../../../src/core/prior/lag.ts';
import { forceWasmOffForTesting } from '../../../src/core/wasm/runtime.ts';
import { type BlockPool, parallelPosteriorStd } from '../../../src/core/parallel/blocks.ts';
import { nodeBlockPool } from '../../../src/core/parallel/node.ts';
import { prepareStructuredPosteriorParallel } from '../../../src/core/parallel/products.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import type { BenchCase } from '../types.ts';
import { writeProblemForScipy } from './fft.ts';

/** Matérn ν = 1.5, variance 1, length n/8, constant mean 0. */
export function benchPrior3(n: number): PriorSpec {
  return { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: n / 8 }] };
}

/** The invented n × n × n survey of the module comment (1 m cells, M rays). */
export function benchProblem3(n: number, m: number): Problem {
  const grid: Grid = { shape: [n, n, n], spacing: [1, 1, 1] };
  const rng = new Random(31_000 + n);
  const lo = -0.5;
  const hi = n - 0.5;
  const ri: number[] = [];
  const ci: number[] = [];
  const v: number[] = [];
  for (let k = 0; k < m; k++) {
    const r = () => lo + (hi - lo) * rng.nextDouble();
    const a = [lo, r(), r()];
    const b = [hi, r(), r()];
    const s = k % 3; // which face pair: x, then y, then z
    const p = [a[(3 - s) % 3]!, a[(4 - s) % 3]!, a[(5 - s) % 3]!];
    const q = [b[(3 - s) % 3]!, b[(4 - s) % 3]!, b[(5 - s) % 3]!];
    const length = Math.hypot(q[0]! - p[0]!, q[1]! - p[1]!, q[2]! - p[2]!);
    const steps = Math.ceil(length * 20);
    const cell = (t: number, j: number) => Math.min(n - 1, Math.max(0, Math.round(p[j]! + t * (q[j]! - p[j]!))));
    for (let st = 0; st < steps; st++) {
      const t = (st + 0.5) / steps;
      ri.push(k);
      ci.push(cell(t, 0) + n * (cell(t, 1) + n * cell(t, 2)));
      v.push(length / steps);
    }
  }
  const operator = { kind: 'sparse' as const, matrix: sparseFromCoordinates(m, n * n * n, ri, ci, v) };
  const values = Float64Array.from({ length: m }, () => rng.nextNormal());
  return { grid, operator, data: { values, sigma: new Float64Array(m).fill(0.5) } };
}

/** Mean + std on the FFT route; returns milliseconds. */
function meanAndStd(n: number, m: number): number {
  const problem = benchProblem3(n, m);
  const t0 = performance.now();
  structuredPosteriorStd(prepareStructuredPosterior(structuredProblem(problem), benchPrior3(n)));
  return performance.now() - t0;
}

/** One 2-thread worker_threads pool per process (the dense route's BLAS uses both cores too); it does not keep the process alive. */
let pool2: BlockPool | null = null;
const twoThreads = (): BlockPool => (pool2 ??= nodeBlockPool(2));

const child: { wallMs: number[]; rssMb: number[] } = { wallMs: [], rssMb: [] };
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const k = s.length >> 1;
  return s.length % 2 ? s[k]! : (s[k - 1]! + s[k]!) / 2;
};

const volume = (n: number): Grid => ({ shape: [n, n, n], spacing: [1, 1, 1] });
/** Matérn ν = 1.5, length n/8 (and for the verdict a nugget of 1 % of the variance, common practice, no source). */
const volumePrior = (n: number, nugget = 0): PriorSpec => ({
  mean: { constant: 0 },
  ...(nugget > 0 ? { nugget } : {}),
  terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: n / 8 }],
});

/** The 20³ problem with M = 500, also written for the scipy side (./fft3.py reads it). */
function problem20(): Problem {
  const problem = benchProblem3(20, 500);
  writeProblemForScipy(20, problem, 'fft3-problem');
  return problem;
}
const params20 = { N: 8000, M: 500, n: 20 };

export const cases: BenchCase[] = [
  {
    name: '3-D fft posterior 20x20x20 M=500: mean + std (cold), against the dense scipy route (target ≤ 0.1)',
    params: params20,
    scipyOp: 'dense_route_3d_mean_std',
    setup: () => {
      const problem = problem20();
      return () => structuredPosteriorStd(prepareStructuredPosterior(structuredProblem(problem), benchPrior3(20)));
    },
  },
  {
    name: '3-D fft posterior 20x20x20 M=500: mean + std (cold), rows of Bᵀ by circulant embedding (forced; the route before lag sums)',
    params: params20,
    scipyOp: 'dense_route_3d_mean_std',
    setup: () => {
      const problem = problem20();
      return () =>
        structuredPosteriorStd(prepareStructuredPosterior(structuredProblem(problem, { products: 'circulant' }), benchPrior3(20)));
    },
  },
  {
    name: '3-D fft posterior 20x20x20 M=500: mean + std (cold) on both cores (products and std split over a 2-thread pool), against the dense scipy route',
    params: params20,
    scipyOp: 'dense_route_3d_mean_std',
    setup: () => {
      const problem = problem20();
      const pool = twoThreads();
      return async () =>
        parallelPosteriorStd(await prepareStructuredPosteriorParallel(structuredProblem(problem), benchPrior3(20), pool), pool);
    },
  },
  {
    // The floor of the target above: the exact standard deviations need W = L⁻¹Bᵀ (M²N/2 multiply-adds) on any route
    // that factors K, so the same step in scipy (LAPACK's triangular solve on the same L and Bᵀ) bounds what the whole
    // posterior can reach against the dense route.
    name: '3-D posterior 20x20x20 M=500: the std step alone (W = L⁻¹Bᵀ, column sums of W²), against scipy on the same L and Bᵀ',
    params: params20,
    scipyOp: 'dense_route_3d_std_step',
    flops: (500 * 500 * 8000) / 2,
    setup: () => {
      const state = prepareStructuredPosterior(structuredProblem(problem20()), benchPrior3(20));
      return () => structuredPosteriorStd(state);
    },
  },
  // The rows of Bᵀ alone by lag sums (../../../src/core/inverse/lagProducts.ts): the WebAssembly kernel and its
  // JavaScript twin (same bits), 2 flops per multiply-add of nnz(G)·N.
  ...(['wasm', 'js'] as const).map(
    (kind): BenchCase => ({
      name: `3-D lag-sum rows of Bᵀ 20x20x20 M=500 (${kind === 'wasm' ? 'WebAssembly SIMD' : 'JavaScript twin'})`,
      params: params20,
      flops: 2 * 16034 * 8000,
      setup: () => {
        const problem = problem20();
        const g = problem.operator;
        if (g.kind !== 'sparse' || g.matrix.rowPtr[500] !== 16034) throw new Error('bench: the 20³ problem changed (nnz)');
        const table = lagTable(problem.grid, benchPrior3(20).terms);
        const rows = Int32Array.from({ length: 500 }, (_, k) => k);
        const bt = new Float64Array(500 * 8000);
        return () => {
          forceWasmOffForTesting(kind === 'js');
          try {
            lagRowsInto(table, g.matrix, undefined, rows, rows, bt);
          } finally {
            forceWasmOffForTesting(false);
          }
        };
      },
    }),
  ),
  {
    name: '3-D fft posterior 32x32x32 M=1000: mean + std in a child process (targets ≤ 5 s, peak RSS ≤ 1 GB)',
    params: { N: 32 ** 3, M: 1000 },
    runs: 5,
    warmup: 0,
    setup: () => {
      child.wallMs.length = 0;
      child.rssMb.length = 0;
      return () => {
        const out = execFileSync(process.execPath, ['--import', 'tsx', fileURLToPath(import.meta.url), 'child', '32', '1000'], {
          encoding: 'utf8',
        });
        const [ms, rss] = out.trim().split(' ').map(Number) as [number, number];
        child.wallMs.push(ms);
        child.rssMb.push(rss);
      };
    },
    report: () => ({ child_compute_ms_median: median(child.wallMs), child_peak_rss_mb_median: median(child.rssMb) }),
  },
  ...[64, 128].map(
    (n): BenchCase => ({
      name: `3-D fft realisation ${n}x${n}x${n} Matérn 1.5: embedding + one draw (target ${n === 64 ? '≤ 0.4 s' : '≤ 3 s'})`,
      params: { N: n ** 3 },
      warmup: n === 128 ? 0 : 1,
      run: () => circulantSampler(volume(n), volumePrior(n)).draw(1, 1),
    }),
  ),
  {
    name: '3-D fft realisation 64x64x64 Matérn 1.5: one draw (embedding reused)',
    params: { N: 64 ** 3 },
    setup: () => {
      const sampler = circulantSampler(volume(64), volumePrior(64));
      let seed = 1;
      return () => sampler.draw(1, seed++);
    },
  },
  {
    name: '3-D positive-definiteness verdict 64x64x64 Matérn 1.5 + nugget 0.01 (FFT bracket and Lanczos; target ≤ 2 s)',
    params: { N: 64 ** 3 },
    run: () => {
      const d = diagnoseStructured(volume(64), volumePrior(64, 0.01));
      if (d.verdict !== 'positive-definite') throw new Error(`bench: verdict ${d.verdict}`);
      return d;
    },
  },
];

// Child mode: build the problem, time mean + std, print "ms maxRSS-MB".
if (process.argv[2] === 'child') {
  const ms = meanAndStd(Number(process.argv[3]), Number(process.argv[4]));
  process.stdout.write(`${ms.toFixed(0)} ${(process.resourceUsage().maxRSS / 1024).toFixed(0)}\n`);
}
