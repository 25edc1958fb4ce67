import { describe, expect, it } from 'vitest';
import { covarianceDefect } from '../../../src/core/io/covarianceCheck.ts';
import { fromRows } from '../../../src/core/linalg/matrix.ts';

// Hand-made 2×2 and 3×3 cases: [[1, 2], [2, 1]] has eigenvalues 3 and −1 (indefinite; worked by hand).
describe('covarianceDefect', () => {
  it.each([
    [
      'a valid covariance',
      [
        [2, 0.5],
        [0.5, 1],
      ],
      null,
    ],
    [
      'round-off asymmetry within 1e-12 of the largest entry',
      [
        [2, 0.5],
        [0.5 + 1e-13, 1],
      ],
      null,
    ],
    [
      'a real asymmetry names the lower entry and its mirror',
      [
        [2, 0.5],
        [0.4, 1],
      ],
      { kind: 'asymmetric', row: 1, col: 0, value: 0.4, mirror: 0.5 },
    ],
    [
      'an indefinite matrix names the failing pivot',
      [
        [1, 2],
        [2, 1],
      ],
      { kind: 'not-positive-definite', pivot: 1, value: -3 },
    ],
    [
      'a zero variance fails at its row',
      [
        [1, 0, 0],
        [0, 0, 0],
        [0, 0, 1],
      ],
      { kind: 'not-positive-definite', pivot: 1, value: 0 },
    ],
  ])('%s', (_name, rows, expected) => {
    expect(covarianceDefect(fromRows(rows as number[][]))).toEqual(expected);
  });
});
