/**
 * Linear-Gaussian posterior in the data-space form (Tarantola 2005, Inverse Problem Theory, §3.2):
 *
 *   d = G m + e,  m ~ N(m0, Cm),  e ~ N(0, Cd),  K = G Cm Gᵀ + Cd = L Lᵀ (Cholesky),
 *   m̃ = m0 + Cm Gᵀ K⁻¹ (d − G m0),   C̃ = Cm − Cm Gᵀ K⁻¹ G Cm.
 *
 * PUBLIC API: PosteriorFactors, PosteriorState, preparePosterior, preparePosteriorFromCovariance,
 * posteriorSummary, posteriorCovariance, resolutionRow, posteriorRealisations.
 *
 * Everything goes through the factor L of the M × M matrix K; no inverse is formed. We keep
 * Bᵀ = G Cm (M × N; its transpose B = Cm Gᵀ is the data-to-model cross-covariance), which for a
 * sparse G costs nnz(G)·N. With W = L⁻¹ Bᵀ (M × N):
 *   C̃ = Cm − Bᵀᵀ K⁻¹ Bᵀ = Cm − Wᵀ W,   so  var_i = Cm_ii − Σ_k W_ki².
 * Rounding can make var_i a tiny negative number where the data determine a cell almost exactly;
 * such values are clamped to 0 (std = 0) rather than returned as NaN. The subtraction cancels, so
 * var_i carries an absolute error of a few ε·Cm_ii: posterior std below about √(ε Cm_ii)·10 is
 * rounding noise (use the model-space form if such tiny posterior variances matter).
 */
import { InputError, NotPositiveDefiniteError } from '../errors.ts';
import { cellCount, type Geometry } from '../grid/grid.ts';
import { cholesky, choleskySolve, solveLower, solveLowerMatrix } from '../linalg/cholesky.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { applyOperator, applyOperatorTranspose, operatorTimesSymmetric, operatorTimesTransposedSymmetric } from '../linalg/operator.ts';
import { columnSumsOfSquares, plusRowCombination, symmetricProductNT, transposeOf } from '../linalg/products.ts';
import { covarianceMatrix, meanVector } from '../prior/covariance.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import { Random, validateSeed } from '../sampling/random.ts';
import { chiSquareInterval } from './chisquare.ts';
import { logEvidenceFromFactor } from './evidence.ts';
import { dataFitReference, weightsFromWhitened } from './fitReference.ts';
import type { PosteriorSummary } from './types.ts';

/** The factorised posterior of one problem with a dense prior covariance. Treat as immutable. */
export interface PosteriorFactors {
  readonly problem: Problem<Geometry>;
  /** Prior mean m0 (N). */
  readonly m0: Float64Array;
  /** Prior covariance Cm (N × N). */
  readonly Cm: Matrix;
  /** Bᵀ = G Cm (M × N). */
  readonly Bt: Matrix;
  /** Lower Cholesky factor of K = G Cm Gᵀ + Cd (M × M). */
  readonly L: Matrix;
  /** Lower Cholesky factor of a full Cd (M × M); absent for a diagonal Cd. */
  readonly Ld?: Matrix;
  /** r = d − G m0. */
  readonly r: Float64Array;
  /** α = K⁻¹ r. */
  readonly alpha: Float64Array;
}

/** Factorised posterior for one (problem, prior): holds Cm Gᵀ, the Cholesky factor of K, α = K⁻¹ r. */
export interface PosteriorState extends PosteriorFactors {
  readonly problem: Problem<Geometry>;
  readonly prior: PriorSpec;
}

/** Builds Cm and m0 from the prior (covarianceMatrix validates it) and factors the posterior. */
export function preparePosterior(problem: Problem<Geometry>, prior: PriorSpec): PosteriorState {
  const Cm = covarianceMatrix(problem.grid, prior);
  const m0 = meanVector(problem.grid, prior);
  return { ...preparePosteriorFromCovariance(problem, Cm, m0), prior };
}

