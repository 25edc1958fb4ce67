import { describe, expect, it } from 'vitest';
import {
  CHOLESKY_BLOCK,
  cholesky,
  choleskySolve,
  choleskySolveMatrix,
  choleskyUnblocked,
  logDetFromCholesky,
  solveLower,
  solveLowerMatrix,
  solveLowerTranspose,
  solveLowerTransposeMatrix,
} from '../../../src/core/linalg/cholesky.ts';
import { fromRows, matmul, matrix, transpose, matvec } from '../../../src/core/linalg/matrix.ts';
import { randomMatrix, randomSpd, relError } from './helpers.ts';

describe('cholesky (small cases worked by hand)', () => {
  it('factors a small SPD matrix so that L Lᵀ = A', () => {
    const A = fromRows([
      [4, 2, 0.4],
      [2, 5, 1],
      [0.4, 1, 3],
    ]);
    const r = cholesky(A);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    // By hand: L00 = 2, L10 = 1, L11 = 2, L20 = 0.2, L21 = (1 − 0.2)/2 = 0.4, L22 = √(3 − 0.04 − 0.16).
    expect(Array.from(r.factor.data)).toEqual([2, 0, 0, 1, 2, 0, 0.2, 0.4, Math.sqrt(2.8)].map((v) => expect.closeTo(v, 14)));
    const back = matmul(r.factor, transpose(r.factor));
    back.data.forEach((v, k) => expect(v).toBeCloseTo(A.data[k], 14));
    const x = choleskySolve(r.factor, [1, 2, 3]);
    const ax = matvec(A, x);
    expect(Array.from(ax)).toEqual([1, 2, 3].map((v) => expect.closeTo(v, 12)));
  });
  it('reports the failing pivot of an indefinite matrix', () => {
    // [[1, 2], [2, 1]]: second pivot 1 − 2²/1 = −3.
    const r = cholesky(
      fromRows([
        [1, 2],
        [2, 1],
      ]),
    );
    expect(r).toEqual({ ok: false, pivot: 1, value: -3 });
  });
  it('rejects a non-square matrix with a message naming the shape', () => {
    expect(() => cholesky(matrix(2, 3))).toThrow(/2×3, expected square/);
  });
  it('handles the empty matrix', () => {
    const r = cholesky(matrix(0, 0));
    expect(r.ok).toBe(true);
  });
});

describe('blocked cholesky agrees with the unblocked oracle across block boundaries', () => {
  const b = CHOLESKY_BLOCK;
  for (const n of [3, b - 1, b, b + 1, 2 * b + 3, 5 * b - 2]) {
    it(`n = ${n}`, () => {
      const a = randomSpd(n, 40 + n);
      const r1 = cholesky(a);
      const r2 = choleskyUnblocked(a);
      expect(r1.ok && r2.ok).toBe(true);
      if (r1.ok && r2.ok) expect(relError(r1.factor.data, r2.factor.data)).toBeLessThan(1e-12);
    });
  }
  it('same failing pivot and value as the oracle when the failure is inside a later block', () => {
    const n = 3 * b + 5;
    const a = randomSpd(n, 9);
    const k = 2 * b + 1;
    a.data[k * n + k] = 0.01; // below the Schur complement's subtraction, so the pivot goes negative
    const r1 = cholesky(a);
    const r2 = choleskyUnblocked(a);
    expect(r1.ok).toBe(false);
    expect(r2.ok).toBe(false);
    if (!r1.ok && !r2.ok) {
      expect(r1.pivot).toBe(r2.pivot);
      expect(r1.value).toBeCloseTo(r2.value, 10);
    }
  });
});

describe('triangular solves', () => {
  const n = 150;
  const r = cholesky(randomSpd(n, 3));
  if (!r.ok) throw new Error('test matrix not SPD');
  const L = r.factor;
  it('matrix solves agree column by column with the vector solves', () => {
    const B = randomMatrix(n, 6, 4);
    const X1 = solveLowerMatrix(L, B);
    const X2 = solveLowerTransposeMatrix(L, B);
    const X3 = choleskySolveMatrix(L, B);
    for (let j = 0; j < 6; j++) {
      const b = Array.from({ length: n }, (_, i) => B.data[i * 6 + j]);
      const col = (X: typeof X1) => Array.from({ length: n }, (_, i) => X.data[i * 6 + j]);
      expect(relError(col(X1), solveLower(L, b))).toBeLessThan(1e-12);
      expect(relError(col(X2), solveLowerTranspose(L, b))).toBeLessThan(1e-12);
      expect(relError(col(X3), choleskySolve(L, b))).toBeLessThan(1e-12);
    }
  });
  it('shape mismatches throw with both shapes in the message', () => {
    expect(() => solveLowerMatrix(L, matrix(n + 1, 2))).toThrow(/150×150, B is 151×2/);
  });
  it('log det from the factor equals the sum of log pivots squared (2×2 by hand)', () => {
    // det [[4, 2], [2, 5]] = 16.
    const f = cholesky(
      fromRows([
        [4, 2],
        [2, 5],
      ]),
    );
    if (!f.ok) throw new Error('not SPD');
    expect(logDetFromCholesky(f.factor)).toBeCloseTo(Math.log(16), 14);
  });
});
