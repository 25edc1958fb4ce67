/**
 * Closed-form prior-selection criteria for one (problem, prior): leave-one-out predictive log score,
 * the discrepancy principle as a scaling of the prior variance, and the prior predictive check.
 *
 * PUBLIC API: leaveOneOut, discrepancyScale (classical and expected-value forms), DISCREPANCY_FORM_WORDS,
 * priorPredictiveCheck, priorCriteria, CRITERIA_DIFFER_EXPLANATION.
 *
 * Notation: r = d − G m0, K = G Cm Gᵀ + Cd = L Lᵀ, α = K⁻¹ r, Cd = Ld Ldᵀ.
 */
import { InputError } from '../errors.ts';
import { choleskySolve, solveLower, solveLowerMatrix } from '../linalg/cholesky.ts';
import { symmetricEigen } from '../linalg/eigen.ts';
import { identity, matTvec, transpose, type Matrix } from '../linalg/matrix.ts';
import { symmetrise } from '../linalg/products.ts';
import { chiSquareInterval, regularizedGammaP, regularizedGammaQ } from '../inverse/chisquare.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import {
  LOG_2PI,
  logEvidenceOf,
  prepareDataSide,
  priorDataSpace,
  type DataSide,
  type PriorDataSpace,
  type RouteOptions,
} from './dataSpace.ts';

/**
 * One line for the UI on why the criteria can disagree: they answer different questions.
 */
export const CRITERIA_DIFFER_EXPLANATION =
  'They answer different questions: the evidence scores how probable all data are jointly under the prior, ' +
  'leave-one-out scores how well each datum is predicted from the others, the discrepancy rule only matches ' +
  'the size of the misfit, and the predictive check only asks whether the data are plausible at all.';

export interface LeaveOneOut {
  /** Σ_i log p(d_i | d_−i), natural log. */
  readonly logScore: number;
  /** log p(d_i | d_−i) per datum. */
  readonly contributions: Float64Array;
  /** Predictive mean of d_i given the other data (data units). */
  readonly mean: Float64Array;
  /** Predictive standard deviation of d_i given the other data. */
  readonly std: Float64Array;
  /** (d_i − mean_i)/std_i. */
  readonly standardised: Float64Array;
}

/**
 * Leave-one-out predictive densities in closed form (Rasmussen & Williams 2006, eqs. 5.10–5.12),
 * for the residual r = d − G m0 ~ N(0, K):
 *
 *   σ_i² = 1/[K⁻¹]_ii,   μ_i = r_i − α_i/[K⁻¹]_ii,
 *   log p(r_i | r_−i) = −½ log σ_i² − (r_i − μ_i)²/(2σ_i²) − ½ log 2π = −½ log σ_i² − α_i²/(2[K⁻¹]_ii) − ½ log 2π.
 *
 * In data units the predictive mean is (G m0)_i + μ_i. diag(K⁻¹) comes from the rows of the
 * factor's inverse: K⁻¹ = L⁻ᵀ L⁻¹, so [K⁻¹]_ii = Σ_k (L⁻¹)_ki², the squared norm of column i of
 * Z = L⁻¹ (one triangular solve with M right-hand sides, M³/3 flops; K⁻¹ itself is never formed).
 * This is the conditional of datum i given the rest, with the full Cd (correlated errors included).
 */
export function leaveOneOut(problem: Problem, prior: PriorSpec, options: RouteOptions = {}): LeaveOneOut {
  const ev = logEvidenceOf(prepareDataSide(problem, options), prior);
  return leaveOneOutFromFactor(problem, ev.factor, ev.space.residual);
}

/**
 * {@link leaveOneOut} from the lower Cholesky factor L of K = G Cm Gᵀ + Cd and r = d − G m0 (e.g.
 * the factor of a structured posterior, ../inverse/structured.ts, which holds both).
 */
