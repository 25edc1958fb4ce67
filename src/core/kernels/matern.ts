/**
 * Matérn correlation in the scaling of Rasmussen & Williams (2006) eq. 4.14, at scaled distance h = r/ℓ ≥ 0:
 *
 *   ρ_ν(h) = 2^{1−ν}/Γ(ν) · z^ν K_ν(z),   z = √(2ν) h,   ν > 0,
 *
 * with closed forms (eq. 4.17) ν = 1/2: e^{−h}; ν = 3/2: (1 + √3h) e^{−√3h}; ν = 5/2: (1 + √5h + 5h²/3) e^{−√5h}.
 * ν sets the smoothness (realisations are ⌈ν⌉ − 1 times mean-square differentiable, R&W §4.2.1); as ν → ∞,
 * ρ_ν(h) → e^{−h²/2}, the Gaussian kernel, with the first-order error e^{−h²/2} h²(h² − 4)/(8ν) (derived in
 * test/core/kernels/matern.test.ts from the spectral density, R&W eq. 4.15). Other authors (e.g. Stein 1999) scale
 * the argument without √(2ν); ours keeps the curvature at 0 close to the Gaussian's for large ν.
 *
 * General-ν evaluation. Write ν = μ + n with μ ∈ [−½, ½) and n = ⌊ν + ½⌋ (./../special/bessel.ts), and
 *   r_k(z) = z^{μ+k} K_{μ+k}(z) / (Γ(μ+k) 2^{μ+k−1}),
 * so that ρ_ν(h) = r_n(√(2ν)h). Multiplying K_{m+1} = K_{m−1} + (2m/z) K_m (DLMF 10.29.1) by z^{m+1} and
 * normalising gives the recurrence (derived)
 *   r_{k+1} = r_k + z² r_{k−1} / (4 (μ+k)(μ+k−1)),   k ≥ 2,
 * whose terms are all positive (no cancellation) and which never overflows (0 < r_k ≤ 1), so no Γ(ν) or 2^ν
 * factors appear even for ν in the thousands. It starts from r_1, r_2 built from z^μ K_μ and z^{μ+1} K_{μ+1}
 * (Temme's series for z < 2, the continued fraction scaled by e^z for z ≥ 2). The work per call is O(n).
 * For z ≥ 2 the values carry the factor e^z; they are rescaled by 2^{−900} when large and the factor is removed
 * at the end, so large z underflows gracefully to 0.
 * ρ(0) = 1 exactly (also when √(2ν)h underflows to 0); results are clamped to [0, 1] (rounding can otherwise give 1 + 1 ulp near h = 0).
 */
import { besselKScaled, besselOrder, temmeContinuedFraction, temmeSeries } from '../special/bessel.ts';
import { gamma } from '../special/gamma.ts';

/** A correlation ρ(h) at scaled distance h (the table's CorrelationFunction, written out: the table imports this file). */
type CorrelationFunction = (h: number) => number;

/** Matérn smoothness ν used when a matern term gives none (ν = 3/2: once mean-square differentiable). */
export const DEFAULT_MATERN_NU = 1.5;

const SQRT3 = Math.sqrt(3);
const SQRT5 = Math.sqrt(5);
const RESCALE = Math.pow(2, -900);
const RESCALE_LOG = 900 * Math.LN2;
const RESCALE_ABOVE = 1e250;

/** Matérn ν = 1/2 (R&W eq. 4.17): e^{−h}. */
export function matern12(h: number): number {
  return Math.exp(-h);
}

/** Matérn ν = 3/2 (R&W eq. 4.17): (1 + √3 h) e^{−√3 h}. */
export function matern32(h: number): number {
  const t = SQRT3 * h;
  return (1 + t) * Math.exp(-t);
}

/** Matérn ν = 5/2 (R&W eq. 4.17): (1 + √5 h + 5h²/3) e^{−√5 h}. */
export function matern52(h: number): number {
  const t = SQRT5 * h;
  return (1 + t + (t * t) / 3) * Math.exp(-t);
}

function checkNu(nu: number): void {
  if (!(nu > 0) || !Number.isFinite(nu)) {
    throw new RangeError(`matern: nu must be a finite number > 0, got ${Number.isNaN(nu) ? 'NaN' : nu}`);
  }
}

/**
 * The general-ν evaluator through K_ν (no closed-form shortcut). Constants depending only on ν are
 * computed here once; the returned function is cheap to call in covariance-filling loops.
 * Throws RangeError unless ν is finite and > 0.
 */
