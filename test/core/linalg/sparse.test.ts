import { describe, expect, it } from 'vitest';
import { matmul, matrix } from '../../../src/core/linalg/matrix.ts';
import {
  denseTimesSparseTranspose,
  denseToSparse,
  sparseFromCoordinates,
  sparseTimesDense,
  sparseToDense,
} from '../../../src/core/linalg/sparse.ts';
import { transposeOf } from '../../../src/core/linalg/products.ts';
import { randomMatrix, relError, seededUniform } from './helpers.ts';

describe('sparse × dense products', () => {
  const u = seededUniform(21);
  const g = randomMatrix(17, 60, 22);
  for (let i = 0; i < g.data.length; i++) if (u() < 0.85) g.data[i] = 0;
  const s = denseToSparse(g);
  it('S X equals the dense product', () => {
    const x = randomMatrix(60, 5, 23);
    expect(relError(sparseTimesDense(s, x).data, matmul(g, x).data)).toBeLessThan(1e-14);
  });
  it('A Sᵀ equals the dense product', () => {
    const a = randomMatrix(9, 60, 24);
    expect(relError(denseTimesSparseTranspose(a, s).data, matmul(a, transposeOf(g)).data)).toBeLessThan(1e-14);
  });
  it('duplicates are summed and empty rows give zero rows', () => {
    const t = sparseFromCoordinates(3, 2, [0, 0, 2], [1, 1, 0], [1.5, 2.5, -1]);
    expect(Array.from(sparseToDense(t).data)).toEqual([0, 4, 0, 0, -1, 0]);
    const x = matrix(2, 1, Float64Array.from([10, 100]));
    expect(Array.from(sparseTimesDense(t, x).data)).toEqual([400, 0, -10]);
  });
  it('CSR from shuffled coordinates with duplicates equals a stable sort by (row, column), duplicates summed in entry order', () => {
    const u77 = seededUniform(77);
    const rnd = () => (u77() + 1) / 2; // [0, 1)
    const nnz = 5000;
    const ri = Array.from({ length: nnz }, () => Math.floor(rnd() * 40));
    const ci = Array.from({ length: nnz }, () => Math.floor(rnd() * 30));
    const v = Array.from({ length: nnz }, () => (rnd() - 0.5) * 10 ** Math.floor(rnd() * 12 - 6));
    // Reference: the textbook construction (stable sort of the entries, then one pass summing equal pairs).
    const order = Array.from({ length: nnz }, (_, k) => k).sort((a, b) => ri[a]! - ri[b]! || ci[a]! - ci[b]!);
    const rowPtr = new Array<number>(41).fill(0);
    const colIdx: number[] = [];
    const values: number[] = [];
    let last = '';
    for (const k of order) {
      const key = `${ri[k]},${ci[k]}`;
      if (key === last) values[values.length - 1]! += v[k]!;
      else {
        colIdx.push(ci[k]!);
        values.push(v[k]!);
        rowPtr[ri[k]! + 1]!++;
      }
      last = key;
    }
    for (let i = 0; i < 40; i++) rowPtr[i + 1]! += rowPtr[i]!;
    const t = sparseFromCoordinates(40, 30, ri, ci, v);
    expect(Array.from(t.rowPtr)).toEqual(rowPtr);
    expect(Array.from(t.colIdx)).toEqual(colIdx);
    expect(Array.from(t.values)).toEqual(values);
    expect(() => sparseFromCoordinates(3, 2, [0, 3], [0, 0], [1, 1])).toThrow(/row 3 of entry 1 outside 0…2/);
  });
  it('shape mismatches throw', () => {
    expect(() => sparseTimesDense(s, matrix(59, 2))).toThrow(/expected 60 rows/);
    expect(() => denseTimesSparseTranspose(matrix(2, 59), s)).toThrow(/expected 59 columns/);
  });
});
