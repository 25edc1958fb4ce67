/**
 * The one posterior entry of the core, used by the worker engine (src/worker/engine.ts) and the
 * command line (src/cli/commands.ts): the route (dense or FFT, ./auto.ts choosePosteriorPath), the
 * thread split of the FFT route's products and standard deviations, and the FFT route's early
 * mean (`onPartial`) are decided here once. Every route and thread count gives the same numbers to
 * round-off (the thread split gives the same bits; test/core/parallel, test/cli/threads.test.ts).
 */
import { InputError } from '../errors.ts';
import { cellCount, type Geometry, isCellList } from '../grid/grid.ts';
import { MIN_SPLIT_FLOPS, parallelPosteriorStd, varianceFlops, type BlockPool } from '../parallel/blocks.ts';
import { productsWorthSplitting, structuredShapeProductsParallel } from '../parallel/products.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import { choosePosteriorPath, type PathDecision, type PathRequest } from './auto.ts';
import { posteriorSummary, preparePosterior, type PosteriorState } from './posterior.ts';
import {
  completeStructuredPosterior,
  prepareStructuredPosterior,
  rowsByLagSums,
  type ShapeProducts,
  structuredShapeProducts,
  structuredPosteriorStd,
  structuredPosteriorSummary,
  type StructuredPosteriorState,
  type StructuredProblem,
} from './structured.ts';
import type { PosteriorSummary } from './types.ts';

/** Threads for the FFT route. */
export interface PosteriorPool {
  /** The pool; called only when a split is decided, so a caller may start it on the first call. */
  get(): BlockPool;
  readonly threads: number;
  /**
   * Smallest std solve (multiply-adds, ../parallel/blocks.ts varianceFlops) for which the pool is used.
   * Default MIN_SPLIT_FLOPS, measured for a pool that is already running (the browser's); a caller
   * that starts a pool per computation (the command line) sets its own, higher break-even.
   */
  readonly minSplitFlops?: number;
  /** Split the products and the std whatever the size (an explicit thread count). */
  readonly force?: boolean;
}

export interface PosteriorOptions {
  /** 'auto' (default), 'dense' or 'fft'. */
  readonly path?: PathRequest;
  /** Names where the path request came from in the InputError of an impossible 'fft' (e.g. '--path'). */
  readonly field?: string;
  readonly pool?: PosteriorPool;
  /** FFT route: called with the factored state (mean, predicted data) before the standard deviations. */
  readonly onPartial?: (state: StructuredPosteriorState) => void;
  /** The dense route's prepared state, e.g. from a cache (default: prepared here). */
  readonly dense?: () => PosteriorState;
  /** The FFT route's prepared state, e.g. from a cache (default: {@link prepareStructured}). */
  readonly structured?: () => Promise<StructuredPosteriorState>;
}

export interface ComputedPosterior {
  readonly summary: PosteriorSummary;
  readonly decision: PathDecision;
  /** Threads that computed the standard deviations (1 when not split). */
  readonly threadsUsed: number;
}

/** True when the FFT route's std solve of M data on N cells goes over `pool`. */
export function stdSplits(pool: PosteriorPool | undefined, m: number, n: number): pool is PosteriorPool {
  if (pool === undefined || pool.threads < 2) return false;
  return pool.force === true || varianceFlops(m, n) >= (pool.minSplitFlops ?? MIN_SPLIT_FLOPS);
}

/**
 * The FFT route's state (Bᵀ, L, mean); the Bᵀ products go over `pool` when forced or when
 * ../parallel/products.ts productsWorthSplitting says they gain (same bits as one thread).
 */
export async function prepareStructured(
  sp: StructuredProblem | Problem,
  prior: PriorSpec,
  pool?: PosteriorPool,
): Promise<StructuredPosteriorState> {
  const p = await structuredProducts(sp, prior, pool);
  return completeStructuredPosterior(p);
}

/**
 * The FFT route's Bᵀ for the prior's covariance shape (./structured.ts covarianceShape; not yet scaled), over
 * `pool` on the same decision as {@link prepareStructured}; ./structured.ts completeWithShapeProducts turns it
 * into the posterior of any prior of that shape.
 */
export async function structuredProducts(sp: StructuredProblem | Problem, prior: PriorSpec, pool?: PosteriorPool): Promise<ShapeProducts> {
  const problem = 'cacheBytes' in sp ? sp.problem : sp;
  const split =
    pool !== undefined &&
    pool.threads > 1 &&
    (pool.force === true ||
      productsWorthSplitting(
        problem.data.values.length,
        problem.grid.shape,
        pool.threads,
        rowsByLagSums(sp) ? problem.operator : undefined,
      ));
  return split ? structuredShapeProductsParallel(sp, prior, pool.get()) : structuredShapeProducts(sp, prior);
}

