/**
 * A starting prior fitted to a loaded problem's data and grid (issue 11, part 6), so that a user's
 * own problem does not open with mean 0 and variance 1 whatever its units.
 *
 * The rule (stated in the UI; derivation ours):
 *
 * 1. Correlation: one exponential term, isotropic, length ℓ = a tenth of the largest grid extent
 *    (nₖ·Δₖ), but at least two cells of the largest spacing. Long enough to span several cells,
 *    short enough that about ten independent lengths fit in the domain, so the data can tell the
 *    structure apart (common practice, no source). R is its unit-variance correlation matrix.
 * 2. Whitening: Cd = Ld Ldᵀ, d̃ = Ld⁻¹ d, g = G·1 (the data a constant model of 1 gives), g̃ = Ld⁻¹ g.
 * 3. Constant mean c by generalised least squares through G with weight Cd⁻¹:
 *        c = g̃ᵀ d̃ / g̃ᵀ g̃ = gᵀ Cd⁻¹ d / gᵀ Cd⁻¹ g.
 *    (The prior part of the data covariance is left out of the weight: it depends on the variance
 *    being estimated.) When G maps constants to (numerically) zero, gᵀCd⁻¹g ≤ 1e-12·‖G‖²_F-scale,
 *    the data cannot see a constant and c = 0.
 * 4. Variance σ² by the method of moments on the residual r̃ = d̃ − c g̃ = P d̃, with
 *    P = I − g̃ g̃ᵀ / g̃ᵀg̃ (P = I when c = 0), rank M − p (p = 1 with a fitted mean, else 0).
 *    Under the model d ~ N(μ g, σ² G R Gᵀ + Cd) for any μ, P g̃ = 0 and
 *        E[r̃ᵀ r̃] = tr(P (σ² Ã + I)) = σ² tr(P Ã) + (M − p),   Ã = Ld⁻¹ G R Gᵀ Ld⁻ᵀ,
 *        tr(P Ã) = tr(Ã) − g̃ᵀ Ã g̃ / g̃ᵀ g̃,
 *    so σ̂² = (r̃ᵀ r̃ − (M − p)) / tr(P Ã) is unbiased: the data's spread beyond their errors,
 *    divided by how strongly the operator passes a unit-variance field of that length into the data.
 * 5. Floor: when the data are within their errors (σ̂² below σ²_min), σ² = σ²_min, the variance at
 *    which the prior's signal in the data is a tenth of the noise: σ²_min = 0.1 (M − p) / tr(P Ã)
 *    (a choice, stated; the plausibility warning then tells whether the data agree).
 * 6. Display: c, σ² and ℓ rounded to 2 significant digits (the exact values are returned too).
 *
 * Cost: one projection G R Gᵀ (M × M) by ./dataSpace.ts projectedPriorCovariance (FFT route on
 * large grids) and, for a full Cd, two M × M triangular solves.
 *
 * PUBLIC API: startPriorRule, StartPriorRule, START_PRIOR_RULE_TEXT.
 */
import { InputError } from '../errors.ts';
import { cellCount, gridDimension, type Grid } from '../grid/grid.ts';
import { cholesky, solveLower, solveLowerRows } from '../linalg/cholesky.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { applyOperator, operatorShape } from '../linalg/operator.ts';
import { transposeOf } from '../linalg/products.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import type { StructuredProblem } from '../inverse/structured.ts';
import { projectedPriorCovariance } from './dataSpace.ts';

/** The rule in one sentence, for the UI (the numbers follow in {@link StartPriorRule.explanation}). */
export const START_PRIOR_RULE_TEXT =
  'Starting prior fitted to this problem: constant mean by generalised least squares through G (weights Cd⁻¹); ' +
  'one exponential term with length a tenth of the largest grid extent (at least two cells); its variance ' +
  'by the method of moments, so that the data spread beyond their errors is what the prior predicts ' +
  '(floor: prior signal a tenth of the noise); rounded to 2 significant digits.';

/** Fraction of the largest grid extent used as the correlation length. */
export const START_LENGTH_FRACTION = 0.1;
/** Signal-to-noise power ratio of the variance floor. */
export const START_VARIANCE_FLOOR_SNR = 0.1;

export interface StartPriorRule {
  /** The prior to start from (values rounded to 2 significant digits). */
  readonly prior: PriorSpec;
  /** Unrounded values of the rule. */
  readonly exact: { readonly mean: number; readonly variance: number; readonly length: number };
  /** Whether a constant mean was fitted (false when G maps constants to zero). */
  readonly meanFitted: boolean;
  /** Whether the variance is the floor (the data are within their errors under the rule's length). */
  readonly varianceFloored: boolean;
  /** r̃ᵀ r̃, M − p and tr(P Ã) of the moment equation. */
  readonly moments: { readonly residualSquares: number; readonly degreesOfFreedom: number; readonly operatorTrace: number };
  /** One paragraph in words with the numbers. */
  readonly explanation: string;
}

/** x rounded to `digits` significant digits. */
function round(x: number, digits = 2): number {
  return x === 0 || !Number.isFinite(x) ? x : Number(x.toPrecision(digits));
}

