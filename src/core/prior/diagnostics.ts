/**
 * Positive-definiteness diagnostics of a prior covariance.
 *
 * - Factorisation: Cm is positive definite (in floating point) iff the Cholesky factorisation
 *   succeeds (Higham 2002, Accuracy and Stability of Numerical Algorithms, Thm 10.7); the failed
 *   pivot row is reported.
 * - Extreme eigenvalues: all eigenvalues by Householder + QL (../linalg/eigen.ts) for N ≤
 *   {@link EXACT_EIGEN_LIMIT}; above that (O(N³) becomes slow in a browser) estimates.
 * - Condition number λmax / λmin (Infinity when λmin ≤ 0).
 * - Suggested jitter: the smallest j = r · mean(diag Cm), r = 1e−12, 1e−11, …, 1, for which
 *   Cm + jI factors AND has condition number (λmax + j)/(λmin + j) ≤ {@link NEAR_SINGULAR_CONDITION}
 *   (eigenvalues of Cm + jI are λ + j exactly, so no new eigen-decomposition is needed). Searching
 *   by decades from about 1e−10 of the variance is common practice in general-purpose Gaussian-
 *   process software (no single source); the threshold 1e10 on the condition number ("near-
 *   singular": about 10 of the 16 significant digits lost in solves) is common practice, no source.
 * - Plain-language warnings with stable codes (see {@link WARNING_CODES}).
 */
import { KERNEL_NAMES } from '../kernels/spec.ts';
import { kernelDefinition, KERNELS, kernelTakes, termSmoothness } from '../kernels/table.ts';
import { cellCount, type Geometry, gridDimension, type Grid, isCellList } from '../grid/grid.ts';
import { cholesky } from '../linalg/cholesky.ts';
import { lanczosExtremes, symmetricEigenvalues } from '../linalg/eigen.ts';
import type { Matrix } from '../linalg/matrix.ts';
import { covarianceMatrix } from './covariance.ts';
import { lagTable, meanRowSum } from './lag.ts';
import { logLatticeCondition } from './spectral.ts';
import type { PriorSpec } from './spec.ts';
import { formatSpread } from '../format.ts';

/** Condition number above which Cm counts as near-singular (common practice, no source). */
export const NEAR_SINGULAR_CONDITION = 1e10;
/** Largest N for which all eigenvalues are computed (a few seconds in JavaScript at N = 1500). */
export const EXACT_EIGEN_LIMIT = 1500;
/** Decades tried for the suggested jitter, relative to the mean prior variance. */
export const JITTER_DECADES: readonly number[] = Array.from({ length: 13 }, (_, k) => 10 ** (k - 12));
/** The spherical correlation is positive definite only up to three dimensions. */
export const SPHERICAL_MAX_DIMENSION: number = KERNELS.spherical.maxDimension;

/** The warning codes: general ones, then the kernel table's (long-length and dimension warnings). */
export const WARNING_CODES: readonly string[] = [
  'not-positive-definite',
  'not-decided',
  'near-singular',
  'no-jitter-found',
  'nu-ignored',
  ...KERNEL_NAMES.flatMap((k) => {
    const def = kernelDefinition(k);
    return [...(def.longLengthWarning ? [def.longLengthWarning.code] : []), ...(def.maxDimension < Infinity ? [`${k}-dimension`] : [])];
  }),
];

export type EigenvalueMethod = 'exact' | 'lanczos' | 'fft-bounds';

/**
 * The three outcomes of the positive-definiteness check. "Not decided" is never reported as "not
 * positive definite": it means no route available at this size could prove either.
 */
export type PdVerdict = 'positive-definite' | 'not-positive-definite' | 'not-decided';

/**
 * What decided the verdict:
 * - 'cholesky': the Cholesky factorisation of the dense Cm succeeded (positive definite in floating
 *   point: Higham 2002, Thm 10.7) or failed at a pivot (not positive definite in floating point);
 * - 'fft-bracket': the certified lower bound of the spectrum from the circulant embedding is > 0
 *   (./structuredDiagnostics.ts), possibly after enlarging the embedding;
 * - 'lanczos-ritz': a Ritz value (a Rayleigh quotient of Cm) below zero beyond round-off proves a
 *   negative eigenvalue;
 * - 'none': not decided (see {@link Diagnostics.nextStep}).
 */
export type PdDecidedBy = 'cholesky' | 'fft-bracket' | 'lanczos-ritz' | 'none';

