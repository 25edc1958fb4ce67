/**
 * A linear inverse problem d = G m + e, e ~ N(0, Cd), on a regular grid or on a cell list (the user's own mesh).
 * Typed-array form used inside the core; the JSON problem file maps onto it in src/core/io.
 */
import { InputError } from '../errors.ts';
import { cellCount, type Geometry, type Grid, isCellList } from '../grid/grid.ts';
import type { Matrix } from '../linalg/matrix.ts';
import type { Operator } from '../linalg/operator.ts';

/**
 * Where each datum was measured, in the grid's unit and along its axes (row k belongs to datum k):
 * a point datum at a position (a station, a sample; [x] in 1-D, [x, y] in 2-D, [x, y, z] in 3-D), or a
 * path datum between a source and a receiver ([x, y] each in 2-D, [x, y, z] in 3-D). Positions may lie outside the grid
 * (stations above a section). Used for plots only; G alone defines the forward model.
 */
export type DataGeometry =
  | { readonly kind: 'points' /** M × dim, row-major. */; readonly positions: Matrix }
  | { readonly kind: 'paths' /** M × dim (2 or 3). */; readonly sources: Matrix /** M × dim. */; readonly receivers: Matrix };

export interface DataSpec {
  readonly values: Float64Array;
  /** Per-datum standard deviations (> 0): Cd = diag(σ²). Exactly one of sigma / covariance. */
  readonly sigma?: Float64Array;
  /** Full symmetric positive-definite data covariance (M × M). */
  readonly covariance?: Matrix;
  /** Unit of the data values, e.g. "ms" or "mGal" (optional, for labels). */
  readonly unit?: string;
  /** Where the data were measured (optional). */
  readonly geometry?: DataGeometry;
}

/**
 * `G` is the cell geometry: a regular Grid everywhere by default; `Problem<Geometry>` also admits a cell list
 * (the user's own mesh), which the posterior entry (../inverse/compute.ts) sends to the dense route.
 */
export interface Problem<G extends Geometry = Grid> {
  readonly title?: string;
  readonly grid: G;
  readonly operator: Operator;
  readonly data: DataSpec;
  readonly truth?: Float64Array;
  readonly quantity?: { readonly name: string; readonly unit?: string };
}

/** Whether the problem's cells form a regular grid (not a cell list). */
export function isGridProblem(problem: Problem<Geometry>): problem is Problem {
  return !isCellList(problem.grid);
}

/**
 * The problem on its regular grid (the same object), for the computations that need one (FFT products, lag tables,
 * grid plots); a cell list is refused with an InputError on `cells` saying what works on cell lists instead.
 */
export function gridProblem(problem: Problem<Geometry>, what: string): Problem {
  if (isGridProblem(problem)) return problem;
  throw new InputError(
    'cells',
    `a regular "grid" for ${what} (a problem on a cell list of its own mesh takes the dense route: priorscope posterior, check and sample)`,
    `a cell list of ${cellCount(problem.grid)} centres`,
  );
}
