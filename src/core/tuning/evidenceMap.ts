/**
 * Evidence maps: the log marginal likelihood log N(d; G m0, G Cm Gᵀ + Cd) over a log-spaced grid of
 * (length, variance) of one covariance term, everything else in the prior held fixed; and 1-D
 * evidence profiles over the Matérn smoothness ν and over the nugget.
 *
 * PUBLIC API: logSpaced, evidenceMap, evidenceProfile, withTerm, setTermLength, termLength, LengthAxis, LENGTH_AXES.
 *
 * ## The eigendecomposition shortcut (derivation)
 * Write the prior covariance as Cm = σ² C₁ + C_f, with C₁ the chosen term at unit variance (the
 * standard-deviation profile included: C₁ = S R₁ S) and C_f everything else (other terms, nugget),
 * which does not depend on the chosen term's length or variance. Then
 *
 *   K(σ²) = σ² P₁ + B,   P₁ = G C₁ Gᵀ,   B = G C_f Gᵀ + Cd = L_B L_Bᵀ   (B is SPD because Cd is).
 *
 * Whiten with L_B: K = L_B (σ² A + I) L_Bᵀ with A = L_B⁻¹ P₁ L_B⁻ᵀ = U Λ Uᵀ (symmetric, PSD). Hence
 *
 *   log|K|     = log|B| + log|σ²Λ + I|        = log|B| + Σ_k log(1 + σ² λ_k),
 *   rᵀ K⁻¹ r   = (L_B⁻¹r)ᵀ U (σ²Λ + I)⁻¹ Uᵀ (L_B⁻¹r) = Σ_k b_k² / (1 + σ² λ_k),   b = Uᵀ L_B⁻¹ r,
 *
 * so after one eigendecomposition per length (O(M³)) every variance costs O(M). With a single term
 * and no nugget, B = Cd; other terms and a nugget only change B, so the same algebra covers them,
 * stated here so it can be checked (test/core/tuning/evidenceMap.test.ts compares both paths on priors with a nugget and
 * a second term). The nugget profile uses the same identity with C₁ = I (K(η) = η G Gᵀ + B).
 * The per-cell Cholesky path (K = σ² P₁ + B factored for every cell, M³/3 flops each) is used when
 * asked for, when the whitened matrix has a clearly negative eigenvalue (an indefinite term, e.g. a
 * kernel outside its valid dimension) where log(1 + σ²λ) could fail, and by `method: 'auto'` when
 * the variance axis is short: one symmetricEigen of an M × M matrix costs about as much as
 * {@link EIGEN_BREAK_EVEN} Cholesky factorisations of it (measured on the project machine at
 * M = 256, crosshole demo: ≈ 440 ms against ≈ 17 ms per cell), so below that many variances the
 * factorisations are cheaper. Both paths agree to 1e-10 (test/core/tuning/evidenceMap.test.ts).
 */
import { assertNever, InputError } from '../errors.ts';
import { patchTerm, type Term, type TermPatch } from '../kernels/spec.ts';
import { kernelsTaking, kernelTakes } from '../kernels/table.ts';
import { cholesky, logDetFromCholesky, solveLower, solveLowerMatrix } from '../linalg/cholesky.ts';
import { symmetricEigen } from '../linalg/eigen.ts';
import { matrix, matTvec, transpose, type Matrix } from '../linalg/matrix.ts';
import { operatorGram } from '../linalg/operator.ts';
import { symmetrise } from '../linalg/products.ts';
import { validatePrior } from '../prior/covariance.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import {
  aborted,
  addMatrices,
  checkTermIndex,
  gaussianLogDensity,
  LOG_2PI,
  prepareDataSide,
  priorDataSpace,
  priorResidual,
  sideProjection,
  type DataSide,
  type RouteOptions,
  type TuningControl,
} from './dataSpace.ts';

/** A log-spaced axis: `count` values from `min` to `max` inclusive (count = 1 gives [min]). */
export interface LogAxis {
  readonly min: number;
  readonly max: number;
  readonly count: number;
}

export type EvidenceMethod = 'eigen' | 'cholesky';

/**
 * Variance-axis length from which `method: 'auto'` uses the eigen shortcut (see the module comment;
 * measured, machine-dependent, so it is a constant to retune rather than a law).
 */
export const EIGEN_BREAK_EVEN = 24;

