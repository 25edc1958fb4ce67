/**
 * Eigenvalues against Debian's numpy.linalg.eigvalsh / eigh (LAPACK syevd), run through
 * test/reference/linalg_reference.py on seeded random symmetric matrices; Lanczos extremes against
 * the same eigvalsh.
 */
import { describe, expect, it } from 'vitest';
import { lanczosExtremes, symmetricEigen, symmetricEigenProjected, symmetricEigenvalues } from '../../src/core/linalg/eigen.ts';
import { matrix, matvec, type Matrix } from '../../src/core/linalg/matrix.ts';
import { runPython } from './python.ts';
import { poisonUpper, randomMatrix, randomSpd, randomSymmetric, relError, toJson, type JsonMatrix } from '../core/linalg/helpers.ts';

const SIZES = [1, 2, 3, 7, 63, 64, 65, 130, 257];

describe('symmetricEigenvalues vs numpy.linalg.eigvalsh (Debian python3-numpy)', () => {
  const mats = SIZES.flatMap((n) => [randomSymmetric(n, 100 + n), randomSpd(n, 200 + n)]);
  const ref = runPython<{ results: number[][] }>('linalg_reference.py', {
    cases: mats.map((a) => ({ op: 'eigvalsh', a: toJson(a) })),
  }).results;
  mats.forEach((a, k) => {
    it(`n = ${a.rows}, ${k % 2 === 0 ? 'indefinite' : 'SPD'}: all eigenvalues to 1e-10 relative to ‖A‖`, () => {
      // Reads the lower triangle only: the NaN upper triangle must not leak in.
      const ours = symmetricEigenvalues(poisonUpper(a));
      expect(ours.length).toBe(a.rows);
      expect(relError(ours, ref[k])).toBeLessThan(1e-10);
      for (let i = 1; i < ours.length; i++) expect(ours[i]).toBeGreaterThanOrEqual(ours[i - 1]);
    });
  });
});

describe('symmetricEigen vs numpy.linalg.eigh (Debian python3-numpy)', () => {
  const mats = [2, 7, 40, 65].map((n) => randomSymmetric(n, 300 + n));
  const ref = runPython<{ results: { values: number[]; vectors: JsonMatrix }[] }>('linalg_reference.py', {
    cases: mats.map((a) => ({ op: 'eigh', a: toJson(a) })),
  }).results;
  mats.forEach((a, k) => {
    it(`n = ${a.rows}: values match and vectors match up to sign`, () => {
      const n = a.rows;
      const { values, vectors } = symmetricEigen(poisonUpper(a));
      expect(relError(values, ref[k].values)).toBeLessThan(1e-10);
      const rv = ref[k].vectors.data;
      for (let j = 0; j < n; j++) {
        // Random matrices have well-separated eigenvalues, so each vector is unique up to sign.
        let dotp = 0;
        for (let i = 0; i < n; i++) dotp += vectors.data[i * n + j] * rv[i * n + j];
        const sign = dotp >= 0 ? 1 : -1;
        let err = 0;
        for (let i = 0; i < n; i++) err = Math.max(err, Math.abs(sign * vectors.data[i * n + j] - rv[i * n + j]));
        expect(err).toBeLessThan(1e-8);
      }
    });
  });
});

describe('symmetricEigenProjected vs numpy.linalg.eigh: Vᵀ B (Debian python3-numpy)', () => {
  const shapes = [
    [1, 1],
    [5, 2],
    [64, 1],
    [97, 3],
    [150, 4],
  ] as const;
  const inputs = shapes.map(([n, k]) => ({ a: randomSymmetric(n, 400 + n), b: randomMatrix(n, k, 500 + n) }));
  const ref = runPython<{ results: { values: number[]; projected: JsonMatrix }[] }>('linalg_reference.py', {
    cases: inputs.map(({ a, b }) => ({ op: 'eigh_project', a: toJson(a), b: toJson(b) })),
  }).results;
  shapes.forEach(([n, k], c) => {
    it(`n = ${n}, k = ${k}: values to 1e-10, each row of Vᵀ B to 1e-8 up to the eigenvector's sign`, () => {
      const { a, b } = inputs[c];
      const r = symmetricEigenProjected(poisonUpper(a), b);
      expect(relError(r.values, ref[c].values)).toBeLessThan(1e-10);
      const rp = ref[c].projected.data;
      for (let j = 0; j < n; j++) {
        const ours = Array.from(r.projected.data.subarray(j * k, (j + 1) * k));
        const theirs = rp.slice(j * k, (j + 1) * k);
        const same = Math.max(...ours.map((v, q) => Math.abs(v - theirs[q])));
        const flipped = Math.max(...ours.map((v, q) => Math.abs(v + theirs[q])));
        expect(Math.min(same, flipped)).toBeLessThan(1e-8);
      }
    });
  });
});