/** `positiveDefinite` of a verdict: true / false when proven, null when not decided. */
export function verdictValue(v: PdVerdict): boolean | null {
  return v === 'positive-definite' ? true : v === 'not-positive-definite' ? false : null;
}

export interface DiagnosticWarning {
  /** Stable machine code, e.g. "gaussian-long-length", "spherical-dimension", "near-singular". */
  readonly code: string;
  /** One plain-language sentence for the user. */
  readonly message: string;
}

export interface Diagnostics {
  /** The verdict: proven positive definite, proven not positive definite, or not decided. */
  readonly verdict: PdVerdict;
  /** true / false when proven (see {@link verdict}), null when not decided. */
  readonly positiveDefinite: boolean | null;
  /** The route that decided the verdict. */
  readonly decidedBy: PdDecidedBy;
  /** One plain sentence: what the verdict rests on. */
  readonly basis: string;
  /** Not decided only: what the user can do to get a decision. */
  readonly nextStep?: string;
  /** Zero-based row where the Cholesky factorisation failed, null when it factors. */
  readonly failedPivot: number | null;
  readonly minEigenvalue: number;
  readonly maxEigenvalue: number;
  /** λmax / λmin (Infinity when λmin ≤ 0). */
  readonly conditionNumber: number;
  /**
   * How minEigenvalue / maxEigenvalue were found: 'exact' (all eigenvalues of the dense Cm),
   * 'lanczos' (Ritz values on the dense Cm), 'fft-bounds' (no dense Cm: a certified bracket from the
   * circulant embedding plus Ritz values with FFT products; ./structuredDiagnostics.ts).
   */
  readonly eigenvalueMethod: EigenvalueMethod;
  /**
   * 'fft-bounds' only: certified bracket lower ≤ λmin(Cm) ≤ λmax(Cm) ≤ upper (Cauchy interlacing
   * in the circulant embedding, FFT round-off margin included); minEigenvalue / maxEigenvalue are
   * then estimates inside it.
   */
  readonly eigenvalueBounds?: { readonly lower: number; readonly upper: number };
  /** 'fft-bounds' only: certified κ ≤ upper / lower (Infinity when lower ≤ 0). */
  readonly conditionUpperBound?: number;
  /** 'fft-bounds' only: the embedding sizes per grid axis whose bracket is reported. */
  readonly embeddingPadding?: readonly number[];
  /** Smallest diagonal jitter (variance units, to add to the nugget) that makes Cm factor and brings it
   *  below the near-singular threshold; null when none is needed. */
  readonly suggestedJitter: number | null;
  /** The same jitter relative to the mean prior variance (a decade from 1e-12 upwards). */
  readonly suggestedJitterRelative: number | null;
  readonly warnings: readonly DiagnosticWarning[];
}

const fmt = (x: number) => (Number.isFinite(x) ? x.toPrecision(2) : String(x));

/** Lanczos steps used above EXACT_EIGEN_LIMIT (each costs one dense product, N² flops). */
export const LANCZOS_STEPS = 100;

/**
 * Extreme eigenvalues of a symmetric matrix: all of them (exact up to round-off) for N ≤
 * EXACT_EIGEN_LIMIT, else Lanczos Ritz values. Ritz values lie inside the spectrum (θmin ≥ λmin,
 * θmax ≤ λmax; Cauchy interlacing, Golub & Van Loan §10.1, memory), and θmin converges slowly when
 * the small eigenvalues cluster, so with 'lanczos' the condition number is a lower estimate.
 */
function extremeEigenvalues(c: Matrix): { min: number; max: number; method: 'exact' | 'lanczos' } {
  const n = c.rows;
  // Eigenvalues of c·A are c times those of A: the solver runs on Cm scaled to a unit largest
  // diagonal entry, so that tiny or huge variances (1e-300, 1e300) neither underflow nor overflow
  // in its Householder reflections (without it a variance of 1e-300 gave λmin = −4.2e-301 beside a
  // successful Cholesky factorisation).
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(c.data[i * n + i]));
  if (!(scale > 0) || !Number.isFinite(scale)) scale = 1;
  if (n <= EXACT_EIGEN_LIMIT) {
    const scaled = { rows: n, cols: n, data: c.data.map((v) => v / scale) };
    const ev = symmetricEigenvalues(scaled);
    return { min: ev[0] * scale, max: ev[ev.length - 1] * scale, method: 'exact' };
  }
  const d = c.data;
  const y = new Float64Array(n);
  const apply = (x: Float64Array): Float64Array => {
    for (let i = 0; i < n; i++) {
      let s = 0;
      const oi = i * n;
      for (let j = 0; j < n; j++) s += (d[oi + j] / scale) * x[j];
      y[i] = s;
    }
    return y;
  };
  const r = lanczosExtremes(apply, n, { iterations: LANCZOS_STEPS });
  return { min: r.min * scale, max: r.max * scale, method: 'lanczos' };
}