function checkProblem(problem: Problem<Geometry>, Cm: Matrix, m0: ArrayLike<number>): void {
  const n = cellCount(problem.grid);
  const { rows: m, cols } = problem.operator.matrix;
  if (cols !== n) throw new InputError('problem.operator', `a matrix with ${n} columns (one per grid cell)`, `${m}×${cols}`);
  if (Cm.rows !== n || Cm.cols !== n) throw new InputError('prior covariance Cm', `a ${n}×${n} matrix`, `${Cm.rows}×${Cm.cols}`);
  if (m0.length !== n) throw new InputError('prior mean m0', `${n} numbers (one per grid cell)`, m0);
  const { values, sigma, covariance } = problem.data;
  if (values.length !== m) throw new InputError('problem.data.values', `${m} numbers (one per operator row)`, values);
  for (let k = 0; k < m; k++) {
    if (!Number.isFinite(values[k])) throw new InputError(`problem.data.values[${k}]`, 'a finite number', values[k]);
  }
  if ((sigma === undefined) === (covariance === undefined)) {
    throw new InputError('problem.data', 'exactly one of sigma or covariance', sigma ? 'both' : 'neither');
  }
  if (sigma !== undefined) {
    if (sigma.length !== m) throw new InputError('problem.data.sigma', `${m} numbers (one per datum)`, sigma);
    for (let k = 0; k < m; k++) {
      if (!(sigma[k] > 0) || !Number.isFinite(sigma[k])) throw new InputError(`problem.data.sigma[${k}]`, 'a finite number > 0', sigma[k]);
    }
  } else if (covariance!.rows !== m || covariance!.cols !== m) {
    throw new InputError('problem.data.covariance', `a ${m}×${m} matrix`, `${covariance!.rows}×${covariance!.cols}`);
  }
}

const K_HINT =
  'K = G Cm Gᵀ + Cd must be positive definite: check that every data σ is > 0 and a full data covariance ' +
  'is symmetric positive definite; if the data errors are tiny compared with G Cm Gᵀ, increase σ or add a nugget to the prior';

/**
 * Factorises the posterior for a given dense Cm (N × N, symmetric positive semi-definite) and m0.
 * Throws InputError on inconsistent sizes or bad data errors, NotPositiveDefiniteError when K or a
 * full Cd does not factor.
 */
export function preparePosteriorFromCovariance(problem: Problem<Geometry>, Cm: Matrix, m0: ArrayLike<number>): PosteriorFactors {
  checkProblem(problem, Cm, m0);
  const G = problem.operator;
  const m = G.matrix.rows;
  const mean0 = Float64Array.from(m0);
  const Bt = operatorTimesSymmetric(G, Cm);
  const K = operatorTimesTransposedSymmetric(G, Bt);
  const { sigma, covariance } = problem.data;
  let Ld: Matrix | undefined;
  if (sigma !== undefined) {
    for (let k = 0; k < m; k++) K.data[k * m + k] += sigma[k] * sigma[k];
  } else {
    const fd = cholesky(covariance!);
    if (!fd.ok) {
      throw new NotPositiveDefiniteError(
        'data covariance Cd (problem.data.covariance)',
        fd.pivot,
        'it must be symmetric positive definite',
      );
    }
    Ld = fd.factor;
    const cd = covariance!.data;
    // Only the lower triangle of Cd is read (the factor's convention); mirror it.
    for (let k = 0; k < m; k++) {
      for (let l = 0; l <= k; l++) {
        K.data[k * m + l] += cd[k * m + l];
        if (l !== k) K.data[l * m + k] += cd[k * m + l];
      }
    }
  }
  const f = cholesky(K, { inPlace: true });
  if (!f.ok) throw new NotPositiveDefiniteError('data-space covariance K', f.pivot, K_HINT);
  const L = f.factor;
  const r = applyOperator(G, mean0);
  for (let k = 0; k < m; k++) r[k] = problem.data.values[k] - r[k];
  const alpha = choleskySolve(L, r);
  return Ld ? { problem, m0: mean0, Cm, Bt, L, Ld, r, alpha } : { problem, m0: mean0, Cm, Bt, L, r, alpha };
}

/** m0 + B v = m0 + (Bᵀ)ᵀ v for a data-space vector v. */
function addCrossCovariance(state: PosteriorFactors, base: ArrayLike<number>, v: ArrayLike<number>): Float64Array {
  return plusRowCombination(base, state.Bt.data, v, state.Bt.cols);
}