describe('lanczosExtremes vs numpy.linalg.eigvalsh (Debian python3-numpy)', () => {
  // Random SPD matrices (spectrum dense at its edges: slow convergence) and an evenly spaced spectrum
  // 1, 2, …, n rotated by two Householder reflections (relative gap 1/n: fast convergence).
  const cases = [
    { n: 300, iterations: 100, a: randomSpd(300, 11), converged: false },
    { n: 257, iterations: 60, a: randomSpd(257, 12), converged: false },
    { n: 40, iterations: 40, a: randomSpd(40, 13), converged: true },
    { n: 300, iterations: 100, a: plantedSpectrum(300, 14), converged: true },
  ];
  const ref = runPython<{ results: number[][] }>('linalg_reference.py', {
    cases: cases.map(({ a }) => ({ op: 'eigvalsh', a: toJson(a) })),
  }).results;
  cases.forEach(({ n, iterations, a, converged }, c) => {
    it(`n = ${n}, ${iterations} steps: extremes within the residual bound and inside the spectrum`, () => {
      const r = lanczosExtremes((x) => matvec(a, x), n, { iterations, seed: 5 });
      const lam = ref[c];
      const lo = lam[0];
      const hi = lam[n - 1];
      const tol = 1e-10 * hi;
      // Ritz values interlace, so they lie inside [λ_min, λ_max] (Cauchy interlacing, memory).
      expect(r.min).toBeGreaterThanOrEqual(lo - tol);
      expect(r.max).toBeLessThanOrEqual(hi + tol);
      // Some eigenvalue lies within the residual of each Ritz value; at the ends, the extreme one.
      expect(Math.abs(r.min - lo)).toBeLessThanOrEqual(r.minResidual + tol);
      expect(Math.abs(r.max - hi)).toBeLessThanOrEqual(r.maxResidual + tol);
      if (converged) {
        expect(Math.abs(r.min - lo) / hi).toBeLessThan(1e-8);
        expect(Math.abs(r.max - hi) / hi).toBeLessThan(1e-8);
      }
    });
  });
});

/** H₂ H₁ diag(1, …, n) H₁ H₂ with seeded Householder reflections H = I − 2uuᵀ. */
function plantedSpectrum(n: number, seed: number): Matrix {
  const a = matrix(n, n);
  for (let i = 0; i < n; i++) a.data[i * n + i] = i + 1;
  for (const s of [seed, seed + 1]) {
    const u = randomMatrix(1, n, s).data;
    const nu = Math.sqrt(u.reduce((acc, v) => acc + v * v, 0));
    for (let i = 0; i < n; i++) u[i] /= nu;
    // A ← H A H = A − 2u(uᵀA) − 2(Au)uᵀ + 4(uᵀAu) u uᵀ
    const au = matvec(a, u);
    const uau = au.reduce((acc, v, i) => acc + v * u[i], 0);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        a.data[i * n + j] += -2 * u[i] * au[j] - 2 * au[i] * u[j] + 4 * uau * u[i] * u[j];
      }
    }
  }
  return a;
}

describe('numerically singular covariances (regression: QL used to cycle on eigenvalue clusters at 0)', () => {
  // Gaussian correlation exp(−h²/2) on 200 points with lengths 40 and 80 spacings: the spectrum falls
  // to round-off within a few dozen eigenvalues, so most of d is at the 1e-16‖A‖ level.
  const cases = [40, 80].map((len) => {
    const n = 200;
    const a = matrix(n, n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) a.data[i * n + j] = Math.exp(-0.5 * ((i - j) / len) ** 2);
    return a;
  });
  const ref = runPython<{ results: number[][] }>('linalg_reference.py', {
    cases: cases.map((a) => ({ op: 'eigvalsh', a: toJson(a) })),
  }).results;
  cases.forEach((a, k) => {
    it(`length ${[40, 80][k]} spacings: converges and matches numpy.linalg.eigvalsh to 1e-12·‖A‖`, () => {
      const ours = symmetricEigenvalues(a);
      const ref_ = ref[k];
      const norm = Math.max(...ref_.map(Math.abs));
      for (let i = 0; i < ours.length; i++) expect(Math.abs(ours[i] - ref_[i])).toBeLessThan(1e-12 * norm);
    });
  });
});