/** Diagnostics of a symmetric matrix; with `context`, prior-specific warnings are added. */
export function diagnoseCovariance(c: Matrix, context?: { grid: Geometry; prior: PriorSpec }): Diagnostics {
  const n = c.rows;
  const chol = cholesky(c);
  const failedPivot = chol.ok ? null : chol.pivot;
  const { min, max, method } = extremeEigenvalues(c);
  const conditionNumber = min > 0 ? max / min : Infinity;
  // The verdict and the numbers must agree: a factorisation that succeeds beside a computed
  // eigenvalue ≤ 0 means λmin lies within round-off of zero (both are backward stable, so each
  // describes a matrix within a few ε‖Cm‖ of Cm): neither proves a sign, so it is not decided.
  const verdict: PdVerdict = !chol.ok ? 'not-positive-definite' : method === 'exact' && !(min > 0) ? 'not-decided' : 'positive-definite';
  const positiveDefinite = verdict === 'positive-definite';
  const basis =
    verdict === 'not-positive-definite'
      ? `The Cholesky factorisation of the dense Cm failed at row ${failedPivot}.`
      : verdict === 'positive-definite'
        ? 'The Cholesky factorisation of the dense Cm succeeds (positive definite in floating point).'
        : `The Cholesky factorisation of the dense Cm succeeds, but its smallest eigenvalue (${fmt(min)}) is zero within round-off, so neither sign can be proven.`;

  let meanVariance = 0;
  for (let i = 0; i < n; i++) meanVariance += c.data[i * n + i];
  meanVariance /= n;

  let suggestedJitter: number | null = null;
  let suggestedJitterRelative: number | null = null;
  const needed = !positiveDefinite || !(conditionNumber <= NEAR_SINGULAR_CONDITION);
  if (needed && meanVariance > 0) {
    for (const r of JITTER_DECADES) {
      const j = r * meanVariance;
      const condJ = min + j > 0 ? (max + j) / (min + j) : Infinity;
      if (!(condJ <= NEAR_SINGULAR_CONDITION)) continue;
      if (!cholesky(c, { jitter: j }).ok) continue;
      suggestedJitter = j;
      suggestedJitterRelative = r;
      break;
    }
  }

  const warnings: DiagnosticWarning[] = [];
  const est = method === 'exact' ? '' : ' (estimated)';
  const fix =
    suggestedJitter !== null
      ? ` Adding a nugget of ${fmt(suggestedJitter)} (${suggestedJitterRelative!.toExponential(0)} of the mean variance) fixes this.`
      : '';
  if (verdict === 'not-positive-definite') {
    warnings.push({
      code: 'not-positive-definite',
      message: `The prior covariance is not positive definite: its Cholesky factorisation failed at row ${failedPivot}${cellLabel(failedPivot!, context?.grid)}, so it cannot be used for sampling or inversion.${fix}`,
    });
  } else if (verdict === 'not-decided') {
    warnings.push({
      code: 'not-decided',
      message: `Positive definiteness not decided: ${basis} The matrix is numerically singular.${fix}`,
    });
  } else if (!(conditionNumber <= NEAR_SINGULAR_CONDITION)) {
    warnings.push({
      code: 'near-singular',
      message: `The prior covariance is nearly singular: its condition number${est} is ${fmt(conditionNumber)} (above ${fmt(NEAR_SINGULAR_CONDITION)}), so about ${Math.min(16, Math.round(Math.log10(conditionNumber)))} of the 16 significant digits are lost in solves with it.${fix}`,
    });
  }
  if (needed && suggestedJitter === null) {
    warnings.push({
      code: 'no-jitter-found',
      message: 'No diagonal jitter up to the mean prior variance makes the covariance well conditioned; check the covariance terms.',
    });
  }
  // The spec-only warnings rest on the lattice (lag tables); a cell list has none.
  if (context && !isCellList(context.grid)) warnings.push(...priorWarnings(context.grid, context.prior));
  return {
    verdict,
    positiveDefinite: verdictValue(verdict),
    decidedBy: 'cholesky',
    basis,
    ...(verdict === 'not-decided'
      ? {
          nextStep:
            suggestedJitter !== null ? `Add a nugget of ${fmt(suggestedJitter)}.` : 'Check the covariance terms and their variances.',
        }
      : {}),
    failedPivot,
    minEigenvalue: min,
    maxEigenvalue: max,
    conditionNumber,
    eigenvalueMethod: method,
    suggestedJitter,
    suggestedJitterRelative,
    warnings,
  };
}

