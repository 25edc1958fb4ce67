/**
 * covarianceOperator (FFT path) against the dense Cm of prior/covariance.ts (lag-table assembly
 * written independently by the prior module) on every case of the shared table; numpy is the
 * outside check in test/reference/fft.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { covarianceOperator, isStationaryOnGrid, nonStationaryReason } from '../../../src/core/fft/covariance.ts';
import { cellCount, type Grid } from '../../../src/core/grid/grid.ts';
import { diagonal, matvec } from '../../../src/core/linalg/matrix.ts';
import { covarianceMatrix } from '../../../src/core/prior/covariance.ts';
import { COVARIANCE_CASES, relErr, seededVector } from './cases.ts';

describe('FFT-path Cm·x equals dense Cm·x to 1e-10 relative', () => {
  for (const { name, grid, prior } of COVARIANCE_CASES) {
    it(name, () => {
      const n = cellCount(grid);
      const cm = covarianceMatrix(grid, prior);
      const op = covarianceOperator(grid, prior);
      expect(op.path).toBe('fft');
      expect(isStationaryOnGrid(grid, prior)).toBe(true);
      for (const seed of [1, 2]) {
        const x = seededVector(n, seed);
        expect(relErr(op.apply(x), matvec(cm, x))).toBeLessThan(1e-10);
      }
      // A unit vector picks one column: exact column of Cm (the far-corner cell exercises every lag).
      const e = new Float64Array(n);
      e[n - 1] = 1;
      expect(relErr(op.apply(e), matvec(cm, e))).toBeLessThan(1e-10);
      expect(relErr(op.diagonal(), diagonal(cm))).toBeLessThan(1e-14);
    });
  }
});

describe('padding and path', () => {
  it('reports power-of-two padding ≥ 2n − 1 per axis', () => {
    const grid: Grid = { shape: [9, 7], spacing: [1, 1] };
    const op = covarianceOperator(grid, COVARIANCE_CASES[6]!.prior);
    expect(op.padding).toEqual([32, 16]);
    expect(covarianceOperator({ shape: [64], spacing: [1] }, COVARIANCE_CASES[0]!.prior).padding).toEqual([128]);
  });

  it('the dense path can be requested and agrees with the FFT path', () => {
    const { grid, prior } = COVARIANCE_CASES[12]!;
    const dense = covarianceOperator(grid, prior, { path: 'dense' });
    expect(dense.path).toBe('dense');
    expect(dense.reason).toMatch(/requested/);
    const x = seededVector(cellCount(grid), 5);
    expect(relErr(covarianceOperator(grid, prior).apply(x), dense.apply(x))).toBeLessThan(1e-10);
  });

  it('applyMany on an odd number of rows matches apply row by row', () => {
    const { grid, prior } = COVARIANCE_CASES[9]!;
    const n = cellCount(grid);
    const op = covarianceOperator(grid, prior);
    const data = seededVector(3 * n, 8);
    const out = op.applyMany({ rows: 3, cols: n, data });
    for (let r = 0; r < 3; r++) expect(relErr(out.data.subarray(r * n, (r + 1) * n), op.apply(data.subarray(r * n, (r + 1) * n)))).toBeLessThan(1e-13);
  });

  it('a 3-axis grid is not FFT-able and the reason says why', () => {
    expect(nonStationaryReason({ shape: [2, 2, 2], spacing: [1, 1, 1] }, COVARIANCE_CASES[0]!.prior)).toMatch(/3 axes/);
  });

  it('names the field for a vector of the wrong length', () => {
    const { grid, prior } = COVARIANCE_CASES[0]!;
    expect(() => covarianceOperator(grid, prior).apply(new Float64Array(5))).toThrow(/x must be a vector of length 23/);
  });
});
