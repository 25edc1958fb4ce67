/**
 * Covariance terms of a prior, as plain JSON-able data (the same shape as in prior files).
 *
 * A term contributes variance · ρ(h) where ρ is the kernel's correlation at scaled distance h.
 * Isotropic: h = r / length. Anisotropic (2-D): the offset (dx, dy) is rotated by −angle
 * (angle in degrees, counter-clockwise from +x to the first axis) into (u, v) and
 * h = √((u/l1)² + (v/l2)²).
 *
 * The kernels themselves (names, correlations, ranges, fields) are defined in one table, ./table.ts.
 */
import type { KernelName } from './table.ts';

export { type CorrelationFunction, KERNEL_NAMES, type KernelName } from './table.ts';
export { DEFAULT_MATERN_NU } from './matern.ts';

export interface Term {
  readonly kernel: KernelName;
  /** Variance (sill contribution), > 0, in the quantity's unit squared. */
  readonly variance: number;
  /** Correlation length for an isotropic term, > 0, in the grid's unit. */
  readonly length?: number;
  /** Two correlation lengths [l1, l2] for an anisotropic 2-D term, each > 0. */
  readonly lengths?: readonly [number, number];
  /** Rotation of the first axis, degrees counter-clockwise from +x (default 0). */
  readonly angle?: number;
  /** Matérn smoothness ν > 0 (matern only; {@link DEFAULT_MATERN_NU} when absent). */
  readonly nu?: number;
}
