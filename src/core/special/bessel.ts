/**
 * Modified Bessel function of the second kind K_ν(x) for real order ν and x > 0, and the exponentially
 * scaled e^x K_ν(x).
 *
 * Method (Temme 1975, J. Comput. Phys. 19:324–337; the continued fraction evaluated by Steed's algorithm,
 * Barnett, Feng, Steed & Goldfarb 1974, Comput. Phys. Commun. 8:377):
 * 1. K_{−ν} = K_ν (DLMF 10.27.3), so take ν ≥ 0; split ν = μ + n with n = ⌊ν + ½⌋, μ ∈ [−½, ½).
 * 2. x < 2: Temme's series for K_μ and K_{μ+1} (below, {@link temmeSeries}).
 *    x ≥ 2: Temme's continued fraction for K_{μ+1}/K_μ and the normalising sum for K_μ itself
 *    ({@link temmeContinuedFraction}); this branch yields e^x K directly.
 * 3. Forward recurrence K_{ν+1} = K_{ν−1} + (2ν/x) K_ν (DLMF 10.29.1), stable upwards because K grows with ν.
 *
 * The constants that depend only on μ are gathered once in a {@link BesselOrder} so that hot loops with a
 * fixed order (the Matérn kernel) pay only for the x-dependent part.
 *
 * Accuracy, measured against Debian's scipy.special.kv / kve over ν ∈ {0 … 30} and x ∈ [1e-6, 700]:
 * see test/reference/kernels-special.test.ts (≤ 1e-12 relative is the asserted band; typical errors are a few ulp
 * times the number of recurrence steps).
 */
import { lnGamma1pParts } from './gamma.ts';

/** x below which the series is used and at or above which the continued fraction is (Temme 1975 uses 2). */
const SERIES_LIMIT = 2;
/** Series terms kept: at x < 2 the k-th term is below (x²/4)^k/k!·max(f) < 1/k!·…; 1/30! ≈ 4e-33. */
const MAX_SERIES_TERMS = 30;
/** Continued-fraction iterations allowed (≈ 60 are needed at x = 2, fewer for larger x; measured). */
const MAX_CF_ITERATIONS = 1000;
const EPS = 2.220446049250313e-16;
/** Tabulated continued-fraction steps (76 are needed at x = 2, measured; beyond the table they are computed on the fly). */
const CF_TABLE = 128;

/** Constants of Temme's series that depend only on the fractional order μ ∈ [−½, ½). */
export interface BesselOrder {
  /** The order ν ≥ 0 this was built for. */
  readonly nu: number;
  /** μ = ν − n ∈ [−½, ½). */
  readonly mu: number;
  /** n = ⌊ν + ½⌋, the number of forward recurrence steps from μ to ν. */
  readonly n: number;
  /** μπ / sin(μπ) (1 at μ = 0). */
  readonly fact: number;
  /** Γ1(μ) = [1/Γ(1 − μ) − 1/Γ(1 + μ)]/(2μ) (−γ at μ = 0), Temme 1975 eq. (2.7). */
  readonly gamma1: number;
  /** Γ2(μ) = [1/Γ(1 − μ) + 1/Γ(1 + μ)]/2. */
  readonly gamma2: number;
  /** Γ(1 + μ) and Γ(1 − μ). */
  readonly gammaPlus: number;
  readonly gammaMinus: number;
  /** 2^μ (so that x^μ = 2^μ (x/2)^μ). */
  readonly twoPowMu: number;
  /** Per-term reciprocals of the series recursion: 1/(k² − μ²), 1/(k − μ), 1/(k + μ), 1/k for k = 1 … MAX_SERIES_TERMS. */
  readonly invK2MinusMu2: Float64Array;
  readonly invKMinusMu: Float64Array;
  readonly invKPlusMu: Float64Array;
  readonly invK: Float64Array;
  /** Continued-fraction coefficients depending only on μ, for i = 1 … CF_TABLE − 1: a_{i+1}, 1/a_{i+1}, C_{i+1}. */
  readonly cfA: Float64Array;
  readonly cfInvA: Float64Array;
  readonly cfC: Float64Array;
}

function checkOrder(fn: string, nu: number): void {
  if (!Number.isFinite(nu)) throw new RangeError(`${fn}: nu must be a finite number, got ${Number.isNaN(nu) ? 'NaN' : nu}`);
}

function checkArgument(fn: string, x: number): void {
  if (!(x > 0)) throw new RangeError(`${fn}: x must be a positive number, got ${Number.isNaN(x) ? 'NaN' : x}`);
}

