/**
 * Positive-definiteness diagnostics of a stationary prior on a regular grid without the dense
 * N × N matrix (the dense route is ./diagnostics.ts).
 *
 * Bracket of the spectrum. Write Cm = S C S + ν I (S = diag(stdProfile), ν = nugget) with C the
 * BTTB kernel part. For any embedding size p ≥ 2n − 1 per axis, C is the leading principal
 * submatrix of the symmetric BCCB matrix C̃ (../fft/embedding.ts: every lag |Δi| ≤ n − 1 sits at
 * its own place), whose eigenvalues are λ = F c̃. By Cauchy interlacing (Horn & Johnson, Matrix
 * Analysis, 2nd ed., Thm 4.3.17 / Golub & Van Loan, Matrix Computations, 4th ed., Thm 8.1.7;
 * theorem numbers from memory)
 *
 *   min λ ≤ λmin(C) ≤ λmax(C) ≤ max λ.
 *
 * Std profile, derived from the Rayleigh quotient: for x ≠ 0 and y = S x,
 *   xᵀ S C S x / xᵀx = (yᵀ C y / yᵀy) · (yᵀy / xᵀx),   yᵀy / xᵀx ∈ [s_min², s_max²],
 * so λmin(SCS) ≥ λmin(C)·s_min² when λmin(C) ≥ 0 and ≥ λmin(C)·s_max² when it is negative, and
 * λmax(SCS) ≤ λmax(C)·s_max² (λmax(C) ≥ 0 since tr C ≥ 0). (The sharper form is Ostrowski's
 * theorem, Horn & Johnson Thm 4.5.9, memory.) The nugget shifts every eigenvalue by exactly ν.
 *
 * Round-off margin: the computed λ̂ differs from F c̃ by ‖λ̂ − λ‖₂ ≤ log₂P · η · ‖λ‖₂ with
 * η ≈ μ + γ₄(√2 + μ) for a radix-2 FFT (Higham 2002, Accuracy and Stability of Numerical
 * Algorithms, Thm 24.2, memory; μ the twiddle-factor error), P = px·py; every single eigenvalue is
 * within that 2-norm. We take δ_fft = 8·log₂P·ε·‖λ̂‖₂ (a constant of 8 covers η and the packing of
 * ../fft/embedding.ts evenRealSpectrum; our choice). The kernel values themselves carry a relative
 * error of a few ε, and the dense path evaluates them by a different formula (./lag.ts), so we add
 * δ_kernel = 4ε·Σ|c̃| (a perturbation with |E_ij| ≤ 4ε|C_ij| has ‖E‖₂ ≤ 4ε·max row sum of |C|;
 * ‖E‖₂ ≤ √(‖E‖₁‖E‖∞), derived). The bracket widens by δ = δ_fft + δ_kernel on both
 * sides before the profile and nugget are applied. A lower end > 0 therefore PROVES Cm positive
 * definite (in the arithmetic sense: the matrix of computed kernel values is).
 *
 * Padding: interlacing holds for every p ≥ 2n − 1, so each embedding size gives a valid bracket and
 * the tightest ends over all sizes tried are kept. The minimal size is tried first and the sizes
 * are doubled (every axis with n > 1; as in Wood & Chan 1994 for sampling) while the bracket cannot
 * prove positive definiteness with κ ≤ NEAR_SINGULAR_CONDITION, at most BRACKET_MAX_DOUBLINGS
 * times and while px·py ≤ maxCells. For large p
 * the circulant spectrum approaches the lattice spectral density (the symbol), whose range
 * contains the spectrum of every finite section (Grenander & Szegő; ./spectral.ts).
 *
 * Estimates inside the bracket: Lanczos Ritz values of Cm with FFT products (../linalg/eigen.ts
 * lanczosExtremes, ../fft/covariance.ts covarianceOperator). A Ritz value is a Rayleigh quotient
 * of Cm, so θmin ≥ λmin and θmax ≤ λmax (Golub & Van Loan §10.1, memory); in particular θmin < 0
 * (beyond round-off) proves that Cm is NOT positive definite.
 *
 * Condition number: `conditionNumber` is the estimate θmax/θmin, `conditionUpperBound` the
 * certified upper/lower. Jitter: the smallest decade r (JITTER_DECADES, relative to the mean prior
 * variance) for which the certified bracket of Cm + jI proves lower + j > 0 and
 * (upper + j)/(lower + j) ≤ NEAR_SINGULAR_CONDITION (the decade rule and threshold of
 * ./diagnostics.ts: common practice, no source). No Cholesky of Cm is run (failedPivot is null).
 *
 * PUBLIC API: diagnoseStructured, diagnosePriorAuto, chooseDiagnosticsPath,
 * STRUCTURED_DIAGNOSTICS_MIN_CELLS, spectrumBracket.
 */
