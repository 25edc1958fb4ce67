/**
 * Type-II maximum likelihood ("best by evidence"): maximise log N(d; G m0, G Cm(θ) Gᵀ + Cd) over the
 * continuous hyperparameters θ of the prior, started from the current prior, and report the
 * curvature-based uncertainty of each (log-)parameter.
 *
 * PUBLIC API: logEvidence, hyperParameters, applyHyperParameters, evidenceGradient, maximiseEvidence.
 *
 * Parameterisation: log of every term variance, length (or both lengths of an anisotropic term)
 * and Matérn ν, log nugget (when the prior has a nugget > 0); the anisotropy angle in degrees,
 * unconstrained. ν is included only when the kernel module evaluates general (non-half-integer)
 * orders. Any parameter can be held fixed by name (`fixed`).
 *
 * Gradient (Rasmussen & Williams 2006, eq. 5.9): ∂/∂θ_j log p(d) = ½ tr((ααᵀ − K⁻¹) ∂K/∂θ_j),
 * α = K⁻¹ r, with ∂K/∂θ_j = G (∂Cm/∂θ_j) Gᵀ. Exact for log variances (∂Cm/∂log σ_t² = σ_t² S R_t S,
 * the term itself) and the log nugget (η I). Lengths and the angle are analytic too: ∂Cm/∂θ = S (σ² ρ'(h) ∂h/∂θ) S
 * tabulated over the grid's offsets (./termDerivative.ts, ρ' from the kernel table) and projected by the dense
 * route, the lag table or circulant products of the derivative's own embedding (./dataSpace.ts
 * sideOffsetProjection). For ν we use central differences of the term's projected covariance with step h = 1e-5 (truncation O(h²) ≈ 1e-10 relative, round-off ≈ ε/h ≈ 1e-11), not of the
 * evidence: the kernel is cheap and smooth in these parameters. Split: αᵀ D α / 2 − tr(K⁻¹ D)/2,
 * tr(K⁻¹ D) = Σ W ∘ D with W = K⁻¹ = L⁻ᵀ L⁻¹ formed once per evaluation through the Cholesky factor
 * (Rasmussen & Williams 2006, Algorithm 5.1; used only for these traces, never to solve).
 *
 * Optimiser: BFGS on −log p(d) with a backtracking Armijo line search (Nocedal & Wright 2006,
 * Numerical Optimization, Alg. 6.1 with Alg. 3.1 and the initial scaling of eq. 6.20), steps capped
 * at 3 in every coordinate (a factor e³ in any length or variance) so that a single step cannot
 * run far off into a region where K is badly conditioned. Chosen over Nelder–Mead because the
 * gradient is available at the cost of p extra projections, and BFGS needs far fewer evaluations
 * than a simplex method for the 2–7 parameters a prior has.
 *
 * Conditioning: the evidence of a smooth kernel can keep rising as the nugget falls,
 * towards a prior that no longer factors. With a free nugget η the search is bounded to priors with
 * κ(Cm) ≤ NEAR_SINGULAR_CONDITION (1e10, the workbench's threshold, ../prior/diagnostics.ts): the
 * kernel part C₀ = Cm − ηI is positive semi-definite with λmax(C₀) ≤ B, B = max(s)² Σ_offsets |T| (the
 * absolute lag-table sum bounds every row sum of |C₀|: Gershgorin; s the std profile), so
 * κ(Cm) = (λmax(C₀) + η)/(λmin(C₀) + η) ≤ (B + η)/η ≤ 1e10 whenever η ≥ B/(1e10 − 1) (our derivation).
 * That floor is a lower bound on the nugget coordinate; the search is projected BFGS with it as an
 * active bound (trial points are lifted onto the floor, and while the bound is active and the evidence
 * still asks for a smaller nugget its gradient component is dropped; Bertsekas 1982, SIAM J. Control
 * Optim. 20:221, projected Newton/quasi-Newton methods for bounds, memory). The bound is sufficient,
 * not necessary: on the floor, κ is somewhat below 1e10. Every optimum is then checked with the
 * workbench's own diagnosis (../prior/structuredDiagnostics.ts diagnosePriorAuto); without a free
 * nugget nothing bounds the search, and a result that fails the check says so in `conditioning` and
 * `note`.
 * Box bounds given by the caller (`bounds`, natural units) are handled the same way: trial points are
 * clamped into the box, and a coordinate resting on a bound with the evidence pushing past it is
 * held (its gradient component and its row of the curvature dropped; it has no standard error).
 *
 * Uncertainty: the observed information J = −∇² log p(d) at the optimum, by central differences of
 * the gradient (step 1e-3, symmetrised), and standard errors √diag(J⁻¹) of each coordinate
 * (Laplace approximation of the likelihood surface; common practice, no source). If J is not
 * positive definite the optimum is not a strict maximum (a flat direction) and the errors are NaN.
 */
