/**
 * A starting prior fitted to a loaded problem's data and grid, so that a user's
 * own problem does not open with mean 0 and variance 1 whatever its units.
 *
 * The rule (stated in the UI; derivation ours):
 *
 * 1. Correlation: one exponential term, isotropic, length ℓ = a tenth of the largest grid extent
 *    (nₖ·Δₖ), but at least two cells of the largest spacing. Long enough to span several cells,
 *    short enough that about ten independent lengths fit in the domain, so the data can tell the
 *    structure apart (common practice, no source). R is its unit-variance correlation matrix, with ℓ rounded to
 *    the 2 significant digits shown (step 5), so the variance is fitted for the length the user sees.
 * 2. Whitening: Cd = Ld Ldᵀ, d̃ = Ld⁻¹ d, g = G·1 (the data a constant model of 1 gives), g̃ = Ld⁻¹ g.
 * 3. Variance σ² and constant mean c together: with K(σ²) = σ² G R Gᵀ + Cd, the mean is the
 *    generalised least squares constant through G,  c(σ²) = gᵀK⁻¹d / gᵀK⁻¹g,  and σ² is the value at
 *    which the data are exactly typical under the prior: the prior predictive statistic with that
 *    mean, q(σ²) = (d − c g)ᵀ K⁻¹ (d − c g), equals its expectation M − p (p = 1 with a fitted mean).
 *    Why: under the model with the true σ², q ~ χ²_{M−p} (the fitted constant removes one degree
 *    of freedom; a restricted-likelihood identity, memory), so this is an unbiased estimating
 *    equation, and q is non-increasing in σ² (a minimum over c of sums with weights 1/(σ²λ + 1)),
 *    so the root is unique and P(σ̂² ≤ σ²_true) = P(χ²_{M−p} ≤ M − p) exactly (checked by simulation
 *    in test/core/tuning/startPrior.test.ts). The start therefore never trips the plausibility warning on the
 *    data it was fitted to. Fitted to a subset (step 6), the check on all the data can still fire: seen on invented
 *    white-noise data four times the stated error variance (32³, 1,000 rays: q/M = 1.46 on all of them), which no
 *    smooth prior explains, so the warning is right there.
 *    Computed in whitened form: Ã = Ld⁻¹ G R Gᵀ Ld⁻ᵀ = V Λ Vᵀ, a = Vᵀd̃, b = Vᵀg̃, w = 1/(σ²λ + 1),
 *    c = Σ w a b / Σ w b², q = Σ w (a − c b)²; the root by bisection on log σ².
 *    When G maps constants to (numerically) zero (‖g̃‖² ≤ 1e-12 tr Ã) the data cannot see a constant:
 *    c = 0, p = 0.
 * 4. Floor: when the data are within their errors (q(0) ≤ M − p, no σ² > 0 reaches the target),
 *    σ² = σ²_min, the variance at which the prior's signal in the data is a tenth of the noise:
 *    σ²_min = 0.1 (M − p) / tr(P Ã), P = I − g̃g̃ᵀ/g̃ᵀg̃ (a choice, stated). When even an unbounded
 *    variance leaves q above M − p (data in directions G R Gᵀ cannot produce), σ² is the largest
 *    value searched (10¹² σ²_min) and the rule says so.
 * 5. Display: c, σ² and ℓ rounded to 2 significant digits (the exact values are returned too).
 * 6. Many data: above START_RULE_MAX_DATA data the rule is fitted to that many, evenly spaced in file order (rows
 *    ⌊k·M/300⌋), with their errors (and block of Cd): a starting scale does not need every datum, and the
 *    projection G R Gᵀ costs one FFT product per datum (a 32³ problem with 1,000 rays: 1.9 s for all of them). The
 *    statistic of step 3 is then χ² on the subset's degrees of freedom, so the properties above hold for it.
 *
 * Cost: one projection G R Gᵀ (M × M) by ./dataSpace.ts projectedPriorCovariance (FFT route on
 * large grids) and, for a full Cd, two M × M triangular solves. A caller that has Bᵀ = G R for every
 * datum (the worker computes it on the FFT route, where the first posterior needs it anyway) passes it
 * as `products`, and the projection is G times the rule's rows of it.
 *
 * Where to check: test/core/tuning/startPrior.test.ts (numpy/scipy references, seeded simulation; the
 * `products` form against the default one).
 *
 * PUBLIC API: startPriorRule, startPriorShape, StartPriorRule, StartPriorOptions, START_PRIOR_RULE_TEXT.
 */
