import { describe, expect, it } from 'vitest';
import {
  lanczosExtremes,
  symmetricEigen,
  symmetricEigenvalues,
  tridiagonalEigenvalues,
  tridiagonalise,
  tridiagonaliseUnblocked,
} from '../../../src/core/linalg/eigen.ts';
import { fromRows, matrix, matvec } from '../../../src/core/linalg/matrix.ts';
import { randomSymmetric, relError } from './helpers.ts';

/** 1-D Dirichlet Laplacian tridiag(−1, 2, −1): eigenvalues 2 − 2 cos(kπ/(n+1)), k = 1…n (textbook, memory). */
function laplacian(n: number) {
  const a = matrix(n, n);
  for (let i = 0; i < n; i++) {
    a.data[i * n + i] = 2;
    if (i > 0) a.data[i * n + i - 1] = a.data[(i - 1) * n + i] = -1;
  }
  const exact = Float64Array.from({ length: n }, (_, k) => 2 - 2 * Math.cos(((k + 1) * Math.PI) / (n + 1)));
  return { a, exact };
}

describe('symmetric eigenvalues', () => {
  it('a 2×2 worked by hand: [[2, 1], [1, 2]] has 1 and 3', () => {
    expect(
      Array.from(
        symmetricEigenvalues(
          fromRows([
            [2, 1],
            [1, 2],
          ]),
        ),
      ),
    ).toEqual([1, 3].map((v) => expect.closeTo(v, 14)));
  });
  for (const n of [1, 2, 5, 64, 201]) {
    it(`Laplacian n = ${n} against the closed form`, () => {
      const { a, exact } = laplacian(n);
      expect(relError(symmetricEigenvalues(a), exact)).toBeLessThan(1e-13);
      const d = new Float64Array(n).fill(2);
      const e = new Float64Array(Math.max(n - 1, 0)).fill(-1);
      expect(relError(tridiagonalEigenvalues(d, e), exact)).toBeLessThan(1e-13);
    });
  }
  it('a diagonal matrix (nothing to reduce) returns its sorted diagonal', () => {
    const a = matrix(4, 4);
    [3, -1, 7, 0].forEach((v, i) => (a.data[i * 4 + i] = v));
    expect(Array.from(symmetricEigenvalues(a))).toEqual([-1, 0, 3, 7]);
  });
  it('tridiagonalisation preserves trace and Frobenius norm (orthogonal similarity)', () => {
    const n = 37;
    const a = randomSymmetric(n, 2);
    const { d, e } = tridiagonalise(a);
    let tr = 0,
      fr = 0,
      trT = 0,
      frT = 0;
    for (let i = 0; i < n; i++) {
      tr += a.data[i * n + i];
      trT += d[i];
      frT += d[i] ** 2 + 2 * e[i] ** 2;
      for (let j = 0; j < n; j++) fr += a.data[i * n + j] ** 2;
    }
    expect(trT).toBeCloseTo(tr, 11);
    expect(frT).toBeCloseTo(fr, 10);
  });
  for (const n of [65, 97, 160]) {
    it(`blocked reduction n = ${n} gives the unblocked tridiagonal (panels of 32, partial last panel)`, () => {
      const a = randomSymmetric(n, 50 + n);
      const t1 = tridiagonalise(a);
      const t2 = tridiagonaliseUnblocked(a);
      expect(relError(t1.d, t2.d)).toBeLessThan(1e-12);
      expect(relError(t1.e, t2.e)).toBeLessThan(1e-12);
    });
  }
  it('eigenvectors: A V = V Λ and Vᵀ V = I', () => {
    const n = 90; // above the blocked-reduction threshold
    const a = randomSymmetric(n, 3);
    const { values, vectors } = symmetricEigen(a);
    let res = 0,
      orth = 0;
    for (let j = 0; j < n; j++) {
      const v = Float64Array.from({ length: n }, (_, i) => vectors.data[i * n + j]);
      const av = matvec(a, v);
      for (let i = 0; i < n; i++) res = Math.max(res, Math.abs(av[i] - values[j] * v[i]));
      for (let k = 0; k < n; k++) {
        let s = 0;
        for (let i = 0; i < n; i++) s += vectors.data[i * n + j] * vectors.data[i * n + k];
        orth = Math.max(orth, Math.abs(s - (j === k ? 1 : 0)));
      }
    }
    expect(res).toBeLessThan(1e-12);
    expect(orth).toBeLessThan(1e-12);
  });
  it('non-square or non-finite input is rejected with the entry named', () => {
    expect(() => symmetricEigenvalues(matrix(2, 3))).toThrow(/2×3, expected square/);
    const a = matrix(3, 3);
    a.data[2 * 3 + 1] = Number.NaN;
    expect(() => symmetricEigenvalues(a)).toThrow(/entry \(2, 1\) must be finite, got NaN/);
    expect(() => symmetricEigen(a)).toThrow(/entry \(2, 1\) must be finite/);
    a.data[2 * 3 + 1] = 0;
    a.data[1 * 3 + 2] = Number.NaN; // upper triangle is not read
    expect(Array.from(symmetricEigenvalues(a))).toEqual([0, 0, 0]);
  });
});

describe('lanczosExtremes', () => {
  it('stops early on an invariant subspace and is then exact (three distinct eigenvalues)', () => {
    const n = 50;
    const diag = Float64Array.from({ length: n }, (_, i) => [0.5, 2, 9][i % 3]);
    const r = lanczosExtremes((x) => x.map((v, i) => v * diag[i]), n, { iterations: 20 });
    expect(r.iterations).toBe(3);
    expect(r.min).toBeCloseTo(0.5, 12);
    expect(r.max).toBeCloseTo(9, 12);
  });
  it('the seed makes the run reproducible', () => {
    const { a } = laplacian(120);
    const f = (x: Float64Array) => matvec(a, x);
    expect(lanczosExtremes(f, 120, { seed: 3, iterations: 30 })).toEqual(lanczosExtremes(f, 120, { seed: 3, iterations: 30 }));
  });
  it('a wrong-length or non-finite product is reported', () => {
    expect(() => lanczosExtremes(() => new Float64Array(3), 4)).toThrow(/returned length 3, expected 4/);
    expect(() => lanczosExtremes(() => new Float64Array(4).fill(Number.NaN), 4)).toThrow(/non-finite product at step 0/);
  });
});