import { assertNever, InputError, NotPositiveDefiniteError } from '../errors.ts';
import { patchTerm, type Term, type TermPatch } from '../kernels/spec.ts';
import { kernelTakes, termSmoothness } from '../kernels/table.ts';
import { cholesky, choleskySolve, solveLowerMatrix } from '../linalg/cholesky.ts';
import { identity, matrix, type Matrix } from '../linalg/matrix.ts';
import { symmetricProductNT, transposeOf } from '../linalg/products.ts';
import { operatorGram } from '../linalg/operator.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import { validatePrior } from '../prior/covariance.ts';
import { NEAR_SINGULAR_CONDITION, type PdVerdict } from '../prior/diagnostics.ts';
import { lagTable } from '../prior/lag.ts';
import { termDerivative } from './termDerivative.ts';
import { chooseDiagnosticsPath, diagnosePriorAuto, spectrumBracket } from '../prior/structuredDiagnostics.ts';
import type { Grid } from '../grid/grid.ts';
import {
  aborted,
  addMatrices,
  gaussianLogDensity,
  generalMaternAvailable,
  logEvidenceOf,
  prepareDataSide,
  priorDataSpace,
  priorResidual,
  sideOffsetProjection,
  sideProjection,
  tuningRoute,
  type DataSide,
  type RouteOptions,
  type TuningControl,
} from './dataSpace.ts';

/** log N(d; G m0, G Cm Gᵀ + Cd) for the prior (NotPositiveDefiniteError if K does not factor). */
export function logEvidence(problem: Problem, prior: PriorSpec, options: RouteOptions = {}): number {
  return logEvidenceOf(prepareDataSide(problem, options), prior).logDensity;
}

/** One optimisation coordinate. */
export interface HyperParameter {
  /** `terms[k].variance`, `terms[k].length`, `terms[k].lengths[0]`, `terms[k].lengths[1]`, `terms[k].angle`, `terms[k].nu` or `nugget`. */
  readonly name: string;
  /** 'log': the coordinate is the natural log of the value; 'linear': the value itself (angle, degrees). */
  readonly scale: 'log' | 'linear';
  /** Term index, or null for the nugget. */
  readonly term: number | null;
  readonly field: 'variance' | 'length' | 'lengths0' | 'lengths1' | 'angle' | 'nu' | 'nugget';
}

export interface HyperParameterOptions {
  /** Names (as in HyperParameter.name) to hold at their current values. */
  readonly fixed?: readonly string[];
}

/** The continuous hyperparameters of a prior, in a fixed order (term by term, then the nugget). */
export function hyperParameters(prior: PriorSpec, options: HyperParameterOptions = {}): HyperParameter[] {
  const out: HyperParameter[] = [];
  const general = prior.terms.some((t) => kernelTakes(t.kernel, 'nu')) && generalMaternAvailable();
  prior.terms.forEach((t, k) => {
    const p = `terms[${k}]`;
    out.push({ name: `${p}.variance`, scale: 'log', term: k, field: 'variance' });
    if (t.lengths !== undefined) {
      out.push({ name: `${p}.lengths[0]`, scale: 'log', term: k, field: 'lengths0' });
      out.push({ name: `${p}.lengths[1]`, scale: 'log', term: k, field: 'lengths1' });
      out.push({ name: `${p}.angle`, scale: 'linear', term: k, field: 'angle' });
    } else {
      out.push({ name: `${p}.length`, scale: 'log', term: k, field: 'length' });
    }
    if (kernelTakes(t.kernel, 'nu') && general) out.push({ name: `${p}.nu`, scale: 'log', term: k, field: 'nu' });
  });
  if ((prior.nugget ?? 0) > 0) out.push({ name: 'nugget', scale: 'log', term: null, field: 'nugget' });
  const fixed = options.fixed ?? [];
  fixed.forEach((f, i) => {
    if (!out.some((h) => h.name === f)) {
      throw new InputError(`fixed[${i}]`, `one of ${out.map((h) => JSON.stringify(h.name)).join(', ')}`, f);
    }
  });
  return out.filter((h) => !fixed.includes(h.name));
}

function rawValue(prior: PriorSpec, h: HyperParameter): number {
  if (h.term === null) return prior.nugget ?? 0;
  const t = prior.terms[h.term];
  switch (h.field) {
    case 'variance':
      return t.variance;
    case 'length':
    case 'lengths0':
      return t.lengths === undefined ? t.length : t.lengths[0];
    case 'lengths1':
      return t.lengths === undefined ? t.length : t.lengths[1];
    case 'angle':
      return t.angle ?? 0;
    case 'nu':
      return smoothnessOf(t, h.term);
    case 'nugget':
      return prior.nugget ?? 0;
  }
}

