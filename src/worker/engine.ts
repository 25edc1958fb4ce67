/**
 * The worker's computing side, free of worker globals so that it runs (and is tested) in Node:
 * keeps the current problem and the factorised posterior of the latest prior, and answers one
 * request at a time by calling the numerical core.
 */
import { START_PRIOR_RULE_TEXT, startPriorRule, startPriorShape } from '../core/tuning/startPrior.ts';
import { DEMOS } from '../core/problems/demos.ts';
import { gridProblem, isGridProblem, type Problem } from '../core/problems/spec.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import { cellCount, type Geometry } from '../core/grid/grid.ts';
import { operatorColumnAbsSums, operatorEntries } from '../core/linalg/operator.ts';
import { diagnosePriorAuto } from '../core/prior/structuredDiagnostics.ts';
import { structuredPosteriorDraws, structuredResolutionRow } from '../core/inverse/structuredDraws.ts';
import { wasmGemmAvailable } from '../core/wasm/gemmNT.ts';
import { wasmAvailable } from '../core/wasm/varianceBlock.ts';
import { covarianceMatrix, meanVector } from '../core/prior/covariance.ts';
import { priorRealisations } from '../core/sampling/realisations.ts';
import { posteriorRealisations, preparePosterior, resolutionRow, type PosteriorState } from '../core/inverse/posterior.ts';
import { assertNever, InputError, NotPositiveDefiniteError } from '../core/errors.ts';
import { cholesky } from '../core/linalg/cholesky.ts';
import { choosePosteriorPath } from '../core/inverse/auto.ts';
import {
  completeWithShapeProducts,
  hasCovarianceShape,
  type ShapeProducts,
  structuredDataFit,
  structuredProblem,
  type StructuredProblem,
} from '../core/inverse/structured.ts';
import { varianceFlops, type BlockPool } from '../core/parallel/blocks.ts';
import { computePosterior, prepareStructured, structuredProducts } from '../core/inverse/compute.ts';
import type { StructuredPosteriorState } from '../core/inverse/structured.ts';
import {
  serialiseError,
  transferables,
  type PosteriorPartial,
  type WorkerReply,
  type ProblemView,
  type RequestKind,
  type ResultMap,
  type WorkerRequest,
} from './protocol.ts';
import { isTuningRequest, runTuning } from './tuning.ts';

/** Largest N for which the dense covariance is sent to the UI as a heat map. */
export const COVARIANCE_VIEW_LIMIT = 400;
/**
 * Largest N for which the dense Cm or its Cholesky factor is exported: 4096 cells, a 128 MiB
 * float64 matrix (held about three times while it is built, factored and saved).
 */
export const COVARIANCE_EXPORT_LIMIT = 4096;
/** Largest number of realisations one request may ask for (the export asks for as many as the user chooses). */
export const MAX_DRAWS = 10_000;
/** Largest draws × cells one request may return: 2²⁴ numbers, 128 MiB of float64 (the browser holds it twice while saving). */
export const MAX_DRAW_NUMBERS = 2 ** 24;

export type ProgressFn = (stage: string, fraction: number) => void;
/** Receives the first part of a posterior result (see {@link Engine.handle}). */
export type PartialFn = (partial: PosteriorPartial) => void;

/**
 * Smallest variance-solve work (multiply-adds, src/core/parallel/blocks.ts varianceFlops = M²N/2)
 * for which the FFT path sends the mean ahead of the bands. Measured rate on the project machine
 * (blocks.ts: 64², M = 400, 3.3e8 in 218–292 ms) is about 1.3e9 per second, so 5e7 is ≈ 40 ms of
 * bands still to come: below that the second draw would follow the first within a frame or two
 * and only cost main-thread time (crosshole demo, 3.4e7: no partial; 64², M = 400: partial).
 */
export const PARTIAL_MIN_FLOPS = 5e7;

/**
 * The mean-only part of the FFT-path posterior, with fresh arrays (the state keeps its own, which
 * the final summary reuses). The data fit is src/core/inverse/structured.ts structuredDataFit, as in
 * structuredPosteriorSummary, so both agree bit for bit (test/worker/engine.test.ts checks that).
 */
export function structuredPartial(st: StructuredPosteriorState): PosteriorPartial {
  const { problem, mean, priorVariance } = st;
  const n = mean.length;
  const m = problem.data.values.length;
  const { predicted, residuals, chi2 } = structuredDataFit(st);
  const priorStd = new Float64Array(n);
  for (let i = 0; i < n; i++) priorStd[i] = Math.sqrt(priorVariance[i]);
  return {
    path: 'fft',
    mean: mean.slice(),
    priorMean: st.m0.slice(),
    priorStd,
    predicted,
    residuals,
    chi2,
    dataCount: m,
    parameterCount: n,
  };
}