/**
 * Posterior mean, standard deviations, data fit and evidence of (problem, prior) through the route
 * `options.path` resolves to. On the FFT route, when the std solve is split, the pool is asked for
 * before the mean (so a pool that starts on demand boots while the mean is computed) and the mean's
 * products go over it too; a pool is never started for the products alone.
 */
export async function computePosterior(
  input: StructuredProblem | Problem<Geometry>,
  prior: PriorSpec,
  options: PosteriorOptions = {},
): Promise<ComputedPosterior> {
  const problem = 'cacheBytes' in input ? input.problem : input;
  const decision = choosePosteriorPath(problem, prior, options.path ?? 'auto', options.field);
  const sp = onGrid(input);
  if (decision.path === 'dense' || sp === null) {
    const state = options.dense ? options.dense() : preparePosterior(problem, prior);
    return { summary: checkedFinite(posteriorSummary(state)), decision, threadsUsed: 1 };
  }
  const pool = options.pool;
  const split = stdSplits(pool, problem.data.values.length, cellCount(problem.grid));
  if (split) pool.get();
  const state = options.structured ? await options.structured() : await prepareStructured(sp, prior, split ? pool : undefined);
  options.onPartial?.(state);
  const std = split ? await parallelPosteriorStd(state, pool.get()) : structuredPosteriorStd(state);
  // A copy of the mean: a caller may transfer the result's buffers while it keeps `state` cached.
  const summary = structuredPosteriorSummary({ ...state, mean: state.mean.slice() }, std);
  return { summary: checkedFinite(summary), decision, threadsUsed: split ? pool.threads : 1 };
}

/** The input when its cells form a regular grid (the FFT route can run), null for a cell list (dense only). */
function onGrid(input: StructuredProblem | Problem<Geometry>): StructuredProblem | Problem | null {
  if ('cacheBytes' in input) return input;
  const g = input.grid;
  return isCellList(g) ? null : { ...input, grid: g };
}

/**
 * The last guard before a result leaves the core: every number of the summary must be finite.
 * The input scale limits (../prior/validate.ts, the problem readers) keep results in range; if a
 * combination of inputs still overflows, the caller gets a message instead of NaN, ±∞ or JSON nulls.
 */
export function checkedFinite<T extends PosteriorSummary>(summary: T): T {
  const arrays: [string, ArrayLike<number> | undefined][] = [
    ['mean', summary.mean],
    ['std', summary.std],
    ['predicted', summary.predicted],
    ['residuals', summary.residuals],
  ];
  for (const [name, a] of arrays) {
    if (!a) continue;
    for (let i = 0; i < a.length; i++) {
      if (!Number.isFinite(a[i])) throw nonFinite(`${name}[${i}]`, a[i]);
    }
  }
  for (const name of ['chi2', 'logEvidence', 'resolutionTrace'] as const) {
    const v = summary[name];
    if (typeof v === 'number' && !Number.isFinite(v)) throw nonFinite(name, v);
  }
  return summary;
}

function nonFinite(where: string, v: number): InputError {
  return new InputError(
    'posterior',
    `finite numbers; ${where} came out ${v} because the scales of the inputs cannot be combined in double precision (check the units of the prior variance and mean, the data and their errors, and the operator)`,
    v,
  );
}

/**
 * {@link computePosterior} on one thread without hooks, synchronously: the same route decision and
 * the same numbers (benchmarks, tests, callers without a pool).
 */
export function computePosteriorSerial(
  input: StructuredProblem | Problem<Geometry>,
  prior: PriorSpec,
  path: PathRequest = 'auto',
  field?: string,
): ComputedPosterior {
  const problem = 'cacheBytes' in input ? input.problem : input;
  const decision = choosePosteriorPath(problem, prior, path, field);
  const sp = onGrid(input);
  if (decision.path === 'dense' || sp === null)
    return { summary: checkedFinite(posteriorSummary(preparePosterior(problem, prior))), decision, threadsUsed: 1 };
  const state = prepareStructuredPosterior(sp, prior);
  return { summary: checkedFinite(structuredPosteriorSummary(state, structuredPosteriorStd(state))), decision, threadsUsed: 1 };
}