/** The term's smoothness ν (its kernel's default filled in); only kernels that take one have a ν parameter. */
function smoothnessOf(t: Term, k: number): number {
  const nu = termSmoothness(t);
  if (nu === undefined) throw new InputError(`terms[${k}].kernel`, 'a kernel with a smoothness ν', t.kernel);
  return nu;
}

/** The change of one term that sets one hyperparameter to v. */
function termPatch(t: Term, field: HyperParameter['field'], v: number): TermPatch {
  switch (field) {
    case 'variance':
      return { variance: v };
    case 'length':
      return { length: v };
    case 'lengths0':
      return { lengths: [v, t.lengths === undefined ? t.length : t.lengths[1]] };
    case 'lengths1':
      return { lengths: [t.lengths === undefined ? t.length : t.lengths[0], v] };
    case 'angle':
      return { angle: v };
    case 'nu':
      return { nu: v };
    case 'nugget':
      return {};
    default:
      return assertNever(field, 'hyperparameter field');
  }
}

/** Current coordinates θ of the prior (logs where the scale is log). */
export function hyperParameterVector(prior: PriorSpec, params: readonly HyperParameter[]): Float64Array {
  return Float64Array.from(params, (h) => (h.scale === 'log' ? Math.log(rawValue(prior, h)) : rawValue(prior, h)));
}

/** The prior with the coordinates θ put in. */
export function applyHyperParameters(prior: PriorSpec, params: readonly HyperParameter[], theta: ArrayLike<number>): PriorSpec {
  const terms: Term[] = [...prior.terms];
  let nugget = prior.nugget;
  params.forEach((h, k) => {
    const v = h.scale === 'log' ? Math.exp(theta[k]) : theta[k];
    if (h.term === null) {
      nugget = v;
      return;
    }
    const t = terms[h.term];
    terms[h.term] = patchTerm(t, termPatch(t, h.field, v));
  });
  return { ...prior, terms, ...(nugget !== undefined ? { nugget } : {}) };
}

/** The prior with one hyperparameter set to v (natural units, not the log coordinate). */
export function setHyperParameter(prior: PriorSpec, h: Pick<HyperParameter, 'term' | 'field'>, v: number): PriorSpec {
  if (h.term === null || h.field === 'nugget') return { ...prior, nugget: v };
  const k = h.term;
  return { ...prior, terms: prior.terms.map((t, i) => (i === k ? patchTerm(t, termPatch(t, h.field, v)) : t)) };
}

/** Step of the central differences of the kernel in the length, angle and ν coordinates. */
const KERNEL_STEP = 1e-5;

/**
 * G S R_t S Gᵀ · variance_t for term t alone (the standard-deviation profile included), by the
 * route of ./dataSpace.ts projectedPriorCovariance (FFT above TUNING_DENSE_LIMIT cells, with the
 * side's spectrum cache: every projection of one fit shares the row spectra).
 */
function projectedTerm(side: DataSide, prior: PriorSpec, t: number): Matrix {
  const single: PriorSpec = { mean: prior.mean, terms: [prior.terms[t]], ...(prior.stdProfile ? { stdProfile: prior.stdProfile } : {}) };
  return sideProjection(side, single);
}

export interface EvidenceAndGradient {
  readonly logEvidence: number;
  /** ∂ log p(d) / ∂θ_j in the optimisation coordinates. */
  readonly gradient: Float64Array;
}

/**
 * log p(d) and its gradient in the coordinates of `params` (see the module comment). Returns
 * logEvidence −∞ (gradient NaN) when K does not factor.
 */
