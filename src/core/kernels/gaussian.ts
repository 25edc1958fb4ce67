/**
 * Gaussian (squared-exponential) correlation ρ(h) = e^{−h²/2} at scaled distance h ≥ 0
 * (Rasmussen & Williams 2006 §4.2.1, eq. 4.9 with r/ℓ = h; eq. number from memory). Infinitely differentiable: fields are very smooth, and
 * covariance matrices on dense grids are badly conditioned (Ababou et al. 1994). It is the ν → ∞ limit of
 * the Matérn family in our scaling (see ./matern.ts). ρ(h) = 0.05 at h = √(2 ln 20) ≈ 2.4477 (derived).
 */
export function gaussianCorrelation(h: number): number {
  return Math.exp(-0.5 * h * h);
}

/** h with ρ(h) = 0.05: √(2 ln 20) (derived). */
/** dρ/dh of e^{−h²/2}: −h e^{−h²/2}. */
export function gaussianDerivative(h: number): number {
  return -h * Math.exp(-0.5 * h * h);
}

export const GAUSSIAN_PRACTICAL_RANGE = Math.sqrt(2 * Math.log(20));
