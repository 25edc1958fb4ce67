import { describe, expect, it } from 'vitest';
import { fromRows, matrix, transpose, type Matrix } from '../../../src/core/linalg/matrix.ts';
import {
  columnSumsOfSquares,
  mirrorLowerToUpper,
  multiply,
  multiplyNT,
  plusRowCombination,
  rowSumsOfSquares,
  symmetricProduct,
  symmetricProductNT,
  transposeOf,
} from '../../../src/core/linalg/products.ts';
import { randomMatrix, relError } from './helpers.ts';
import { relErr, seededVector } from '../fft/cases.ts';
import { sameBits } from '../../worker/problems.ts';

/** Plain triple loop, the definition C_ij = Σ_p A_ip B_pj. */
function naive(a: Matrix, b: Matrix): Matrix {
  const c = matrix(a.rows, b.cols);
  for (let i = 0; i < a.rows; i++)
    for (let j = 0; j < b.cols; j++) {
      let s = 0;
      for (let p = 0; p < a.cols; p++) s += a.data[i * a.cols + p] * b.data[p * b.cols + j];
      c.data[i * b.cols + j] = s;
    }
  return c;
}

describe('dense products', () => {
  it('a 2×2 product worked by hand', () => {
    const c = multiply(
      fromRows([
        [1, 2],
        [3, 4],
      ]),
      fromRows([
        [5, 6],
        [7, 8],
      ]),
    );
    expect(Array.from(c.data)).toEqual([19, 22, 43, 50]);
  });
  // Shapes around the 4 × 2 tile and across the KC = 256 depth block.
  for (const [m, k, n] of [
    [1, 1, 1],
    [3, 2, 5],
    [4, 7, 2],
    [9, 257, 3],
    [6, 513, 7],
    [33, 40, 31],
  ] as const) {
    it(`${m}×${k} · ${k}×${n} matches the triple loop`, () => {
      const a = randomMatrix(m, k, m + 10 * k);
      const b = randomMatrix(k, n, n + 7 * k);
      const ref = naive(a, b);
      expect(relError(multiply(a, b).data, ref.data)).toBeLessThan(1e-13);
      expect(relError(multiplyNT(a, transposeOf(b)).data, ref.data)).toBeLessThan(1e-13);
    });
  }
  it('symmetric products fill both triangles with the full product', () => {
    for (const m of [1, 5, 18]) {
      const g = randomMatrix(m, 23, m);
      const bt = randomMatrix(m, 23, m + 1);
      // G Gᵀ is symmetric: compare with the full product.
      const full = naive(g, transposeOf(g));
      expect(relError(symmetricProductNT(g, g).data, full.data)).toBeLessThan(1e-13);
      expect(relError(symmetricProduct(g, transposeOf(g)).data, full.data)).toBeLessThan(1e-13);
      // For a non-symmetric product, the result is the lower triangle mirrored.
      const k = symmetricProductNT(g, bt);
      const f2 = naive(g, transposeOf(bt));
      for (let i = 0; i < m; i++)
        for (let j = 0; j <= i; j++) {
          expect(k.data[i * m + j]).toBeCloseTo(f2.data[i * m + j], 12);
          expect(k.data[j * m + i]).toBe(k.data[i * m + j]);
        }
    }
  });
  it('sums of squares by column and by row', () => {
    const w = fromRows([
      [1, 2, 3],
      [4, 5, 6],
    ]);
    expect(Array.from(columnSumsOfSquares(w))).toEqual([17, 29, 45]);
    expect(Array.from(rowSumsOfSquares(w))).toEqual([14, 77]);
  });
  it('mirrorLowerToUpper across 32-wide tiles', () => {
    const n = 70;
    const a = randomMatrix(n, n, 3);
    const low = a.data.slice();
    mirrorLowerToUpper(a);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(a.data[i * n + j]).toBe(j <= i ? low[i * n + j] : low[j * n + i]);
  });
  it('shape mismatches throw with both shapes', () => {
    expect(() => multiply(matrix(2, 3), matrix(4, 2))).toThrow(/A is 2×3, B is 4×2/);
    expect(() => multiplyNT(matrix(2, 3), matrix(4, 2))).toThrow(/expected 3 columns/);
  });
});

describe('transpose', () => {
  it('matches the definition on shapes around the 32-wide tiles', () => {
    for (const [r, c] of [
      [1, 1],
      [3, 70],
      [33, 31],
      [65, 64],
    ] as const) {
      const a = randomMatrix(r, c, r * 100 + c);
      const t = transpose(a);
      expect([t.rows, t.cols]).toEqual([c, r]);
      for (let i = 0; i < r; i++) for (let j = 0; j < c; j++) expect(t.data[j * r + i]).toBe(a.data[i * c + j]);
      expect(Array.from(transposeOf(a).data)).toEqual(Array.from(t.data));
    }
  });
});

describe('plusRowCombination: the posterior mean pass, four rows of Bᵀ at a time', () => {
  it('equals m0 + Σ_k α_k (scale · Bᵀ row k) summed a row at a time, and leaves Bᵀ scaled (M = 1 … 9: every tail length)', () => {
    for (let m = 1; m <= 9; m++) {
      const n = 13;
      const m0 = seededVector(n, 100 + m);
      const alpha = seededVector(m, 200 + m);
      const bt = seededVector(m * n, 300 + m);
      for (const scale of [1, 0.37]) {
        const ref = m0.slice();
        for (let k = 0; k < m; k++) for (let i = 0; i < n; i++) ref[i] += alpha[k] * (scale * bt[k * n + i]);
        const b = bt.slice();
        const mean = plusRowCombination(m0, b, alpha, n, scale);
        expect(relErr(mean, ref)).toBeLessThan(1e-14);
        expect(
          sameBits(
            b,
            bt.map((v) => scale * v),
          ),
        ).toBe(true);
        expect(mean).not.toBe(m0);
      }
    }
  });
});