import { InputError } from '../errors.ts';
import { cellCount, type Geometry, gridDimension, isCellList } from '../grid/grid.ts';
import { geometryScale } from '../problems/geometry.ts';
import { cholesky, solveLower, solveLowerRows } from '../linalg/cholesky.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { applyOperator, type Operator, operatorRowSubset, operatorShape, operatorTimesTransposedSymmetric } from '../linalg/operator.ts';
import { transposeOf } from '../linalg/products.ts';
import { symmetricEigenProjected } from '../linalg/eigen.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import type { StructuredProblem } from '../inverse/structured.ts';
import { projectedPriorCovariance } from './dataSpace.ts';

/** The rule in one sentence, for the UI (the numbers follow in {@link StartPriorRule.explanation}). */
export const START_PRIOR_RULE_TEXT =
  'Starting prior fitted to this problem: one exponential term with length a tenth of the largest grid extent ' +
  '(at least two cells); its variance chosen so that the data are exactly typical under the prior ' +
  '(rᵀK⁻¹r = M − 1, its expected value), with the constant mean fitted by generalised least squares through G; ' +
  'a floor where the data lie within their errors (prior signal a tenth of the noise); rounded to 2 significant digits.';

/** Most data the rule is fitted to (step 6 of the module comment; our choice). */
export const START_RULE_MAX_DATA = 300;

/** The data rows the rule is fitted to (step 6): ⌊k·M/START_RULE_MAX_DATA⌋, or null for all of them. */
function ruleRows(m: number): number[] | null {
  return m <= START_RULE_MAX_DATA ? null : Array.from({ length: START_RULE_MAX_DATA }, (_, k) => Math.floor((k * m) / START_RULE_MAX_DATA));
}

/** The problem restricted to the rows of {@link ruleRows} (step 6), or itself when it has no more data. */
function ruleData(problem: Problem<Geometry>): Problem<Geometry> {
  const rows = ruleRows(problem.data.values.length);
  if (rows === null) return problem;
  const d = problem.data;
  const cd = d.covariance;
  return {
    grid: problem.grid,
    operator: operatorRowSubset(problem.operator, rows),
    data: {
      values: Float64Array.from(rows, (i) => d.values[i]),
      ...(d.sigma ? { sigma: Float64Array.from(rows, (i) => d.sigma![i]) } : {}),
      ...(cd
        ? {
            covariance: {
              rows: rows.length,
              cols: rows.length,
              data: Float64Array.from(
                { length: rows.length ** 2 },
                (_, q) => cd.data[rows[Math.floor(q / rows.length)] * cd.cols + rows[q % rows.length]],
              ),
            },
          }
        : {}),
    },
  };
}

/** G R Gᵀ for the rule's rows (./startPrior.ts ruleRows of `total` data) from the whole problem's Bᵀ = G R; `g` is the rule's operator. */
function projectionFromProducts(g: Operator, bt: Matrix, total: number): Matrix {
  const n = bt.cols;
  if (bt.rows !== total || n !== g.matrix.cols)
    throw new RangeError(`startPriorRule: products of ${bt.rows}×${n}, expected ${total}×${g.matrix.cols} (every datum, every cell)`);
  return operatorTimesTransposedSymmetric(g, bt, ruleRows(total) ?? undefined);
}

/** Fraction of the largest grid extent used as the correlation length. */
export const START_LENGTH_FRACTION = 0.1;
/** Signal-to-noise power ratio of the variance floor. */
export const START_VARIANCE_FLOOR_SNR = 0.1;

