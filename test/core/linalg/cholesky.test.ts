import { describe, expect, it } from 'vitest';
import { cholesky, choleskySolve } from '../../../src/core/linalg/cholesky.ts';
import { fromRows, matmul, transpose, matvec } from '../../../src/core/linalg/matrix.ts';

describe('cholesky (reference version)', () => {
  it('factors a small SPD matrix so that L Lᵀ = A', () => {
    const A = fromRows([[4, 2, 0.4], [2, 5, 1], [0.4, 1, 3]]);
    const r = cholesky(A);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const back = matmul(r.factor, transpose(r.factor));
    back.data.forEach((v, k) => expect(v).toBeCloseTo(A.data[k]!, 14));
    const x = choleskySolve(r.factor, [1, 2, 3]);
    const ax = matvec(A, x);
    expect(Array.from(ax)).toEqual([1, 2, 3].map((v) => expect.closeTo(v, 12)));
  });
  it('reports the failing pivot of an indefinite matrix', () => {
    const r = cholesky(fromRows([[1, 2], [2, 1]]));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.pivot).toBe(1);
  });
});
