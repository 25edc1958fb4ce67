/**
 * The gamma function Γ(x) and log Γ(x) for real x > 0, plus the pieces of ln Γ(1 + μ), |μ| ≤ 1/2,
 * that the Bessel K_ν code needs without cancellation.
 *
 * Method (no Lanczos coefficients needed):
 * - |z| ≤ 1/2: the Taylor series ln Γ(1 + z) = −γz + Σ_{k≥2} (−1)^k ζ(k) z^k / k (DLMF 5.7.3), split into
 *   even and odd parts; the even part in the faster form −½ ln(1 − z²) + Σ_{k even} (ζ(k) − 1) z^k / k
 *   (A&S 6.1.33 rearranged). ζ(k) − 1 is computed once at load by Euler–Maclaurin summation (DLMF 25.2.9).
 * - 1/2 ≤ x < 10: Γ(x) = (x − 1)(x − 2)…Γ(y) with y ∈ [1/2, 3/2) (DLMF 5.5.1); the shifts x − k are exact.
 * - x ≥ 10: Stirling's series (DLMF 5.11.1) with the Bernoulli terms B_{2k}/(2k(2k − 1)x^{2k−1}) to k = 8;
 *   the first omitted term is < 0.18/x^17 ≤ 2e-18. Γ itself is formed as √(2π)·p·(p·e^{−x})·e^{S} with
 *   p = x^{(x−1/2)/2}, so nothing overflows below the true overflow at x ≈ 171.62.
 *
 * Accuracy (measured against Debian's scipy.special.gamma / gammaln, see test/reference/kernels-special.test.ts):
 * a few ulp relative for Γ; ln Γ is accurate relative also near its zeros x = 1 and x = 2, because it is
 * evaluated there as ln Γ(1 + z) (resp. ln(1 + z) + ln Γ(1 + z)) with the exact z = x − 1 (resp. x − 2).
 */

/** Euler's constant γ (DLMF 5.2.3: 0.57721 56649 01532 86060 65…), rounded to double. */
export const EULER_GAMMA = 0.5772156649015329;

const HALF_LN_2PI = 0.5 * Math.log(2 * Math.PI);
const SQRT_2PI = Math.sqrt(2 * Math.PI);
/** Largest x with Γ(x) finite in double precision (Γ(171.624…) ≈ 1.8e308; common practice, no source). */
const GAMMA_OVERFLOW_X = 171.62437695630272;

/** Number of terms of the ln Γ(1 + z) series; (1/4)^30/30 ≈ 3e-20 relative to |ln Γ(1.5)| ≈ 0.12. */
const SERIES_TERMS = 30;

/**
 * ζ(s) − 1 for integer s ≥ 2 by Euler–Maclaurin summation (DLMF 25.2.9) with N = 20 and five Bernoulli
 * corrections: ζ(s) − 1 = Σ_{n=2}^{N−1} n^{−s} + ½N^{−s} + N^{1−s}/(s − 1) + Σ_{j=1}^{5} B_{2j}/(2j)! (s)_{2j−1} N^{1−s−2j}.
 * The remainder is below the B_12 term, |B_12|/12!·(s)_11·N^{−s−11} ≤ 3e-18 for s = 2 and smaller for larger s.
 */
export function zetaMinusOne(s: number): number {
  if (!Number.isInteger(s) || s < 2) throw new RangeError(`zetaMinusOne: s must be an integer ≥ 2, got ${s}`);
  const N = 20;
  // B_2, B_4, …, B_10 (DLMF Table 24.2.1) divided by (2j)!.
  const bernoulliOverFactorial = [1 / 6 / 2, -1 / 30 / 24, 1 / 42 / 720, -1 / 30 / 40320, 5 / 66 / 3628800];
  let tail = 0;
  let rising = s; // (s)_{2j−1}, starting with (s)_1 = s
  let power = Math.pow(N, -s - 1); // N^{1−s−2j} for j = 1
  for (let j = 0; j < bernoulliOverFactorial.length; j++) {
    tail += bernoulliOverFactorial[j] * rising * power;
    rising *= (s + 2 * j + 1) * (s + 2 * j + 2);
    power /= N * N;
  }
  let sum = tail + Math.pow(N, 1 - s) / (s - 1) + 0.5 * Math.pow(N, -s);
  for (let n = N - 1; n >= 2; n--) sum += Math.pow(n, -s); // smallest first
  return sum;
}

/** (ζ(k) − 1)/k for even k = 2, 4, …, 30 (Horner coefficients in μ² of the even part). */
const EVEN_COEF = new Float64Array(SERIES_TERMS / 2);
for (let j = 0; j < EVEN_COEF.length; j++) EVEN_COEF[j] = zetaMinusOne(2 * j + 2) / (2 * j + 2);
/**
 * ζ(k)/k for odd k = 3, 5, …, 53 (Horner coefficients in μ² of the odd part divided by μ). The odd part is summed
 * without the ln(1 + z) rearrangement: that would need 1 − atanh(μ)/μ, whose cancellation costs ~1 ulp of 1
 * against a result ≈ −γ. Terms fall like μ^{k−1}/k; at |μ| = ½ the last one is 0.25^26/53 ≈ 4e-18.
 */
