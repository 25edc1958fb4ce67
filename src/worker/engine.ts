/**
 * The worker's computing side, free of worker globals so that it runs (and is tested) in Node:
 * keeps the current problem and the factorised posterior of the latest prior, and answers one
 * request at a time by calling the numerical core.
 */
import { DEMOS } from '../core/problems/demos.ts';
import type { Problem } from '../core/problems/spec.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import { cellCount } from '../core/grid/grid.ts';
import { diagnosePrior } from '../core/prior/diagnostics.ts';
import { covarianceMatrix, meanVector } from '../core/prior/covariance.ts';
import { priorRealisations } from '../core/sampling/realisations.ts';
import {
  posteriorRealisations,
  posteriorSummary,
  preparePosterior,
  resolutionRow,
  type PosteriorState,
} from '../core/inverse/posterior.ts';
import { InputError } from '../core/errors.ts';
import { choosePosteriorPath } from '../core/inverse/auto.ts';
import {
  prepareStructuredPosterior,
  structuredPosteriorStd,
  structuredPosteriorSummary,
  structuredProblem,
  type StructuredProblem,
} from '../core/inverse/structured.ts';
import { parallelPosteriorStd, worthSplitting, type BlockPool } from '../core/parallel/blocks.ts';
import { chiSquareQuantile } from '../core/inverse/chisquare.ts';
import {
  assertNever,
  type ProblemView,
  type RequestKind,
  type ResultMap,
  type WorkerRequest,
} from './protocol.ts';
import { isTuningRequest, runTuning } from './tuning.ts';

/** Largest N for which the dense covariance is sent to the UI as a heat map. */
export const COVARIANCE_VIEW_LIMIT = 400;
/** Largest number of realisations one request may ask for. */
export const MAX_DRAWS = 64;

export type ProgressFn = (stage: string, fraction: number) => void;

/** Column sums of |G| (how strongly the data see each cell). */
export function coverageOf(problem: Problem): Float64Array {
  const g = problem.operator;
  const out = new Float64Array(g.matrix.cols);
  switch (g.kind) {
    case 'dense': {
      const { rows, cols, data } = g.matrix;
      for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) out[j] += Math.abs(data[i * cols + j]!);
      return out;
    }
    case 'sparse': {
      const { rowPtr, colIdx, values, rows } = g.matrix;
      for (let i = 0; i < rows; i++) for (let p = rowPtr[i]!; p < rowPtr[i + 1]!; p++) out[colIdx[p]!] += Math.abs(values[p]!);
      return out;
    }
    default:
      return assertNever(g);
  }
}

function sigmaOf(problem: Problem): Float64Array {
  const { sigma, covariance } = problem.data;
  if (sigma) return sigma.slice();
  if (covariance) {
    const m = covariance.rows;
    const out = new Float64Array(m);
    for (let i = 0; i < m; i++) out[i] = Math.sqrt(covariance.data[i * m + i]!);
    return out;
  }
  throw new InputError('problem.data', 'sigma or covariance', undefined);
}

export function problemView(
  problem: Problem,
  version: number,
  extra: { demoId: string | null; description: string; startPrior: PriorSpec | null; truthPrior: PriorSpec | null },
): ProblemView {
  const g = problem.operator;
  return {
    version,
    demoId: extra.demoId,
    title: problem.title ?? 'Untitled problem',
    description: extra.description,
    grid: problem.grid,
    dataCount: problem.data.values.length,
    values: problem.data.values.slice(),
    sigma: sigmaOf(problem),
    truth: problem.truth ? problem.truth.slice() : null,
    coverage: coverageOf(problem),
    operatorKind: g.kind,
    operatorNonZeros: g.kind === 'dense' ? g.matrix.rows * g.matrix.cols : g.matrix.values.length,
    quantity: { name: problem.quantity?.name ?? 'value', unit: problem.quantity?.unit ?? '' },
    dataUnit: problem.data.unit ?? '',
    startPrior: extra.startPrior,
    truthPrior: extra.truthPrior,
  };
}

/** Optional thread pool for the FFT path's standard deviations (src/worker/pool.ts lazyPool in the browser). */
export interface EngineOptions {
  readonly pool?: { get(): BlockPool; readonly threads: number };
}

export class Engine {
  private problem: Problem | null = null;
  private version = -1;
  private cached: { key: string; state: PosteriorState } | null = null;
  /** FFT path: the problem with its cached row spectra, so a prior change costs only the inverse transforms. */
  private structured: StructuredProblem | null = null;

  constructor(private readonly options: EngineOptions = {}) {}

  get problemVersion(): number {
    return this.version;
  }

  private requireProblem(problemVersion: number): Problem {
    if (!this.problem) throw new StaleProblemError('no problem has been loaded yet');
    if (problemVersion !== this.version) {
      throw new StaleProblemError(`the request was made for problem ${problemVersion}, the worker holds ${this.version}`);
    }
    return this.problem;
  }

