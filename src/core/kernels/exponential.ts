/**
 * Exponential correlation ρ(h) = e^{−h} at scaled distance h ≥ 0 (Rasmussen & Williams 2006 §4.2.1, eq. 4.18 from memory:
 * the γ-exponential with γ = 1; identical to Matérn ν = 1/2, eq. 4.17). Continuous, not differentiable at 0:
 * fields are rough. ρ(h) = 0.05 at h = ln 20 ≈ 2.9957 (derived).
 */
export function exponentialCorrelation(h: number): number {
  return Math.exp(-h);
}

/** h with ρ(h) = 0.05: −ln 0.05 = ln 20 (derived). */
/** dρ/dh of e^{−h}: −e^{−h} (the one-sided limit −1 at h = 0). */
export function exponentialDerivative(h: number): number {
  return -Math.exp(-h);
}

export const EXPONENTIAL_PRACTICAL_RANGE = Math.log(20);