/** Values min·(max/min)^(k/(count−1)), k = 0 … count−1. InputError naming `field` on bad ranges. */
export function logSpaced(axis: LogAxis, field = 'axis'): Float64Array {
  const { min, max, count } = axis;
  if (!(min > 0) || !Number.isFinite(min)) throw new InputError(`${field}.min`, 'a finite number > 0', min);
  if (!(max >= min) || !Number.isFinite(max)) throw new InputError(`${field}.max`, `a finite number ≥ ${field}.min (${min})`, max);
  if (!Number.isInteger(count) || count < 1 || count > 10000) throw new InputError(`${field}.count`, 'an integer from 1 to 10000', count);
  const out = new Float64Array(count);
  const lr = Math.log(max / min);
  for (let k = 0; k < count; k++) out[k] = count === 1 ? min : min * Math.exp((lr * k) / (count - 1));
  if (count > 1) out[count - 1] = max;
  return out;
}

/** The prior with term `index` replaced by `patch` applied to it. */
export function withTerm(prior: PriorSpec, index: number, patch: TermPatch): PriorSpec {
  return { ...prior, terms: prior.terms.map((t, k) => (k === index ? patchTerm(t, patch) : t)) };
}

/**
 * Which length of a term a map's length axis sets. "both": the term's one length, or for an anisotropic
 * term l1 with l2 scaled in proportion (axis ratio and angle kept); "l1" / "l2": that length of an
 * anisotropic term alone, the other and the angle kept (an isotropic term has only "both").
 */
export type LengthAxis = 'both' | 'l1' | 'l2';
export const LENGTH_AXES: readonly LengthAxis[] = ['both', 'l1', 'l2'];

/** The length that the map's length axis stands for: `length`, or `lengths[0]` (`lengths[1]` for "l2") of an anisotropic term. */
export function termLength(term: Term, axis: LengthAxis = 'both'): number {
  return term.lengths !== undefined ? term.lengths[axis === 'l2' ? 1 : 0] : term.length;
}

/**
 * The term with its length along `axis` set to `length` (see {@link LengthAxis}; "both" keeps an
 * anisotropic term's axis ratio l2/l1 by scaling both lengths by length/l1). An isotropic term
 * takes `length` whatever the axis: {@link evidenceMap} refuses "l1" / "l2" for it.
 */
export function setTermLength(term: Term, length: number, axis: LengthAxis = 'both'): Term {
  if (term.lengths !== undefined) {
    const [l1, l2] = term.lengths;
    switch (axis) {
      case 'both':
        return { ...term, lengths: [length, (l2 * length) / l1] };
      case 'l1':
        return { ...term, lengths: [length, l2] };
      case 'l2':
        return { ...term, lengths: [l1, length] };
      default:
        return assertNever(axis, 'length axis');
    }
  }
  return { ...term, length };
}

export interface EvidenceMapOptions extends TuningControl, RouteOptions {
  /** Index of the term whose length and variance are mapped. */
  readonly term: number;
  readonly lengths: LogAxis;
  readonly variances: LogAxis;
  /** Which length the length axis sets (default "both"; "l1" / "l2" only for an anisotropic term). */
  readonly axis?: LengthAxis;
  /**
   * 'auto' (default): the eigen shortcut when the variance axis has at least EIGEN_BREAK_EVEN
   * values, else a Cholesky per cell; 'eigen': the shortcut wherever it applies; 'cholesky': one
   * factorisation per cell.
   */
  readonly method?: 'auto' | 'eigen' | 'cholesky';
}

export interface EvidenceMap {
  readonly term: number;
  readonly lengths: Float64Array;
  readonly variances: Float64Array;
  /** Row-major over (length, variance): value for lengths[i], variances[j] at i·variances.length + j; NaN where not computed or K failed to factor. */
  readonly logEvidence: Float64Array;
  /** 'eigen' when every length used the shortcut, else 'cholesky'. */
  readonly method: EvidenceMethod;
  readonly methodByLength: readonly EvidenceMethod[];
  /** Best cell (largest finite log evidence), null when none is finite. */
  readonly best: { readonly length: number; readonly variance: number; readonly logEvidence: number; readonly index: number } | null;
  /** True when the signal stopped the computation early (remaining cells are NaN). */
  readonly cancelled: boolean;
  /** Why the Cholesky path was used, if it was. */
  readonly note?: string;
}

/** Relative size of a negative eigenvalue of the whitened matrix that is still taken as round-off. */
const NEGATIVE_EIGEN_TOLERANCE = 1e-9;

