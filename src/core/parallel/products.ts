/**
 * Bᵀ = G Cm (M × N), the main cost of the FFT-path posterior mean, split across threads (pure: no
 * worker or Node imports; the pools live in ./node.ts and src/worker/pool.ts).
 *
 * Row k of Bᵀ is s ⊙ C(s ⊙ g_k) + nugget·g_k, computed for the prior's covariance shape (../inverse/structured.ts
 * covarianceShape; the caller scales) two data rows per complex transform by
 * circulant embedding (../inverse/structured.ts computeBtPairs; Tarantola 2005, Inverse Problem
 * Theory, §3.2 for the posterior it feeds). The pairs (in pairOrder) split into contiguous ranges,
 * one per thread; each range's rows come from the same arithmetic as in the single-thread
 * prepareStructuredPosterior (a pair depends on its two rows, the grid and the prior only, and every
 * thread builds the same CirculantProduct from the same plain data), so the result equals the
 * single-thread one bit for bit. With Bᵀ shared and G sparse the threads also form K = G Bᵀᵀ, each in its own rows'
 * columns (the same sums as the caller's, so the same bits); K's factor and the mean then run on the caller
 * (completeStructuredPosterior).
 *
 * Choices (measured on the 2-core project machine, see test/bench/cases/parallel.ts and
 * {@link MIN_PRODUCT_SPLIT_WORK}):
 * - the caller computes one share itself while the pool's other threads compute the rest: on T
 *   threads the pool's ports 0 … T − 2 get a share each (no thread sits idle, one transfer less);
 * - each thread keeps the full 2-D spectra of its own pairs (and the problem's G) keyed by a problem
 *   token, the padding, the std profile and its rows, within its share of the problem's memory
 *   budget, so a prior change sends only the prior and the row list; tasks are pinned to their port
 *   so the cache is found again;
 * - Bᵀ lives in a SharedArrayBuffer when the runtime allows it (Node always; browsers only when
 *   crossOriginIsolated): the threads write their rows in place. Otherwise each thread returns its
 *   rows (transferred, not copied) and the caller copies them into Bᵀ.
 *
 * PUBLIC API: ProductsTask, ProductsResult, ProductsThreadState, ParallelProductsOptions, runProductsTask, pairRanges,
 * sharedMemoryAvailable, productWork, MIN_PRODUCT_SPLIT_WORK, productsWorthSplitting,
 * prepareStructuredPosteriorParallel, structuredShapeProductsParallel.
 */
import type { Grid } from '../grid/grid.ts';
import { CirculantProduct } from '../fft/covariance.ts';
import { sparseGramLowerInto, type Operator } from '../linalg/operator.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { mirrorLowerToUpper } from '../linalg/products.ts';
import {
  completeStructuredPosterior,
  computeBtPairs,
  finishBtRows,
  lagShapeRows,
  structuredProblem,
  structuredSetup,
  type ShapeProducts,
  type StructuredPosteriorState,
  type StructuredSetup,
  type StructuredProblem,
} from '../inverse/structured.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import { lagTable } from '../prior/lag.ts';
import { circulantWork, lagWork } from '../inverse/lagProducts.ts';
import type { BlockPool } from './blocks.ts';
import type { ProductsResult, ProductsTask } from './tasks.ts';

interface ThreadCache {
  readonly token: number;
  readonly px: number;
  readonly py: number;
  readonly pz: number;
  readonly profile: Float64Array | null;
  readonly rows: Int32Array;
  readonly spectra: Float64Array[];
}

/** What one thread keeps between products tasks: the latest problem's G and its spectra. */
export class ProductsThreadState {
  problem: { readonly token: number; readonly operator: Operator } | null = null;
  cache: ThreadCache | null = null;
}

