/**
 * Benchmark cases for the dense data-space posterior (not a timed test). Target: 1-D, N = 1000 cells,
 * M = 100 data, mean + std + χ² + evidence (preparePosteriorFromCovariance + posteriorSummary) ≤ 40 ms
 * median on the project machine, with Cm given (its assembly is the prior module's benchmark).
 *
 * Format: `cases` in the shape of test/bench/types.ts (BenchCase: name, params, setup, runs, warmup;
 * declared locally so this file does not depend on the harness). The shared harness picks it up;
 * `npx tsx test/bench/cases/posterior.ts` also runs the list by itself and prints JSON.
 */
import { cellCoordinates, type Grid } from '../../../src/core/grid/grid.ts';
import { posteriorSummary, preparePosteriorFromCovariance } from '../../../src/core/inverse/posterior.ts';
import { computePosteriorSerial } from '../../../src/core/inverse/compute.ts';
import { structuredProblem } from '../../../src/core/inverse/structured.ts';
import { matrix } from '../../../src/core/linalg/matrix.ts';
import { applyOperator, type Operator } from '../../../src/core/linalg/operator.ts';
import { denseToSparse } from '../../../src/core/linalg/sparse.ts';
import { covarianceMatrix, meanVector } from '../../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';

export interface BenchCase {
  readonly name: string;
  readonly params?: Readonly<Record<string, number>>;
  readonly setup: () => () => unknown;
  readonly runs?: number;
  readonly warmup?: number;
}

function setup(kind: 'dense' | 'sparse', n: number, m: number) {
  const grid: Grid = { shape: [n], spacing: [1], origin: [0.5] };
  const prior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 30 }], nugget: 1e-3 };
  const { x } = cellCoordinates(grid);
  const G = matrix(m, n);
  const width = kind === 'dense' ? n / 8 : 8;
  for (let k = 0; k < m; k++) {
    const c = ((k + 0.5) * n) / m;
    for (let j = 0; j < n; j++) {
      const u = (x[j] - c) / width;
      if (kind === 'dense' || Math.abs(u) < 3) G.data[k * n + j] = Math.exp(-0.5 * u * u);
    }
  }
  const op: Operator = kind === 'dense' ? { kind: 'dense', matrix: G } : { kind: 'sparse', matrix: denseToSparse(G) };
  const values = applyOperator(
    op,
    x.map((v) => Math.sin(v / 40)),
  ).map((v, k) => v + 0.01 * Math.cos(k));
  const problem: Problem = { grid, operator: op, data: { values, sigma: new Float64Array(m).fill(0.01) } };
  return { problem, prior, Cm: covarianceMatrix(grid, prior), m0: meanVector(grid, prior) };
}

function posteriorCase(kind: 'dense' | 'sparse', n: number, m: number): BenchCase {
  return {
    name: `posterior ${kind} G, 1-D N=${n} M=${m} (mean, std, χ², evidence)`,
    params: { N: n, M: m },
    runs: 15,
    warmup: 3,
    setup: () => {
      const s = setup(kind, n, m);
      return () => posteriorSummary(preparePosteriorFromCovariance(s.problem, s.Cm, s.m0));
    },
  };
}

/**
 * The same problems from the prior spec through the automatic path (the CLI's and the worker's route):
 * FFT structure for this stationary prior, Cm never built. `cached`: the row spectra of G are kept
 * between runs, as the worker keeps them across prior changes on one problem.
 */
function autoCase(kind: 'dense' | 'sparse', n: number, m: number, cached: boolean): BenchCase {
  return {
    name: `posterior ${kind} G, 1-D N=${n} M=${m}, auto path from the prior${cached ? ' (cached row spectra)' : ' (cold)'}`,
    params: { N: n, M: m },
    runs: 15,
    warmup: 3,
    setup: () => {
      const s = setup(kind, n, m);
      const sp = structuredProblem(s.problem);
      return () => computePosteriorSerial(cached ? sp : s.problem, s.prior).summary;
    },
  };
}

export const cases: BenchCase[] = [
  posteriorCase('dense', 1000, 100),
  posteriorCase('sparse', 1000, 100),
  autoCase('dense', 1000, 100, false),
  autoCase('dense', 1000, 100, true),
];

function median(a: number[]): number {
  const s = [...a].sort((p, q) => p - q);
  return s[Math.floor(s.length / 2)];
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const out = cases.map((c) => {
    const run = c.setup();
    for (let i = 0; i < (c.warmup ?? 1); i++) run();
    const t: number[] = [];
    for (let i = 0; i < (c.runs ?? 5); i++) {
      const t0 = performance.now();
      run();
      t.push(performance.now() - t0);
    }
    return { name: c.name, medianMs: +median(t).toFixed(2), minMs: +Math.min(...t).toFixed(2), runs: t.length };
  });
  console.log(JSON.stringify(out, null, 2));
}