import { InputError } from '../errors.ts';
import { cellCount, type Geometry, type Grid, isCellList } from '../grid/grid.ts';
import { lanczosExtremes } from '../linalg/eigen.ts';
import { circulantEmbedding, gridAxes, productPadding } from '../fft/embedding.ts';
import { covarianceOperator, nonStationaryReason } from '../fft/covariance.ts';
import { cholesky } from '../linalg/cholesky.ts';
import { covarianceMatrix } from './covariance.ts';
import { validatePrior } from './validate.ts';
import {
  diagnosePrior,
  JITTER_DECADES,
  NEAR_SINGULAR_CONDITION,
  priorWarnings,
  verdictValue,
  type DiagnosticWarning,
  type Diagnostics,
  type PdDecidedBy,
  type PdVerdict,
} from './diagnostics.ts';
import type { PriorSpec } from './spec.ts';

/**
 * Smallest N for which {@link diagnosePriorAuto} takes the FFT route. Measured (Node, this
 * machine: 2 cores shared with other jobs; test/bench/structuredDiagnostics.ts, Matérn ν = 1.5,
 * length n/8, nugget 1e-4, medians): dense 66 / 54 / 112 / 462 / 1518 ms at N = 256 / 400 / 576 /
 * 1024 / 2304; FFT bounds 30 / 23 / 25 / 33 / 59 ms, and 84 ms at 64², 303 ms at 128². Below
 * 512 cells the dense route stays within about 0.1 s and gives exact eigenvalues and a Cholesky
 * verdict (it can also confirm priors the bracket cannot prove), so it is kept there.
 */
export const STRUCTURED_DIAGNOSTICS_MIN_CELLS = 512;
/** Lanczos steps on the FFT route (each one FFT product and a reorthogonalisation against all earlier vectors). */
export const STRUCTURED_LANCZOS_STEPS = 60;
/** Largest Lanczos basis kept (doubles): fewer steps on very large grids. */
export const LANCZOS_STORAGE = 1 << 23;
/** Default largest embedding px·py tried while tightening the bracket. */
export const BRACKET_MAX_CELLS = 1 << 20;
/**
 * Default number of doublings of the minimal embedding (8× per axis): once p/2 exceeds the
 * correlation range the circulant spectrum only samples the symbol more finely and its minimum
 * hardly moves (measured: a 1-D Gaussian at 2^20 cells took 1.1 s without changing the verdict).
 */
export const BRACKET_MAX_DOUBLINGS = 3;
/**
 * Largest N for which an undecided bracket is settled by the Cholesky factorisation of the dense Cm.
 * Measured (Node, this 2-core machine while shared with other jobs, exponential 2-D prior): assembly
 * plus factorisation 0.6 s at 1024 cells, 1.2 s at 2304, 5.8 s at 4096 (8 bytes × N² = 134 MB).
 */
export const DENSE_DECISION_LIMIT = 2500;
/** Enlarged embedding tried for an undecided bracket above {@link DENSE_DECISION_LIMIT}: doublings and cells. */
export const ENLARGED_MAX_DOUBLINGS = 6;
export const ENLARGED_MAX_CELLS = 1 << 22;

const EPS = Number.EPSILON;

export interface SpectrumBracket {
  /** Certified lower ≤ λmin(Cm) and λmax(Cm) ≤ upper. */
  readonly lower: number;
  readonly upper: number;
  /** Bracket of the kernel part C alone (margin included), before profile and nugget. */
  readonly kernelLower: number;
  readonly kernelUpper: number;
  /** Embedding sizes tried, in order: [px, py], or [px, py, pz] on a 3-D grid. */
  readonly tried: readonly (readonly number[])[];
  /** Round-off margin δ of the last size tried (on C). */
  readonly margin: number;
}

function profileRange(prior: PriorSpec): { lo2: number; hi2: number } {
  const s = prior.stdProfile;
  if (s === undefined) return { lo2: 1, hi2: 1 };
  let lo = Infinity;
  let hi = 0;
  for (const v of s) {
    const a = Math.abs(v);
    if (a < lo) lo = a;
    if (a > hi) hi = a;
  }
  return { lo2: lo * lo, hi2: hi * hi };
}