function sigmaOf(problem: Problem<Geometry>): Float64Array {
  const { sigma, covariance } = problem.data;
  if (sigma) return sigma.slice();
  if (covariance) {
    const m = covariance.rows;
    const out = new Float64Array(m);
    for (let i = 0; i < m; i++) out[i] = Math.sqrt(covariance.data[i * m + i]);
    return out;
  }
  throw new InputError('problem.data', 'sigma or covariance', undefined);
}

export function problemView(
  problem: Problem<Geometry>,
  version: number,
  extra: {
    demoId: string | null;
    description: string;
    startPrior: PriorSpec | null;
    truthPrior: PriorSpec | null;
    startRule?: string | null;
  },
): ProblemView {
  const g = problem.operator;
  return {
    version,
    demoId: extra.demoId,
    title: problem.title ?? 'Untitled problem',
    description: extra.description,
    // Every array the view holds is its own copy: the reply's buffers are transferred to the page (protocol.ts
    // transferables), and the worker keeps the problem's (a cell list's centres, the data geometry).
    grid: structuredClone(problem.grid),
    dataCount: problem.data.values.length,
    values: problem.data.values.slice(),
    sigma: sigmaOf(problem),
    truth: problem.truth ? problem.truth.slice() : null,
    coverage: operatorColumnAbsSums(g),
    operatorKind: g.kind,
    operatorNonZeros: operatorEntries(g).length,
    quantity: { name: problem.quantity?.name ?? 'value', unit: problem.quantity?.unit ?? '' },
    dataUnit: problem.data.unit ?? '',
    geometry: problem.data.geometry ? structuredClone(problem.data.geometry) : null,
    startPrior: extra.startPrior,
    startRule: extra.startRule ?? null,
    truthPrior: extra.truthPrior,
    numericKernels: wasmAvailable() && wasmGemmAvailable() ? 'WebAssembly SIMD' : 'JavaScript',
  };
}

/** Optional thread pool for the FFT path's products and standard deviations (src/worker/pool.ts lazyPool in the browser). */
export interface EngineOptions {
  readonly pool?: { get(): BlockPool; readonly threads: number };
  /** Variance work from which a partial posterior is sent ({@link PARTIAL_MIN_FLOPS} by default; 0: always on the FFT path). */
  readonly partialMinFlops?: number;
}

export class Engine {
  private problem: Problem<Geometry> | null = null;
  private version = -1;
  private cached: { key: string; state: PosteriorState } | null = null;
  /** FFT path: the problem with its cached row spectra, so a prior change costs only the inverse transforms. */
  private structured: StructuredProblem | null = null;
  /** FFT path: the factored state of the latest prior asked for draws or resolution rows (no std). */
  private structuredCached: { key: string; state: StructuredPosteriorState } | null = null;
  /**
   * The FFT route's Bᵀ for the starting rule's correlation (src/core/inverse/structured.ts covarianceShape),
   * computed when the problem arrives: the rule fits its variance from it, and the first posterior of a prior
   * with that shape (the starting prior) takes it over instead of computing the products again.
   */
  private shapeProducts: ShapeProducts | null = null;

  /** Whether products from the problem's arrival are waiting for their first posterior (for tests). */
  get holdsStartProducts(): boolean {
    return this.shapeProducts !== null;
  }

  constructor(private readonly options: EngineOptions = {}) {}

  get problemVersion(): number {
    return this.version;
  }

