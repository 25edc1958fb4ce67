/**
 * Dense linear-algebra benchmark cases: Cholesky (N³/3 flops), triangular solve with many
 * right-hand sides (N² k flops), symmetric eigenvalues (≈ 4/3 N³ for the reduction), GEMM (2 m k n).
 * Flop counts: Golub & Van Loan, Matrix Computations, 4th ed., §4.2, §3.1, §8.3 (memory).
 */
import { cholesky, choleskyUnblocked, solveLowerMatrix, solveLowerRows } from '../../../src/core/linalg/cholesky.ts';
import { symmetricEigenvalues } from '../../../src/core/linalg/eigen.ts';
import { matrix, type Matrix } from '../../../src/core/linalg/matrix.ts';
import { multiplyNT, symmetricProduct } from '../../../src/core/linalg/products.ts';
import type { BenchCase } from '../types.ts';

/** Seeded uniform [0, 1) (integer hash; common practice, no source). */
function uniform(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = Math.imul(s ^ (s >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return ((z ^ (z >>> 16)) >>> 0) / 2 ** 32;
  };
}

/**
 * SPD test matrix in O(N²): exponential correlation exp(−|xᵢ − xⱼ| / 0.1) of N random points in
 * [0, 1] plus 0.1 I (the exponential kernel is positive definite; Rasmussen & Williams 2006, §4.2).
 * scipy_dense.py builds the same kind of matrix.
 */
export function benchSpd(n: number, seed = 1): Matrix {
  const u = uniform(seed);
  const x = Float64Array.from({ length: n }, u);
  const a = matrix(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      const v = Math.exp(-Math.abs(x[i] - x[j]) / 0.1) + (i === j ? 0.1 : 0);
      a.data[i * n + j] = v;
      a.data[j * n + i] = v;
    }
  }
  return a;
}

function randomDense(rows: number, cols: number, seed: number): Matrix {
  const u = uniform(seed);
  const m = matrix(rows, cols);
  for (let i = 0; i < m.data.length; i++) m.data[i] = 2 * u() - 1;
  return m;
}

function factor(a: Matrix): Matrix {
  const r = cholesky(a);
  if (!r.ok) throw new Error(`benchmark matrix not SPD (pivot ${r.pivot})`);
  return r.factor;
}

const choleskyCase = (n: number): BenchCase => ({
  name: `cholesky n=${n}`,
  params: { n },
  flops: n ** 3 / 3,
  scipyOp: 'cholesky',
  runs: n >= 2000 ? 5 : 7,
  setup: () => {
    const a = benchSpd(n);
    return () => cholesky(a);
  },
});

export const cases: BenchCase[] = [
  choleskyCase(500),
  choleskyCase(1000),
  choleskyCase(2000),
  {
    name: 'cholesky unblocked (oracle) n=1000',
    params: { n: 1000 },
    flops: 1000 ** 3 / 3,
    scipyOp: 'cholesky',
    runs: 5,
    setup: () => {
      const a = benchSpd(1000);
      return () => choleskyUnblocked(a);
    },
  },
  {
    name: 'solve L X = B n=1000 k=100',
    params: { n: 1000, k: 100 },
    flops: 1000 * 1000 * 100,
    scipyOp: 'solve_lower',
    runs: 7,
    setup: () => {
      const L = factor(benchSpd(1000));
      const B = randomDense(1000, 100, 2);
      return () => solveLowerMatrix(L, B);
    },
  },
  {
    name: 'symmetric eigenvalues n=500',
    params: { n: 500 },
    flops: (4 / 3) * 500 ** 3,
    scipyOp: 'eigvalsh',
    runs: 5,
    setup: () => {
      const a = benchSpd(500);
      return () => symmetricEigenvalues(a);
    },
  },
  {
    // Posterior shape: W = L⁻¹ Bᵀ with B = Cm Gᵀ (N × M), L the factor of G Cm Gᵀ + Cd (M × M).
    name: 'solve L Wᵀ rows: M=200, N=2000 right-hand sides',
    params: { m: 200, n: 2000 },
    flops: 200 * 200 * 2000,
    scipyOp: 'solve_lower_rows',
    runs: 7,
    setup: () => {
      const L = factor(benchSpd(200));
      const B = randomDense(2000, 200, 5);
      return () => solveLowerRows(L, B);
    },
  },
  {
    // Posterior shape: K = G B with B = Cm Gᵀ, symmetric, lower triangle computed (half of 2 M² N).
    name: 'symmetric product G B: M=200, N=2000',
    params: { m: 200, n: 2000 },
    flops: 200 * 200 * 2000,
    scipyOp: 'symmetric_product',
    runs: 7,
    setup: () => {
      const g = randomDense(200, 2000, 6);
      const b = randomDense(2000, 200, 7);
      return () => symmetricProduct(g, b);
    },
  },
  {
    name: 'A Bᵀ m=n=k=1000',
    params: { m: 1000, k: 1000, n: 1000 },
    flops: 2 * 1000 ** 3,
    scipyOp: 'matmul_nt',
    runs: 5,
    setup: () => {
      const a = randomDense(1000, 1000, 3);
      const b = randomDense(1000, 1000, 4);
      return () => multiplyNT(a, b);
    },
  },
];
