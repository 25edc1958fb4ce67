/**
 * Data-space building blocks shared by the prior-selection criteria (evidence, leave-one-out,
 * discrepancy, calibration). Everything here works with
 *
 *   r = d − G m0,   P = G Cm Gᵀ (M × M),   K = P + Cd = L Lᵀ (Cholesky),
 *
 * so a criterion costs one projection of Cm and one M × M factorisation, never an N × N solve.
 * The projection P takes the dense route (Cm as an N × N matrix) or, for a stationary prior on a
 * grid of more than TUNING_DENSE_LIMIT cells, the FFT route with no N × N matrix
 * ({@link projectedPriorCovariance}, ./projected.ts).
 * Log density of the data under the prior (Rasmussen & Williams 2006, eq. 2.30 / Algorithm 2.1):
 *
 *   log N(d; G m0, K) = −½ rᵀ K⁻¹ r − Σ log L_ii − (M/2) log 2π.
 */
import { assertNever, InputError, NotPositiveDefiniteError } from '../errors.ts';
import { nonStationaryReason } from '../fft/covariance.ts';
import { structuredProblem, type StructuredProblem } from '../inverse/structured.ts';
import { cellCount, type Geometry } from '../grid/grid.ts';
import { cholesky, logDetFromCholesky, solveLower } from '../linalg/cholesky.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { applyOperator, operatorShape, projectCovariance } from '../linalg/operator.ts';
import { assembleCovariance, covarianceMatrix, meanVector } from '../prior/covariance.ts';
import { offsetTable, type OffsetFunction } from '../prior/lag.ts';
import type { PriorSpec } from '../prior/spec.ts';
import { isGridProblem, type Problem } from '../problems/spec.ts';
import { structuredProjection, TUNING_DENSE_LIMIT, tuningRoute, type TuningRoute } from './projected.ts';
import { lagProjectionApplies, lagTableProjection, projectLagTable } from './lagProjection.ts';

import { LOG_2PI } from '../inverse/evidence.ts';

export { LOG_2PI, TUNING_DENSE_LIMIT, tuningRoute, type TuningRoute };

/** Optional progress report and cancellation flag, shared by every long-running tuning call. */
export interface TuningControl {
  /** Called with the finished fraction in [0, 1] after each unit of work (grid cell, replicate …). */
  readonly onProgress?: (fraction: number) => void;
  /** Checked between units of work; when it becomes true the call stops and says so in its result. */
  readonly signal?: { readonly aborted: boolean };
}

/** The problem's fixed data-space pieces: sizes, the factor of Cd and the data. */
export interface DataSide {
  readonly problem: Problem;
  readonly dataCount: number;
  readonly cellCount: number;
  /** Lower Cholesky factor of Cd (diagonal for per-datum σ). */
  readonly cdFactor: Matrix;
  /** Cd as a dense M × M matrix. */
  readonly cd: Matrix;
  /** True when Cd is diagonal (σ given per datum). */
  readonly diagonalCd: boolean;
  /** Spectrum cache of the FFT route, shared by every projection made through this side. */
  readonly structured: StructuredProblem;
  /** Route of every projection made through this side ('auto': {@link tuningRoute} per prior). */
  readonly route: 'auto' | TuningRoute;
}

/** Route and spectrum cache of the projections of one call (tests and benchmarks force the route). */
export interface RouteOptions {
  /** 'auto' (default): {@link tuningRoute} per prior; 'dense' / 'fft' force a route. */
  readonly route?: 'auto' | TuningRoute;
  /** Made by structuredProblem(problem) for the same problem object; a fresh one per call when absent. */
  readonly structured?: StructuredProblem;
}

/**
 * Checks the problem's sizes and factors Cd. Throws InputError naming the field when the data,
 * the operator and the grid disagree or when σ is not positive; NotPositiveDefiniteError when a
 * full Cd does not factor.
 */
