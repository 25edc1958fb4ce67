/**
 * In-process cross-check of our Cholesky and symmetric eigen-solver against ml-matrix (an
 * independent JavaScript implementation: JAMA's algorithms, Householder tridiagonalisation + QL
 * with its own code), on seeded random matrices at sizes around the blocked Cholesky's panel width
 * (CHOLESKY_BLOCK = 64) and the blocked tridiagonalisation. The scipy/LAPACK checks in
 * test/reference/ remain the outside reference; this one runs without Python, on more sizes.
 *
 * Tolerances come from the backward stability of both algorithms (Golub & Van Loan, 4th ed.,
 * §4.2.6 and §8.3, from memory): a computed factor is exact for A + E with ‖E‖ ≲ c·n·ε·‖A‖, so
 * eigenvalues differ by at most that (Weyl), eigenvectors by an angle ≲ ‖E‖ / gap (Davis–Kahan),
 * and the Cholesky factor by ≲ κ(A)·c·n·ε relative. Two solvers: twice the bound; c = 10 is a loose
 * constant for these sizes.
 */
import { CholeskyDecomposition, EigenvalueDecomposition, Matrix as MlMatrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { cholesky } from '../../../src/core/linalg/cholesky.ts';
import { symmetricEigen, symmetricEigenvalues } from '../../../src/core/linalg/eigen.ts';
import type { Matrix } from '../../../src/core/linalg/matrix.ts';
import { randomSpd, randomSymmetric } from './helpers.ts';

const EPS = 2 ** -52;
const C = 10;

function toMl(a: Matrix): MlMatrix {
  return new MlMatrix(Array.from({ length: a.rows }, (_, i) => Array.from(a.data.subarray(i * a.cols, (i + 1) * a.cols))));
}

/** ml-matrix's eigenvalues ascending, with the eigenvector of each as a column array. */
function mlEigen(a: Matrix): { values: number[]; vectors: number[][] } {
  const e = new EigenvalueDecomposition(toMl(a), { assumeSymmetric: true });
  const order = e.realEigenvalues.map((v, j) => [v, j] as const).sort((x, y) => x[0] - y[0]);
  return { values: order.map(([v]) => v), vectors: order.map(([, j]) => e.eigenvectorMatrix.getColumn(j)) };
}

describe('Cholesky against ml-matrix', () => {
  it.each([1, 7, 63, 64, 65, 130, 200])('n = %i: the same factor within κ·n·ε', (n) => {
    const a = randomSpd(n, 1000 + n);
    const ours = cholesky(a);
    expect(ours.ok).toBe(true);
    if (!ours.ok) return;
    const ml = new CholeskyDecomposition(toMl(a));
    expect(ml.isPositiveDefinite()).toBe(true);
    const lm = ml.lowerTriangularMatrix;
    const ev = mlEigen(a).values;
    const kappa = ev[n - 1] / ev[0];
    let diff = 0;
    let scale = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const x = ours.factor.data[i * n + j];
        diff = Math.max(diff, Math.abs(x - lm.get(i, j)));
        scale = Math.max(scale, Math.abs(x));
      }
    }
    expect(diff / scale).toBeLessThanOrEqual(2 * C * kappa * n * EPS);
  });

  it('an indefinite matrix: both refuse it', () => {
    const a = randomSymmetric(40, 77);
    expect(mlEigen(a).values[0]).toBeLessThan(0);
    expect(cholesky(a).ok).toBe(false);
    expect(new CholeskyDecomposition(toMl(a)).isPositiveDefinite()).toBe(false);
  });
});

describe('symmetric eigen-solver against ml-matrix', () => {
  it.each([2, 17, 64, 97, 160])('n = %i (indefinite): eigenvalues within n·ε·‖A‖, eigenvectors within ‖E‖ / gap', (n) => {
    const a = randomSymmetric(n, 2000 + n);
    const ref = mlEigen(a);
    const norm = Math.max(Math.abs(ref.values[0]), Math.abs(ref.values[n - 1]));
    const bound = 2 * C * n * EPS * norm;
    const values = symmetricEigenvalues(a);
    values.forEach((v, j) => expect(Math.abs(v - ref.values[j])).toBeLessThanOrEqual(bound));
    const full = symmetricEigen(a);
    full.values.forEach((v, j) => expect(Math.abs(v - ref.values[j])).toBeLessThanOrEqual(bound));
    for (let j = 0; j < n; j++) {
      const gap = Math.min(j > 0 ? ref.values[j] - ref.values[j - 1] : Infinity, j < n - 1 ? ref.values[j + 1] - ref.values[j] : Infinity);
      // Up to sign, ‖v − v̂‖ = 2 sin(θ/2) ≤ θ ≤ (π/2) sin θ, and sin θ ≤ ‖E‖ / gap.
      let dot = 0;
      for (let i = 0; i < n; i++) dot += full.vectors.data[i * n + j] * ref.vectors[j][i];
      let dist = 0;
      for (let i = 0; i < n; i++) dist += (full.vectors.data[i * n + j] - Math.sign(dot) * ref.vectors[j][i]) ** 2;
      expect(Math.sqrt(dist)).toBeLessThanOrEqual(Math.min(2, ((Math.PI / 2) * bound) / gap));
    }
  });
});