export function evidenceGradient(
  problem: Problem,
  prior: PriorSpec,
  params: readonly HyperParameter[],
  side = prepareDataSide(problem),
): EvidenceAndGradient {
  // FFT route: P = Σ_t P_t + η G Gᵀ from the per-term projections that the variance derivatives
  // need anyway (one projection per evaluation fewer; equal to the direct P to round-off). The
  // dense route keeps its single projection of Cm, so its numbers stay as they were.
  const fft = side.route === 'fft' || (side.route === 'auto' && tuningRoute(problem, prior) === 'fft');
  const termP: Matrix[] = [];
  let gram: Matrix | null = null;
  let space: { residual: Float64Array; projected: Matrix };
  if (fft && prior.terms.length > 0) {
    validatePrior(prior, problem.grid);
    prior.terms.forEach((_, t) => termP.push(projectedTerm(side, prior, t)));
    const first = termP[0];
    const projected = matrix(first.rows, first.cols, first.data.slice());
    for (let t = 1; t < termP.length; t++) for (let i = 0; i < projected.data.length; i++) projected.data[i] += termP[t].data[i];
    const eta = prior.nugget ?? 0;
    if (eta !== 0) {
      gram = operatorGram(problem.operator);
      for (let i = 0; i < projected.data.length; i++) projected.data[i] += eta * gram.data[i];
    }
    space = { residual: priorResidual(side, prior), projected };
  } else {
    space = priorDataSpace(side, prior);
  }
  const g = gaussianLogDensity(addMatrices(space.projected, side.cd), space.residual);
  const p = params.length;
  if (g === null) return { logEvidence: Number.NEGATIVE_INFINITY, gradient: new Float64Array(p).fill(Number.NaN) };
  const L = g.factor;
  const m = L.rows;
  const alpha = choleskySolve(L, space.residual);
  // K⁻¹ = L⁻ᵀ L⁻¹ = zᵀ z, formed once through the factor for the p trace terms (Rasmussen & Williams 2006,
  // Algorithm 5.1 forms it the same way): each trace is then Σ W ∘ D, O(M²), instead of one M × M
  // triangular solve per parameter.
  const z = solveLowerMatrix(L, identity(m));
  const zt = transposeOf(z);
  const w = symmetricProductNT(zt, zt);
  const theta = hyperParameterVector(prior, params);
  const grad = new Float64Array(p);
  const centralDifference = (j: number, term: number): Matrix => {
    const step = (sign: number): Matrix => {
      const th = Float64Array.from(theta);
      th[j] += sign * KERNEL_STEP;
      return projectedTerm(side, applyHyperParameters(prior, params, th), term);
    };
    const plus = step(1);
    const minus = step(-1);
    return { rows: m, cols: m, data: plus.data.map((v, k) => (v - minus.data[k]) / (2 * KERNEL_STEP)) };
  };
  params.forEach((h, j) => {
    let dk: Matrix;
    if (h.field === 'nugget') {
      gram ??= operatorGram(problem.operator);
      dk = { rows: m, cols: m, data: gram.data.map((v) => v * prior.nugget!) };
    } else if (h.field === 'variance') {
      dk = termP[h.term!] ?? projectedTerm(side, prior, h.term!);
    } else {
      // Lengths and angle: the analytic derivative through the side's route (./termDerivative.ts); ν by central
      // differences of the term's projection.
      dk =
        h.field === 'nu' ? centralDifference(j, h.term!) : sideOffsetProjection(side, prior, termDerivative(prior.terms[h.term!], h.field));
    }
    // ½ αᵀ D α
    let quad = 0;
    for (let a = 0; a < m; a++) {
      let s = 0;
      const oa = a * m;
      for (let b = 0; b < m; b++) s += dk.data[oa + b] * alpha[b];
      quad += alpha[a] * s;
    }
    // tr(K⁻¹ D) = Σ W ∘ D (both symmetric)
    let tr = 0;
    for (let k = 0; k < dk.data.length; k++) tr += w.data[k] * dk.data[k];
    grad[j] = 0.5 * quad - 0.5 * tr;
  });
  return { logEvidence: g.logDensity, gradient: grad };
}

export interface MaximiseOptions extends HyperParameterOptions, TuningControl, RouteOptions {
  /** Iteration limit (default 200). */
  readonly maxIterations?: number;
  /** Stop when every |∂ log p/∂θ_j| is below this (default 1e-6). */
  readonly gradientTolerance?: number;
  /**
   * Box bounds [lo, hi] in natural units (degrees for an angle), keyed by HyperParameter.name; a
   * bound on a held parameter is an InputError. Enforced like the nugget floor (projected BFGS with
   * active bounds); the nugget's effective lower bound is the larger of its bound and the floor.
   */
  readonly bounds?: Readonly<Record<string, readonly [number, number]>>;
}

export interface FittedParameter {
  readonly name: string;
  readonly scale: 'log' | 'linear';
  /** Value at the optimum in natural units. */
  readonly value: number;
  /** Starting value in natural units. */
  readonly start: number;
  /** Optimum in the optimisation coordinate (log value, or degrees). */
  readonly coordinate: number;
  /** Curvature-based standard error of the coordinate (NaN when the curvature is not negative definite, or the parameter ends on a bound). */
  readonly standardError: number;
  /** coordinate ± 1.96 standard errors, mapped back to natural units. */
  readonly interval95: readonly [number, number];
  /** 'low' / 'high' when the optimum rests on that bound (given in `bounds`, or the nugget floor) with the evidence pushing past it. */
  readonly atBound: 'low' | 'high' | null;
}

/** The workbench's positive-definiteness and conditioning check of the optimum. */
export interface OptimumConditioning {
  /** The verdict of ../prior/structuredDiagnostics.ts diagnosePriorAuto (proven, proven not, not decided). */
  readonly verdict: PdVerdict;
  /** verdict === 'positive-definite'. */
  readonly positiveDefinite: boolean;
  /** Its condition number (the certified upper bound on the FFT route). */
  readonly conditionNumber: number;
  /** positiveDefinite and conditionNumber ≤ NEAR_SINGULAR_CONDITION. */
  readonly usable: boolean;
  /** With a free nugget: the nugget sits on its conditioning floor (the evidence asked for less). */
  readonly nuggetAtFloor: boolean;
  /** The floor B/(1e10 − 1) at the optimum, or null without a free nugget. */
  readonly nuggetFloor: number | null;
}