export function prepareDataSide(problem: Problem, options: RouteOptions = {}): DataSide {
  const structured = options.structured ?? structuredProblem(problem);
  const route = options.route ?? 'auto';
  if (structured.problem !== problem)
    throw new InputError('structured', 'a spectrum cache made for this problem', 'one made for another problem');
  const { rows: m, cols: n } = operatorShape(problem.operator);
  const cells = cellCount(problem.grid);
  if (n !== cells) throw new InputError('problem.operator', `${cells} columns (one per grid cell)`, `${n} columns`);
  const d = problem.data;
  if (d.values.length !== m) throw new InputError('problem.data.values', `${m} values (one per operator row)`, d.values);
  for (let i = 0; i < m; i++) {
    if (!Number.isFinite(d.values[i])) throw new InputError(`problem.data.values[${i}]`, 'a finite number', d.values[i]);
  }
  const cd = matrix(m, m);
  if (d.sigma !== undefined) {
    if (d.covariance !== undefined) throw new InputError('problem.data', 'exactly one of sigma or covariance', 'both');
    if (d.sigma.length !== m) throw new InputError('problem.data.sigma', `${m} standard deviations`, d.sigma);
    const f = matrix(m, m);
    for (let i = 0; i < m; i++) {
      const s = d.sigma[i];
      if (!(s > 0) || !Number.isFinite(s)) throw new InputError(`problem.data.sigma[${i}]`, 'a finite number > 0', s);
      f.data[i * m + i] = s;
      cd.data[i * m + i] = s * s;
    }
    return { problem, dataCount: m, cellCount: cells, cdFactor: f, cd, diagonalCd: true, structured, route };
  }
  if (d.covariance === undefined) throw new InputError('problem.data', 'one of sigma or covariance', 'neither');
  if (d.covariance.rows !== m || d.covariance.cols !== m) {
    throw new InputError('problem.data.covariance', `an ${m}×${m} matrix`, `${d.covariance.rows}×${d.covariance.cols}`);
  }
  cd.data.set(d.covariance.data);
  const f = cholesky(cd);
  if (!f.ok) throw new NotPositiveDefiniteError('data covariance Cd', f.pivot, 'check problem.data.covariance');
  return { problem, dataCount: m, cellCount: cells, cdFactor: f.factor, cd, diagonalCd: false, structured, route };
}

/** a + b (new matrix). */
export function addMatrices(a: Matrix, b: Matrix): Matrix {
  const out = matrix(a.rows, a.cols, a.data.slice());
  for (let i = 0; i < out.data.length; i++) out.data[i] += b.data[i];
  return out;
}

/**
 * P = G Cm Gᵀ (M × M) for the prior on the problem's grid: the dense route (covarianceMatrix, then
 * ../linalg/operator.ts projectCovariance) or the FFT route (./projected.ts structuredProjection), chosen by
 * {@link tuningRoute} unless `options.route` forces one; under `auto`, where the FFT route would run, an operator
 * with few non-zeros takes the lag table instead (./lagProjection.ts). All give the same matrix to round-off
 * (test/core/tuning/projected.test.ts). Validates the prior (InputError naming the field); a forced
 * 'fft' for a prior that is not stationary on the grid is an InputError naming `route`.
 */
export function projectedPriorCovariance(problem: Problem<Geometry>, prior: PriorSpec, options: RouteOptions = {}): Matrix {
  if (!isGridProblem(problem)) {
    // A cell list (the user's own mesh) has no lattice: the dense route only.
    if (options.route === 'fft' || options.structured)
      throw new InputError('route', '"dense" or "auto" for a cell list (the FFT route needs a regular grid)', 'fft');
    return projectCovariance(problem.operator, covarianceMatrix(problem.grid, prior));
  }
  const route = projectionRoute(problem, prior, options.route ?? 'auto');
  if (route === 'dense') return projectCovariance(problem.operator, covarianceMatrix(problem.grid, prior));
  // Few non-zeros (point data): the lag table gives P exactly, cheaper than any transform (./lagProjection.ts).
  if (route === 'lag') return lagTableProjection(problem.operator, problem.grid, prior);
  const why = nonStationaryReason(problem.grid, prior);
  if (why !== null)
    throw new InputError(
      'route',
      `"dense" or "auto" for this prior (the FFT route needs a stationary prior on a regular grid: ${why})`,
      'fft',
    );
  const holder = options.structured ?? structuredProblem(problem);
  if (holder.problem !== problem)
    throw new InputError('structured', 'a spectrum cache made for this problem', 'one made for another problem');
  return structuredProjection(holder, prior);
}

/**
 * How P is formed for (problem, prior) when `asked` is the route option: 'dense', the lag table ('lag': under
 * `auto` where the FFT route would run and the operator has few non-zeros) or 'fft'.
 */
function projectionRoute(problem: Problem, prior: PriorSpec, asked: 'auto' | TuningRoute): TuningRoute | 'lag' {
  switch (asked) {
    case 'auto': {
      const route = tuningRoute(problem, prior);
      return route === 'fft' && lagProjectionApplies(problem.operator, problem.grid) ? 'lag' : route;
    }
    case 'dense':
    case 'fft':
      return asked;
    default:
      return assertNever(asked);
  }
}

/**
 * G S D S Gᵀ for D the table of an even function of the offset (../prior/lag.ts offsetTable), S the prior's
 * standard-deviation profile, no nugget: the derivative of P along one term's length or angle
 * (./termDerivative.ts), by the side's route: the dense assembly, the lag-table projection, or circulant
 * products with the function's own embedding (./projected.ts structuredProjection with `kernel`).
 */
