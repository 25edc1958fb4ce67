/**
 * A linear inverse problem d = G m + e, e ~ N(0, Cd), on a regular grid.
 * Typed-array form used inside the core; the JSON problem file maps onto it in src/core/io.
 */
import type { Grid } from '../grid/grid.ts';
import type { Matrix } from '../linalg/matrix.ts';
import type { Operator } from '../linalg/operator.ts';

export interface DataSpec {
  readonly values: Float64Array;
  /** Per-datum standard deviations (> 0): Cd = diag(σ²). Exactly one of sigma / covariance. */
  readonly sigma?: Float64Array;
  /** Full symmetric positive-definite data covariance (M × M). */
  readonly covariance?: Matrix;
  /** Unit of the data values, e.g. "ms" or "mGal" (optional, for labels). */
  readonly unit?: string;
}

export interface Problem {
  readonly title?: string;
  readonly grid: Grid;
  readonly operator: Operator;
  readonly data: DataSpec;
  readonly truth?: Float64Array;
  readonly quantity?: { readonly name: string; readonly unit?: string };
}