export function leaveOneOutFromFactor(problem: Problem, L: Matrix, r: Float64Array): LeaveOneOut {
  const m = r.length;
  const alpha = choleskySolve(L, r);
  const z = solveLowerMatrix(L, identity(m));
  const kii = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const ok = k * m;
    // Z is lower triangular: column i has entries in rows k ≥ i only.
    for (let i = 0; i <= k; i++) kii[i] += z.data[ok + i] * z.data[ok + i];
  }
  const contributions = new Float64Array(m);
  const mean = new Float64Array(m);
  const std = new Float64Array(m);
  const standardised = new Float64Array(m);
  let logScore = 0;
  for (let i = 0; i < m; i++) {
    const s2 = 1 / kii[i];
    const mu = r[i] - alpha[i] * s2;
    const c = -0.5 * Math.log(s2) - (0.5 * alpha[i] * alpha[i]) / kii[i] - 0.5 * LOG_2PI;
    contributions[i] = c;
    logScore += c;
    mean[i] = problem.data.values[i] - r[i] + mu;
    std[i] = Math.sqrt(s2);
    standardised[i] = alpha[i] / Math.sqrt(kii[i]);
  }
  return { logScore, contributions, mean, std, standardised };
}

/**
 * Which target the discrepancy rule aims at. 'classical' (Morozov): χ² = M, the value χ² would have
 * if the posterior mean were the truth; with the true prior it asks for a stiffer prior than the truth,
 * because the mean also fits part of the noise. 'expected': χ² = its expected value under the scaled
 * model, M − tr R(s) (M minus the resolved parameters; src/core/inverse/fitReference.ts), which the
 * true prior meets on average.
 */
export type DiscrepancyForm = 'classical' | 'expected';

/** One line per form for the UI: what the rescaling targets, in plain words. */
export const DISCREPANCY_FORM_WORDS: Readonly<Record<DiscrepancyForm, string>> = {
  classical:
    'classical (Morozov): scales the prior until χ² = M, as if the posterior mean were the truth; with a correct prior this asks for a stiffer prior, because the mean also fits part of the noise',
  expected:
    'expected value: scales the prior until χ² equals its expected value under the scaled model, M minus the resolved parameters; a correct prior meets it on average',
};

export interface DiscrepancyResult {
  readonly form: DiscrepancyForm;
  /**
   * 'found': χ²(s) = target at `scale`; 'mean-fits': even s → 0 gives χ² ≤ target (the prior mean
   * alone fits the data to the noise level, no positive scale is needed); 'unreachable': even s → ∞
   * leaves χ² > target (the data contain a part that the prior cannot fit at any variance).
   */
  readonly status: 'found' | 'mean-fits' | 'unreachable';
  /** The factor s applied to every term variance and to the nugget (NaN unless found). */
  readonly scale: number;
  /** The prior with variances and nugget multiplied by s (null unless found). */
  readonly prior: PriorSpec | null;
  /** χ² at the scale (or at the limit that was reached). */
  readonly chi2: number;
  /** The χ² aimed at: M (classical), or M − tr R at the found scale (expected; at s = 1 otherwise). */
  readonly target: number;
  /** χ² at s → 0 and at s → ∞: the range any scale can give. */
  readonly chi2Range: readonly [number, number];
}

/** The prior with every term variance and the nugget multiplied by s. */
export function scalePrior(prior: PriorSpec, s: number): PriorSpec {
  return {
    ...prior,
    terms: prior.terms.map((t) => ({ ...t, variance: t.variance * s })),
    ...(prior.nugget !== undefined ? { nugget: prior.nugget * s } : {}),
  };
}