function sameValues(a: ArrayLike<number> | null, b: ArrayLike<number> | null | undefined): boolean {
  if (a === null || b === null || b === undefined) return a === null && (b === null || b === undefined);
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

function cellsOf(grid: Grid): number {
  let n = 1;
  for (const k of grid.shape) n *= k;
  return n;
}

/**
 * Computes one share into `bt` at row slots `slots` (the worker side; the caller runs its own share
 * through it too). Throws when the task has no operator and the thread holds none for its token.
 */
function productsInto(
  task: ProductsTask,
  state: ProductsThreadState,
  bt: Float64Array,
  slots: Int32Array,
  setup?: Pick<StructuredSetup, 'cp' | 'table'>,
): Omit<ProductsResult, 'rows'> {
  if (task.operator !== null) {
    if (state.problem?.token !== task.token) state.cache = null;
    state.problem = { token: task.token, operator: task.operator };
  }
  if (state.problem === null || state.problem.token !== task.token) {
    throw new Error(`products task: this thread holds no operator for problem token ${task.token} (send the operator with the task)`);
  }
  const g = state.problem.operator;
  const s = task.prior.stdProfile;
  if (task.lag) {
    const t0 = now();
    // The caller passes the table it already built for the same grid and prior.
    lagShapeRows(setup?.table ?? lagTable(task.grid, task.prior.terms), g, s, task.prior.nugget ?? 0, task.rows, slots, bt);
    gramColumns(task, g, bt);
    return { spectraCached: false, spectra: 0, products: now() - t0 };
  }
  // The caller passes the product it already built for the same grid and prior.
  const cp = setup?.cp ?? new CirculantProduct(task.grid, task.prior);
  const c = state.cache;
  const hit =
    c !== null &&
    c.token === task.token &&
    c.px === cp.px &&
    c.py === cp.py &&
    c.pz === cp.pz &&
    sameValues(c.profile, s) &&
    sameValues(c.rows, task.rows);
  if (!hit) state.cache = null;
  const pairs = Math.ceil(task.rows.length / 2);
  const fits = pairs * cp.columnSpectrumLength * 8 <= task.cacheBytes;
  const save: Float64Array[] | null = !hit && fits ? [] : null;
  const t = computeBtPairs(cp, g, s, task.rows, slots, bt, hit ? c.spectra : null, save);
  if (save !== null) {
    state.cache = {
      token: task.token,
      px: cp.px,
      py: cp.py,
      pz: cp.pz,
      profile: s === undefined ? null : Float64Array.from(s),
      rows: task.rows.slice(),
      spectra: save,
    };
  }
  const tFix = now();
  finishBtRows(g, s, task.prior.nugget ?? 0, task.rows, slots, bt, cellsOf(task.grid));
  gramColumns(task, g, bt);
  return { spectraCached: hit, spectra: t.spectra, products: t.products + now() - tFix };
}

/**
 * This share's columns of the lower triangle of K = G Bᵀᵀ into the task's shared `gram`, from its finished rows of Bᵀ
 * (row k at k·N in `bt`, the shared layout). Columns in ascending order so that each group of eight sweeps few rows of
 * G it does not need.
 */
function gramColumns(task: ProductsTask, g: Operator, bt: Float64Array): void {
  if (task.gram === null) return;
  if (g.kind !== 'sparse') throw new RangeError('products task: K columns in the threads need a sparse operator');
  sparseGramLowerInto(g.matrix, bt, null, task.rows.slice().sort(), new Float64Array(task.gram));
}

/** What a pool thread does with a products task (./pool.ts answerTask calls this). */
export function runProductsTask(task: ProductsTask, state: ProductsThreadState): ProductsResult {
  const n = cellsOf(task.grid);
  if (task.out !== null) {
    const bt = new Float64Array(task.out);
    return { rows: null, ...productsInto(task, state, bt, task.rows) };
  }
  const rows = new Float64Array(task.rows.length * n);
  const slots = new Int32Array(task.rows.length);
  for (let i = 0; i < slots.length; i++) slots[i] = i;
  return { rows, ...productsInto(task, state, rows, slots) };
}

/** [p0, p1) ranges covering 0 … pairs − 1 in `parts` nearly equal contiguous pieces (fewer when pairs < parts). */
export function pairRanges(pairs: number, parts: number): [number, number][] {
  const k = Math.max(1, Math.min(parts, pairs));
  const out: [number, number][] = [];
  let p0 = 0;
  for (let q = 0; q < k; q++) {
    const p1 = Math.round(((q + 1) * pairs) / k);
    if (p1 > p0) out.push([p0, p1]);
    p0 = p1;
  }
  return out;
}

/** Whether Bᵀ can live in a SharedArrayBuffer that workers write (Node: yes; browsers: crossOriginIsolated only). */
export function sharedMemoryAvailable(): boolean {
  const g = globalThis as { crossOriginIsolated?: boolean };
  return typeof SharedArrayBuffer === 'function' && g.crossOriginIsolated !== false;
}

/**
 * Work of the products in points transformed: ⌈M/2⌉ pairs × px × py × pz (the embedding size; each
 * pair costs a few passes over it; pz = 1 below 3-D).
 */
export function productWork(m: number, shape: readonly number[]): number {
  return circulantWork(m, shape);
}

/**
 * Below this much {@link productWork} the split does not pay for a repeated call on the project
 * machine. Measured with test/bench/cases/parallel.ts (2 shared cores, other developers' jobs
 * running, Node 20; 2-thread pool already started; caller + 1 worker, shared Bᵀ; interleaved
 * runs, median / min of 7–11, ms; one thread → split):
 *
 *   case (work)                              mean cold                 mean after a prior change
 *   32² M = 400 (8.2e5)                      50 / 35 → 38 / 30         24 / 23 → 26 / 21 (cached)
 *   64² M = 100 (8.2e5)                      —                         18 / 16 → 18 / 15 (cached)
 *   64² M = 400 (3.3e6)                      178 / 139 → 184 / 98      86 / 71 → 88 / 66 (cached)
 *   128² M = 400 (1.3e7, over the budget)    549 / 519 → 468 / 347     558 / 487 → 344 / 299
 *   64² M = 800 (6.6e6, over the budget)     —                         312 → 220 (median of 11)
 *
 * So the cold products split well from 64² on, but with cached spectra (the interactive case: a
 * prior change) the split gains nothing at 64²; at 128² (spectra recomputed: over the 64 MB
 * budget) it is 1.6× on the median. The threshold sits between: 64² M = 400 stays on one thread,
 * 128² splits. Mean + std with both splits: 64² 367 / 310 → 354 / 236, 128² 1525 / 1286 →
 * 1099 / 890. Rows transferred back instead of a shared Bᵀ: 64² cached 98 / 69, 128² 370 / 314
 * (a little slower than shared, 88 / 66 and 344 / 299). The caller idle (2 workers): 64² cold
 * 139 / 99 against 184 / 98, 128² 451 / 340 against 468 / 347 (no clear difference; the caller
 * share keeps a worker free for other work and costs no transfer). Starting a 2-thread pool
 * (worker threads + tsx's loader): 380–670 ms, so a one-shot run (the CLI) starts one only when
 * the std split needs it anyway.
 */
export const MIN_PRODUCT_SPLIT_WORK = 5e6;

/**
 * Whether splitting the products over `threads` threads (a pool already running) is worth it ({@link MIN_PRODUCT_SPLIT_WORK}).
 * `lagRows`: the operator, when its rows are lag sums (../inverse/structured.ts rowsByLagSums); their work
 * (../inverse/lagProducts.ts lagWork, in the same unit) is then what counts, not the transforms they replace.
 */
export function productsWorthSplitting(m: number, shape: readonly number[], threads: number, lagRows?: Operator): boolean {
  const work = lagRows === undefined ? productWork(m, shape) : lagWork(lagRows, shape);
  return threads > 1 && work >= MIN_PRODUCT_SPLIT_WORK;
}

let nextToken = 1;
const tokens = new WeakMap<StructuredProblem, number>();
/** Per caller-side problem holder: the caller's own thread state (its share's spectra). */
const callerStates = new WeakMap<StructuredProblem, ProductsThreadState>();
/** Per pool: the problem token whose operator each port last received. */
const sentTokens = new WeakMap<BlockPool, (number | undefined)[]>();

export interface ParallelProductsOptions {
  /** The caller computes one share (default true); false: all shares go to the pool. */
  readonly callerShare?: boolean;
  /** Bᵀ in a SharedArrayBuffer (default {@link sharedMemoryAvailable}); false: rows are transferred back. */
  readonly shared?: boolean;
}

/**
 * As prepareStructuredPosterior (../inverse/structured.ts), with the Bᵀ products split over the
 * pool (and the caller): the returned state equals the single-thread one bit for bit (Bᵀ, L, α,
 * mean). Pass the same StructuredProblem on each call so the threads' spectra caches are found
 * again. Rejects with the same InputError / NotPositiveDefiniteError as the single-thread version,
 * and with `products worker: …` when a thread fails.
 */
export async function prepareStructuredPosteriorParallel(
  sp: StructuredProblem | Problem,
  prior: PriorSpec,
  pool: BlockPool,
  options: ParallelProductsOptions = {},
): Promise<StructuredPosteriorState> {
  const p = await structuredShapeProductsParallel(sp, prior, pool, options);
  return completeStructuredPosterior(p);
}

/**
 * As ../inverse/structured.ts structuredShapeProducts (the shape's Bᵀ, not yet scaled), with the
 * products split over the pool (and the caller): the same bits as one thread.
 */
export async function structuredShapeProductsParallel(
  sp: StructuredProblem | Problem,
  prior: PriorSpec,
  pool: BlockPool,
  options: ParallelProductsOptions = {},
): Promise<ShapeProducts> {
  const holder = 'cacheBytes' in sp ? sp : structuredProblem(sp);
  const setup = structuredSetup(holder, prior);
  // The threads keep this problem's spectra now; the single-thread cache would only hold memory.
  holder.cache = null;
  const { problem, n, m, order } = setup;
  const callerShare = options.callerShare ?? true;
  const shared = options.shared ?? sharedMemoryAvailable();
  const pairs = Math.ceil(m / 2);
  const workers = callerShare ? pool.size - 1 : pool.size;
  const ranges = pairRanges(pairs, workers + (callerShare ? 1 : 0));
  let token = tokens.get(holder);
  if (token === undefined) tokens.set(holder, (token = nextToken++));
  let sent = sentTokens.get(pool);
  if (sent === undefined) sentTokens.set(pool, (sent = []));

  // The caller's share below runs without yielding: the threads must be running before it starts.
  await pool.started?.();
  const t0 = now();
  const sab = shared ? new SharedArrayBuffer(m * n * 8) : null;
  // With Bᵀ shared and G sparse, each thread also fills K = G Bᵀᵀ's lower triangle in its own rows' columns once those
  // rows are done, in parallel (the caller would otherwise compute all of it after the split: 10 ms at 20³, M = 500).
  const gramSab = sab !== null && problem.operator.kind === 'sparse' ? new SharedArrayBuffer(m * m * 8) : null;
  const Bt: Matrix = sab !== null ? { rows: m, cols: n, data: new Float64Array(sab) } : matrix(m, n);
  const rowsOf = ([p0, p1]: [number, number]) => order.slice(2 * p0, Math.min(m, 2 * p1));
  const share = (rows: Int32Array, out: SharedArrayBuffer | null, operator: Operator | null): ProductsTask => ({
    kind: 'products',
    token: token!,
    grid: problem.grid,
    prior: setup.shape,
    operator,
    rows,
    cacheBytes: Math.floor((holder.cacheBytes * rows.length) / m),
    out,
    lag: setup.cp === null,
    gram: gramSab,
  });
  // Worker shares are posted first (the caller's share then runs while they work).
  const own = callerShare ? ranges[0] : null;
  const remote = ranges.slice(callerShare ? 1 : 0);
  const jobs = remote.map((range, port) => {
    const rows = rowsOf(range);
    const known = sent![port] === token;
    sent![port] = token;
    return pool
      .runProducts(share(rows, sab, known ? null : problem.operator), port)
      .then((result) => ({ rows, result }))
      .catch((e: unknown) => {
        sent![port] = undefined;
        throw e;
      });
  });
  let spectra = 0;
  let cached = true;
  if (own !== null) {
    let state = callerStates.get(holder);
    if (state === undefined) callerStates.set(holder, (state = new ProductsThreadState()));
    const rows = rowsOf(own);
    try {
      const r = productsInto(share(rows, null, problem.operator), state, Bt.data, rows, setup);
      spectra = r.spectra;
      cached = r.spectraCached;
    } catch (e) {
      await Promise.allSettled(jobs);
      throw e;
    }
  }
  const results = await Promise.all(jobs);
  for (const { rows, result } of results) {
    spectra = Math.max(spectra, result.spectra);
    cached &&= result.spectraCached;
    if (result.rows !== null) {
      for (let i = 0; i < rows.length; i++) Bt.data.set(result.rows.subarray(i * n, (i + 1) * n), rows[i] * n);
    }
  }
  const gram = gramSab === null ? undefined : mirrorLowerToUpper({ rows: m, cols: m, data: new Float64Array(gramSab) });
  // Wall time of the split stage; `spectra` is the longest thread's spectra time.
  const wall = now() - t0;
  const times = { spectra, products: wall - spectra };
  return gram === undefined ? { setup, Bt, spectraCached: cached, times } : { setup, Bt, spectraCached: cached, times, gram };
}

function now(): number {
  return typeof performance !== 'undefined' ? performance.now() : Date.now();
}