interface Whitening {
  /** Lower factor of B. */
  readonly factor: Matrix;
  readonly logDet: number;
  /** L_B⁻¹ r. */
  readonly whitenedResidual: Float64Array;
  /** B itself (for the Cholesky path). */
  readonly fixed: Matrix;
}

/** B = G C_f Gᵀ + Cd with C_f the prior without term `skip` (and without the nugget when `dropNugget`). */
function fixedPart(side: DataSide, prior: PriorSpec, skip: number | null, dropNugget: boolean): Matrix {
  const terms = prior.terms.filter((_, k) => k !== skip);
  const nugget = dropNugget ? 0 : (prior.nugget ?? 0);
  if (terms.length === 0 && nugget === 0) return matrix(side.dataCount, side.dataCount, side.cd.data.slice());
  const rest: PriorSpec = { ...prior, terms, nugget };
  if (terms.length === 0) {
    // Nugget only: C_f = η I, G C_f Gᵀ = η G Gᵀ.
    const ggt = operatorGram(side.problem.operator);
    for (let i = 0; i < ggt.data.length; i++) ggt.data[i] *= nugget;
    return addMatrices(ggt, side.cd);
  }
  return addMatrices(sideProjection(side, rest), side.cd);
}

function whiten(fixed: Matrix, residual: Float64Array): Whitening | null {
  const f = cholesky(fixed);
  if (!f.ok) return null;
  return { factor: f.factor, logDet: logDetFromCholesky(f.factor), whitenedResidual: solveLower(f.factor, residual), fixed };
}

/** Eigenvalues λ and b = Uᵀ L_B⁻¹ r of A = L_B⁻¹ P L_B⁻ᵀ; null when A is clearly indefinite. */
function whitenedSpectrum(w: Whitening, p: Matrix): { lambda: Float64Array; b: Float64Array } | null {
  const x = solveLowerMatrix(w.factor, p); // L_B⁻¹ P
  const a = solveLowerMatrix(w.factor, transpose(x)); // L_B⁻¹ (L_B⁻¹ P)ᵀ = L_B⁻¹ P L_B⁻ᵀ
  symmetrise(a);
  const { values, vectors } = symmetricEigen(a);
  const top = Math.max(Math.abs(values[0]), Math.abs(values[values.length - 1]));
  const lambda = new Float64Array(values.length);
  for (let k = 0; k < values.length; k++) {
    const v = values[k];
    if (v < -NEGATIVE_EIGEN_TOLERANCE * top) return null;
    lambda[k] = Math.max(v, 0);
  }
  return { lambda, b: matTvec(vectors, w.whitenedResidual) };
}

/** log N at scale s: log|K| = log|B| + Σ log(1 + sλ), q = Σ b²/(1 + sλ) (see the module comment). */
function shortcutLogEvidence(w: Whitening, spec: { lambda: Float64Array; b: Float64Array }, s: number): number {
  const { lambda, b } = spec;
  let logDet = w.logDet;
  let q = 0;
  for (let k = 0; k < lambda.length; k++) {
    const t = 1 + s * lambda[k];
    logDet += Math.log(t);
    q += (b[k] * b[k]) / t;
  }
  return -0.5 * q - 0.5 * logDet - 0.5 * lambda.length * LOG_2PI;
}

/** Log evidence of K = s P + B by one Cholesky (NaN when it does not factor). */
function choleskyLogEvidence(p: Matrix, s: number, fixed: Matrix, residual: Float64Array): number {
  const k = matrix(p.rows, p.cols);
  for (let i = 0; i < k.data.length; i++) k.data[i] = s * p.data[i] + fixed.data[i];
  const g = gaussianLogDensity(k, residual);
  return g === null ? Number.NaN : g.logDensity;
}

/**
 * Log evidence over lengths × variances of term `options.term` (see the module comment for the
 * method). Cost per length: one projection G C₁ Gᵀ (dense: one Cm assembly; FFT route above
 * TUNING_DENSE_LIMIT cells: ⌈M/2⌉ circulant products, no N × N matrix) and one M × M
 * eigendecomposition; per cell O(M) (eigen) or one M × M Cholesky (cholesky).
 */