export interface TypeIIResult {
  readonly prior: PriorSpec;
  readonly start: PriorSpec;
  readonly logEvidence: number;
  readonly startLogEvidence: number;
  readonly parameters: readonly FittedParameter[];
  /** J = −∇² log p(d) at the optimum, p × p row-major, in the optimisation coordinates. */
  readonly information: Float64Array;
  /** J⁻¹ (p × p row-major); NaN when J is not positive definite. */
  readonly covariance: Float64Array;
  readonly gradient: Float64Array;
  readonly iterations: number;
  readonly evaluations: number;
  readonly converged: boolean;
  readonly cancelled: boolean;
  /** Whether the optimum passes the workbench's positive-definiteness check with κ ≤ 1e10. */
  readonly conditioning: OptimumConditioning;
  readonly note?: string;
}

/**
 * Upper bound B on λmax of the kernel part of Cm (everything but the nugget): max(s)² Σ |T| over the
 * whole lag table (each row of C₀ holds each offset at most once, so every absolute row sum is at
 * most this; Gershgorin).
 */
export function kernelEigenvalueBound(grid: Grid, prior: PriorSpec): number {
  const t = lagTable(grid, prior.terms).values;
  let sum = 0;
  for (let i = 0; i < t.length; i++) sum += Math.abs(t[i]);
  let smax = 1;
  if (prior.stdProfile) smax = prior.stdProfile.reduce((a, v) => Math.max(a, Math.abs(v)), 0);
  return smax * smax * sum;
}

/** Smallest nugget that guarantees κ(Cm) ≤ NEAR_SINGULAR_CONDITION: B/(1e10 − 1) (see the module comment). */
export function conditioningNuggetFloor(grid: Grid, prior: PriorSpec): number {
  return kernelEigenvalueBound(grid, prior) / (NEAR_SINGULAR_CONDITION - 1);
}

/** Largest step in any coordinate (log units or degrees). */
const MAX_STEP = 3;
/** Step of the finite-difference Hessian (of the gradient). */
const HESSIAN_STEP = 1e-3;

