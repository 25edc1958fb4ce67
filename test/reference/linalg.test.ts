/**
 * Dense and sparse linear algebra against Debian's numpy / scipy (test/reference/linalg_reference.py):
 * numpy.linalg.cholesky, scipy.linalg.solve_triangular, numpy.linalg.det and numpy's matmul, on
 * seeded random matrices whose sizes straddle the block sizes (CHOLESKY_BLOCK = 64, KC = 256).
 */
import { describe, expect, it } from 'vitest';
import {
  cholesky,
  choleskySolveMatrix,
  solveLowerMatrix,
  solveLowerMatrixTransposed,
  solveLowerRows,
  solveLowerTransposeMatrix,
} from '../../src/core/linalg/cholesky.ts';
import { matmul, matrix, type Matrix } from '../../src/core/linalg/matrix.ts';
import { columnSumsOfSquares, multiply, multiplyNT, symmetricProduct, transposeOf } from '../../src/core/linalg/products.ts';
import { denseToSparse } from '../../src/core/linalg/sparse.ts';
import { denseTimesOperatorTranspose, operatorTimesDense } from '../../src/core/linalg/operator.ts';
import { runPython } from './python.ts';
import { poisonUpper, randomMatrix, randomSpd, relError, seededUniform, toJson, type JsonMatrix } from '../core/linalg/helpers.ts';

type Ref = { results: unknown[] };
const py = (cases: unknown[]) => runPython<Ref>('linalg_reference.py', { cases }).results;
const fromJson = (m: JsonMatrix): Matrix => matrix(m.rows, m.cols, Float64Array.from(m.data));

const SIZES = [1, 2, 7, 63, 64, 65, 130, 257, 400];

describe('cholesky vs numpy.linalg.cholesky (Debian python3-numpy)', () => {
  const mats = SIZES.map((n) => randomSpd(n, 1000 + n));
  const ref = py(mats.map((a) => ({ op: 'cholesky', a: toJson(a) }))) as { failed: boolean; factor: JsonMatrix }[];
  mats.forEach((a, k) => {
    it(`n = ${a.rows}: factor to 1e-10 relative, strict upper triangle zero, input untouched`, () => {
      const before = a.data.slice();
      const r = cholesky(poisonUpper(a));
      expect(r.ok).toBe(true);
      if (!r.ok) return;
      expect(ref[k].failed).toBe(false);
      expect(relError(r.factor.data, ref[k].factor.data)).toBeLessThan(1e-10);
      const n = a.rows;
      let upperNonZero = 0;
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) if (r.factor.data[i * n + j] !== 0) upperNonZero++;
      expect(upperNonZero).toBe(0);
      expect(a.data).toEqual(before);
    });
  });
  it('inPlace overwrites the input with the same factor', () => {
    const a = randomSpd(130, 77);
    const ref1 = py([{ op: 'cholesky', a: toJson(a) }])[0] as { factor: JsonMatrix };
    const r = cholesky(a, { inPlace: true });
    expect(r.ok && r.factor.data === a.data).toBe(true);
    expect(relError(a.data, ref1.factor.data)).toBeLessThan(1e-10);
  });
  it('jitter is added to the diagonal before factoring', () => {
    const a = randomSpd(70, 78);
    const shifted = matrix(70, 70, a.data.slice());
    for (let i = 0; i < 70; i++) shifted.data[i * 70 + i] += 0.5;
    const ref1 = py([{ op: 'cholesky', a: toJson(shifted) }])[0] as { factor: JsonMatrix };
    const r = cholesky(a, { jitter: 0.5 });
    expect(r.ok).toBe(true);
    if (r.ok) expect(relError(r.factor.data, ref1.factor.data)).toBeLessThan(1e-10);
  });
});

describe('cholesky failure: pivot of the first indefinite leading minor (Sylvester criterion via numpy.linalg.det)', () => {
  // A[k][k] := −1 keeps the leading k × k minor SPD and makes the (k+1) × (k+1) one indefinite.
  const cases = [
    [5, 0],
    [20, 7],
    [130, 63],
    [130, 64],
    [130, 65],
    [300, 200],
  ] as const;
  const broken = cases.map(([n, k]) => {
    const a = randomSpd(n, 2000 + n + k);
    a.data[k * n + k] = -1;
    return a;
  });
  const refs = py(
    broken.flatMap((a, c) => [
      { op: 'cholesky', a: toJson(a) },
      { op: 'leading_minor_det', a: toJson(a), k: cases[c][1] + 1 },
    ]),
  );
  cases.forEach(([n, k], c) => {
    it(`n = ${n}, broken at row ${k}: pivot ${k}, value = det(A_{k+1}) / det(A_k)`, () => {
      const a = broken[c];
      const chol = refs[2 * c] as { failed: boolean };
      const dets = refs[2 * c + 1] as number[];
      expect(chol.failed).toBe(true);
      for (let i = 0; i < k; i++) expect(dets[i]).toBeGreaterThan(0);
      expect(dets[k]).toBeLessThan(0);
      const r = cholesky(poisonUpper(a));
      expect(r.ok).toBe(false);
      if (r.ok) return;
      expect(r.pivot).toBe(k);
      // The failing pivot is the Schur complement det(A_{k+1}) / det(A_k) (Golub & Van Loan §4.2, memory).
      const expected = k === 0 ? dets[0] : dets[k] / dets[k - 1];
      expect(Math.abs(r.value - expected)).toBeLessThan(1e-8 * Math.max(1, Math.abs(expected)));
    });
  });
  it('a NaN in the lower triangle is reported as a failed pivot, not a NaN factor', () => {
    const a = randomSpd(80, 5);
    a.data[70 * 80 + 3] = Number.NaN;
    const r = cholesky(a);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.pivot).toBe(70);
      expect(Number.isNaN(r.value)).toBe(true);
    }
  });
});