/** Normalised residuals: (d − p)/σ for a diagonal Cd, Ld⁻¹ (d − p) for a full one. */
function normalisedResiduals(state: PosteriorFactors, predicted: Float64Array): Float64Array {
  const { values, sigma } = state.problem.data;
  const raw = values.map((v, k) => v - predicted[k]);
  if (state.Ld) return solveLower(state.Ld, raw);
  return raw.map((v, k) => v / sigma![k]);
}

/**
 * X = L⁻¹ S with Cd = S Sᵀ (S = diag σ or S = Ld). tr(K⁻¹ Cd) = ‖X‖_F², since
 * tr(L⁻ᵀ L⁻¹ S Sᵀ) = tr((L⁻¹ S)ᵀ (L⁻¹ S)); the eigenvalues of X Xᵀ are the weights of the data-fit
 * reference (./fitReference.ts).
 */
function whitenedNoise(state: PosteriorFactors): Matrix {
  const m = state.L.rows;
  let S: Matrix;
  if (state.Ld) S = state.Ld;
  else {
    S = matrix(m, m);
    const sigma = state.problem.data.sigma!;
    for (let k = 0; k < m; k++) S.data[k * m + k] = sigma[k];
  }
  return solveLowerMatrix(state.L, S);
}

/** ‖X‖_F². */
function squaredNorm(X: Matrix): number {
  let s = 0;
  for (let i = 0; i < X.data.length; i++) s += X.data[i] * X.data[i];
  return s;
}

export interface SummaryOptions {
  /** Also return the full N × N posterior covariance Cm − Wᵀ W (small N only). */
  readonly fullCovariance?: boolean;
}

/**
 * Posterior mean, pointwise std, prior std, variance reduction, predicted data G m̃, normalised
 * residuals and χ² with its reference distribution under the model (./fitReference.ts), log
 * evidence, the prior-predictive misfit rᵀ K⁻¹ r with its χ²_M interval, and tr R.
 *
 * tr R: R = Cm Gᵀ K⁻¹ G, so tr R = tr(K⁻¹ G Cm Gᵀ) = tr(K⁻¹ (K − Cd)) = M − tr(K⁻¹ Cd)
 * (cyclic trace; our derivation).
 */
export function posteriorSummary(state: PosteriorFactors, options: SummaryOptions = {}): PosteriorSummary {
  const { problem, Cm, Bt, L, alpha, r } = state;
  const n = Cm.rows;
  const m = L.rows;
  const mean = addCrossCovariance(state, state.m0, alpha);
  const W = solveLowerMatrix(L, Bt);
  const colSq = columnSumsOfSquares(W);
  const std = new Float64Array(n);
  const priorStd = new Float64Array(n);
  const varianceReduction = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const pv = Cm.data[i * n + i];
    const v = Math.max(0, pv - colSq[i]);
    std[i] = Math.sqrt(v);
    priorStd[i] = Math.sqrt(Math.max(0, pv));
    varianceReduction[i] = pv > 0 ? 1 - v / pv : 0;
  }
  const predicted = applyOperator(problem.operator, mean);
  const residuals = normalisedResiduals(state, predicted);
  let chi2 = 0;
  for (let k = 0; k < m; k++) chi2 += residuals[k] * residuals[k];
  let misfit = 0;
  for (let k = 0; k < m; k++) misfit += r[k] * alpha[k];
  const [lo, hi] = chiSquareInterval(m, 0.95);
  const X = whitenedNoise(state);
  const summary: PosteriorSummary = {
    mean,
    std,
    priorStd,
    varianceReduction,
    predicted,
    residuals,
    chi2,
    logEvidence: logEvidenceFromFactor(L, r, alpha),
    resolutionTrace: m - squaredNorm(X),
    fitReference: dataFitReference(weightsFromWhitened(X), chi2),
    dataMisfit: misfit,
    reducedMisfitInterval95: [lo / m, hi / m],
    dataCount: m,
    parameterCount: n,
    path: 'dense',
  };
  return options.fullCovariance ? { ...summary, covariance: covarianceFromW(Cm, W) } : summary;
}

/** Cm − Wᵀ W (N × N), with Wᵀ W = Wt Wtᵀ by the symmetric NT product (Wt = Wᵀ, N × M). */
function covarianceFromW(Cm: Matrix, W: Matrix): Matrix {
  const Wt = transposeOf(W);
  const C = symmetricProductNT(Wt, Wt);
  const c = C.data;
  for (let i = 0; i < c.length; i++) c[i] = Cm.data[i] - c[i];
  return C;
}