/**
 * Discrepancy principle (Morozov 1984, Methods for Solving Incorrectly Posed Problems): choose the
 * scale s of the prior covariance (Cm → s Cm) so that the χ² of the normalised residuals of the
 * posterior mean equals `target` (default M).
 *
 * Closed form: with P = G Cm Gᵀ, the residual of the posterior mean is
 * d − G m̃(s) = r − s P (s P + Cd)⁻¹ r = Cd (s P + Cd)⁻¹ r. Whitening Cd = Ld Ldᵀ and
 * A = Ld⁻¹ P Ld⁻ᵀ = U Λ Uᵀ gives s P + Cd = Ld (sA + I) Ldᵀ, so the normalised residual is
 * Ld⁻¹ Cd (sP + Cd)⁻¹ r = U (sΛ + I)⁻¹ b with b = Uᵀ Ld⁻¹ r, and
 *
 *   χ²(s) = Σ_k b_k² / (1 + s λ_k)²,
 *
 * strictly decreasing from Σ b² (s → 0) to Σ_{λ_k = 0} b² (s → ∞) (our derivation). The root is
 * found by bisection on log s (monotone, so bisection cannot fail) to relative precision 1e-13.
 *
 * The expected-value form (`form: 'expected'`): under the model with covariance s Cm, χ²(s) is a
 * weighted sum of χ²₁ with weights 1/(1 + s λ_k) (the eigenvalues of L⁻¹ Cd L⁻ᵀ in the whitened
 * frame above; src/core/inverse/fitReference.ts), so E χ²(s) = Σ_k 1/(1 + s λ_k) = M − tr R(s). The
 * rule solves g(s) = χ²(s) − E χ²(s) = 0; E g(1) = 0 exactly when the data come from the prior as
 * given, which is why it recovers s ≈ 1 then (checked by simulation). g runs from Σ b² − M (s → 0) to
 * Σ_{λ=0} b² − #{λ = 0} (s → ∞); it need not be monotone, so the root is bracketed from s = 1 outwards
 * (the first sign change met, in the direction g(1) points) and then bisected: the found scale is
 * above 1 exactly when χ²(1) exceeds its expected value.
 */
export function discrepancyScale(
  problem: Problem,
  prior: PriorSpec,
  options: { readonly target?: number; readonly form?: DiscrepancyForm } & RouteOptions = {},
): DiscrepancyResult {
  const side = prepareDataSide(problem, options);
  const space = priorDataSpace(side, prior);
  if (options.form === 'expected') {
    if (options.target !== undefined)
      throw new InputError('target', 'left out with the expected-value form (its target is M − tr R)', options.target);
    return expectedDiscrepancy(whitenedByCd(side, space), prior);
  }
  const target = options.target ?? side.dataCount;
  if (!(target > 0) || !Number.isFinite(target)) throw new InputError('target', 'a finite χ² target > 0', target);
  return classicalDiscrepancy(whitenedByCd(side, space), prior, target);
}

/** χ²(s) = Σ b²/(1 + sλ)² and E χ²(s) = Σ 1/(1 + sλ) in the whitened frame. */
function chi2AndExpected(lambda: Float64Array, b: Float64Array, s: number): { chi2: number; expected: number } {
  let chi2 = 0;
  let expected = 0;
  for (let k = 0; k < lambda.length; k++) {
    const t = 1 + s * lambda[k];
    chi2 += (b[k] * b[k]) / (t * t);
    expected += 1 / t;
  }
  return { chi2, expected };
}