/** Maximise the log evidence over the prior's continuous hyperparameters (see the module comment). */
export function maximiseEvidence(problem: Problem, start: PriorSpec, options: MaximiseOptions = {}): TypeIIResult {
  const side = prepareDataSide(problem, options);
  const params = hyperParameters(start, options);
  const p = params.length;
  if (p === 0) throw new InputError('fixed', 'to leave at least one hyperparameter free', options.fixed);
  const maxIter = options.maxIterations ?? 200;
  const gtol = options.gradientTolerance ?? 1e-6;
  let evaluations = 0;
  const evaluate = (th: Float64Array): EvidenceAndGradient => {
    evaluations++;
    try {
      return evidenceGradient(problem, applyHyperParameters(start, params, th), params, side);
    } catch (e) {
      // A trial point outside the valid range (e.g. a length overflowing to ∞) is rejected like an
      // indefinite K: the line search backs off from it.
      if (e instanceof InputError || e instanceof NotPositiveDefiniteError)
        return { logEvidence: Number.NEGATIVE_INFINITY, gradient: new Float64Array(p).fill(Number.NaN) };
      throw e;
    }
  };
  // The nugget coordinate and its floor (log), when the nugget is free.
  const nIdx = params.findIndex((h) => h.field === 'nugget');
  const logFloor = (th: Float64Array): number => Math.log(conditioningNuggetFloor(problem.grid, applyHyperParameters(start, params, th)));
  const { lower, upper } = coordinateBounds(params, options.bounds);
  /** Lower bound of coordinate k at θ: the given bound, for the nugget at least its floor. */
  const lowerAt = (th: Float64Array, k: number): number => (k === nIdx ? Math.max(lower[k], logFloor(th) + 1e-9) : lower[k]);
  /** θ clamped into the bounds, the nugget lifted onto its floor (plus a relative 1e-9) where it lies below. */
  const project = (th: Float64Array): Float64Array => {
    for (let k = 0; k < p; k++) {
      if (th[k] > upper[k]) th[k] = upper[k];
      if (k !== nIdx && th[k] < lower[k]) th[k] = lower[k];
    }
    if (nIdx < 0) return th;
    const f = lowerAt(th, nIdx);
    if (th[nIdx] < f) th[nIdx] = f;
    return th;
  };
  const startTheta0 = hyperParameterVector(start, params);
  const startEval = evaluate(startTheta0);
  if (!Number.isFinite(startEval.logEvidence))
    throw new InputError('start prior', 'a prior whose data-space covariance G Cm Gᵀ + Cd factors', 'one that does not');
  const startLogEvidence = startEval.logEvidence;
  let theta = project(Float64Array.from(startTheta0));
  let cur = theta.every((v, k) => v === startTheta0[k]) ? startEval : evaluate(theta);
  if (!Number.isFinite(cur.logEvidence))
    throw new InputError('start prior', 'a prior whose data-space covariance G Cm Gᵀ + Cd factors', 'one that does not');
  /**
   * Per coordinate, the bound it rests on with the evidence pushing past it (∇φ = −∇ log p points
   * outwards): 'low' at a lower bound with ∂φ/∂θ_k > 0, 'high' at an upper bound with ∂φ/∂θ_k < 0.
   */
  const activeBounds = (th: Float64Array, g: Float64Array): ('low' | 'high' | null)[] =>
    params.map((_, k) => (th[k] <= lowerAt(th, k) + 1e-6 && g[k] > 0 ? 'low' : th[k] >= upper[k] - 1e-6 && g[k] < 0 ? 'high' : null));
  /** At the floor, with the evidence asking for a smaller nugget (∂φ/∂θ_n > 0). */
  const atFloor = (th: Float64Array, g: Float64Array): boolean => nIdx >= 0 && th[nIdx] <= logFloor(th) + 1e-6 && g[nIdx] > 0;
  // Inverse Hessian approximation of φ = −log p (row-major p × p).
  let H = eye(p);
  let first = true;
  let iterations = 0;
  let converged = false;
  let cancelled = false;
  let smallChanges = 0;
  for (; iterations < maxIter; iterations++) {
    if (aborted(options)) {
      cancelled = true;
      break;
    }
    const g = cur.gradient.map((v) => -v); // ∇φ
    // Projected gradient: on an active bound (the nugget floor among them) the component is dropped.
    const active = activeBounds(theta, g);
    const gp = g.map((v, k) => (active[k] === null ? v : 0));
    if (maxAbs(gp) < gtol) {
      converged = true;
      break;
    }
    let dir = matVec(H, gp).map((v) => -v);
    active.forEach((a, k) => {
      if (a !== null) dir[k] = 0;
    });
    let slope = dotp(gp, dir);
    if (!(slope < 0)) {
      H = eye(p);
      dir = gp.map((v) => -v);
      slope = dotp(gp, dir);
    }
    const big = maxAbs(dir);
    if (big > MAX_STEP) {
      dir = dir.map((v) => (v * MAX_STEP) / big);
      slope = dotp(g, dir);
    }
    const phi0 = -cur.logEvidence;
    let t = 1;
    let next: EvidenceAndGradient | null = null;
    let thNext = theta;
    for (let ls = 0; ls < 40; ls++) {
      thNext = project(theta.map((v, k) => v + t * dir[k]));
      const trial = evaluate(thNext);
      if (Number.isFinite(trial.logEvidence) && -trial.logEvidence <= phi0 + 1e-4 * t * slope) {
        next = trial;
        break;
      }
      t *= 0.5;
    }
    if (next === null) break; // no descent possible along the search direction: at the optimum to round-off
    const s = thNext.map((v, k) => v - theta[k]);
    const y = next.gradient.map((v, k) => -v - g[k]);
    const sy = dotp(s, y);
    if (sy > 1e-12 * Math.sqrt(dotp(s, s) * dotp(y, y))) {
      if (first) {
        // Nocedal & Wright eq. 6.20: H₀ = (sᵀy / yᵀy) I before the first update.
        H = eye(p).map((v) => (v * sy) / dotp(y, y));
        first = false;
      }
      H = bfgsUpdate(H, s, y, sy);
    }
    const change = cur.logEvidence - next.logEvidence;
    smallChanges = Math.abs(change) <= 1e-13 * (1 + Math.abs(next.logEvidence)) ? smallChanges + 1 : 0;
    theta = thNext;
    cur = next;
    options.onProgress?.(Math.min(0.9, (iterations + 1) / maxIter));
    if (smallChanges >= 3) {
      converged = maxAbs(projectedGradient(cur.gradient)) < 1e3 * gtol;
      break;
    }
  }
  function projectedGradient(grad: Float64Array): Float64Array {
    const active = activeBounds(
      theta,
      grad.map((v) => -v),
    );
    return grad.map((v, k) => (active[k] === null ? v : 0));
  }
  if (!converged && !cancelled && maxAbs(projectedGradient(cur.gradient)) < gtol) converged = true;
  const onFloor =
    nIdx >= 0 &&
    atFloor(
      theta,
      cur.gradient.map((v) => -v),
    );
  const finalActive = activeBounds(
    theta,
    cur.gradient.map((v) => -v),
  );
  const held = (k: number): boolean => finalActive[k] !== null;
  // Observed information by central differences of the gradient.
  const info = new Float64Array(p * p);
  if (!cancelled) {
    for (let j = 0; j < p; j++) {
      // On an active bound (the nugget on its floor) a coordinate is not free: its row and column are left out of the curvature.
      if (held(j)) continue;
      const tp = Float64Array.from(theta);
      const tm = Float64Array.from(theta);
      tp[j] += HESSIAN_STEP;
      tm[j] -= HESSIAN_STEP;
      const gp = evaluate(tp).gradient;
      const gm = evaluate(tm).gradient;
      for (let i = 0; i < p; i++) if (!held(i)) info[i * p + j] = -(gp[i] - gm[i]) / (2 * HESSIAN_STEP);
    }
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < i; j++) {
        const v = 0.5 * (info[i * p + j] + info[j * p + i]);
        info[i * p + j] = v;
        info[j * p + i] = v;
      }
    }
  }
  options.onProgress?.(1);
  const cov = new Float64Array(p * p).fill(Number.NaN);
  let note: string | undefined;
  // The free coordinates of the curvature (all but those resting on a bound).
  const free = params.map((_, k) => k).filter((k) => !held(k));
  const q = free.length;
  const sub = new Float64Array(q * q);
  free.forEach((a, i) => free.forEach((b, j) => (sub[i * q + j] = info[a * p + b])));
  const f = cholesky({ rows: q, cols: q, data: sub });
  if (f.ok && !cancelled) {
    for (let j = 0; j < q; j++) {
      const e = new Float64Array(q);
      e[j] = 1;
      const col = choleskySolve(f.factor, e);
      free.forEach((a, i) => (cov[a * p + free[j]] = col[i]));
    }
  } else if (!cancelled) {
    note = 'the curvature at the optimum is not negative definite (a flat or rising direction): standard errors are not available';
  }
  if (!converged && !cancelled)
    note =
      (note ? note + '; ' : '') +
      `not converged after ${iterations} iterations (largest gradient ${maxAbs(cur.gradient).toExponential(2)})`;
  const best = applyHyperParameters(start, params, theta);
  const conditioning = checkConditioning(problem.grid, best, onFloor, nIdx >= 0 ? Math.exp(logFloor(theta)) : null);
  if (onFloor) {
    note =
      (note ? note + '; ' : '') +
      `the evidence keeps rising as the nugget falls: the search stopped at the smallest nugget that keeps the prior's condition number within ${THRESHOLD_TEXT} (nugget ${conditioning.nuggetFloor!.toPrecision(3)}); the unconstrained optimum would be a prior that does not factor reliably, and the nugget has no standard error`;
  }
  if (!conditioning.usable) {
    note =
      (note ? note + '; ' : '') +
      (conditioning.positiveDefinite
        ? `the optimum's prior covariance is nearly singular (condition number ${conditioning.conditionNumber.toPrecision(3)}, above ${THRESHOLD_TEXT}): free the nugget so the search can stay within the threshold, or hold the lengths`
        : conditioning.verdict === 'not-decided'
          ? `the positive definiteness of the optimum's prior covariance could not be decided: free the nugget`
          : `the optimum's prior covariance is not positive definite: free the nugget so the search can stay within the threshold, or hold the lengths`);
  }
  const startTheta = hyperParameterVector(start, params);
  const back = (h: HyperParameter, c: number): number => (h.scale === 'log' ? Math.exp(c) : c);
  const parameters: FittedParameter[] = params.map((h, k) => {
    const se = Math.sqrt(cov[k * p + k]);
    const c = theta[k];
    return {
      name: h.name,
      scale: h.scale,
      value: back(h, c),
      start: back(h, startTheta[k]),
      coordinate: c,
      standardError: se,
      interval95: [back(h, c - 1.96 * se), back(h, c + 1.96 * se)],
      atBound: finalActive[k],
    };
  });
  return {
    prior: best,
    start,
    logEvidence: cur.logEvidence,
    startLogEvidence,
    parameters,
    information: info,
    covariance: cov,
    gradient: cur.gradient,
    iterations,
    evaluations,
    converged,
    cancelled,
    conditioning,
    ...(note !== undefined ? { note } : {}),
  };
}