export function evidenceMap(problem: Problem, prior: PriorSpec, options: EvidenceMapOptions): EvidenceMap {
  checkTermIndex(prior, options.term, 'term');
  const lengths = logSpaced(options.lengths, 'lengths');
  const variances = logSpaced(options.variances, 'variances');
  const asked = options.method ?? 'auto';
  if (asked !== 'auto' && asked !== 'eigen' && asked !== 'cholesky') throw new InputError('method', '"auto", "eigen" or "cholesky"', asked);
  const requested = asked === 'cholesky' || (asked === 'auto' && variances.length < EIGEN_BREAK_EVEN) ? 'cholesky' : 'auto';
  const side = prepareDataSide(problem, options);
  const term = prior.terms[options.term];
  const axis = options.axis ?? 'both';
  if (!LENGTH_AXES.includes(axis)) throw new InputError('axis', '"both", "l1" or "l2"', axis);
  if (axis !== 'both' && term.lengths === undefined) {
    throw new InputError(
      'axis',
      `"both" for term ${options.term}, which has one length (l1 and l2 need an anisotropic term, "lengths": [l1, l2])`,
      axis,
    );
  }
  const unit = (len: number): PriorSpec => ({ ...prior, terms: [{ ...setTermLength(term, len, axis), variance: 1 }], nugget: 0 });
  // Validation of the prior as given, and the residual r = d − G m0.
  validatePrior(prior, problem.grid);
  const residual = priorResidual(side, prior);
  const fixed = fixedPart(side, prior, options.term, false);
  const w = whiten(fixed, residual);
  const nl = lengths.length;
  const nv = variances.length;
  const out = new Float64Array(nl * nv).fill(Number.NaN);
  const methods: EvidenceMethod[] = [];
  let note: string | undefined = w === null ? 'the fixed part G C_f Gᵀ + Cd did not factor' : undefined;
  let cancelled = false;
  const total = nl * nv;
  for (let i = 0; i < nl && !cancelled; i++) {
    if (aborted(options)) {
      cancelled = true;
      break;
    }
    const p = sideProjection(side, unit(lengths[i]));
    const spec = requested === 'auto' && w !== null ? whitenedSpectrum(w, p) : null;
    if (requested === 'auto' && w !== null && spec === null)
      note = `term ${options.term} at length ${lengths[i]} gives an indefinite G C₁ Gᵀ`;
    methods.push(spec !== null ? 'eigen' : 'cholesky');
    for (let j = 0; j < nv; j++) {
      if (spec === null && aborted(options)) {
        cancelled = true;
        break;
      }
      out[i * nv + j] = spec !== null ? shortcutLogEvidence(w!, spec, variances[j]) : choleskyLogEvidence(p, variances[j], fixed, residual);
      if (spec === null) options.onProgress?.((i * nv + j + 1) / total);
    }
    if (spec !== null) options.onProgress?.(((i + 1) * nv) / total);
  }
  if (asked === 'cholesky') note = 'Cholesky per cell was requested';
  else if (requested === 'cholesky')
    note = `Cholesky per cell: fewer than ${EIGEN_BREAK_EVEN} variances, where it is cheaper than an eigendecomposition per length`;
  return finishMap(options.term, lengths, variances, out, methods, cancelled, note);
}

/** The method of a whole map: 'eigen' only when every length took the eigen shortcut. */
export function mapMethod(methods: readonly EvidenceMethod[]): EvidenceMethod {
  return methods.length > 0 && methods.every((m) => m === 'eigen') ? 'eigen' : 'cholesky';
}

/** The best cell of a filled map (largest finite log evidence, the first of equals; lengths × variances, variances fastest). */
export function bestCell(lengths: ArrayLike<number>, variances: ArrayLike<number>, logEvidence: ArrayLike<number>): EvidenceMap['best'] {
  const nv = variances.length;
  let best: EvidenceMap['best'] = null;
  for (let k = 0; k < logEvidence.length; k++) {
    const v = logEvidence[k];
    if (Number.isFinite(v) && (best === null || v > best.logEvidence)) {
      best = { length: lengths[Math.floor(k / nv)], variance: variances[k % nv], logEvidence: v, index: k };
    }
  }
  return best;
}

/** An {@link EvidenceMap} from its filled values (shared by the whole-map call and the worker's map by rows). */
export function finishMap(
  term: number,
  lengths: Float64Array,
  variances: Float64Array,
  logEvidence: Float64Array,
  methods: EvidenceMethod[],
  cancelled: boolean,
  note: string | undefined,
): EvidenceMap {
  return {
    term,
    lengths,
    variances,
    logEvidence,
    method: mapMethod(methods),
    methodByLength: methods,
    best: bestCell(lengths, variances, logEvidence),
    cancelled,
    ...(note !== undefined ? { note } : {}),
  };
}