function expectedDiscrepancy(w: { lambda: Float64Array; b: Float64Array }, prior: PriorSpec): DiscrepancyResult {
  const { lambda, b } = w;
  const top = lambda.reduce((a, v) => Math.max(a, v), 0);
  const g = (s: number): number => {
    const v = chi2AndExpected(lambda, b, s);
    return v.chi2 - v.expected;
  };
  let at0 = 0;
  let atInf = 0;
  let nullCount = 0;
  for (let k = 0; k < lambda.length; k++) {
    at0 += b[k] * b[k];
    if (lambda[k] <= 1e-12 * top) {
      atInf += b[k] * b[k];
      nullCount++;
    }
  }
  const range: [number, number] = [at0, atInf];
  const base = { form: 'expected' as const, chi2Range: range };
  const at1 = chi2AndExpected(lambda, b, 1);
  // Search outwards from s = 1 for the first sign change, up to 30 decades each way.
  let lo = 0;
  let hi = 0;
  if (at1.chi2 > at1.expected) {
    while (g(Math.exp(hi)) > 0) {
      hi += Math.LN10;
      if (hi > 30 * Math.LN10) return { ...base, status: 'unreachable', scale: Number.NaN, prior: null, chi2: atInf, target: nullCount };
    }
    lo = hi - Math.LN10;
  } else {
    while (g(Math.exp(lo)) <= 0) {
      lo -= Math.LN10;
      if (lo < -30 * Math.LN10) return { ...base, status: 'mean-fits', scale: Number.NaN, prior: null, chi2: at0, target: lambda.length };
    }
    hi = lo + Math.LN10;
  }
  for (let it = 0; it < 200 && hi - lo > 1e-13; it++) {
    const mid = 0.5 * (lo + hi);
    if (g(Math.exp(mid)) > 0) lo = mid;
    else hi = mid;
  }
  const s = Math.exp(0.5 * (lo + hi));
  const at = chi2AndExpected(lambda, b, s);
  return { ...base, status: 'found', scale: s, prior: scalePrior(prior, s), chi2: at.chi2, target: at.expected };
}

function classicalDiscrepancy(w: { lambda: Float64Array; b: Float64Array }, prior: PriorSpec, target: number): DiscrepancyResult {
  const { lambda, b } = w;
  const top = lambda.reduce((a, v) => Math.max(a, v), 0);
  const chi2 = (s: number): number => {
    let q = 0;
    for (let k = 0; k < lambda.length; k++) {
      const t = 1 + s * lambda[k];
      q += (b[k] * b[k]) / (t * t);
    }
    return q;
  };
  let at0 = 0;
  let atInf = 0;
  for (let k = 0; k < lambda.length; k++) {
    at0 += b[k] * b[k];
    // Eigenvalues at the round-off level of the largest count as zero (null space of G Cm Gᵀ).
    if (lambda[k] <= 1e-12 * top) atInf += b[k] * b[k];
  }
  const range: [number, number] = [at0, atInf];
  if (at0 <= target) return { form: 'classical', status: 'mean-fits', scale: Number.NaN, prior: null, chi2: at0, target, chi2Range: range };
  if (atInf >= target)
    return { form: 'classical', status: 'unreachable', scale: Number.NaN, prior: null, chi2: atInf, target, chi2Range: range };
  // Bracket in log s, starting from s = 1 (the prior as given).
  let lo = 0;
  let hi = 0;
  if (chi2(1) > target) {
    while (chi2(Math.exp(hi)) > target) hi += Math.LN10;
    lo = hi - Math.LN10;
  } else {
    while (chi2(Math.exp(lo)) <= target) lo -= Math.LN10;
    hi = lo + Math.LN10;
  }
  for (let it = 0; it < 200 && hi - lo > 1e-13; it++) {
    const mid = 0.5 * (lo + hi);
    if (chi2(Math.exp(mid)) > target) lo = mid;
    else hi = mid;
  }
  const s = Math.exp(0.5 * (lo + hi));
  return { form: 'classical', status: 'found', scale: s, prior: scalePrior(prior, s), chi2: chi2(s), target, chi2Range: range };
}

/** Eigenvalues λ of Ld⁻¹ G Cm Gᵀ Ld⁻ᵀ (clamped at 0) and b = Uᵀ Ld⁻¹ r. */
function whitenedByCd(side: DataSide, space: PriorDataSpace): { lambda: Float64Array; b: Float64Array } {
  const { residual, projected } = space;
  const ld = side.cdFactor;
  const x = solveLowerMatrix(ld, projected);
  const a = solveLowerMatrix(ld, transpose(x));
  symmetrise(a);
  const { values, vectors } = symmetricEigen(a);
  const lambda = values.map((v) => Math.max(v, 0));
  return { lambda, b: matTvec(vectors, solveLower(ld, residual)) };
}

