/**
 * Prior realisations m = m0 + L z with Cm = L Lᵀ (Cholesky) and z ~ N(0, I): then
 * E[m] = m0 and Cov[m] = L E[z zᵀ] Lᵀ = Cm (e.g. Rasmussen & Williams 2006, Appendix A.2).
 *
 * Stream layout (part of the "same seed, same numbers" contract): realisation r uses normal
 * variates r·N … r·N + N − 1 of the generator seeded with `seed` (./random.ts), in cell order.
 */
import { InputError, NotPositiveDefiniteError } from '../errors.ts';
import type { Grid } from '../grid/grid.ts';
import { cholesky } from '../linalg/cholesky.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { covarianceMatrix, meanVector } from '../prior/covariance.ts';
import { diagnoseCovariance } from '../prior/diagnostics.ts';
import type { PriorSpec } from '../prior/spec.ts';
import { Random, validateSeed } from './random.ts';

/** `count` prior realisations m0 + L z, one per row (count × N); same seed, same numbers everywhere. */
export function priorRealisations(grid: Grid, prior: PriorSpec, count: number, seed: number): Matrix {
  if (!Number.isInteger(count) || count < 0) throw new InputError('count', 'a non-negative integer', count);
  validateSeed(seed);
  const m0 = meanVector(grid, prior);
  const c = covarianceMatrix(grid, prior);
  const r = cholesky(c);
  if (!r.ok) {
    const d = diagnoseCovariance(c, { grid, prior });
    const hint =
      d.suggestedJitter !== null
        ? `add a nugget of about ${d.suggestedJitter.toPrecision(2)} (${d.suggestedJitterRelative!.toExponential(0)} of the mean variance) to the prior`
        : 'check the covariance terms; no diagonal jitter up to 10% of the mean variance makes it factor';
    throw new NotPositiveDefiniteError('prior covariance Cm', r.pivot, hint);
  }
  return realisationsFromFactor(r.factor, m0, count, new Random(seed));
}

/** Rows m0 + L z_r for r = 0 … count − 1, z_r the next N normal variates of `rng`. */
export function realisationsFromFactor(L: Matrix, m0: ArrayLike<number>, count: number, rng: Random): Matrix {
  const n = L.rows;
  const out = matrix(count, n);
  const z = new Float64Array(n);
  const l = L.data;
  for (let r = 0; r < count; r++) {
    rng.fillNormal(z);
    const o = r * n;
    for (let i = 0; i < n; i++) {
      const oi = i * n;
      let s = 0;
      for (let k = 0; k <= i; k++) s += l[oi + k]! * z[k]!;
      out.data[o + i] = m0[i]! + s;
    }
  }
  return out;
}