/** The rule's correlation length for a grid (step 1 of the module comment). */
export function startLength(grid: Grid): number {
  const extent = Math.max(...grid.shape.map((n, k) => n * grid.spacing[k]!));
  return Math.max(START_LENGTH_FRACTION * extent, 2 * Math.max(...grid.spacing));
}

/**
 * The starting prior of the module comment for `problem`. Throws InputError when the data
 * covariance does not factor or the operator is zero (no variance can be inferred).
 */
export function startPriorRule(problem: Problem, options: { structured?: StructuredProblem } = {}): StartPriorRule {
  const { grid, operator, data } = problem;
  const { rows: m, cols: n } = operatorShape(operator);
  if (n !== cellCount(grid)) throw new InputError('problem.operator', `${cellCount(grid)} columns (one per grid cell)`, `${n} columns`);
  const length = startLength(grid);
  const unit: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length }], nugget: 0 };
  const A = projectedPriorCovariance(problem, unit, options.structured ? { structured: options.structured } : {});

  // Whitening: d̃, g̃ and Ã = Ld⁻¹ A Ld⁻ᵀ.
  const g = applyOperator(operator, new Float64Array(n).fill(1));
  let dw: Float64Array;
  let gw: Float64Array;
  let Aw: Matrix;
  if (data.sigma) {
    const s = data.sigma;
    dw = Float64Array.from(data.values, (v, i) => v / s[i]!);
    gw = Float64Array.from(g, (v, i) => v / s[i]!);
    Aw = matrix(m, m);
    for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) Aw.data[i * m + j] = A.data[i * m + j]! / (s[i]! * s[j]!);
  } else if (data.covariance) {
    const f = cholesky(data.covariance);
    if (!f.ok) throw new InputError('problem.data.covariance', 'a positive-definite matrix (Cholesky failed)', `pivot ${f.pivot}`);
    const L = f.factor;
    dw = solveLower(L, data.values);
    gw = solveLower(L, g);
    // Rows of A Ld⁻ᵀ are Ld⁻¹ a_r; its transpose is Ld⁻¹ A (A symmetric); rows again give Ã.
    Aw = solveLowerRows(L, transposeOf(solveLowerRows(L, A)));
  } else {
    throw new InputError('problem.data', 'sigma or covariance', undefined);
  }

  let gg = 0;
  let gd = 0;
  let trA = 0;
  for (let i = 0; i < m; i++) {
    gg += gw[i]! * gw[i]!;
    gd += gw[i]! * dw[i]!;
    trA += Aw.data[i * m + i]!;
  }
  // A constant is visible when its whitened data are not negligible next to the operator's scale.
  const meanFitted = gg > 1e-12 * Math.max(trA, Number.MIN_VALUE) && gg > 0;
  const c = meanFitted ? gd / gg : 0;
  let gAg = 0;
  if (meanFitted) {
    for (let i = 0; i < m; i++) {
      let row = 0;
      for (let j = 0; j < m; j++) row += Aw.data[i * m + j]! * gw[j]!;
      gAg += gw[i]! * row;
    }
  }
  const trPA = trA - (meanFitted ? gAg / gg : 0);
  if (!(trPA > 0)) throw new InputError('problem.operator', 'an operator that passes a correlated field into the data (G R Gᵀ has zero trace)', 0);
  let rr = 0;
  for (let i = 0; i < m; i++) {
    const r = dw[i]! - c * gw[i]!;
    rr += r * r;
  }
  const dof = m - (meanFitted ? 1 : 0);
  const moment = (rr - dof) / trPA;
  const floor = (START_VARIANCE_FLOOR_SNR * Math.max(dof, 1)) / trPA;
  const varianceFloored = !(moment > floor);
  const variance = varianceFloored ? floor : moment;

  const prior: PriorSpec = {
    mean: { constant: round(c) },
    terms: [{ kernel: 'exponential', variance: round(variance), length: round(length) }],
    nugget: 0,
  };
  const lu = grid.unit ? ` ${grid.unit}` : '';
  const dims = gridDimension(grid) === 2 ? 'the larger grid extent' : 'the grid extent';
  const explanation =
    `Mean ${round(c)}` +
    (meanFitted ? ' (generalised least squares through G with weights Cd⁻¹)' : ' (G maps a constant to zero: the data cannot see a constant mean)') +
    `; exponential term with length ${round(length)}${lu} (a tenth of ${dims}) and variance ${round(variance)}` +
    (varianceFloored
      ? ' (the floor: the data lie within their errors, so the prior signal is set to a tenth of the noise)'
      : ` (method of moments: whitened residual sum of squares ${round(rr, 4)} against ${dof} expected from the errors alone, per ${round(trPA, 4)} for unit variance)`) +
    '.';
  return {
    prior,
    exact: { mean: c, variance, length },
    meanFitted,
    varianceFloored,
    moments: { residualSquares: rr, degreesOfFreedom: dof, operatorTrace: trPA },
    explanation,
  };
}