export interface StartPriorRule {
  /** The prior to start from (values rounded to 2 significant digits). */
  readonly prior: PriorSpec;
  /** Unrounded values of the rule (the length is the one fitted with: {@link startPriorShape}'s, 2 significant digits). */
  readonly exact: { readonly mean: number; readonly variance: number; readonly length: number };
  /** Whether a constant mean was fitted (false when G maps constants to zero). */
  readonly meanFitted: boolean;
  /** Whether the variance is the floor (the data are within their errors under the rule's length). */
  readonly varianceFloored: boolean;
  /** q at the chosen variance, its target M − p, tr(P Ã) (of the floor), and which case of the rule applied. */
  readonly fit: {
    readonly statistic: number;
    readonly degreesOfFreedom: number;
    readonly operatorTrace: number;
    readonly outcome: 'fitted' | 'floor' | 'unreached';
  };
  /** One paragraph in words with the numbers. */
  readonly explanation: string;
}

/** x rounded to `digits` significant digits. */
function round(x: number, digits = 2): number {
  return x === 0 || !Number.isFinite(x) ? x : Number(x.toPrecision(digits));
}

/**
 * The rule's correlation length for a grid (step 1 of the module comment); for a cell list, its extent and typical
 * cell size from ../problems/geometry.ts geometryScale.
 */
export function startLength(grid: Geometry): number {
  if (isCellList(grid)) {
    const { extent, spacing } = geometryScale(grid);
    return Math.max(START_LENGTH_FRACTION * extent, 2 * spacing);
  }
  const extent = Math.max(...grid.shape.map((n, k) => n * grid.spacing[k]));
  return Math.max(START_LENGTH_FRACTION * extent, 2 * Math.max(...grid.spacing));
}

/**
 * The rule's correlation R as a prior (step 1): one exponential term of variance 1 with the length of
 * {@link startLength} to the 2 significant digits shown, so the variance is fitted for the length the
 * user sees. A caller that computes Bᵀ = R Gᵀ for this prior anyway (the worker, on the FFT route, for
 * the first posterior) passes it to {@link startPriorRule}.
 */
export function startPriorShape(grid: Geometry): PriorSpec {
  return { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: round(startLength(grid)) }], nugget: 0 };
}

export interface StartPriorOptions {
  /** The whole problem's spectrum cache for the FFT route (used when the rule fits all data). */
  readonly structured?: StructuredProblem;
  /**
   * Bᵀ = G R (M × N, every datum, in file order) for R = {@link startPriorShape}: the projection G R Gᵀ of the
   * rule's rows is then formed from it (G times the rows of Bᵀ) instead of fresh covariance products.
   */
  readonly products?: Matrix;
}

/**
 * The starting prior of the module comment for `problem`. Throws InputError when the data
 * covariance does not factor or the operator is zero (no variance can be inferred).
 */
