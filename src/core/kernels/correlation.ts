/**
 * Correlation ρ(h) at scaled distance h ≥ 0 for each kernel (see ./spec.ts for how h is formed), read from the
 * kernel table (./table.ts, where each kernel is defined once).
 * PUBLIC API (used by prior/, the CLI and the UI): correlationFunction, correlation, practicalRange, kernelInfo.
 */
import { type CorrelationFunction, type KernelName, kernelDefinition } from './table.ts';

export { PRACTICAL_RANGE_LEVEL } from './table.ts';

/**
 * A fast evaluator ρ(h) for one kernel (constants precomputed; for Matérn the ν-dependent Bessel constants).
 * `nu` is used by kernels that take a smoothness (matern; default DEFAULT_MATERN_NU); a Matérn ν that is not finite
 * and > 0 throws RangeError.
 */
export function correlationFunction(kernel: KernelName, nu?: number): CorrelationFunction {
  return kernelDefinition(kernel).correlation(nu);
}

/** A fast evaluator of dρ/dh for one kernel (same `nu` rule as {@link correlationFunction}). */
export function correlationDerivative(kernel: KernelName, nu?: number): CorrelationFunction {
  return kernelDefinition(kernel).derivative(nu);
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
export function practicalRange(kernel: KernelName, nu?: number): number {
  return kernelDefinition(kernel).practicalRange(nu);
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
  const { label, description, formula, source } = kernelDefinition(kernel);
  return { kernel, label, description, formula, source };
}