export function sideOffsetProjection(side: DataSide, prior: PriorSpec, f: OffsetFunction): Matrix {
  const { problem } = side;
  const route = projectionRoute(problem, prior, side.route);
  if (route === 'fft') return structuredProjection(side.structured, prior, f);
  const table = offsetTable(problem.grid, f);
  if (route === 'lag') return projectLagTable(problem.operator, problem.grid, table, prior.stdProfile);
  const { nugget: _none, ...kernelPart } = prior;
  return projectCovariance(problem.operator, assembleCovariance(kernelPart, table));
}

/** P = G Cm Gᵀ by the side's route and spectrum cache. */
export function sideProjection(side: DataSide, prior: PriorSpec): Matrix {
  return projectedPriorCovariance(side.problem, prior, { route: side.route, structured: side.structured });
}

/** The prior-dependent data-space pieces for one prior. */
export interface PriorDataSpace {
  /** d − G m0. */
  readonly residual: Float64Array;
  /** G Cm Gᵀ. */
  readonly projected: Matrix;
}

/** r = d − G m0 for `prior` (validates the mean). */
export function priorResidual(side: DataSide, prior: PriorSpec): Float64Array {
  const { grid, operator, data } = side.problem;
  const gm0 = applyOperator(operator, meanVector(grid, prior));
  const residual = new Float64Array(side.dataCount);
  for (let i = 0; i < residual.length; i++) residual[i] = data.values[i] - gm0[i];
  return residual;
}

/**
 * r = d − G m0 and P = G Cm Gᵀ for `prior` (validated by the projection), P by
 * {@link projectedPriorCovariance} with the side's spectrum cache.
 */
export function priorDataSpace(side: DataSide, prior: PriorSpec): PriorDataSpace {
  const projected = sideProjection(side, prior);
  return { residual: priorResidual(side, prior), projected };
}

/** The Gaussian log density log N(r; 0, K) and the pieces it was made of. */
export interface GaussianLogDensity {
  readonly logDensity: number;
  /** rᵀ K⁻¹ r. */
  readonly quadratic: number;
  /** log |K|. */
  readonly logDet: number;
  /** Lower Cholesky factor of K. */
  readonly factor: Matrix;
  /** w = L⁻¹ r (so rᵀK⁻¹r = wᵀw). */
  readonly whitened: Float64Array;
}

/**
 * log N(r; 0, K) = −½ rᵀK⁻¹r − ½ log|K| − (M/2) log 2π by Cholesky (Rasmussen & Williams 2006,
 * Algorithm 2.1). Returns null when K does not factor (not positive definite in floating point).
 */
export function gaussianLogDensity(k: Matrix, r: ArrayLike<number>): GaussianLogDensity | null {
  const f = cholesky(k);
  if (!f.ok) return null;
  const w = solveLower(f.factor, r);
  let q = 0;
  for (let i = 0; i < w.length; i++) q += w[i] * w[i];
  const logDet = logDetFromCholesky(f.factor);
  return { logDensity: -0.5 * q - 0.5 * logDet - 0.5 * r.length * LOG_2PI, quadratic: q, logDet, factor: f.factor, whitened: w };
}

/** K = G Cm Gᵀ + Cd for a prior, factored; throws NotPositiveDefiniteError naming the prior when it fails. */
export function logEvidenceOf(side: DataSide, prior: PriorSpec): GaussianLogDensity & { readonly space: PriorDataSpace } {
  const space = priorDataSpace(side, prior);
  const g = gaussianLogDensity(addMatrices(space.projected, side.cd), space.residual);
  if (g === null)
    throw new NotPositiveDefiniteError('data-space covariance G Cm Gᵀ + Cd', 0, 'the prior gives an indefinite covariance; add a nugget');
  return { ...g, space };
}

/** Throws InputError unless `index` names a term of the prior. */
export function checkTermIndex(prior: PriorSpec, index: number, field = 'term'): void {
  if (!Number.isInteger(index) || index < 0 || index >= prior.terms.length) {
    throw new InputError(field, `an integer from 0 to ${prior.terms.length - 1} (the prior has ${prior.terms.length} terms)`, index);
  }
}

/** True when the kernel module evaluates the Matérn kernel at a non-half-integer ν (general ν available). */
export function generalMaternAvailable(): boolean {
  try {
    // The probe ν = 1.3 is arbitrary; any non-closed-form order would do.
    return Number.isFinite(
      covarianceMatrix(
        { shape: [2], spacing: [1] },
        { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.3, variance: 1, length: 1 }] },
      ).data[1],
    );
  } catch {
    return false;
  }
}

/** Check the control's abort flag. */
export function aborted(control: TuningControl | undefined): boolean {
  return control?.signal?.aborted === true;
}