export function startPriorRule(whole: Problem<Geometry>, options: StartPriorOptions = {}): StartPriorRule {
  const problem = ruleData(whole);
  const subset = problem !== whole;
  const { grid, operator, data } = problem;
  const { rows: m, cols: n } = operatorShape(operator);
  if (n !== cellCount(grid)) throw new InputError('problem.operator', `${cellCount(grid)} columns (one per grid cell)`, `${n} columns`);
  const unit = startPriorShape(grid);
  const length = unit.terms[0].length!;
  const A =
    options.products !== undefined
      ? projectionFromProducts(operator, options.products, whole.data.values.length)
      : // A spectrum cache belongs to the whole problem: a subset builds its own.
        projectedPriorCovariance(problem, unit, options.structured && !subset ? { structured: options.structured } : {});

  // Whitening: d̃, g̃ and Ã = Ld⁻¹ A Ld⁻ᵀ.
  const g = applyOperator(operator, new Float64Array(n).fill(1));
  let dw: Float64Array;
  let gw: Float64Array;
  let Aw: Matrix;
  if (data.sigma) {
    const s = data.sigma;
    dw = Float64Array.from(data.values, (v, i) => v / s[i]);
    gw = Float64Array.from(g, (v, i) => v / s[i]);
    Aw = matrix(m, m);
    for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) Aw.data[i * m + j] = A.data[i * m + j] / (s[i] * s[j]);
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
  let trA = 0;
  for (let i = 0; i < m; i++) {
    gg += gw[i] * gw[i];
    trA += Aw.data[i * m + i];
  }
  // A constant is visible when its whitened data are not negligible next to the operator's scale.
  const meanFitted = gg > 0 && gg > 1e-12 * trA;
  let gAg = 0;
  if (meanFitted) {
    for (let i = 0; i < m; i++) {
      let row = 0;
      for (let j = 0; j < m; j++) row += Aw.data[i * m + j] * gw[j];
      gAg += gw[i] * row;
    }
  }
  const trPA = trA - (meanFitted ? gAg / gg : 0);
  if (!(trPA > 0))
    throw new InputError('problem.operator', 'an operator that passes a correlated field into the data (G R Gᵀ has zero trace)', 0);

  const B = matrix(m, 2);
  for (let i = 0; i < m; i++) {
    B.data[2 * i] = dw[i];
    B.data[2 * i + 1] = gw[i];
  }
  const eig = symmetricEigenProjected(Aw, B);
  const lam = Float64Array.from(eig.values, (v) => Math.max(v, 0));
  const a = Float64Array.from({ length: m }, (_, j) => eig.projected.data[2 * j]);
  const b = Float64Array.from({ length: m }, (_, j) => eig.projected.data[2 * j + 1]);
  /** The GLS mean and q at variance v (module comment, step 3). */
  const at = (v: number): { c: number; q: number } => {
    let wab = 0;
    let wbb = 0;
    for (let j = 0; j < m; j++) {
      const w = 1 / (v * lam[j] + 1);
      wab += w * a[j] * b[j];
      wbb += w * b[j] * b[j];
    }
    const c = meanFitted && wbb > 0 ? wab / wbb : 0;
    let q = 0;
    for (let j = 0; j < m; j++) {
      const r = a[j] - c * b[j];
      q += (r * r) / (v * lam[j] + 1);
    }
    return { c, q };
  };
  const dof = m - (meanFitted ? 1 : 0);
  const floor = (START_VARIANCE_FLOOR_SNR * Math.max(dof, 1)) / trPA;
  let variance: number;
  let outcome: 'fitted' | 'floor' | 'unreached';
  if (at(0).q <= dof || at(floor).q <= dof) {
    variance = floor;
    outcome = 'floor';
  } else {
    let lo = floor;
    let hi = floor * 10;
    const cap = floor * 1e12;
    while (at(hi).q > dof && hi < cap) {
      lo = hi;
      hi *= 10;
    }
    if (at(hi).q > dof) {
      variance = hi;
      outcome = 'unreached';
    } else {
      // Bisection on log σ²: q(lo) > dof ≥ q(hi).
      for (let k = 0; k < 200 && hi / lo - 1 > 1e-13; k++) {
        const mid = Math.sqrt(lo * hi);
        if (at(mid).q > dof) lo = mid;
        else hi = mid;
      }
      variance = Math.sqrt(lo * hi);
      outcome = 'fitted';
    }
  }
  const { c, q } = at(variance);
  const varianceFloored = outcome === 'floor';

  const prior: PriorSpec = {
    mean: { constant: round(c) },
    terms: [{ kernel: 'exponential', variance: round(variance), length: round(length) }],
    nugget: 0,
  };
  const lu = grid.unit ? ` ${grid.unit}` : '';
  const dims = isCellList(grid)
    ? 'the largest extent of the cell centres'
    : ['the grid extent', 'the larger grid extent', 'the largest grid extent'][gridDimension(grid) - 1];
  const explanation =
    `Mean ${round(c)}` +
    (meanFitted
      ? ' (generalised least squares through G with this prior)'
      : ' (G maps a constant to zero: the data cannot see a constant mean)') +
    `; exponential term with length ${round(length)}${lu} (a tenth of ${dims}) and variance ${round(variance)}` +
    (outcome === 'floor'
      ? ' (the floor: the data lie within their errors, so the prior signal is set to a tenth of the noise)'
      : outcome === 'unreached'
        ? ` (the largest searched: even so rᵀK⁻¹r = ${round(q, 3)} stays above ${dof}, so part of the data cannot come from this kind of prior)`
        : ` (at which rᵀK⁻¹r = ${dof} = M − ${meanFitted ? 1 : 0}, its expected value: the data are exactly typical for this prior)`) +
    (subset ? `; fitted to ${m} of the ${whole.data.values.length} data, evenly spaced in file order` : '') +
    '.';
  return {
    prior,
    exact: { mean: c, variance, length },
    meanFitted,
    varianceFloored,
    fit: { statistic: q, degreesOfFreedom: dof, operatorTrace: trPA, outcome },
    explanation,
  };
}