export type ProfileParameter = { readonly parameter: 'nu'; readonly term: number } | { readonly parameter: 'nugget' };

export interface EvidenceProfileOptions extends TuningControl, RouteOptions {
  /** Values of ν (> 0) or of the nugget (≥ 0) at which to evaluate. */
  readonly values: ArrayLike<number>;
  /** Nugget profile only; as in EvidenceMapOptions (ν profiles always factor per value). */
  readonly method?: 'auto' | 'eigen' | 'cholesky';
}

export interface EvidenceProfile {
  readonly parameter: 'nu' | 'nugget';
  readonly values: Float64Array;
  readonly logEvidence: Float64Array;
  readonly method: EvidenceMethod;
  readonly best: { readonly value: number; readonly logEvidence: number; readonly index: number } | null;
  readonly cancelled: boolean;
}

/**
 * Log evidence along ν of a Matérn term (one Cm and one Cholesky per value: ν changes the shape of
 * the correlation, so there is no shortcut) or along the nugget (eigen shortcut with C₁ = I, see
 * the module comment; Cholesky per value when asked).
 */
export function evidenceProfile(
  problem: Problem,
  prior: PriorSpec,
  which: ProfileParameter,
  options: EvidenceProfileOptions,
): EvidenceProfile {
  const values = Float64Array.from(options.values);
  if (values.length === 0) throw new InputError('values', 'at least one value', options.values);
  const side = prepareDataSide(problem, options);
  validatePrior(prior, problem.grid);
  const residual = priorResidual(side, prior);
  const out = new Float64Array(values.length).fill(Number.NaN);
  let cancelled = false;
  let method: EvidenceMethod = 'cholesky';
  const kind = which.parameter;
  switch (kind) {
    case 'nu': {
      const w = which as { parameter: 'nu'; term: number };
      checkTermIndex(prior, w.term, 'term');
      if (!kernelTakes(prior.terms[w.term].kernel, 'nu')) {
        const takers = kernelsTaking('nu').map((k) => `"${k}"`);
        throw new InputError(`terms[${w.term}].kernel`, `${takers.join(' or ')} for a ν profile`, prior.terms[w.term].kernel);
      }
      values.forEach((v, k) => {
        if (!(v > 0) || !Number.isFinite(v)) throw new InputError(`values[${k}]`, 'a finite ν > 0', v);
      });
      for (let k = 0; k < values.length; k++) {
        if (aborted(options)) {
          cancelled = true;
          break;
        }
        const p = priorDataSpace(side, withTerm(prior, w.term, { nu: values[k] }));
        const g = gaussianLogDensity(addMatrices(p.projected, side.cd), residual);
        out[k] = g === null ? Number.NaN : g.logDensity;
        options.onProgress?.((k + 1) / values.length);
      }
      break;
    }
    case 'nugget': {
      values.forEach((v, k) => {
        if (!(v >= 0) || !Number.isFinite(v)) throw new InputError(`values[${k}]`, 'a finite nugget ≥ 0', v);
      });
      const fixed = fixedPart(side, prior, null, true);
      const ggt = operatorGram(problem.operator);
      const useCholesky = options.method === 'cholesky' || ((options.method ?? 'auto') === 'auto' && values.length < EIGEN_BREAK_EVEN);
      const wh = useCholesky ? null : whiten(fixed, residual);
      const spec = wh === null ? null : whitenedSpectrum(wh, ggt);
      method = spec !== null ? 'eigen' : 'cholesky';
      for (let k = 0; k < values.length; k++) {
        if (aborted(options)) {
          cancelled = true;
          break;
        }
        out[k] = spec !== null ? shortcutLogEvidence(wh!, spec, values[k]) : choleskyLogEvidence(ggt, values[k], fixed, residual);
        options.onProgress?.((k + 1) / values.length);
      }
      break;
    }
    default:
      assertNever(kind);
  }
  let best: EvidenceProfile['best'] = null;
  out.forEach((v, k) => {
    if (Number.isFinite(v) && (best === null || v > best.logEvidence)) best = { value: values[k], logEvidence: v, index: k };
  });
  return { parameter: kind, values, logEvidence: out, method, best, cancelled };
}