  private requireProblem(problemVersion: number): Problem<Geometry> {
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

  /**
   * The FFT-path state (Bᵀ, L, mean) of (problem, prior), cached for the latest prior: the
   * posterior computes it, draws and resolution rows of the same prior reuse it. The Bᵀ products
   * are split over the pool when src/core/parallel/products.ts finds it worthwhile (same bits as
   * one thread); one StructuredProblem per problem, so each thread finds its row spectra again.
   */
  private async structuredState(problemVersion: number, prior: PriorSpec, progress: ProgressFn): Promise<StructuredPosteriorState> {
    const problem = this.requireProblem(problemVersion);
    const key = `${problemVersion}:${JSON.stringify(prior)}`;
    if (this.structuredCached?.key === key) return this.structuredCached.state;
    progress('posterior mean (FFT path)', 0.1);
    const sp = this.structured ?? (this.structured = structuredProblem(gridProblem(problem, 'the FFT route')));
    const pool = this.options.pool;
    // The products kept from the problem's arrival serve one posterior of their shape, then go.
    const kept = this.shapeProducts;
    this.shapeProducts = null;
    const state =
      kept !== null && hasCovarianceShape(kept, prior)
        ? completeWithShapeProducts(kept, prior)
        : await prepareStructured(sp, prior, pool && { get: () => pool.get(), threads: pool.threads });
    this.structuredCached = { key, state };
    return state;
  }

  /**
   * Answer one request. A posterior on the FFT path whose bands take a while (see
   * {@link PARTIAL_MIN_FLOPS}) calls `partial` once with the mean and the data fit right after the
   * factorisation, before the standard deviations are computed; the promise then resolves with the
   * full result as always. Every other request (and the dense path, whose mean and variances come
   * out of one call, src/core/inverse/posterior.ts posteriorSummary) is single-shot.
   */
  async handle<K extends RequestKind>(
    req: Extract<WorkerRequest, { kind: K }>,
    progress: ProgressFn = () => {},
    partial: PartialFn = () => {},
  ): Promise<ResultMap[K]> {
    const r = req as Exclude<WorkerRequest, { kind: 'cancel' }>;
    return (await this.run(r, progress, partial)) as ResultMap[K];
  }

  private async run(
    r: Exclude<WorkerRequest, { kind: 'cancel' }>,
    progress: ProgressFn,
    partial: PartialFn,
  ): Promise<ResultMap[RequestKind]> {
    // Prior selection: chunked, cancellable runs in ./tuning.ts.
    if (isTuningRequest(r))
      return runTuning(gridProblem(this.requireProblem(r.problemVersion), 'prior selection in the workbench'), r, progress);
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
      case 'setProblem': {
        this.setProblemInternal(r.problem, r.version);
        // A starting prior on the problem's own scale (src/core/tuning/startPrior.ts); if the rule
        // cannot be applied the workbench falls back to its generic prior and says why.
        let start: { startPrior: PriorSpec | null; startRule: string | null } = { startPrior: null, startRule: null };
        if (r.startPrior !== false) {
          progress('fitting a starting prior to the data', 0.5);
          try {
            const products = await this.startProducts(r.problem);
            const rule = startPriorRule(
              r.problem,
              products ? { products: products.Bt } : this.structured ? { structured: this.structured } : {},
            );
            start = { startPrior: rule.prior, startRule: `${START_PRIOR_RULE_TEXT} Here: ${rule.explanation}` };
          } catch (e) {
            this.shapeProducts = null;
            start = {
              startPrior: null,
              startRule: `The starting-prior rule could not be applied (${e instanceof Error ? e.message : String(e)}); the generic prior (mean 0, variance 1) is used.`,
            };
          }
        }
        return problemView(r.problem, r.version, { demoId: null, description: '', truthPrior: null, ...start });
      }
      case 'posterior': {
        // Route and threads by src/core/inverse/compute.ts (FFT for stationary priors on grids of
        // ≥ 128 cells). On the FFT route the mean goes out first (a `partial`), then the bands.
        const problem = this.requireProblem(r.problemVersion);
        const pool = this.options.pool;
        const { summary } = await computePosterior(problem, r.prior, {
          pool: pool && { get: () => pool.get(), threads: pool.threads },
          dense: () => {
            const state = this.state(r.problemVersion, r.prior, progress);
            progress('posterior mean and variance', 0.6);
            return state;
          },
          structured: () => this.structuredState(r.problemVersion, r.prior, progress),
          onPartial: (st) => {
            if (varianceFlops(st.L.rows, st.Bt.cols) >= (this.options.partialMinFlops ?? PARTIAL_MIN_FLOPS)) partial(structuredPartial(st));
            progress('posterior standard deviations', 0.5);
          },
        });
        return { summary, priorMean: meanVector(problem.grid, r.prior) };
      }
      case 'diagnostics':
        // Dense (Cholesky + eigenvalues) on small grids, certified FFT bounds on large stationary
        // ones (src/core/prior/structuredDiagnostics.ts); `eigenvalueMethod` says which ran.
        return diagnosePriorAuto(this.requireProblem(r.problemVersion).grid, r.prior);
      case 'priorDraws': {
        const grid = this.requireProblem(r.problemVersion).grid;
        checkCount(r.count, cellCount(grid));
        return priorRealisations(grid, r.prior, r.count, r.seed);
      }
      case 'posteriorDraws': {
        // Same path rule as the posterior (src/core/inverse/auto.ts): on the FFT path the draws
        // come from the perturbation update with circulant prior draws (no N × N matrix).
        const problem = this.requireProblem(r.problemVersion);
        checkCount(r.count, cellCount(problem.grid));
        if (choosePosteriorPath(problem, r.prior).path === 'fft') {
          return structuredPosteriorDraws(await this.structuredState(r.problemVersion, r.prior, progress), r.count, r.seed).realisations;
        }
        return posteriorRealisations(this.state(r.problemVersion, r.prior, progress), r.count, r.seed);
      }
      case 'resolution': {
        const problem = this.requireProblem(r.problemVersion);
        const n = cellCount(problem.grid);
        if (!Number.isInteger(r.cell) || r.cell < 0 || r.cell >= n) {
          throw new InputError('cell', `an integer cell index from 0 to ${n - 1}`, r.cell);
        }
        if (choosePosteriorPath(problem, r.prior).path === 'fft') {
          return { cell: r.cell, row: structuredResolutionRow(await this.structuredState(r.problemVersion, r.prior, progress), r.cell) };
        }
        return { cell: r.cell, row: resolutionRow(this.state(r.problemVersion, r.prior, progress), r.cell) };
      }
      case 'covariance': {
        const grid = this.requireProblem(r.problemVersion).grid;
        const n = cellCount(grid);
        const limit = r.form === undefined ? COVARIANCE_VIEW_LIMIT : COVARIANCE_EXPORT_LIMIT;
        if (n > limit) {
          throw new InputError(
            r.form === undefined ? 'covariance view' : 'dense Cm export',
            `a grid of at most ${limit} cells (larger grids: the prior file and the production code's own assembly)`,
            n,
          );
        }
        const cm = covarianceMatrix(grid, r.prior);
        if (r.form !== 'cholesky') return cm;
        // The lower factor L with L Lᵀ = Cm, as the production run would draw m0 + L z.
        const f = cholesky(cm, { inPlace: true });
        if (!f.ok) throw new NotPositiveDefiniteError('Cm', f.pivot, 'no Cholesky factor to export; see the positive-definiteness verdict');
        return f.factor;
      }
      default:
        return assertNever(r);
    }
  }