/** Bracket of Cm from C's bracket [cLo, cHi] (module comment: profile by the Rayleigh quotient, then the nugget). */
function applyProfileAndNugget(cLo: number, cHi: number, prior: PriorSpec): { lower: number; upper: number } {
  const { lo2, hi2 } = profileRange(prior);
  const nugget = prior.nugget ?? 0;
  const lower = (cLo >= 0 ? cLo * lo2 : cLo * hi2) + nugget;
  const upper = (cHi >= 0 ? cHi * hi2 : cHi * lo2) + nugget;
  return { lower, upper };
}

/**
 * The certified bracket of Cm's spectrum from circulant embeddings (see the module comment).
 * Assumes a validated prior, stationary on a 1-D or 2-D grid.
 */
export function spectrumBracket(grid: Grid, prior: PriorSpec, options: { maxCells?: number; maxDoublings?: number } = {}): SpectrumBracket {
  const maxCells = options.maxCells ?? BRACKET_MAX_CELLS;
  const maxDoublings = options.maxDoublings ?? BRACKET_MAX_DOUBLINGS;
  const { nx, ny } = gridAxes(grid);
  const nz = grid.shape[2] ?? 1;
  const three = grid.shape.length === 3;
  let px = productPadding(nx);
  let py = productPadding(ny);
  let pz = productPadding(nz);
  let cLo = -Infinity;
  let cHi = Infinity;
  let margin = 0;
  const tried: number[][] = [];
  for (;;) {
    tried.push(three ? [px, py, pz] : [px, py]);
    const e = circulantEmbedding(grid, prior.terms, px, py, pz);
    let norm2 = 0;
    for (const v of e.eigenvalues) norm2 += v * v;
    let abs1 = 0;
    for (const v of e.base) abs1 += Math.abs(v);
    const p = px * py * pz;
    margin = 8 * Math.max(1, Math.log2(p)) * EPS * Math.sqrt(norm2) + 4 * EPS * abs1;
    cLo = Math.max(cLo, e.minEigenvalue - margin);
    cHi = Math.min(cHi, e.maxEigenvalue + margin);
    const { lower, upper } = applyProfileAndNugget(cLo, cHi, prior);
    const settled = lower > 0 && upper / lower <= NEAR_SINGULAR_CONDITION;
    const npx = nx > 1 ? 2 * px : px;
    const npy = ny > 1 ? 2 * py : py;
    const npz = nz > 1 ? 2 * pz : pz;
    if (settled || tried.length > maxDoublings || npx * npy * npz > maxCells || (npx === px && npy === py && npz === pz)) {
      return { lower, upper, kernelLower: cLo, kernelUpper: cHi, tried, margin };
    }
    px = npx;
    py = npy;
    pz = npz;
  }
}

const fmt = (x: number) => (Number.isFinite(x) ? x.toPrecision(2) : String(x));

export interface StructuredDiagnosticsOptions {
  /** Largest embedding tried for the bracket (default {@link BRACKET_MAX_CELLS}). */
  readonly maxCells?: number;
  /** Doublings of the minimal embedding tried at most (default {@link BRACKET_MAX_DOUBLINGS}). */
  readonly maxDoublings?: number;
  /** Lanczos steps (default {@link STRUCTURED_LANCZOS_STEPS}, fewer when N·steps > {@link LANCZOS_STORAGE}). */
  readonly lanczosSteps?: number;
  /** Largest N settled by a dense Cholesky when the bracket cannot decide (default {@link DENSE_DECISION_LIMIT}). */
  readonly denseLimit?: number;
}

/**
 * Diagnostics of a stationary prior on a regular 1-D, 2-D or 3-D grid through the FFT embedding
 * (eigenvalueMethod 'fft-bounds'; see the module comment). Validates the prior (InputError) and
 * throws InputError when the prior is not stationary on the grid.
 */
