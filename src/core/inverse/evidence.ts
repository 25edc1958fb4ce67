/**
 * Log marginal likelihood (evidence) of a linear-Gaussian model from the Cholesky factor of the
 * data-space covariance. PUBLIC API: logEvidenceFromFactor, LOG_2PI.
 *
 * With d ~ N(G m0, K), K = G Cm Gᵀ + Cd = L Lᵀ, r = d − G m0 and α = K⁻¹ r:
 *   log p(d) = −½ rᵀ α − Σ_i log L_ii − (M/2) log 2π
 * (Rasmussen & Williams 2006, Gaussian Processes for Machine Learning, Algorithm 2.1 line 8 / eq. 2.30).
 */
import type { Matrix } from '../linalg/matrix.ts';

export const LOG_2PI = Math.log(2 * Math.PI);

/** log N(r; 0, L Lᵀ) given L, r and α = (L Lᵀ)⁻¹ r. */
export function logEvidenceFromFactor(L: Matrix, r: ArrayLike<number>, alpha: ArrayLike<number>): number {
  const m = L.rows;
  let quad = 0;
  for (let k = 0; k < m; k++) quad += r[k] * alpha[k];
  let logDetHalf = 0;
  for (let k = 0; k < m; k++) logDetHalf += Math.log(L.data[k * m + k]);
  return -0.5 * quad - logDetHalf - 0.5 * m * LOG_2PI;
}
