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

/** The fields every term has. */
interface TermFields {
  readonly kernel: KernelName;
  /** Variance (sill contribution), > 0, in the quantity's unit squared. */
  readonly variance: number;
  /**
   * Rotation of the first axis, degrees counter-clockwise from +x (default 0). Used by anisotropic terms; on an
   * isotropic term it is kept (the prior file round-trips it) but has no effect.
   */
  readonly angle?: number;
  /**
   * Smoothness ν > 0 for kernels that take it (the kernel table's `fields`; matern). Read it through
   * `termSmoothness` (./table.ts), which fills in the kernel's default. On other kernels it is kept but ignored.
   */
  readonly nu?: number;
}

/** h = r / length. */
export interface IsotropicTerm extends TermFields {
  /** Correlation length, > 0, in the grid's unit. */
  readonly length: number;
  readonly lengths?: undefined;
}

/**
 * 2-D: h = √((u/l1)² + (v/l2)²) in axes rotated by the angle. 3-D: h = √((u/l1)² + (v/l2)² + (w/l3)²) with
 * (u, v, w) = Rᵀ(dx, dy, dz), R = Rz(a1)·Ry(a2)·Rx(a3) from `angles` (../prior/lag.ts).
 */
export interface AnisotropicTerm extends TermFields {
  /** Correlation lengths [l1, l2] (2-D) or [l1, l2, l3] (3-D), each > 0. */
  readonly lengths: readonly [number, number] | readonly [number, number, number];
  /** 3-D only: [a1, a2, a3] degrees (a1 about z, then a2 about the new y, then a3 about the newest x); zeros when absent. */
  readonly angles?: readonly [number, number, number];
  readonly length?: undefined;
}

/**
 * A covariance term, discriminated by which length field it has (the prior file's own fields, so files, saved
 * sessions and share links keep their shape): `t.lengths !== undefined` narrows to {@link AnisotropicTerm},
 * otherwise `t.length` is a number.
 */
export type Term = IsotropicTerm | AnisotropicTerm;

/** Whether the term has two lengths (narrows the union). */
export function isAnisotropic(t: Term): t is AnisotropicTerm {
  return t.lengths !== undefined;
}

/** Fields to change in a term; giving `length` makes it isotropic, giving `lengths` anisotropic. */
export interface TermPatch {
  readonly kernel?: KernelName;
  readonly variance?: number;
  readonly angle?: number;
  readonly nu?: number;
  readonly length?: number;
  readonly lengths?: readonly [number, number] | readonly [number, number, number];
}

/**
 * The term with the patch applied; giving the other length field switches the form (the old field is dropped).
 * Fields keep their order (new ones go last), so JSON texts of unchanged fields stay the same.
 */
export function patchTerm(t: Term, patch: TermPatch): Term {
  const { length, lengths, ...common } = patch;
  if (lengths !== undefined) {
    if (isAnisotropic(t)) return { ...t, ...common, lengths };
    const { length: _dropped, ...rest } = t;
    return { ...rest, ...common, lengths };
  }
  if (length !== undefined) {
    if (!isAnisotropic(t)) return { ...t, ...common, length };
    const { lengths: _dropped, ...rest } = t;
    return { ...rest, ...common, length };
  }
  return isAnisotropic(t) ? { ...t, ...common } : { ...t, ...common };
}
