/**
 * A Gaussian prior as plain JSON-able data: mean model plus a covariance that is a sum of kernel
 * terms, an optional nugget (white variance on the diagonal) and an optional standard-deviation
 * profile s giving S·C·S with S = diag(s).
 *
 *   Cm[i][j] = s_i s_j (Σ_t variance_t ρ_t(h_ij)) + nugget·δ_ij      (s ≡ 1 when absent)
 *
 * The nugget is added after the profile scaling (it is measurement-like small-scale variance).
 */
import type { Term } from '../kernels/spec.ts';

/** m0 = c in every cell. */
export interface ConstantMean {
  readonly constant: number;
}

/** m0 given cell by cell (N numbers). */
export interface ValuesMean {
  readonly values: readonly number[];
}

/** m0(x, y) = intercept + slope[0]·x (+ slope[1]·y in 2-D), absolute coordinates. */
export interface TrendMean {
  readonly trend: { readonly intercept: number; readonly slope: readonly number[] };
}

/**
 * The mean model, discriminated by its one field (the prior file's own shape, so files, saved sessions and share
 * links keep it): `'constant' in m`, `'values' in m` and `'trend' in m` narrow; {@link MeanKind} names the form.
 */
export type MeanSpec = ConstantMean | ValuesMean | TrendMean;

export type MeanKind = 'constant' | 'values' | 'trend';

export interface PriorSpec {
  readonly mean: MeanSpec;
  readonly terms: readonly Term[];
  /** ≥ 0, variance units; default 0. */
  readonly nugget?: number;
  /** N numbers > 0 (standard-deviation multipliers per cell). */
  readonly stdProfile?: readonly number[];
}