/** Precompute the order-dependent constants for K_ν (ν of either sign; K_{−ν} = K_ν). */
export function besselOrder(nu: number): BesselOrder {
  checkOrder('besselOrder', nu);
  const a = Math.abs(nu);
  const n = Math.floor(a + 0.5);
  const mu = a - n;
  // 1/Γ(1 ± μ) = exp(−E ∓ O) with E, O the even and odd parts of ln Γ(1 + μ) (see ./gamma.ts).
  const { even, oddOverMu } = lnGamma1pParts(mu);
  const odd = mu * oddOverMu;
  const eE = Math.exp(-even);
  const sinhcOdd = odd === 0 ? 1 : Math.sinh(odd) / odd;
  const gamma1 = eE * sinhcOdd * oddOverMu; // e^{−E} sinh(O)/μ
  const gamma2 = eE * Math.cosh(odd);
  const pimu = Math.PI * mu;
  const fact = mu === 0 ? 1 : pimu / Math.sin(pimu);
  const invK2MinusMu2 = new Float64Array(MAX_SERIES_TERMS + 1);
  const invKMinusMu = new Float64Array(MAX_SERIES_TERMS + 1);
  const invKPlusMu = new Float64Array(MAX_SERIES_TERMS + 1);
  const invK = new Float64Array(MAX_SERIES_TERMS + 1);
  for (let k = 1; k <= MAX_SERIES_TERMS; k++) {
    invK2MinusMu2[k] = 1 / (k * k - mu * mu);
    invKMinusMu[k] = 1 / (k - mu);
    invKPlusMu[k] = 1 / (k + mu);
    invK[k] = 1 / k;
  }
  const cfA = new Float64Array(CF_TABLE);
  const cfInvA = new Float64Array(CF_TABLE);
  const cfC = new Float64Array(CF_TABLE);
  {
    const a1 = 0.25 - mu * mu;
    let ai = -a1;
    let ci = a1;
    for (let i = 1; i < CF_TABLE; i++) {
      ai -= 2 * i;
      ci = (-ai * ci) / (i + 1);
      cfA[i] = ai;
      cfInvA[i] = 1 / ai;
      cfC[i] = ci;
    }
  }
  return {
    nu: a,
    mu,
    n,
    fact,
    gamma1,
    gamma2,
    gammaPlus: Math.exp(even + odd),
    gammaMinus: Math.exp(even - odd),
    twoPowMu: Math.pow(2, mu),
    invK2MinusMu2,
    invKMinusMu,
    invKPlusMu,
    invK,
    cfA,
    cfInvA,
    cfC,
  };
}

/**
 * Temme's series (Temme 1975 §2) for 0 < x < 2, writing into `out`:
 * out[0] = K_μ(x), out[1] = x·K_{μ+1}(x), out[2] = x^μ.
 *
 * With σ = μ ln(2/x), c_k = (x²/4)^k / k!:
 *   f_0 = (μπ/sin μπ) [Γ1(μ) cosh σ + Γ2(μ) ln(2/x) sinh(σ)/σ],
 *   p_0 = ½ (x/2)^{−μ} Γ(1 + μ),  q_0 = ½ (x/2)^{μ} Γ(1 − μ),
 *   f_k = (k f_{k−1} + p_{k−1} + q_{k−1}) / (k² − μ²),  p_k = p_{k−1}/(k − μ),  q_k = q_{k−1}/(k + μ),
 *   K_μ = Σ c_k f_k,  K_{μ+1} = (2/x) Σ c_k (p_k − k f_k).
 * ln(2/x) is formed as ln 2 − ln x so that subnormal x does not overflow 2/x.
 */
export function temmeSeries(order: BesselOrder, x: number, out: Float64Array): void {
  const { mu, invK2MinusMu2, invKMinusMu, invKPlusMu, invK } = order;
  const ln2x = Math.LN2 - Math.log(x);
  const sigma = mu * ln2x;
  const eSigma = Math.exp(sigma); // (x/2)^{−μ}
  const sinhc = sigma === 0 ? 1 : Math.sinh(sigma) / sigma;
  let f = order.fact * (order.gamma1 * Math.cosh(sigma) + order.gamma2 * sinhc * ln2x);
  let p = 0.5 * eSigma * order.gammaPlus;
  let q = (0.5 / eSigma) * order.gammaMinus;
  const d = 0.25 * x * x;
  let c = 1;
  let sum = f;
  let sum1 = p; // h_0 = p_0
  for (let k = 1; k <= MAX_SERIES_TERMS; k++) {
    f = (k * f + p + q) * invK2MinusMu2[k];
    c *= d * invK[k];
    p *= invKMinusMu[k];
    q *= invKPlusMu[k];
    const del = c * f;
    sum += del;
    const del1 = c * (p - k * f);
    sum1 += del1;
    if (Math.abs(del) < EPS * Math.abs(sum) && Math.abs(del1) < EPS * Math.abs(sum1)) break;
  }
  out[0] = sum;
  out[1] = 2 * sum1;
  out[2] = order.twoPowMu / eSigma; // x^μ = 2^μ (x/2)^μ
}

