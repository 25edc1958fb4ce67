/**
 * Correlation ρ(h) at scaled distance h ≥ 0 for each kernel (see ./spec.ts for how h is formed).
 * PUBLIC API (used by prior/, the CLI and the UI): correlationFunction, correlation, practicalRange, kernelInfo.
 *
 * Conventions (one file per kernel, formulas and sources there):
 *   exponential  e^{−h}                                   ./exponential.ts
 *   gaussian     e^{−h²/2}                                ./gaussian.ts
 *   matern       2^{1−ν}/Γ(ν) (√(2ν)h)^ν K_ν(√(2ν)h)      ./matern.ts (Rasmussen & Williams 2006 eq. 4.14)
 *   spherical    1 − 1.5h + 0.5h³ for h < 1, else 0       ./spherical.ts
 */
import { assertNever } from '../errors.ts';
import { type CorrelationFunction, DEFAULT_MATERN_NU, type KernelName } from './spec.ts';
import { EXPONENTIAL_PRACTICAL_RANGE, exponentialCorrelation } from './exponential.ts';
import { GAUSSIAN_PRACTICAL_RANGE, gaussianCorrelation } from './gaussian.ts';
import { maternCorrelationFunction } from './matern.ts';
import { SPHERICAL_PRACTICAL_RANGE, sphericalCorrelation } from './spherical.ts';

/** The correlation level that defines the practical range. */
export const PRACTICAL_RANGE_LEVEL = 0.05;

/**
 * A fast evaluator ρ(h) for one kernel (constants precomputed; for Matérn the ν-dependent Bessel constants).
 * `nu` is used by 'matern' only (default {@link DEFAULT_MATERN_NU}); a Matérn ν that is not finite and > 0 throws RangeError.
 */
export function correlationFunction(kernel: KernelName, nu = DEFAULT_MATERN_NU): CorrelationFunction {
  switch (kernel) {
    case 'exponential':
      return exponentialCorrelation;
    case 'gaussian':
      return gaussianCorrelation;
    case 'spherical':
      return sphericalCorrelation;
    case 'matern':
      return maternCorrelationFunction(nu);
    default:
      return assertNever(kernel, 'kernel');
  }
}

/** ρ(h) for one kernel (convenience; build a {@link correlationFunction} once for loops). */
export function correlation(kernel: KernelName, h: number, nu?: number): number {
  return correlationFunction(kernel, nu)(h);
}

/**
 * Scaled distance h at which ρ(h) = 0.05 (multiply by the length for a distance).
 * Exponential ln 20 and Gaussian √(2 ln 20) analytically, spherical by the cubic formula, Matérn by a
 * bracketed bisection on the monotone ρ_ν, run until the bracket cannot shrink (full double precision).
 */
export function practicalRange(kernel: KernelName, nu = DEFAULT_MATERN_NU): number {
  switch (kernel) {
    case 'exponential':
      return EXPONENTIAL_PRACTICAL_RANGE;
    case 'gaussian':
      return GAUSSIAN_PRACTICAL_RANGE;
    case 'spherical':
      return SPHERICAL_PRACTICAL_RANGE;
    case 'matern':
      return monotoneRoot(maternCorrelationFunction(nu), PRACTICAL_RANGE_LEVEL);
    default:
      return assertNever(kernel, 'kernel');
  }
}

/** The h > 0 with rho(h) = level for a continuous non-increasing rho with rho(0) = 1 > level (bisection). */
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

/** Plain-language description of a kernel for tooltips and help text. */
export interface KernelInfo {
  readonly kernel: KernelName;
  /** Short name for menus. */
  readonly label: string;
  /** What the choice means for the fields it describes. */
  readonly description: string;
  /** The correlation as a formula in the scaled distance h (= distance / length). */
  readonly formula: string;
  /** Where the formula comes from. */
  readonly source: string;
}

/** Label, description, formula and source of a kernel. */
export function kernelInfo(kernel: KernelName): KernelInfo {
  switch (kernel) {
    case 'exponential':
      return {
        kernel,
        label: 'Exponential',
        description: 'Rough fields: continuous, but jagged at every scale. Correlation drops fast near zero.',
        formula: 'ρ(h) = exp(−h)',
        source: 'Rasmussen & Williams (2006) §4.2.1; Matérn with ν = 1/2',
      };
    case 'gaussian':
      return {
        kernel,
        label: 'Gaussian',
        description:
          'Very smooth fields with no small-scale detail. Covariance matrices on fine grids are badly conditioned.',
        formula: 'ρ(h) = exp(−h²/2)',
        source: 'Rasmussen & Williams (2006) eq. 4.9; the Matérn limit ν → ∞',
      };
    case 'matern':
      return {
        kernel,
        label: 'Matérn (smoothness ν)',
        description:
          'Smoothness set by ν: ν = 1/2 is the rough exponential, ν = 3/2 and 5/2 give once and twice differentiable ' +
          'fields, large ν approaches the Gaussian.',
        formula: 'ρ(h) = 2^(1−ν)/Γ(ν) · (√(2ν)·h)^ν · K_ν(√(2ν)·h)',
        source: 'Rasmussen & Williams (2006) eq. 4.14',
      };
    case 'spherical':
      return {
        kernel,
        label: 'Spherical',
        description:
          'Rough fields whose correlation reaches exactly zero at one length (compact support). Valid up to 3-D.',
        formula: 'ρ(h) = 1 − 1.5·h + 0.5·h³ for h < 1, 0 for h ≥ 1',
        source: 'Chilès & Delfiner (2012) §2.5',
      };
    default:
      return assertNever(kernel, 'kernel');
  }
}
