/**
 * The kernel table: every fact about a kernel in one entry, so that adding a kernel means adding its name to
 * {@link KernelName} and one entry to {@link KERNELS} (here), plus its tests. Everything else reads the table:
 * the evaluator and the practical range (./correlation.ts), the dense-sampling condition estimate
 * (../prior/spectral.ts), the prior's validation and warnings (../prior/validate.ts, ../prior/diagnostics.ts),
 * the prior file's fields (../io/priorFile.ts), the FFT path's stationarity test (../fft/covariance.ts), the
 * command line and the UI (menus from {@link KERNEL_NAMES}, help text from the labels and formulas).
 *
 * Conventions (the formulas and their sources sit in each kernel's own file):
 *   exponential  e^{−h}                                   ./exponential.ts
 *   gaussian     e^{−h²/2}                                ./gaussian.ts
 *   matern       2^{1−ν}/Γ(ν) (√(2ν)h)^ν K_ν(√(2ν)h)      ./matern.ts (Rasmussen & Williams 2006 eq. 4.14)
 *   spherical    1 − 1.5h + 0.5h³ for h < 1, else 0       ./spherical.ts
 * where h is the scaled distance (./spec.ts says how it is formed from the term's lengths and angle).
 */
import { assertNever } from '../errors.ts';
import { EXPONENTIAL_PRACTICAL_RANGE, exponentialCorrelation, exponentialDerivative } from './exponential.ts';
import { GAUSSIAN_PRACTICAL_RANGE, gaussianCorrelation, gaussianDerivative } from './gaussian.ts';
import { DEFAULT_MATERN_NU, maternCorrelationFunction, maternDerivativeFunction } from './matern.ts';
import { SPHERICAL_PRACTICAL_RANGE, sphericalCorrelation, sphericalDerivative } from './spherical.ts';

/** The kernels, by the name they carry in specs, files, the command line and the UI. */
export type KernelName = 'exponential' | 'gaussian' | 'matern' | 'spherical';

/** A correlation ρ(h) at scaled distance h ≥ 0 (ρ(0) = 1). */
export type CorrelationFunction = (h: number) => number;

/** The correlation level that defines the practical range (common practice, no source). */
export const PRACTICAL_RANGE_LEVEL = 0.05;

/**
 * Term fields a kernel may take beyond kernel, variance and the lengths. Today only the Matérn smoothness `nu`.
 * A kernel that takes a field requires it in the prior file; a field on a kernel that does not take it is kept
 * (exact round trip) but ignored, with a warning.
 */
export type KernelField = 'nu';

/** What the near-singular warning of a smooth kernel says (formatted numbers in, one sentence out). */
export interface LongLengthContext {
  /** "Term 2". */
  readonly name: string;
  /** "length 4 m" or "lengths 4 m × 1 m". */
  readonly lengths: string;
  /** "1 m × 1 m". */
  readonly spacing: string;
  /** The span of the eigenvalues, e.g. "13 orders of magnitude". */
  readonly spread: string;
  /** The nugget that would cure it, formatted. */
  readonly cure: string;
  /** The term's smoothness ν when the kernel takes one (the default filled in). */
  readonly nu: number | undefined;
}