/**
 * Temme's continued fraction (Temme 1975 §3) for x ≥ 2, evaluated with Steed's algorithm, writing
 * out[0] = e^x K_μ(x), out[1] = x·e^x K_{μ+1}(x), out[2] = x^μ.
 *
 * With a_1 = ¼ − μ², a_{i+1} = a_i − 2i (i.e. a_{i+1} = −((i + ½)² − μ²)), b_i = 2(x + i):
 *   K_{μ+1}/K_μ = (1/x) [μ + x + ½ − a_1 / (b_1 + a_2/(b_2 + a_3/(b_3 + …)))]   (CF2),
 *   e^x K_μ(x) = √(π/(2x)) / S,   S = 1 + Σ_{k≥1} C_k z_k,   C_k = (−1)^k Γ(μ + ½ + k) / (k! Γ(μ + ½ − k))
 *   (so C_1 = a_1 and C_{k+1} = −a_{k+1} C_k/(k + 1)),
 * where z_k are the ratios of successive solutions of the recurrence behind CF2; Steed's algorithm forms the
 * continued fraction and S together from the same convergents (Temme 1975 eqs. 3.7–3.10).
 */
export function temmeContinuedFraction(order: BesselOrder, x: number, out: Float64Array): void {
  const { mu, cfA, cfInvA, cfC } = order;
  const a1 = 0.25 - mu * mu;
  let b = 2 * (1 + x);
  let d = 1 / b;
  let delh = d;
  let h = d; // convergents of 1/(b_1 + a_2/(b_2 + …))
  let q1 = 0;
  let q2 = 1;
  let q = a1; // Σ C_k q_k
  let s = 1 + q * delh;
  let i = 1;
  for (; i < CF_TABLE; i++) {
    const a = cfA[i];
    const qnew = (q1 - b * q2) * cfInvA[i];
    q1 = q2;
    q2 = qnew;
    q += cfC[i] * qnew;
    b += 2;
    d = 1 / (b + a * d);
    delh = (b * d - 1) * delh;
    h += delh;
    const dels = q * delh;
    s += dels;
    if (Math.abs(dels) < EPS * Math.abs(s)) break;
  }
  if (i === CF_TABLE) {
    // Not reached for x ≥ 2 (measured ≤ 76 steps); continue with coefficients computed on the fly.
    let a = cfA[CF_TABLE - 1];
    let c = cfC[CF_TABLE - 1];
    for (; i < MAX_CF_ITERATIONS; i++) {
      a -= 2 * i;
      c = (-a * c) / (i + 1);
      const qnew = (q1 - b * q2) / a;
      q1 = q2;
      q2 = qnew;
      q += c * qnew;
      b += 2;
      d = 1 / (b + a * d);
      delh = (b * d - 1) * delh;
      h += delh;
      const dels = q * delh;
      s += dels;
      if (Math.abs(dels) < EPS * Math.abs(s)) break;
    }
  }
  const kmu = Math.sqrt(Math.PI / (2 * x)) / s;
  out[0] = kmu;
  out[1] = kmu * (mu + x + 0.5 - a1 * h);
  out[2] = mu === 0 ? 1 : Math.pow(x, mu);
}

/**
 * K_ν(x) for a precomputed order; `scaled` returns e^x K_ν(x). Unchecked: x > 0 is assumed.
 * Overflow (large ν, small x) gives Infinity; underflow (x ≳ 705) gives 0 for the unscaled value.
 */
export function besselKWithOrder(order: BesselOrder, x: number, scaled: boolean, scratch: Float64Array): number {
  const isSeries = x < SERIES_LIMIT;
  if (isSeries) temmeSeries(order, x, scratch);
  else temmeContinuedFraction(order, x, scratch);
  let k0 = scratch[0];
  let result = k0;
  if (order.n > 0) {
    const mu = order.mu;
    const invX = 1 / x;
    let k1 = scratch[1] * invX;
    for (let j = 1; j < order.n; j++) {
      const k2 = k0 + 2 * (mu + j) * invX * k1;
      k0 = k1;
      k1 = k2;
    }
    result = k1;
  }
  if (isSeries) return scaled ? result * Math.exp(x) : result;
  return scaled ? result : result * Math.exp(-x);
}

let cachedOrder: BesselOrder | undefined;
const sharedScratch = new Float64Array(3);

function orderFor(nu: number): BesselOrder {
  const a = Math.abs(nu);
  if (cachedOrder === undefined || cachedOrder.nu !== a) cachedOrder = besselOrder(a);
  return cachedOrder;
}

/**
 * K_ν(x), the modified Bessel function of the second kind (DLMF 10.25), for finite real ν and x > 0.
 * Throws RangeError for non-finite ν or x ≤ 0 / NaN. K_ν(∞) = 0.
 */
export function besselK(nu: number, x: number): number {
  checkOrder('besselK', nu);
  checkArgument('besselK', x);
  if (x === Infinity) return 0;
  return besselKWithOrder(orderFor(nu), x, false, sharedScratch);
}

/** e^x K_ν(x) (finite where K_ν underflows, e.g. x ≫ 700). Same argument checks as {@link besselK}. */
export function besselKScaled(nu: number, x: number): number {
  checkOrder('besselKScaled', nu);
  checkArgument('besselKScaled', x);
  if (x === Infinity) return 0;
  return besselKWithOrder(orderFor(nu), x, true, sharedScratch);
}