function cellLabel(i: number, grid?: Geometry): string {
  if (!grid) return '';
  if (isCellList(grid)) return ` (row ${i} of cells.centres)`;
  const dim = gridDimension(grid);
  if (dim === 1) return '';
  const nx = grid.shape[0];
  const ny = grid.shape[1];
  return dim === 2
    ? ` (cell ix = ${i % nx}, iy = ${Math.floor(i / nx)})`
    : ` (cell ix = ${i % nx}, iy = ${Math.floor(i / nx) % ny}, iz = ${Math.floor(i / (nx * ny))})`;
}

/** Validates the prior, assembles Cm and diagnoses it, with prior-specific warnings. */
export function diagnosePrior(grid: Geometry, prior: PriorSpec): Diagnostics {
  return diagnoseCovariance(covarianceMatrix(grid, prior), { grid, prior });
}

/**
 * Warnings that follow from the prior spec alone (no factorisation; cheap enough to run on every
 * edit). Assumes a valid prior.
 *
 * Smooth-kernel warnings ("gaussian-long-length", "smooth-matern-long-length"): raised for a term
 * whose dense-sampling condition estimate κ (./spectral.ts) exceeds NEAR_SINGULAR_CONDITION while
 * the nugget is too small to cure it. With λmin(term) ≈ 0, Cm's condition number is at least about
 * variance·λ̄ / nugget, where λ̄ = 1ᵀC₁1/N (mean row sum of the unit-variance term matrix, a lower
 * bound on its λmax); so the nugget cannot help when nugget < variance·λ̄ / 1e10. Other terms are
 * ignored (a rough term added to a smooth one also cures it, so the warning can be conservative).
 */
export function priorWarnings(grid: Grid, prior: PriorSpec): DiagnosticWarning[] {
  const out: DiagnosticWarning[] = [];
  const dim: number = gridDimension(grid);
  const nugget = prior.nugget ?? 0;
  const unit = grid.unit ? ` ${grid.unit}` : '';
  prior.terms.forEach((term, k) => {
    const name = `Term ${k + 1}`;
    const def = kernelDefinition(term.kernel);
    if (term.nu !== undefined && !kernelTakes(term.kernel, 'nu')) {
      out.push({
        code: 'nu-ignored',
        message: `${name}: nu = ${term.nu} is ignored because the ${term.kernel} kernel has no smoothness parameter.`,
      });
    }
    if (dim > def.maxDimension) {
      // Cannot happen with 1-D and 2-D grids; kept so the rule is stated where kernels are checked.
      out.push({
        code: `${term.kernel}-dimension`,
        message: `${name}: the ${term.kernel} kernel is only valid up to ${def.maxDimension} dimensions, and this grid has ${dim}.`,
      });
    }
    const warning = def.longLengthWarning;
    if (warning === null) return;
    const logK = logLatticeCondition(term, grid);
    if (logK === null || logK <= Math.log(NEAR_SINGULAR_CONDITION)) return;
    const rowSum = meanRowSum(lagTable(grid, [{ ...term, variance: 1 }]));
    const cure = (term.variance * rowSum) / NEAR_SINGULAR_CONDITION;
    if (nugget >= cure) return;
    const lengths = term.lengths ? `lengths ${term.lengths[0]}${unit} × ${term.lengths[1]}${unit}` : `length ${term.length}${unit}`;
    const spacing = grid.spacing.map((s) => `${s}${unit}`).join(' × ');
    const spread = formatSpread(logK / Math.LN10);
    out.push({
      code: warning.code,
      message: warning.message({ name, lengths, spacing, spread, cure: fmt(cure), nu: termSmoothness(term) }),
    });
  });
  return out;
}

/** For tests and callers that want to know whether Cm was small enough for all eigenvalues. */
export function usesExactEigenvalues(grid: Grid): boolean {
  return cellCount(grid) <= EXACT_EIGEN_LIMIT;
}