/**
 * Default range of a free Matérn ν. Above 50 the Matérn correlation differs from the Gaussian by less than
 * |h²(h² − 4)| e^{−h²/2}/(8ν) ≤ 0.5 % (the first-order term in ../kernels/matern.ts); below 0.05 the fields are
 * rougher than any exponential-like prior in practice (common practice, no source).
 */
export const NU_MIN = 0.05;
export const NU_MAX = 50;

/**
 * Bounds of every coordinate (logs where the scale is log) from `bounds` in natural units; ±∞ where
 * none is given ({@link NU_MIN}–{@link NU_MAX} for ν). Names must be free parameters; lo ≤ hi, and > 0 on a log scale.
 */
function coordinateBounds(
  params: readonly HyperParameter[],
  bounds: MaximiseOptions['bounds'],
): { lower: Float64Array; upper: Float64Array } {
  const lower = new Float64Array(params.length).fill(Number.NEGATIVE_INFINITY);
  const upper = new Float64Array(params.length).fill(Number.POSITIVE_INFINITY);
  // A free Matérn ν keeps to [NU_MIN, NU_MAX] unless the caller bounds it: on data that favour a smooth field the
  // evidence keeps rising slowly with ν towards the Gaussian limit, and each evaluation costs O(ν) (the Bessel
  // recurrence), so an unbounded ν made a fit run for minutes (seen on 50 point data: ν = 19 after 50 steps).
  params.forEach((h, k) => {
    if (h.field === 'nu') {
      lower[k] = Math.log(NU_MIN);
      upper[k] = Math.log(NU_MAX);
    }
  });
  for (const [name, range] of Object.entries(bounds ?? {})) {
    const k = params.findIndex((h) => h.name === name);
    if (k < 0) throw new InputError(`bounds.${name}`, `the name of a free parameter (${params.map((h) => h.name).join(', ')})`, name);
    const h = params[k];
    const [lo, hi] = range;
    const positive = h.scale === 'log';
    if (!(lo <= hi) || Number.isNaN(lo) || Number.isNaN(hi) || (positive && !(lo > 0))) {
      throw new InputError(`bounds.${name}`, `[lo, hi] with lo ≤ hi${positive ? ' and lo > 0' : ''}`, range);
    }
    lower[k] = positive ? Math.log(lo) : lo;
    upper[k] = positive ? Math.log(hi) : hi;
  }
  return { lower, upper };
}