export interface KernelDefinition {
  /** Short name for menus. */
  readonly label: string;
  /** What the choice means for the fields it describes (tooltips and help text). */
  readonly description: string;
  /** The correlation as a formula in the scaled distance h (= distance / length). */
  readonly formula: string;
  /** Where the formula comes from. */
  readonly source: string;
  /** Term fields this kernel takes (see {@link KernelField}), each with the value used when a term omits it. */
  readonly fields: { readonly [F in KernelField]?: { readonly default: number } };
  /**
   * A fast evaluator ρ(h) with its constants precomputed. `nu` is the term's smoothness (undefined when absent;
   * kernels without `nu` ignore it). Throws RangeError for a smoothness the kernel cannot evaluate.
   */
  correlation(nu: number | undefined): CorrelationFunction;
  /**
   * dρ/dh, with its constants precomputed (same `nu` rule as {@link correlation}); used for the analytic
   * derivatives of the evidence in lengths and angle. At h = 0 it returns the one-sided limit.
   */
  derivative(nu: number | undefined): CorrelationFunction;
  /** The scaled distance h where ρ(h) = {@link PRACTICAL_RANGE_LEVEL} (multiply by the length for a distance). */
  practicalRange(nu: number | undefined): number;
  /**
   * The spectral density S of the correlation in `dim` dimensions as log S(q) up to an additive constant, where
   * q = ωᵀ M⁻¹ ω is the quadratic form of the (scaled) wave vector; null when the kernel has no closed form used
   * here (then no dense-sampling condition estimate is made, ../prior/spectral.ts).
   */
  logSpectralDensity(nu: number | undefined, dim: number): ((q: number) => number) | null;
  /** The covariance depends on the offset only, so the FFT path (circulant embedding) can represent it. */
  readonly stationary: boolean;
  /** Largest number of space dimensions in which ρ is positive definite (Infinity: any). */
  readonly maxDimension: number;
  /**
   * The warning raised when the term's condition estimate passes 1e10 without a nugget to cure it (smooth
   * kernels), or null when the kernel never gets one (rough kernels stay well conditioned).
   */
  readonly longLengthWarning: null | {
    readonly code: string;
    message(c: LongLengthContext): string;
  };
}

/** The Matérn spectral density (R&W eq. 4.15): S ∝ (2ν + q)^{−(ν + d/2)}. */
function maternLogSpectrum(nu: number, dim: number): (q: number) => number {
  const p = nu + dim / 2;
  return (q) => -p * Math.log(2 * nu + q);
}

/**
 * The h > 0 with rho(h) = level for a continuous non-increasing rho with rho(0) = 1 > level: bracketed bisection run
 * until the bracket cannot shrink (full double precision).
 */
function monotoneRoot(rho: CorrelationFunction, level: number): number {
  let lo = 0;
  let hi = 1;
  while (rho(hi) > level) {
    lo = hi;
    hi *= 2;
  }
  for (let k = 0; k < 1100; k++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) break;
    if (rho(mid) > level) lo = mid;
    else hi = mid;
  }
  return Math.abs(rho(lo) - level) <= Math.abs(rho(hi) - level) ? lo : hi;
}

