/**
 * Splitting the posterior standard deviations across threads (pure: no worker or Node imports;
 * the pools that run the tasks live in ./node.ts for worker_threads and src/worker/pool.ts for
 * Web Workers).
 *
 * var_j = Cm_jj − Σ_k W_kj², W = L⁻¹ Bᵀ (Tarantola 2005, Inverse Problem Theory, §3.2; see
 * ../inverse/structured.ts): each column j of W depends on column j of Bᵀ and on L only, so the
 * columns split into independent tasks. A task carries L, its columns of Bᵀ (copied contiguous,
 * M × w; or, when Bᵀ is in a SharedArrayBuffer as the split products leave it, Bᵀ itself and L once in shared
 * memory, so nothing of size M × N is copied or sent) and of diag(Cm), and runs ../wasm/varianceBlock.ts wasmVarianceBlock (the bits of
 * ../inverse/varianceBlock.ts structuredVarianceBlock) over blocks of
 * VARIANCE_BLOCK columns, the same blocks the single-thread structuredPosteriorStd uses when the
 * ranges start at multiples of VARIANCE_BLOCK (and each column's arithmetic does not depend on the
 * blocks anyway), so the split result equals the single-thread one bit for bit.
 *
 * PUBLIC API: VarianceTask, BlockPool, columnRanges, isShared, varianceTask, runVarianceTask,
 * parallelPosteriorVariance, parallelPosteriorStd, MIN_SPLIT_FLOPS (used by ../inverse/compute.ts stdSplits).
 */
import { InputError } from '../errors.ts';
import type { Matrix } from '../linalg/matrix.ts';
import { VARIANCE_BLOCK } from '../inverse/varianceBlock.ts';
import { wasmVarianceBlock } from '../wasm/varianceBlock.ts';
import type { ProductsResult, ProductsTask } from './tasks.ts';

/** One unit of work, plain data (structured-clone safe; the Float64Array buffers may be transferred). */
export interface VarianceTask {
  readonly kind: 'variance';
  /** M, the number of data. */
  readonly m: number;
  /** First and one-past-last global column. */
  readonly c0: number;
  readonly c1: number;
  /** L (M × M, row-major; in shared memory when Bᵀ is). */
  readonly L: Float64Array;
  /**
   * Bᵀ's columns: the task's own copy of columns c0 … c1 − 1 (M × (c1 − c0), `cols` = c1 − c0, `first` = 0), or, when
   * Bᵀ lives in a SharedArrayBuffer, the whole M × N Bᵀ itself (`cols` = N, `first` = c0): no copy is made or sent.
   */
  readonly bt: Float64Array;
  readonly cols: number;
  /** The column of `bt` that is global column c0. */
  readonly first: number;
  /** diag(Cm), indexed like the columns of `bt` (the slice c0 … c1 − 1, or all N in shared memory). */
  readonly priorVariance: Float64Array;
}

/** Something that runs variance and products tasks on other threads (./pool.ts portPool). */
export interface BlockPool {
  /** Number of threads. */
  readonly size: number;
  /** Posterior variances of the task's columns (length c1 − c0), on the next free thread. */
  run(task: VarianceTask): Promise<Float64Array>;
  /** Rows of Bᵀ (./products.ts) on thread `port` (0 … size − 1), which keeps that share's spectra. */
  runProducts(task: ProductsTask, port: number): Promise<ProductsResult>;
  /** Ends the threads; pending tasks are rejected. */
  close(): Promise<void>;
  /**
   * Resolves once every thread has answered (at once after the first time). A caller inside a Web Worker awaits it
   * before a long synchronous share of its own: until then the threads it started may not have loaded.
   */
  started?(): Promise<void>;
}

/**
 * [c0, c1) ranges covering 0 … n − 1 in `parts` nearly equal pieces whose starts are multiples of
 * `align` (fewer pieces when n is small). Pure.
 */
export function columnRanges(n: number, parts: number, align = VARIANCE_BLOCK): [number, number][] {
  if (!Number.isInteger(parts) || parts < 1) throw new InputError('parts', 'an integer ≥ 1', parts);
  const blocks = Math.ceil(n / align);
  const k = Math.max(1, Math.min(parts, blocks));
  const out: [number, number][] = [];
  let b0 = 0;
  for (let p = 0; p < k; p++) {
    const b1 = Math.round(((p + 1) * blocks) / k);
    if (b1 > b0) out.push([b0 * align, Math.min(n, b1 * align)]);
    b0 = b1;
  }
  return out;
}