/** Full posterior covariance C̃ = Cm − Wᵀ W, W = L⁻¹ G Cm (N × N; small N only). */
export function posteriorCovariance(state: PosteriorFactors): Matrix {
  return covarianceFromW(state.Cm, solveLowerMatrix(state.L, state.Bt));
}

/**
 * Row `cell` of the resolution matrix R = Cm Gᵀ K⁻¹ G (the averaging kernel of that cell), length N:
 * R_i· = B_i· K⁻¹ G = (K⁻¹ B_iᵀ)ᵀ G with B_iᵀ column i of Bᵀ = G Cm.
 */
export function resolutionRow(state: Pick<PosteriorFactors, 'problem' | 'Bt' | 'L'>, cell: number): Float64Array {
  const { Bt, L } = state;
  const n = Bt.cols;
  if (!Number.isInteger(cell) || cell < 0 || cell >= n) throw new InputError('cell', `an integer in [0, ${n - 1}]`, cell);
  const col = new Float64Array(Bt.rows);
  for (let k = 0; k < Bt.rows; k++) col[k] = Bt.data[k * n + cell];
  return applyOperatorTranspose(state.problem.operator, choleskySolve(L, col));
}

/**
 * `count` exact posterior realisations, one per row (count × N), by perturbing the prior and the
 * data ("Matheron's update"; Wilson et al. 2020, ICML, "Efficiently sampling functions from Gaussian
 * process posteriors", memory):
 *   m* = m0 + Lm z ~ N(m0, Cm),  ε ~ N(0, Cd),  m_s = m* + Cm Gᵀ K⁻¹ (d + ε − G m*).
 * Why exact: m_s is linear in the Gaussian (m*, ε), with mean m0 + B K⁻¹ (d − G m0) = m̃ and
 * covariance Cm − B K⁻¹ G Cm − Cm Gᵀ K⁻¹ Bᵀ + B K⁻¹ (G Cm Gᵀ + Cd) K⁻¹ Bᵀ = Cm − B K⁻¹ Bᵀ = C̃
 * (B = Cm Gᵀ; our derivation).
 * Draws: one generator of src/core/sampling/random.ts seeded with `seed`; per realisation, N normals
 * for z, then M normals for ε (this order is part of the same-seed-same-numbers contract).
 */
export function posteriorRealisations(state: PosteriorFactors, count: number, seed: number): Matrix {
  if (!Number.isInteger(count) || count < 0) throw new InputError('count', 'a non-negative integer', count);
  validateSeed(seed);
  const { Cm, problem, L } = state;
  const n = Cm.rows;
  const m = L.rows;
  const fm = cholesky(Cm);
  if (!fm.ok) {
    throw new NotPositiveDefiniteError(
      'prior covariance Cm',
      fm.pivot,
      'posterior realisations need a prior that factors: add a small nugget',
    );
  }
  const Lm = fm.factor.data;
  const rng = new Random(seed);
  const out = matrix(count, n);
  const z = new Float64Array(n);
  const e = new Float64Array(m);
  const sigma = problem.data.sigma;
  for (let s = 0; s < count; s++) {
    rng.fillNormal(z);
    rng.fillNormal(e);
    const mStar = Float64Array.from(state.m0);
    for (let i = 0; i < n; i++) {
      let acc = 0;
      const oi = i * n;
      for (let k = 0; k <= i; k++) acc += Lm[oi + k] * z[k];
      mStar[i] += acc;
    }
    let eps: Float64Array;
    if (state.Ld) {
      eps = new Float64Array(m);
      const ld = state.Ld.data;
      for (let k = 0; k < m; k++) {
        let acc = 0;
        for (let l = 0; l <= k; l++) acc += ld[k * m + l] * e[l];
        eps[k] = acc;
      }
    } else eps = e.map((v, k) => v * sigma![k]);
    const gm = applyOperator(problem.operator, mStar);
    const rs = new Float64Array(m);
    for (let k = 0; k < m; k++) rs[k] = problem.data.values[k] + eps[k] - gm[k];
    out.data.set(addCrossCovariance(state, mStar, choleskySolve(L, rs)), s * n);
  }
  return out;
}