export const KERNELS = {
  exponential: {
    label: 'Exponential',
    description: 'Rough fields: continuous, but jagged at every scale. Correlation drops fast near zero.',
    formula: 'ρ(h) = exp(−h)',
    source: 'Rasmussen & Williams (2006) §4.2.1; Matérn with ν = 1/2',
    fields: {},
    correlation: () => exponentialCorrelation,
    derivative: () => exponentialDerivative,
    practicalRange: () => EXPONENTIAL_PRACTICAL_RANGE,
    // Matérn ν = 1/2.
    logSpectralDensity: (_nu, dim) => maternLogSpectrum(0.5, dim),
    stationary: true,
    maxDimension: Infinity,
    longLengthWarning: null,
  },
  gaussian: {
    label: 'Gaussian (squared exponential)',
    description: 'Very smooth fields with no small-scale detail. Covariance matrices on fine grids are badly conditioned.',
    formula: 'ρ(h) = exp(−h²/2)',
    source: 'Rasmussen & Williams (2006) eq. 4.9; the Matérn limit ν → ∞',
    fields: {},
    correlation: () => gaussianCorrelation,
    derivative: () => gaussianDerivative,
    practicalRange: () => GAUSSIAN_PRACTICAL_RANGE,
    // S ∝ exp(−q/2) (the transform of R&W eq. 4.9).
    logSpectralDensity: () => (q) => -0.5 * q,
    stationary: true,
    maxDimension: Infinity,
    longLengthWarning: {
      code: 'gaussian-long-length',
      message: (c) =>
        `${c.name}: a Gaussian kernel with ${c.lengths} on a grid with spacing ${c.spacing} is numerically singular (its eigenvalues span ${c.spread}); add a nugget of at least ${c.cure}, shorten the length (in 1-D the condition number passes 1e10 at about 2.2 cells), or use a Matérn kernel.`,
    },
  },
  matern: {
    label: 'Matérn',
    description:
      'Smoothness set by ν: ν = 1/2 is the rough exponential, ν = 3/2 and 5/2 give once and twice differentiable ' +
      'fields, large ν approaches the Gaussian.',
    formula: 'ρ(h) = 2^(1−ν)/Γ(ν) · (√(2ν)·h)^ν · K_ν(√(2ν)·h)',
    source: 'Rasmussen & Williams (2006) eq. 4.14',
    fields: { nu: { default: DEFAULT_MATERN_NU } },
    correlation: (nu = DEFAULT_MATERN_NU) => maternCorrelationFunction(nu),
    derivative: (nu = DEFAULT_MATERN_NU) => maternDerivativeFunction(nu),
    practicalRange: (nu = DEFAULT_MATERN_NU) => monotoneRoot(maternCorrelationFunction(nu), PRACTICAL_RANGE_LEVEL),
    logSpectralDensity: (nu = DEFAULT_MATERN_NU, dim) => maternLogSpectrum(nu, dim),
    stationary: true,
    maxDimension: Infinity,
    longLengthWarning: {
      code: 'smooth-matern-long-length',
      message: (c) =>
        `${c.name}: a Matérn kernel with nu = ${c.nu} and ${c.lengths} on a grid with spacing ${c.spacing}, without a sufficient nugget, is numerically singular (its eigenvalues span ${c.spread}); add a nugget of at least ${c.cure}, lower nu, or shorten the length.`,
    },
  },
  spherical: {
    label: 'Spherical',
    description: 'Rough fields whose correlation reaches exactly zero at one length (compact support). Valid up to 3-D.',
    formula: 'ρ(h) = 1 − 1.5·h + 0.5·h³ for h < 1, 0 for h ≥ 1',
    source: 'Chilès & Delfiner (2012) §2.5',
    fields: {},
    correlation: () => sphericalCorrelation,
    derivative: () => sphericalDerivative,
    practicalRange: () => SPHERICAL_PRACTICAL_RANGE,
    // No simple closed-form spectrum here.
    logSpectralDensity: () => null,
    stationary: true,
    // The volume-of-intersection construction is positive definite only up to three dimensions.
    maxDimension: 3,
    longLengthWarning: null,
  },
} satisfies Record<KernelName, KernelDefinition>;

/** The kernel names in the table's order (menus, help text, error messages). */
export const KERNEL_NAMES: readonly KernelName[] = Object.keys(KERNELS) as KernelName[];

/**
 * The table entry of one kernel (typed as the general definition). A name outside KernelName that got past the
 * types (an unchecked cast, a file read without validation) throws, naming it, instead of failing later on undefined.
 */
export function kernelDefinition(kernel: KernelName): KernelDefinition {
  const entry: KernelDefinition | undefined = Object.hasOwn(KERNELS, kernel) ? KERNELS[kernel] : undefined;
  if (entry === undefined) return assertNever(kernel as never, 'kernel');
  return entry;
}

/** True when the kernel takes the field (e.g. `nu` for matern). */
export function kernelTakes(kernel: KernelName, field: KernelField): boolean {
  return kernelDefinition(kernel).fields[field] !== undefined;
}

/**
 * The smoothness ν a term is evaluated with: its `nu`, or the kernel's default when it omits it; undefined for kernels
 * that take no smoothness (their `nu`, if any, is ignored). The one place where the default is filled in.
 */
export function termSmoothness(term: { readonly kernel: KernelName; readonly nu?: number }): number | undefined {
  const rule = kernelDefinition(term.kernel).fields.nu;
  return rule === undefined ? undefined : (term.nu ?? rule.default);
}

/** The kernels that take a field, for messages ("only matern has a smoothness"). */
export function kernelsTaking(field: KernelField): KernelName[] {
  return KERNEL_NAMES.filter((k) => kernelTakes(k, field));
}