/** True when `a` is a view of a SharedArrayBuffer (threads read it in place). */
export function isShared(a: Float64Array): boolean {
  return typeof SharedArrayBuffer === 'function' && a.buffer instanceof SharedArrayBuffer;
}

/**
 * The task for columns [c0, c1). When Bᵀ is in shared memory the task refers to it (and to `sharedL`, L's copy in
 * shared memory, when given); otherwise it copies its slices of Bᵀ and diag Cm, and L.
 */
export function varianceTask(
  L: Matrix,
  Bt: Matrix,
  priorVariance: Float64Array,
  c0: number,
  c1: number,
  sharedL?: Float64Array,
): VarianceTask {
  const m = Bt.rows;
  const n = Bt.cols;
  const l = sharedL ?? L.data.slice();
  if (isShared(Bt.data)) return { kind: 'variance', m, c0, c1, L: l, bt: Bt.data, cols: n, first: c0, priorVariance };
  const w = c1 - c0;
  const bt = new Float64Array(m * w);
  for (let k = 0; k < m; k++) bt.set(Bt.data.subarray(k * n + c0, k * n + c1), k * w);
  return { kind: 'variance', m, c0, c1, L: l, bt, cols: w, first: 0, priorVariance: priorVariance.slice(c0, c1) };
}

/** Runs one task on this thread: the function a worker calls. */
export function runVarianceTask(task: VarianceTask, block = VARIANCE_BLOCK): Float64Array {
  const w = task.c1 - task.c0;
  const L: Matrix = { rows: task.m, cols: task.m, data: task.L };
  const Bt: Matrix = { rows: task.m, cols: task.cols, data: task.bt };
  const out = new Float64Array(w);
  const f = task.first;
  for (let j0 = 0; j0 < w; j0 += block) {
    const j1 = Math.min(w, j0 + block);
    wasmVarianceBlock(L, Bt, task.priorVariance, f + j0, f + j1, out.subarray(j0, j1)); // = structuredVarianceBlock's bits
  }
  return out;
}

/** Work of the variance solve, M²N/2 multiply-adds (forward substitution per column). */
export function varianceFlops(m: number, n: number): number {
  return (m * m * n) / 2;
}

/**
 * Below this many multiply-adds splitting does not pay on the project machine (measured, 2 shared
 * cores, load ≈ 1, 3 runs each; single / two threads incl. copies and worker start):
 * 64² M = 400 (3.3e8): 231 / 243, 218 / 294, 292 / 291 ms — no gain;
 * 128² M = 400 (1.3e9): 1275 / 802, 974 / 764, 930 / 1087 ms — 1.2–1.6× in two runs of three.
 */
export const MIN_SPLIT_FLOPS = 5e8;

/**
 * Posterior variances (length N) of the structured state split over the pool: 2 tasks per thread
 * so a thread slowed by other load takes fewer (the order of results does not matter: each task
 * writes its own columns).
 */
export async function parallelPosteriorVariance(
  state: { readonly L: Matrix; readonly Bt: Matrix; readonly priorVariance: Float64Array },
  pool: BlockPool,
  tasksPerThread = 2,
): Promise<Float64Array> {
  const n = state.Bt.cols;
  const out = new Float64Array(n);
  const ranges = columnRanges(n, pool.size * tasksPerThread);
  // With Bᵀ in shared memory, L goes there too: one copy for all tasks instead of one per task.
  let sharedL: Float64Array | undefined;
  if (isShared(state.Bt.data)) {
    sharedL = new Float64Array(new SharedArrayBuffer(state.L.data.length * 8));
    sharedL.set(state.L.data);
  }
  await Promise.all(
    ranges.map(async ([c0, c1]) => {
      const v = await pool.run(varianceTask(state.L, state.Bt, state.priorVariance, c0, c1, sharedL));
      if (v.length !== c1 - c0) throw new Error(`parallel variance: task [${c0}, ${c1}) returned ${v.length} values`);
      out.set(v, c0);
    }),
  );
  return out;
}

/** √ of {@link parallelPosteriorVariance}: equals structuredPosteriorStd(state) bit for bit. */
export async function parallelPosteriorStd(
  state: { readonly L: Matrix; readonly Bt: Matrix; readonly priorVariance: Float64Array },
  pool: BlockPool,
): Promise<Float64Array> {
  const v = await parallelPosteriorVariance(state, pool);
  for (let i = 0; i < v.length; i++) v[i] = Math.sqrt(v[i]);
  return v;
}
