/**
 * Small invented problems for the worker tests: a 1-D profile of 160 cells (≥ 128, so the
 * automatic path is the FFT one for a stationary prior) seen through 12 window averages, with
 * diagonal or full (AR(1)-correlated) data errors, and a 100-cell one (dense path).
 */
import type { Problem } from '../../src/core/problems/spec.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';

export const M = 12;

/** Row k averages cells 10k+2 … 10k+9 (8 cells, weight 1/8). */
export function windowOperator(n: number, m = M): Float64Array {
  const g = new Float64Array(m * n);
  for (let k = 0; k < m; k++) for (let j = 10 * k + 2; j < 10 * k + 10; j++) g[k * n + j] = 1 / 8;
  return g;
}

export function profileProblem(n: number, errors: 'diagonal' | 'full'): Problem {
  const values = Float64Array.from({ length: M }, (_, k) => 0.4 + 0.8 * Math.sin(0.7 * k) + 0.03 * ((k * 7) % 5));
  const data =
    errors === 'diagonal'
      ? { values, sigma: Float64Array.from({ length: M }, (_, k) => 0.05 + 0.01 * (k % 3)) }
      : {
          values,
          // Cd_ij = 0.01 · 0.5^|i−j|: the AR(1) correlation, positive definite for |ρ| < 1.
          covariance: {
            rows: M,
            cols: M,
            data: Float64Array.from({ length: M * M }, (_, q) => 0.01 * 0.5 ** Math.abs(Math.floor(q / M) - (q % M))),
          },
        };
  return {
    title: 'worker test profile (invented)',
    grid: { shape: [n], spacing: [1] },
    operator: { kind: 'dense', matrix: { rows: M, cols: n, data: windowOperator(n) } },
    data,
  };
}

export const PRIOR: PriorSpec = { mean: { constant: 0.4 }, terms: [{ kernel: 'exponential', variance: 1.3, length: 6 }], nugget: 0 };

/** Same length and same bits (Object.is per element, so −0 ≠ 0 and NaN = NaN). */
export function sameBits(a: ArrayLike<number>, b: ArrayLike<number>): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return false;
  return true;
}
