/**
 * Covariance terms of a prior, as plain JSON-able data (the same shape as in prior files).
 *
 * A term contributes variance · ρ(h) where ρ is the kernel's correlation at scaled distance h.
 * Isotropic: h = r / length. Anisotropic (2-D): the offset (dx, dy) is rotated by −angle
 * (angle in degrees, counter-clockwise from +x to the first axis) into (u, v) and
 * h = √((u/l1)² + (v/l2)²).
 */
export type KernelName = 'exponential' | 'gaussian' | 'matern' | 'spherical';

export const KERNEL_NAMES: readonly KernelName[] = ['exponential', 'gaussian', 'matern', 'spherical'];

/** A correlation ρ(h) at scaled distance h ≥ 0 (ρ(0) = 1). */
export type CorrelationFunction = (h: number) => number;

/** Matérn smoothness ν used when a matern term gives none (ν = 3/2: once mean-square differentiable). */
export const DEFAULT_MATERN_NU = 1.5;

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