export function diagnoseStructured(grid: Grid, prior: PriorSpec, options: StructuredDiagnosticsOptions = {}): Diagnostics {
  validatePrior(prior, grid);
  const why = nonStationaryReason(grid, prior);
  if (why !== null) throw new InputError('prior', 'stationary on a regular 1-D, 2-D or 3-D grid for the FFT diagnostics', why);
  const n = cellCount(grid);
  const bracket = spectrumBracket(grid, prior, {
    ...(options.maxCells === undefined ? {} : { maxCells: options.maxCells }),
    ...(options.maxDoublings === undefined ? {} : { maxDoublings: options.maxDoublings }),
  });
  const op = covarianceOperator(grid, prior, { path: 'fft' });
  const steps = Math.max(2, Math.min(options.lanczosSteps ?? STRUCTURED_LANCZOS_STEPS, Math.floor(LANCZOS_STORAGE / n), n));
  const ritz = lanczosExtremes((x) => op.apply(x), n, { iterations: steps });
  const min = ritz.min;
  const max = ritz.max;
  const conditionNumber = min > 0 ? max / min : Infinity;
  // θmin is a computed Rayleigh quotient: below −2δ·s_max² (twice the products' round-off margin,
  // our choice) it proves an indefinite Cm.
  const provenIndefinite = min < -2 * bracket.margin * profileRange(prior).hi2;

  // The decision, in order of cost: the bracket; a negative Ritz value; the dense Cholesky where it
  // is cheap; a larger embedding; else not decided.
  let { lower, upper } = bracket;
  let tried = bracket.tried;
  let verdict: PdVerdict;
  let decidedBy: PdDecidedBy;
  let basis: string;
  let failedPivot: number | null = null;
  const denseLimit = options.denseLimit ?? DENSE_DECISION_LIMIT;
  const embed = (t: readonly (readonly number[])[]) => t.map((p) => p.slice(0, grid.shape.length).join(' × ')).join(', ');
  if (lower > 0) {
    verdict = 'positive-definite';
    decidedBy = 'fft-bracket';
    basis = `Every eigenvalue of Cm is at least ${fmt(lower)}: a certified bound from its circulant embedding (${embed(tried)}), round-off included.`;
  } else if (provenIndefinite) {
    verdict = 'not-positive-definite';
    decidedBy = 'lanczos-ritz';
    basis = `A direction with negative variance was found: a Rayleigh quotient of Cm equals ${fmt(min)} (Lanczos), below zero beyond round-off.`;
  } else if (n <= denseLimit) {
    const chol = cholesky(covarianceMatrix(grid, prior));
    decidedBy = 'cholesky';
    if (chol.ok) {
      verdict = 'positive-definite';
      basis = `The Cholesky factorisation of the dense Cm (${n} cells) succeeds (positive definite in floating point); the FFT embedding's bound (${fmt(lower)}) was not sharp enough to prove it alone.`;
    } else {
      verdict = 'not-positive-definite';
      failedPivot = chol.pivot;
      basis = `The Cholesky factorisation of the dense Cm (${n} cells) failed at row ${chol.pivot}.`;
    }
  } else {
    const big = spectrumBracket(grid, prior, {
      maxCells: Math.max(options.maxCells ?? 0, ENLARGED_MAX_CELLS),
      maxDoublings: ENLARGED_MAX_DOUBLINGS,
    });
    if (big.lower > lower) {
      lower = big.lower;
      upper = Math.min(upper, big.upper);
      tried = big.tried;
    }
    if (lower > 0) {
      verdict = 'positive-definite';
      decidedBy = 'fft-bracket';
      basis = `Every eigenvalue of Cm is at least ${fmt(lower)}: a certified bound from an enlarged circulant embedding (${embed(tried)}), round-off included.`;
    } else {
      verdict = 'not-decided';
      decidedBy = 'none';
      basis = `Not decided: the certified bound from the circulant embedding (up to ${embed(tried.slice(-1))}) only gives λmin ≥ ${fmt(lower)}, the grid (${n} cells) is above the ${denseLimit}-cell limit of the dense Cholesky, and Lanczos estimates λmin ≈ ${fmt(min)} (an eigenvalue lies within ${fmt(ritz.minResidual)} of it; smaller ones are not excluded).`;
    }
  }
  const conditionUpperBound = lower > 0 ? upper / lower : Infinity;
  const positiveDefinite = verdict === 'positive-definite';

  const diag = op.diagonal();
  let meanVariance = 0;
  for (let i = 0; i < n; i++) meanVariance += diag[i];
  meanVariance /= n;

  let suggestedJitter: number | null = null;
  let suggestedJitterRelative: number | null = null;
  // Well conditioned: by the certified bound when it proves positive definiteness, else (a Cholesky
  // verdict) by the Lanczos estimate, a lower estimate of κ.
  const conditionForJitter = decidedBy === 'fft-bracket' ? conditionUpperBound : conditionNumber;
  const needed = !positiveDefinite || !(conditionForJitter <= NEAR_SINGULAR_CONDITION);
  if (needed && meanVariance > 0) {
    for (const r of JITTER_DECADES) {
      const j = r * meanVariance;
      if (!(lower + j > 0)) continue;
      if (!((upper + j) / (lower + j) <= NEAR_SINGULAR_CONDITION)) continue;
      suggestedJitter = j;
      suggestedJitterRelative = r;
      break;
    }
  }

  const warnings: DiagnosticWarning[] = [];
  const fix =
    suggestedJitter !== null
      ? ` Adding a nugget of ${fmt(suggestedJitter)} (${suggestedJitterRelative!.toExponential(0)} of the mean variance) fixes this.`
      : '';
  if (verdict === 'not-positive-definite') {
    warnings.push({
      code: 'not-positive-definite',
      message: `The prior covariance is not positive definite, so it cannot be used for sampling or inversion. ${basis}${fix}`,
    });
  } else if (verdict === 'not-decided') {
    warnings.push({ code: 'not-decided', message: `Positive definiteness not decided. ${basis}${fix}` });
  } else if (decidedBy === 'cholesky' && !(conditionNumber <= NEAR_SINGULAR_CONDITION)) {
    warnings.push({
      code: 'near-singular',
      message: `The prior covariance is nearly singular: its estimated condition number (Lanczos) is ${fmt(conditionNumber)} (above ${fmt(NEAR_SINGULAR_CONDITION)}), so about ${Math.min(16, Math.round(Math.log10(conditionNumber)))} of the 16 significant digits may be lost in solves with it.${fix}`,
    });
  } else if (decidedBy === 'fft-bracket' && !(conditionUpperBound <= NEAR_SINGULAR_CONDITION)) {
    warnings.push({
      code: 'near-singular',
      message: `The prior covariance may be nearly singular: the bound from its FFT embedding allows a condition number up to ${fmt(conditionUpperBound)} (above ${fmt(NEAR_SINGULAR_CONDITION)}; estimated ${fmt(conditionNumber)}), so up to ${Math.min(16, Math.round(Math.log10(conditionUpperBound)))} of the 16 significant digits may be lost in solves with it.${fix}`,
    });
  }
  if (needed && suggestedJitter === null) {
    warnings.push({
      code: 'no-jitter-found',
      message: 'No diagonal jitter up to the mean prior variance makes the covariance well conditioned; check the covariance terms.',
    });
  }
  warnings.push(...priorWarnings(grid, prior));
  const last = tried[tried.length - 1];
  const nextStep =
    verdict !== 'not-decided'
      ? undefined
      : `${suggestedJitter !== null ? `Add a nugget of ${fmt(suggestedJitter)} (proven sufficient by the embedding's bound), or c` : 'C'}heck the prior on a grid of at most ${denseLimit} cells, where the dense Cholesky factorisation decides.`;
  return {
    verdict,
    positiveDefinite: verdictValue(verdict),
    decidedBy,
    basis,
    ...(nextStep === undefined ? {} : { nextStep }),
    failedPivot,
    minEigenvalue: min,
    maxEigenvalue: max,
    conditionNumber,
    eigenvalueMethod: 'fft-bounds',
    eigenvalueBounds: { lower, upper },
    conditionUpperBound,
    embeddingPadding: last.slice(0, grid.shape.length),
    suggestedJitter,
    suggestedJitterRelative,
    warnings,
  };
}

export interface DiagnosticsPathDecision {
  readonly path: 'dense' | 'fft';
  readonly reason: string;
}

/** FFT route for stationary priors on grids of ≥ {@link STRUCTURED_DIAGNOSTICS_MIN_CELLS} cells, else dense. */
export function chooseDiagnosticsPath(grid: Grid, prior: PriorSpec): DiagnosticsPathDecision {
  const why = nonStationaryReason(grid, prior);
  const n = cellCount(grid);
  if (why !== null) return { path: 'dense', reason: `dense: ${why}` };
  if (n < STRUCTURED_DIAGNOSTICS_MIN_CELLS)
    return { path: 'dense', reason: `dense: ${n} cells, below ${STRUCTURED_DIAGNOSTICS_MIN_CELLS} the exact route is fast` };
  return { path: 'fft', reason: `FFT bounds: stationary prior on a regular grid of ${n} cells (≥ ${STRUCTURED_DIAGNOSTICS_MIN_CELLS})` };
}

/** Diagnostics through the route {@link chooseDiagnosticsPath} picks; `eigenvalueMethod` says which ran. */
export function diagnosePriorAuto(grid: Geometry, prior: PriorSpec): Diagnostics {
  // A cell list has no lattice, so no circulant embedding: dense Cholesky and eigenvalues.
  if (isCellList(grid)) return diagnosePrior(grid, prior);
  return chooseDiagnosticsPath(grid, prior).path === 'fft' ? diagnoseStructured(grid, prior) : diagnosePrior(grid, prior);
}
