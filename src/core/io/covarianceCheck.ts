/**
 * The check every covariance read from a file goes through: symmetric to 1e-12 of the largest |entry|
 * (round-off in written files is tolerated, a real asymmetry is not) and positive definite by the
 * Cholesky test (Higham 2002, Thm 10.7). Callers turn the defect into a message in their own terms.
 */
import { cholesky } from '../linalg/cholesky.ts';
import type { Matrix } from '../linalg/matrix.ts';

export type CovarianceDefect =
  | { readonly kind: 'asymmetric'; readonly row: number; readonly col: number; readonly value: number; readonly mirror: number }
  | { readonly kind: 'not-positive-definite'; readonly pivot: number; readonly value: number };

/** The first pair (i, j) of the square matrix `c` whose entries differ by more than 1e-12 of its largest |entry|, or null. */
export function asymmetry(c: Matrix): Extract<CovarianceDefect, { kind: 'asymmetric' }> | null {
  const n = c.rows;
  let scale = 0;
  for (const v of c.data) scale = Math.max(scale, Math.abs(v));
  const tol = 1e-12 * scale;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      const a = c.data[i * n + j];
      const b = c.data[j * n + i];
      if (Math.abs(a - b) > tol) return { kind: 'asymmetric', row: i, col: j, value: a, mirror: b };
    }
  }
  return null;
}

/** The first defect of the square matrix `c`, or null when it is a valid covariance. */
export function covarianceDefect(c: Matrix): CovarianceDefect | null {
  const a = asymmetry(c);
  if (a) return a;
  const f = cholesky(c);
  return f.ok ? null : { kind: 'not-positive-definite', pivot: f.pivot, value: f.value };
}
