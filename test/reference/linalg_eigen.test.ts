/**
 * Eigenvalues against Debian's numpy.linalg.eigvalsh / eigh (LAPACK syevd), run through
 * test/reference/linalg_reference.py on seeded random symmetric matrices.
 */
import { describe, expect, it } from 'vitest';
import { symmetricEigen, symmetricEigenvalues } from '../../src/core/linalg/eigen.ts';
import { runPython } from './python.ts';
import { poisonUpper, randomSpd, randomSymmetric, relError, toJson, type JsonMatrix } from '../core/linalg/helpers.ts';

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
      expect(relError(ours, ref[k]!)).toBeLessThan(1e-10);
      for (let i = 1; i < ours.length; i++) expect(ours[i]!).toBeGreaterThanOrEqual(ours[i - 1]!);
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
      expect(relError(values, ref[k]!.values)).toBeLessThan(1e-10);
      const rv = ref[k]!.vectors.data;
      for (let j = 0; j < n; j++) {
        // Random matrices have well-separated eigenvalues, so each vector is unique up to sign.
        let dotp = 0;
        for (let i = 0; i < n; i++) dotp += vectors.data[i * n + j]! * rv[i * n + j]!;
        const sign = dotp >= 0 ? 1 : -1;
        let err = 0;
        for (let i = 0; i < n; i++) err = Math.max(err, Math.abs(sign * vectors.data[i * n + j]! - rv[i * n + j]!));
        expect(err).toBeLessThan(1e-8);
      }
    });
  });
});