describe('triangular solves with many right-hand sides vs scipy.linalg.solve_triangular (Debian python3-scipy)', () => {
  const shapes = [
    [1, 1],
    [7, 3],
    [63, 5],
    [64, 64],
    [65, 9],
    [130, 100],
    [257, 7],
    [300, 33],
  ] as const;
  const problems = shapes.map(([n, k]) => {
    const r = cholesky(randomSpd(n, 3000 + n));
    if (!r.ok) throw new Error('test matrix not SPD');
    return { L: r.factor, B: randomMatrix(n, k, 4000 + n + k) };
  });
  const refs = py(
    problems.flatMap(({ L, B }) => [
      { op: 'solve_lower', l: toJson(L), b: toJson(B) },
      { op: 'solve_lower_t', l: toJson(L), b: toJson(B) },
      { op: 'cho_solve', l: toJson(L), b: toJson(B) },
    ]),
  ) as JsonMatrix[];
  shapes.forEach(([n, k], c) => {
    it(`n = ${n}, k = ${k}: L X = B, Lᵀ X = B, A X = B, L X = Bᵀ`, () => {
      const { L, B } = problems[c];
      const Bt = transposeOf(B);
      const [x1, x2, x3] = [refs[3 * c], refs[3 * c + 1], refs[3 * c + 2]];
      expect(relError(solveLowerMatrix(L, B).data, x1.data)).toBeLessThan(1e-10);
      expect(relError(solveLowerTransposeMatrix(L, B).data, x2.data)).toBeLessThan(1e-10);
      expect(relError(choleskySolveMatrix(L, B).data, x3.data)).toBeLessThan(1e-10);
      expect(relError(solveLowerMatrixTransposed(L, Bt).data, x1.data)).toBeLessThan(1e-10);
      expect(relError(solveLowerRows(L, Bt).data, transposeOf(fromJson(x1)).data)).toBeLessThan(1e-10);
    });
  });
});

describe('products vs numpy matmul (Debian python3-numpy)', () => {
  const shapes = [
    [1, 1, 1],
    [7, 5, 3],
    [65, 300, 33],
    [130, 257, 129],
    [9, 600, 4],
  ] as const;
  const pairs = shapes.map(([m, k, n]) => [randomMatrix(m, k, 5000 + m), randomMatrix(k, n, 6000 + n)] as const);
  const refs = py(pairs.map(([A, B]) => ({ op: 'matmul', a: toJson(A), b: toJson(B) }))) as JsonMatrix[];
  shapes.forEach(([m, k, n], c) => {
    it(`${m}×${k} times ${k}×${n}: multiply, multiplyNT, matmul`, () => {
      const [A, B] = pairs[c];
      const ref = refs[c];
      expect(relError(multiply(A, B).data, ref.data)).toBeLessThan(1e-12);
      expect(relError(multiplyNT(A, transposeOf(B)).data, ref.data)).toBeLessThan(1e-12);
      expect(relError(matmul(A, B).data, ref.data)).toBeLessThan(1e-12);
    });
  });
  it('symmetric product G (Cm Gᵀ), Σ_k W_ki², and the sparse-operator products', () => {
    const M = 37;
    const N = 150;
    const cm = randomSpd(N, 7);
    // A sparse-ish G: about 10 % non-zeros, seeded.
    const u = seededUniform(8);
    const gd = randomMatrix(M, N, 9);
    for (let i = 0; i < gd.data.length; i++) if (u() < 0.8) gd.data[i] = 0;
    const G = { kind: 'sparse' as const, matrix: denseToSparse(gd) };
    const Gdense = { kind: 'dense' as const, matrix: gd };
    const X = randomMatrix(N, 11, 10);
    const [bRef, gxRef] = py([
      { op: 'matmul', a: toJson(cm), b: toJson(transposeOf(gd)) },
      { op: 'matmul', a: toJson(gd), b: toJson(X) },
    ]) as [JsonMatrix, JsonMatrix];
    const Bs = denseTimesOperatorTranspose(cm, G);
    const Bd = denseTimesOperatorTranspose(cm, Gdense);
    expect(relError(Bs.data, bRef.data)).toBeLessThan(1e-12);
    expect(relError(Bd.data, bRef.data)).toBeLessThan(1e-12);
    expect(relError(operatorTimesDense(G, X).data, gxRef.data)).toBeLessThan(1e-12);
    expect(relError(operatorTimesDense(Gdense, X).data, gxRef.data)).toBeLessThan(1e-12);
    const [kRef, sRef] = py([
      { op: 'matmul', a: toJson(gd), b: bRef },
      { op: 'colsumsq', a: bRef },
    ]) as [JsonMatrix, number[]];
    expect(relError(symmetricProduct(gd, Bs).data, kRef.data)).toBeLessThan(1e-12);
    expect(relError(columnSumsOfSquares(fromJson(bRef)), sRef)).toBeLessThan(1e-12);
  });
});
