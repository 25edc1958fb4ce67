/**
 * Spherical correlation ρ(h) = 1 − (3/2)h + (1/2)h³ for 0 ≤ h < 1, else 0, at scaled distance h
 * (the volume of intersection of two unit-diameter balls a distance h apart, relative to one ball;
 * Chilès & Delfiner 2012 §2.5). Positive definite only in up to 3 dimensions; reaches 0 exactly at h = 1
 * (compact support); linear near 0 like the exponential.
 */
export function sphericalCorrelation(h: number): number {
  if (!(h < 1)) return 0;
  const u = 1 - h; // exact for h ∈ [1/2, 1)
  return 0.5 * u * u * (2 + h); // = 1 − 1.5h + 0.5h³, factored: no cancellation as h → 1
}

/**
 * h with ρ(h) = 0.05: the root in (0, 1) of h³ − 3h + 1.9 = 0, by the trigonometric solution of the depressed
 * cubic t³ + pt + q = 0 with three real roots (t_k = 2√(−p/3) cos(⅓ arccos((3q/2p)√(−3/p)) − 2πk/3); standard
 * algebra, common practice, no source). With p = −3, q = 1.9: t = 2 cos(⅓ arccos(−0.95) − 2πk/3), k = 1 gives
 * the root in (0, 1).
 */
/** dρ/dh of 1 − 1.5h + 0.5h³ (h < 1): −1.5 (1 − h²) = −1.5 (1 − h)(1 + h); 0 from h = 1 on (continuous there). */
export function sphericalDerivative(h: number): number {
  if (!(h < 1)) return 0;
  return -1.5 * (1 - h) * (1 + h);
}

export const SPHERICAL_PRACTICAL_RANGE = 2 * Math.cos(Math.acos(-0.95) / 3 - (2 * Math.PI) / 3);