const ODD_COEF = new Float64Array(26);
for (let j = 0; j < ODD_COEF.length; j++) ODD_COEF[j] = (1 + zetaMinusOne(2 * j + 3)) / (2 * j + 3);

/** Even and odd parts of ln Γ(1 + μ) for |μ| ≤ 1/2, the odd part divided by μ (finite at μ = 0). */
export interface LnGamma1pParts {
  /** E(μ) = [ln Γ(1 + μ) + ln Γ(1 − μ)]/2 = −½ ln(1 − μ²) + Σ_{k even} (ζ(k) − 1) μ^k / k. */
  readonly even: number;
  /** O(μ)/μ with O(μ) = [ln Γ(1 + μ) − ln Γ(1 − μ)]/2 = −γμ − Σ_{k odd ≥ 3} ζ(k) μ^k / k (DLMF 5.7.3). */
  readonly oddOverMu: number;
}

/**
 * Even and odd parts of ln Γ(1 + μ), |μ| ≤ 1/2 (DLMF 5.7.3 split by parity; the even part uses the faster
 * ζ(k) − 1 form with the even part of −ln(1 + μ), which is −½ ln(1 − μ²)).
 * With them 1/Γ(1 ± μ) = e^{−E ∓ O}, and the Temme quantity [1/Γ(1 − μ) − 1/Γ(1 + μ)]/(2μ) = e^{−E} sinh(O)/μ
 * is free of the cancellation that the direct difference suffers for small μ.
 */
export function lnGamma1pParts(mu: number): LnGamma1pParts {
  if (!(Math.abs(mu) <= 0.5)) throw new RangeError(`lnGamma1pParts: |mu| must be ≤ 1/2, got ${mu}`);
  const m2 = mu * mu;
  let even = 0;
  for (let j = EVEN_COEF.length - 1; j >= 0; j--) even = even * m2 + EVEN_COEF[j];
  even = even * m2 - 0.5 * Math.log1p(-m2);
  let odd = 0; // Σ_{k odd ≥ 3} ζ(k) μ^{k−1} / k
  for (let j = ODD_COEF.length - 1; j >= 0; j--) odd = odd * m2 + ODD_COEF[j];
  const oddOverMu = -EULER_GAMMA - odd * m2;
  return { even, oddOverMu };
}

/** ln Γ(1 + z) for |z| ≤ 1/2 (DLMF 5.7.3), accurate relative to its value (which is ≈ −γz near 0). */
export function lnGamma1p(z: number): number {
  const p = lnGamma1pParts(z);
  return p.even + z * p.oddOverMu;
}

/** Stirling correction S(x) = ln Γ(x) − [(x − ½) ln x − x + ½ ln 2π] for x ≥ 10 (DLMF 5.11.1, Bernoulli B_2 … B_16). */
function stirlingCorrection(x: number): number {
  const r = 1 / x;
  const r2 = r * r;
  return (
    r *
    (1 / 12 +
      r2 *
        (-1 / 360 + r2 * (1 / 1260 + r2 * (-1 / 1680 + r2 * (1 / 1188 + r2 * (-691 / 360360 + r2 * (1 / 156 + r2 * (-3617 / 122400))))))))
  );
}

function checkPositive(name: string, x: number): void {
  if (!(x > 0)) throw new RangeError(`${name}: x must be a positive number, got ${Number.isNaN(x) ? 'NaN' : x}`);
}

/** Γ(x) for x > 0 (Infinity above x ≈ 171.62). Throws RangeError for x ≤ 0 or NaN. */
export function gamma(x: number): number {
  checkPositive('gamma', x);
  if (x < 0.5) return Math.exp(lnGamma1p(x)) / x; // Γ(x) = Γ(1 + x)/x
  if (x < 1.5) return Math.exp(lnGamma1p(x - 1));
  if (x < 10) {
    let y = x;
    let prod = 1;
    while (y >= 1.5) {
      y -= 1; // exact
      prod *= y;
    }
    return prod * Math.exp(lnGamma1p(y - 1));
  }
  if (x > GAMMA_OVERFLOW_X) return Infinity;
  const p = Math.pow(x, 0.5 * (x - 0.5));
  return SQRT_2PI * p * (p * Math.exp(-x)) * Math.exp(stirlingCorrection(x));
}

/** ln Γ(x) for x > 0. Throws RangeError for x ≤ 0 or NaN. */
export function logGamma(x: number): number {
  checkPositive('logGamma', x);
  if (x < 0.5) return lnGamma1p(x) - Math.log(x);
  if (x < 1.5) return lnGamma1p(x - 1);
  if (x < 2.5) return lnGamma1p(x - 2) + Math.log1p(x - 2); // Γ(2 + z) = (1 + z) Γ(1 + z)
  if (x < 10) return Math.log(gamma(x));
  if (x === Infinity) return Infinity;
  return (x - 0.5) * Math.log(x) - x + HALF_LN_2PI + stirlingCorrection(x);
}