  private state(problemVersion: number, prior: PriorSpec, progress: ProgressFn): PosteriorState {
    const problem = this.requireProblem(problemVersion);
    const key = `${problemVersion}:${JSON.stringify(prior)}`;
    if (this.cached?.key === key) return this.cached.state;
    progress('factorising G Cm Gᵀ + Cd', 0.1);
    const state = preparePosterior(problem, prior);
    this.cached = { key, state };
    return state;
  }

  async handle<K extends RequestKind>(
    req: Extract<WorkerRequest, { kind: K }>,
    progress: ProgressFn = () => {},
  ): Promise<ResultMap[K]> {
    const r = req as Exclude<WorkerRequest, { kind: 'cancel' }>;
    return (await this.run(r, progress)) as ResultMap[K];
  }

  private async run(r: Exclude<WorkerRequest, { kind: 'cancel' }>, progress: ProgressFn): Promise<ResultMap[RequestKind]> {
    // Prior selection (issue 7): chunked, cancellable runs in ./tuning.ts.
    if (isTuningRequest(r)) return runTuning(this.requireProblem(r.problemVersion), r, progress);
    switch (r.kind) {
      case 'loadDemo': {
        const demo = DEMOS.find((d) => d.id === r.demoId);
        if (!demo) {
          throw new InputError('demo', `one of ${DEMOS.map((d) => JSON.stringify(d.id)).join(', ') || '(no demos built yet)'}`, r.demoId);
        }
        progress('building the demo problem', 0.1);
        const built = demo.build();
        this.setProblemInternal(built.problem, r.version);
        return problemView(built.problem, r.version, {
          demoId: demo.id,
          description: demo.description,
          startPrior: built.startPrior,
          truthPrior: built.truthPrior,
        });
      }
      case 'setProblem':
        this.setProblemInternal(r.problem, r.version);
        return problemView(r.problem, r.version, { demoId: null, description: '', startPrior: null, truthPrior: null });
      case 'posterior': {
        // Path by src/core/inverse/auto.ts (FFT for stationary priors on grids of ≥ 128 cells). The
        // protocol has no partial result, so mean and std arrive together.
        const problem = this.requireProblem(r.problemVersion);
        let summary;
        if (choosePosteriorPath(problem, r.prior).path === 'fft') {
          progress('posterior mean (FFT path)', 0.1);
          const st = prepareStructuredPosterior(this.structured ?? (this.structured = structuredProblem(problem)), r.prior);
          progress('posterior standard deviations', 0.5);
          const pool = this.options.pool;
          const std =
            pool !== undefined && worthSplitting(st.L.rows, st.Bt.cols, pool.threads) ? await parallelPosteriorStd(st, pool.get()) : structuredPosteriorStd(st);
          summary = structuredPosteriorSummary(st, std);
        } else {
          const state = this.state(r.problemVersion, r.prior, progress);
          progress('posterior mean and variance', 0.6);
          summary = posteriorSummary(state);
        }
        // Central 95% interval of χ²_M, divided by M (quantiles from src/core/inverse/chisquare.ts).
        const m = summary.dataCount;
        const chi2Interval: readonly [number, number] | null =
          m > 0 ? [chiSquareQuantile(0.025, m) / m, chiSquareQuantile(0.975, m) / m] : null;
        return { summary, chi2Interval, priorMean: meanVector(problem.grid, r.prior) };
      }
      case 'diagnostics':
        return diagnosePrior(this.requireProblem(r.problemVersion).grid, r.prior);
      case 'priorDraws':
        checkCount(r.count);
        return priorRealisations(this.requireProblem(r.problemVersion).grid, r.prior, r.count, r.seed);
      case 'posteriorDraws':
        checkCount(r.count);
        return posteriorRealisations(this.state(r.problemVersion, r.prior, progress), r.count, r.seed);
      case 'resolution': {
        const state = this.state(r.problemVersion, r.prior, progress);
        const n = cellCount(state.problem.grid);
        if (!Number.isInteger(r.cell) || r.cell < 0 || r.cell >= n) {
          throw new InputError('cell', `an integer cell index from 0 to ${n - 1}`, r.cell);
        }
        return { cell: r.cell, row: resolutionRow(state, r.cell) };
      }
      case 'covariance': {
        const grid = this.requireProblem(r.problemVersion).grid;
        const n = cellCount(grid);
        if (n > COVARIANCE_VIEW_LIMIT) {
          throw new InputError('covariance view', `a grid of at most ${COVARIANCE_VIEW_LIMIT} cells`, n);
        }
        return covarianceMatrix(grid, r.prior);
      }
      default:
        return assertNever(r);
    }
  }

  private setProblemInternal(problem: Problem, version: number): void {
    this.problem = problem;
    this.version = version;
    this.cached = null;
    this.structured = structuredProblem(problem);
  }
}

function checkCount(count: number): void {
  if (!Number.isInteger(count) || count < 1 || count > MAX_DRAWS) {
    throw new InputError('count', `an integer from 1 to ${MAX_DRAWS}`, count);
  }
}

/** A request made for a problem the worker no longer holds. */
export class StaleProblemError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'StaleProblemError';
  }
}