/** "1e10" for messages. */
const THRESHOLD_TEXT = NEAR_SINGULAR_CONDITION.toExponential(0).replace('+', '');

/** The workbench's diagnosis of the optimum (dense eigenvalues or certified FFT bounds). */
function checkConditioning(grid: Grid, prior: PriorSpec, nuggetAtFloor: boolean, nuggetFloor: number | null): OptimumConditioning {
  // The verdict's first step on the FFT path is the certified bracket (../prior/structuredDiagnostics.ts); when it
  // proves positive definiteness, that is the whole answer here (verdict and κ bound as diagnosePriorAuto would
  // give them), without the Lanczos estimates that only the full diagnosis reports.
  if (chooseDiagnosticsPath(grid, prior).path === 'fft') {
    const b = spectrumBracket(grid, prior);
    if (b.lower > 0) {
      const kappa = b.upper / b.lower;
      return {
        verdict: 'positive-definite',
        positiveDefinite: true,
        conditionNumber: kappa,
        usable: kappa <= NEAR_SINGULAR_CONDITION,
        nuggetAtFloor,
        nuggetFloor,
      };
    }
  }
  const d = diagnosePriorAuto(grid, prior);
  // κ: the certified bound when the FFT bracket proved the verdict, else the dense or Lanczos value.
  const kappa = d.decidedBy === 'fft-bracket' && d.conditionUpperBound !== undefined ? d.conditionUpperBound : d.conditionNumber;
  const proven = d.verdict === 'positive-definite';
  return {
    verdict: d.verdict,
    positiveDefinite: proven,
    conditionNumber: kappa,
    usable: proven && kappa <= NEAR_SINGULAR_CONDITION,
    nuggetAtFloor,
    nuggetFloor,
  };
}

function eye(p: number): Float64Array {
  const out = new Float64Array(p * p);
  for (let i = 0; i < p; i++) out[i * p + i] = 1;
  return out;
}

function matVec(a: Float64Array, x: Float64Array): Float64Array {
  const p = x.length;
  const out = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    let s = 0;
    for (let j = 0; j < p; j++) s += a[i * p + j] * x[j];
    out[i] = s;
  }
  return out;
}

function dotp(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

function maxAbs(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]));
  return m;
}

/**
 * BFGS update of the inverse Hessian (Nocedal & Wright 2006, eq. 6.17):
 * H⁺ = (I − ρ s yᵀ) H (I − ρ y sᵀ) + ρ s sᵀ, ρ = 1/(yᵀs), expanded as
 * H⁺ = H − ρ (s (Hy)ᵀ + (Hy) sᵀ) + (ρ² yᵀHy + ρ) s sᵀ.
 */
function bfgsUpdate(H: Float64Array, s: Float64Array, y: Float64Array, sy: number): Float64Array {
  const p = s.length;
  const rho = 1 / sy;
  const hy = matVec(H, y);
  const yhy = dotp(y, hy);
  const out = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) {
      out[i * p + j] = H[i * p + j] - rho * (s[i] * hy[j] + hy[i] * s[j]) + (rho * rho * yhy + rho) * s[i] * s[j];
    }
  }
  return out;
}