export function maternBessel(nu: number): CorrelationFunction {
  checkNu(nu);
  const order = besselOrder(nu);
  const { mu, n } = order;
  const s = Math.sqrt(2 * nu);
  // Normalisers 1/(Γ(μ+k) 2^{μ+k−1}) for k = 0 (only used when n = 0, then μ = ν > 0), 1 and 2.
  const norm0 = n === 0 ? 1 / (gamma(mu) * Math.pow(2, mu - 1)) : 0;
  const norm1 = 1 / (order.gammaPlus * order.twoPowMu); // Γ(μ+1) 2^μ
  const norm2 = norm1 / (2 * (mu + 1)); // Γ(μ+2) 2^{μ+1} = 2(μ+1) Γ(μ+1) 2^μ
  const twoMuPlus1 = 2 * (mu + 1);
  // coef[k] = 1/(4(μ+k)(μ+k−1)) for k = 2 … n−1.
  const coef = new Float64Array(Math.max(n, 2));
  for (let k = 2; k < n; k++) coef[k] = 1 / (4 * (mu + k) * (mu + k - 1));
  const scratch = new Float64Array(3);
  // For n ≥ 2 (ν ≥ 3/2), 1 − ρ ≈ z²/(4(ν − 1)) < 1e-300 below z = 1e-150, so ρ = 1 in double precision; returning
  // it there also avoids z^μ K_μ ~ z^{2μ} (μ < 0) overflowing against z² = 0 for subnormal z.
  const zOne = n >= 2 ? 1e-150 : 0;

  return (h: number): number => {
    const z = s * h;
    if (z <= zOne) return 1; // h = 0, z underflowed to 0, or (ν ≥ 3/2) z < 1e-150
    const series = z < 2;
    if (series) temmeSeries(order, z, scratch);
    else temmeContinuedFraction(order, z, scratch);
    // scratch: [K_μ, z K_{μ+1}, z^μ] (times e^z when !series).
    const zmu = scratch[2];
    const g0 = zmu * scratch[0]; // z^μ K_μ
    const g1 = zmu * scratch[1]; // z^{μ+1} K_{μ+1}
    let r: number;
    let logScale = 0;
    if (n === 0) r = g0 * norm0;
    else if (n === 1) r = g1 * norm1;
    else {
      const z2 = z * z;
      let r1 = g1 * norm1;
      let r2 = (z2 * g0 + twoMuPlus1 * g1) * norm2;
      for (let k = 2; k < n; k++) {
        const r3 = r2 + z2 * r1 * coef[k];
        r1 = r2;
        r2 = r3;
        if (r2 > RESCALE_ABOVE) {
          r1 *= RESCALE;
          r2 *= RESCALE;
          logScale += RESCALE_LOG;
        }
      }
      r = r2;
    }
    if (!series) r = logScale === 0 && z < 700 ? r * Math.exp(-z) : Math.exp(Math.log(r) + logScale - z);
    return r > 1 ? 1 : r;
  };
}

/**
 * Fast Matérn evaluator ρ_ν(h): the closed forms for ν = 1/2, 3/2, 5/2 (R&W eq. 4.17), else {@link maternBessel}.
 */
export function maternCorrelationFunction(nu: number): CorrelationFunction {
  checkNu(nu);
  if (nu === 0.5) return matern12;
  if (nu === 1.5) return matern32;
  if (nu === 2.5) return matern52;
  return maternBessel(nu);
}

/**
 * dρ_ν/dh, for the analytic gradient of the evidence in lengths and angle (../tuning/termDerivative.ts).
 * From d/dz [z^ν K_ν(z)] = −z^ν K_{ν−1}(z) (DLMF 10.29.4 with k = 1) and z = √(2ν) h:
 *   dρ_ν/dh = −√(2ν) 2^{1−ν}/Γ(ν) · z^ν K_{ν−1}(z).
 * For ν > 1 the right side is a Matérn correlation of order ν − 1 again (z^{ν−1} K_{ν−1} normalised as in
 * {@link maternBessel}; derived): dρ_ν/dh = −(ν h/(ν − 1)) · ρ_{ν−1}(h √(ν/(ν − 1))), evaluated by the same
 * overflow-free recurrence (no Γ(ν) or 2^ν factors). For ν ≤ 1, K_{ν−1} = K_{1−ν} (DLMF 10.27.3) directly.
 * Closed forms (differentiating R&W eq. 4.17): ν = 1/2: −e^{−h}; ν = 3/2: −3h e^{−√3h};
 * ν = 5/2: −(5h/3)(1 + √5h) e^{−√5h}. At h = 0 the value is the one-sided limit (−1 for ν = 1/2, −∞ below,
 * 0 above); callers multiply it by ∂h/∂θ, which vanishes there.
 */
export function maternDerivativeFunction(nu: number): CorrelationFunction {
  checkNu(nu);
  if (nu === 0.5) return (h) => -Math.exp(-h);
  if (nu === 1.5) return (h) => -3 * h * Math.exp(-SQRT3 * h);
  if (nu === 2.5) return (h) => -(5 / 3) * h * (1 + SQRT5 * h) * Math.exp(-SQRT5 * h);
  if (nu > 1) {
    const lower = maternCorrelationFunction(nu - 1);
    const ratio = nu / (nu - 1);
    const stretch = Math.sqrt(ratio);
    return (h) => -ratio * h * lower(h * stretch);
  }
  const s = Math.sqrt(2 * nu);
  const logNorm = Math.log(s) + (1 - nu) * Math.LN2 - Math.log(gamma(nu));
  const order = 1 - nu;
  return (h) => {
    const z = s * h;
    // The limit at 0: z^ν K_{1−ν}(z) ~ Γ(1−ν) 2^{−ν} z^{2ν−1} (DLMF 10.30.2), → ∞ for ν < 1/2, → 0 for ν > 1/2.
    if (z === 0) return nu < 0.5 ? Number.NEGATIVE_INFINITY : 0;
    // e^z K_{1−ν}(z) keeps its scale for large z; the factor e^{−z} goes into the exponent.
    return -Math.exp(logNorm + nu * Math.log(z) + Math.log(besselKScaled(order, z)) - z);
  };
}