export interface PriorPredictiveCheck {
  /** q = rᵀ K⁻¹ r, χ²_M-distributed if the data come from this prior and these errors. */
  readonly statistic: number;
  readonly dataCount: number;
  /** q / M. */
  readonly reduced: number;
  /** P(χ²_M ≥ q): small when the data are too far from the prior mean for the prior's spread. */
  readonly pUpper: number;
  /** P(χ²_M ≤ q): small when the data fit suspiciously well (prior far too wide, or errors overstated). */
  readonly pLower: number;
  /** 2 min(pUpper, pLower), capped at 1. */
  readonly pTwoSided: number;
  /** Central 95% interval of χ²_M. */
  readonly interval95: readonly [number, number];
  /** Whether q lies inside interval95. */
  readonly plausible: boolean;
}

/**
 * Prior predictive check: under the model r = d − G m0 ~ N(0, K), so q = rᵀ K⁻¹ r = ‖L⁻¹ r‖² is
 * χ² with M degrees of freedom (a quadratic form of a whitened Gaussian; common practice, no
 * source). Tail probabilities from the regularised incomplete gamma function (P(χ²_M ≤ q) =
 * P(M/2, q/2), DLMF 8.2.4) in src/core/inverse/chisquare.ts.
 */
export function priorPredictiveCheck(problem: Problem, prior: PriorSpec, options: RouteOptions = {}): PriorPredictiveCheck {
  const side = prepareDataSide(problem, options);
  const ev = logEvidenceOf(side, prior);
  return predictiveFromStatistic(ev.quadratic, side.dataCount);
}

/** The prior predictive check from q = rᵀ K⁻¹ r and M (e.g. q = rᵀα of a structured posterior). */
export function predictiveFromStatistic(q: number, m: number): PriorPredictiveCheck {
  const pUpper = regularizedGammaQ(m / 2, q / 2);
  const pLower = regularizedGammaP(m / 2, q / 2);
  const interval95 = chiSquareInterval(m, 0.95);
  return {
    statistic: q,
    dataCount: m,
    reduced: q / m,
    pUpper,
    pLower,
    pTwoSided: Math.min(1, 2 * Math.min(pUpper, pLower)),
    interval95,
    plausible: q >= interval95[0] && q <= interval95[1],
  };
}

export interface PriorCriteria {
  readonly logEvidence: number;
  readonly leaveOneOut: LeaveOneOut;
  /** Classical (Morozov) form: χ² = M. */
  readonly discrepancy: DiscrepancyResult;
  /** Expected-value form: χ² = M − tr R. */
  readonly discrepancyExpected: DiscrepancyResult;
  readonly priorPredictive: PriorPredictiveCheck;
  readonly explanation: string;
}

/**
 * All closed-form criteria for one prior, for a side-by-side scores table. One projection P and one
 * factorisation of K serve every criterion (the same numbers as the separate calls).
 */
export function priorCriteria(problem: Problem, prior: PriorSpec, options: RouteOptions = {}): PriorCriteria {
  const side = prepareDataSide(problem, options);
  const ev = logEvidenceOf(side, prior);
  const whitened = whitenedByCd(side, ev.space);
  return {
    logEvidence: ev.logDensity,
    leaveOneOut: leaveOneOutFromFactor(problem, ev.factor, ev.space.residual),
    discrepancy: classicalDiscrepancy(whitened, prior, side.dataCount),
    discrepancyExpected: expectedDiscrepancy(whitened, prior),
    priorPredictive: predictiveFromStatistic(ev.quadratic, side.dataCount),
    explanation: CRITERIA_DIFFER_EXPLANATION,
  };
}