  /**
   * On the FFT route (the posterior of the starting rule's correlation would take it), Bᵀ for that correlation over
   * the pool, kept for the first posterior; null on the dense route (the rule then forms its own projection).
   */
  private async startProducts(problem: Problem<Geometry>): Promise<ShapeProducts | null> {
    // this.structured is set for a problem on a grid (setProblemInternal), null for a cell list.
    if (this.structured === null) return null;
    const shape = startPriorShape(problem.grid);
    if (choosePosteriorPath(problem, shape).path !== 'fft') return null;
    const pool = this.options.pool;
    try {
      this.shapeProducts = await structuredProducts(this.structured, shape, pool && { get: () => pool.get(), threads: pool.threads });
    } catch {
      // Out of memory or a failed thread: the rule forms its own (smaller) projection and reports its own errors.
      this.shapeProducts = null;
    }
    return this.shapeProducts;
  }

  private setProblemInternal(problem: Problem<Geometry>, version: number): void {
    this.problem = problem;
    this.version = version;
    this.cached = null;
    this.structuredCached = null;
    this.shapeProducts = null;
    this.structured = isGridProblem(problem) ? structuredProblem(problem) : null;
  }
}

/**
 * Run one request on the engine and post its replies, in order: progress messages, at most one
 * `partial` (posterior, FFT path), then the `result` or the `error`, all with the request's id.
 * Result and partial buffers go in the transfer list (the partial's are its own copies, so moving
 * them leaves the result intact). The worker entry (./worker.ts) posts through this.
 */
export async function answerRequest(
  engine: Engine,
  job: Exclude<WorkerRequest, { kind: 'cancel' }>,
  post: (reply: WorkerReply, transfer?: ArrayBuffer[]) => void,
): Promise<void> {
  try {
    const result = await engine.handle(
      job,
      (stage, fraction) => post({ type: 'progress', id: job.id, stage, fraction }),
      (partial) => post({ type: 'partial', id: job.id, partial }, transferables(partial)),
    );
    post({ type: 'result', id: job.id, result }, transferables(result));
  } catch (e) {
    post({ type: 'error', id: job.id, error: serialiseError(e) });
  }
}

function checkCount(count: number, cells: number): void {
  const most = Math.max(1, Math.min(MAX_DRAWS, Math.floor(MAX_DRAW_NUMBERS / cells)));
  if (!Number.isInteger(count) || count < 1 || count > most) {
    throw new InputError(
      'number of realisations',
      `an integer from 1 to ${most} on this grid of ${cells} cells (at most ${MAX_DRAW_NUMBERS} numbers in all; for more, use priorscope sample)`,
      count,
    );
  }
}

/** A request made for a problem the worker no longer holds. */
export class StaleProblemError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'StaleProblemError';
  }
}
