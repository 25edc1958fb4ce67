/**
 * Linear-Gaussian posterior through the structured (FFT) path for stationary priors on regular
 * grids, in the data-space form (Tarantola 2005, Inverse Problem Theory, §3.2):
 *
 *   K = G Cm Gᵀ + Cd = L Lᵀ,   m̃ = m0 + B K⁻¹ (d − G m0),   var_i = Cm_ii − Σ_k W_ki²,
 *   B = Cm Gᵀ (N × M),  W = L⁻¹ Bᵀ (M × N).
 *
 * Bᵀ is computed row by row with circulant embedding (../fft/covariance.ts): row k of Bᵀ is
 * Cm g_k = s ⊙ C(s ⊙ g_k) + nugget·g_k, two rows per complex transform. The spectra F pad(s ⊙ g_k)
 * depend on the problem and the std profile only, so they are cached on a {@link StructuredProblem}
 * (within a memory budget): a change of kernel, lengths or variances then costs one pointwise
 * product with λ and one (inverse, done as a forward) transform per pair of data. No N × N matrix
 * is formed.
 *
 * Progressive: {@link prepareStructuredPosterior} factors K and returns the mean at once;
 * {@link structuredPosteriorStd} adds the standard deviations (the M²N/2 triangular solve), column
 * block by column block ({@link structuredVarianceBlock} is the unit a worker runs; each column's
 * arithmetic is the same whatever the blocks, so split runs are identical to one run).
 *
 * PUBLIC API: structuredProblem, prepareStructuredPosterior, structuredShapeProducts, completeStructuredPosterior,
 * completeWithShapeProducts, covarianceShape, hasCovarianceShape, lagShapeRows, rowsByLagSums, structuredPosteriorStd, structuredVarianceBlock, structuredPosteriorSummary.
 */
import { InputError, NotPositiveDefiniteError } from '../errors.ts';
import { cellCount } from '../grid/grid.ts';
import { cholesky, choleskySolve, solveLower, solveLowerMatrix } from '../linalg/cholesky.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { plusRowCombination } from '../linalg/products.ts';
import {
  addOperatorRow,
  applyOperator,
  operatorRowExtents,
  operatorRowInto,
  operatorTimesTransposedSymmetric,
  type Operator,
} from '../linalg/operator.ts';
import { CirculantProduct, nonStationaryReason } from '../fft/covariance.ts';
import { stationaryCovariance } from '../fft/embedding.ts';
import { meanVector, validatePrior } from '../prior/covariance.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import { chiSquareInterval } from './chisquare.ts';
import { dataFitReference, weightsFromWhitened } from './fitReference.ts';
import { VARIANCE_BLOCK } from './varianceBlock.ts';
import { lagProductsPreferred, lagRowsInto } from './lagProducts.ts';
import { lagTable, type LagTable } from '../prior/lag.ts';
import { wasmVarianceBlock } from '../wasm/varianceBlock.ts';

export { structuredVarianceBlock, VARIANCE_BLOCK } from './varianceBlock.ts';
import type { PosteriorSummary } from './types.ts';

/**
 * Default memory budget for cached spectra (bytes): 2·px·py·8 bytes per pair of data, so 52 MB
 * for 64² cells and M = 400, but 210 MB for 128², which is then recomputed per call to keep the
 * peak memory of that case under 300 MB.
 */
export const DEFAULT_SPECTRUM_CACHE_BYTES = 64 * 1024 * 1024;

/**
 * How the rows of Bᵀ are computed on the FFT path: by circulant embedding, by direct sums over the lag table
 * (./lagProducts.ts, sparse operators only), or `auto`: the cheaper of the two by ./lagProducts.ts
 * lagProductsPreferred. Both agree to round-off; each is bit for bit the same on every thread count.
 */
export type RowProducts = 'auto' | 'circulant' | 'lag';

/** A problem with its cache of row spectra for the FFT path. */
export interface StructuredProblem {
  readonly problem: Problem;
  readonly cacheBytes: number;
  /** How the rows of Bᵀ are computed ({@link RowProducts}; default auto). */
  readonly products: RowProducts;
  /** Filled on first use; replaced when the padding or the std profile changes. */
  cache: RowSpectra | null;
}

interface RowSpectra {
  readonly px: number;
  readonly py: number;
  readonly pz: number;
  /** The std profile the spectra were taken with (by value). */
  readonly profile: Float64Array | null;
  /** Full 2-D (3-D) spectrum F pad(s ⊙ (g_2k + i g_2k+1)) per pair of data rows, column-major. */
  readonly spectra: Float64Array[];
}

export function structuredProblem(problem: Problem, options: { cacheBytes?: number; products?: RowProducts } = {}): StructuredProblem {
  return { problem, cacheBytes: options.cacheBytes ?? DEFAULT_SPECTRUM_CACHE_BYTES, products: options.products ?? 'auto', cache: null };
}

export interface StructuredPosteriorState {
  readonly problem: Problem;
  readonly prior: PriorSpec;
  readonly m0: Float64Array;
  /** Bᵀ = G Cm (M × N). */
  readonly Bt: Matrix;
  /** Lower Cholesky factor of K (M × M). */
  readonly L: Matrix;
  /** Lower Cholesky factor of a full Cd; absent for diagonal Cd. */
  readonly Ld?: Matrix;
  readonly r: Float64Array;
  readonly alpha: Float64Array;
  /** Posterior mean m̃ = m0 + Bᵀᵀ α. */
  readonly mean: Float64Array;
  /** diag(Cm). */
  readonly priorVariance: Float64Array;
  /** How the rows of Bᵀ were computed: by circulant embedding or by direct sums over the lag table. */
  readonly products: 'circulant' | 'lag';
  /** Embedding sizes per grid axis used for the circulant products ([px], [px, py] or [px, py, pz]); empty for lag sums. */
  readonly padding: readonly number[];
  /** Whether the row spectra came from the cache. */
  readonly spectraCached: boolean;
  /** Milliseconds per stage (for benchmarks and the UI). */
  readonly timings: { readonly spectra: number; readonly products: number; readonly factor: number };
}

function now(): number {
  return typeof performance !== 'undefined' ? performance.now() : Date.now();
}

function sameProfile(a: Float64Array | null, b: readonly number[] | undefined): boolean {
  if (a === null || b === undefined) return a === null && b === undefined;
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

function validateProblem(problem: Problem, n: number): number {
  const { rows, cols } = problem.operator.matrix;
  if (cols !== n) throw new InputError('problem.operator', `a matrix with ${n} columns (one per grid cell)`, `${rows}×${cols}`);
  const d = problem.data;
  if (d.values.length !== rows) throw new InputError('problem.data.values', `${rows} values (one per operator row)`, d.values);
  if ((d.sigma === undefined) === (d.covariance === undefined)) {
    throw new InputError('problem.data', 'exactly one of sigma or covariance', d.sigma === undefined ? 'neither' : 'both');
  }
  if (d.sigma !== undefined) {
    if (d.sigma.length !== rows) throw new InputError('problem.data.sigma', `${rows} values`, d.sigma);
    d.sigma.forEach((s, k) => {
      if (!(s > 0) || !Number.isFinite(s)) throw new InputError(`problem.data.sigma[${k}]`, 'a finite number > 0', s);
    });
  } else if (d.covariance!.rows !== rows || d.covariance!.cols !== rows) {
    throw new InputError('problem.data.covariance', `an ${rows}×${rows} matrix`, `${d.covariance!.rows}×${d.covariance!.cols}`);
  }
  return rows;
}

/** Row k of G scaled by the std profile, s ⊙ g_k, written into `out` (length N). */
function scaledRow(g: Operator, k: number, s: readonly number[] | undefined, out: Float64Array): Float64Array {
  operatorRowInto(g, k, out);
  if (s !== undefined) for (let i = 0; i < out.length; i++) out[i] *= s[i];
  return out;
}

/**
 * The prior's covariance shape and scale: every term's variance and the nugget divided by the first
 * term's variance v₁ (the mean dropped: products do not depend on it), and v₁. Cm = v₁ · Cm(shape),
 * so Bᵀ = v₁ · Bᵀ(shape). Every FFT-path product is computed for the shape and then multiplied by
 * the scale (the same multiplication on every route), so products computed once for a shape serve
 * any variance (the worker reuses the starting rule's products for the first posterior) with the
 * same bits as a fresh computation. Scale 1 (the prior itself) when v₁ is not a positive number.
 */
export function covarianceShape(prior: PriorSpec): { readonly shape: PriorSpec; readonly scale: number } {
  const v1 = prior.terms[0]?.variance;
  const scale = v1 !== undefined && v1 > 0 && Number.isFinite(v1) ? v1 : 1;
  const shape: PriorSpec = {
    mean: { constant: 0 },
    terms: prior.terms.map((t) => ({ ...t, variance: t.variance / scale })),
    nugget: (prior.nugget ?? 0) / scale,
    ...(prior.stdProfile !== undefined ? { stdProfile: prior.stdProfile } : {}),
  };
  return { shape, scale };
}

/** The prior's part of a {@link StructuredSetup}: the prior, its shape and scale, and c(0) for diag(Cm). */
function priorParts(prior: PriorSpec): Pick<StructuredSetup, 'prior' | 'shape' | 'scale' | 'variance'> {
  return { prior, ...covarianceShape(prior), variance: stationaryCovariance(prior.terms)(0, 0) };
}

/** Whether products computed for `p` serve `prior`: the same covariance shape, compared by value (its JSON). */
export function hasCovarianceShape(p: ShapeProducts, prior: PriorSpec): boolean {
  return JSON.stringify(covarianceShape(prior).shape) === JSON.stringify(p.setup.shape);
}

/** Validated inputs of the FFT path, shared by the single-thread and parallel variants. */
export interface StructuredSetup {
  readonly holder: StructuredProblem;
  readonly problem: Problem;
  readonly prior: PriorSpec;
  /** The prior's covariance shape and scale ({@link covarianceShape}); `cp` is the shape's product. */
  readonly shape: PriorSpec;
  readonly scale: number;
  /** c(0) of the prior itself (Σ of its terms' variances), for diag(Cm). */
  readonly variance: number;
  /** N cells and M data. */
  readonly n: number;
  readonly m: number;
  /** The shape's circulant product, or null when the rows come from `table` (direct sums). */
  readonly cp: CirculantProduct | null;
  /** The shape's lag table when the rows are direct sums (./lagProducts.ts), else null. */
  readonly table: LagTable | null;
  /** Pairing of the data rows into complex transforms ({@link pairOrder}). */
  readonly order: Int32Array;
}

/**
 * Validates the prior and problem for the FFT path (InputError for a bad prior or problem, or a
 * prior that is not stationary on the grid) and builds the circulant product of the prior's shape
 * and the pair order.
 */
export function structuredSetup(sp: StructuredProblem | Problem, prior: PriorSpec): StructuredSetup {
  const holder = 'cacheBytes' in sp ? sp : structuredProblem(sp);
  const problem = holder.problem;
  const grid = problem.grid;
  validatePrior(prior, grid);
  const why = nonStationaryReason(grid, prior);
  if (why !== null) throw new InputError('prior', 'stationary on a regular grid for the FFT path', why);
  const n = cellCount(grid);
  const m = validateProblem(problem, n);
  const parts = priorParts(prior);
  const g = problem.operator;
  const lag = rowsByLagSums(holder);
  if (lag && g.kind !== 'sparse') throw new InputError('products', 'a sparse operator for lag-table sums', `a ${g.kind} operator`);
  const cp = lag ? null : new CirculantProduct(grid, parts.shape);
  const table = lag ? lagTable(grid, parts.shape.terms) : null;
  return { holder, problem, ...parts, n, m, cp, table, order: pairOrder(g, grid.shape[0], m) };
}

/** Whether the rows of Bᵀ for this problem come from lag sums: the holder's `products`, `auto` by ./lagProducts.ts lagProductsPreferred. */
export function rowsByLagSums(sp: StructuredProblem | Problem): boolean {
  const holder = 'cacheBytes' in sp ? sp : null;
  const problem = holder?.problem ?? (sp as Problem);
  const products = holder?.products ?? 'auto';
  return products === 'auto' ? lagProductsPreferred(problem.operator, problem.grid) : products === 'lag';
}

/** Bᵀ of the prior's shape (profile and shape nugget included, not yet scaled), one thread, with the holder's spectra cache. */
export interface ShapeProducts {
  readonly setup: StructuredSetup;
  readonly Bt: Matrix;
  readonly spectraCached: boolean;
  readonly times: { readonly spectra: number; readonly products: number };
  /**
   * G Bᵀᵀ of the shape (M × M, symmetric), when the threads that computed Bᵀ also formed it
   * (../parallel/products.ts); {@link completeStructuredPosterior} then copies it instead of computing it.
   */
  readonly gram?: Matrix;
}

/** {@link ShapeProducts} of (problem, prior) on one thread. Throws as {@link structuredSetup}. */
export function structuredShapeProducts(sp: StructuredProblem | Problem, prior: PriorSpec): ShapeProducts {
  const setup = structuredSetup(sp, prior);
  const { holder, problem, n, m, cp, order } = setup;
  const g = problem.operator;
  const s = prior.stdProfile;
  if (cp === null) return lagShapeProducts(setup);
  // Bᵀ rows by circulant products, two data rows per complex transform.
  const pairs = Math.ceil(m / 2);
  const specBytes = cp.columnSpectrumLength * 8;
  const cachedSpectra = matchingSpectra(holder, cp, s);
  const spectraCached = cachedSpectra !== null;
  const fits = pairs * specBytes <= holder.cacheBytes;
  const spectra: Float64Array[] = cachedSpectra ?? [];
  const Bt = matrix(m, n);
  const t = computeBtPairs(cp, g, s, order, order, Bt.data, cachedSpectra, !spectraCached && fits ? spectra : null);
  if (!spectraCached && fits) keepSpectra(holder, cp, s, spectra);
  const tFix = now();
  finishBtRows(g, s, setup.shape.nugget ?? 0, order, order, Bt.data, n);
  return { setup, Bt, spectraCached, times: { spectra: t.spectra, products: t.products + now() - tFix } };
}

/** {@link structuredShapeProducts} by direct sums over the shape's lag table (the setup's `table`). */
function lagShapeProducts(setup: StructuredSetup): ShapeProducts {
  const { problem, n, m, order, table } = setup;
  const t0 = now();
  const Bt = matrix(m, n);
  if (table === null) throw new RangeError('lagShapeProducts: the setup has no lag table');
  lagShapeRows(table, problem.operator, setup.prior.stdProfile, setup.shape.nugget ?? 0, order, order, Bt.data);
  return { setup, Bt, spectraCached: false, times: { spectra: 0, products: now() - t0 } };
}

/**
 * Rows `rows[i]` of the shape's Bᵀ into `bt` at row slot `slots[i]` · N by direct sums over its lag table, profile
 * and nugget included (./lagProducts.ts lagRowsInto, then {@link finishBtRows}): the lag route's counterpart of
 * {@link computeBtPairs} + {@link finishBtRows}, for one thread or one share of the pool. Throws RangeError for
 * an operator that is not sparse.
 */
export function lagShapeRows(
  table: LagTable,
  g: Operator,
  s: readonly number[] | undefined,
  nugget: number,
  rows: Int32Array,
  slots: Int32Array,
  bt: Float64Array,
): void {
  if (g.kind !== 'sparse') throw new RangeError('lag-table sums need a sparse operator');
  lagRowsInto(table, g.matrix, s, rows, slots, bt);
  finishBtRows(g, s, nugget, rows, slots, bt, table.nx * table.ny * table.nz);
}

/**
 * Rows of Bᵀ = G Cm for the pairs of data rows (rows[2p], rows[2p+1]), p = 0 … ⌈rows.length/2⌉ − 1
 * (the last pair has one row when rows.length is odd): C(s ⊙ g_k) into bt at row slot slots[i]·N
 * for data row rows[i], before the profile and nugget ({@link finishBtRows}). `cached` holds the
 * full 2-D spectra of these pairs (index p) from an earlier `save`; with `save`, the spectra are
 * pushed there. The arithmetic of a pair depends on its two rows only, so any split of the pairs
 * into ranges gives the same rows bit for bit. Returns milliseconds (spectra, products without
 * the spectra).
 */
export function computeBtPairs(
  cp: CirculantProduct,
  g: Operator,
  s: readonly number[] | undefined,
  rows: Int32Array,
  slots: Int32Array,
  bt: Float64Array,
  cached: readonly Float64Array[] | null,
  save: Float64Array[] | null,
): { spectra: number; products: number } {
  const n = cp.nx * cp.ny * cp.nz;
  const m = rows.length;
  const pairs = Math.ceil(m / 2);
  let spectraTime = 0;
  const rowSpec = cached !== null ? null : new Float64Array(cp.spectrumLength);
  const rowA = new Float64Array(n);
  const rowB = new Float64Array(n);
  let tProducts = 0;
  for (let p = 0; p < pairs; p++) {
    const a = rows[2 * p];
    const b = 2 * p + 1 < m ? rows[2 * p + 1] : -1;
    const offA = slots[2 * p] * n;
    const offB = b < 0 ? 0 : slots[2 * p + 1] * n;
    const tp = now();
    if (cached !== null) {
      cp.fromColumnSpectrum(cached[p], bt, b < 0 ? null : bt, offA, offB);
    } else {
      const ts = now();
      cp.spectrum(scaledRow(g, a, s, rowA), b < 0 ? null : scaledRow(g, b, s, rowB), rowSpec!);
      spectraTime += now() - ts;
      const keep = save !== null ? new Float64Array(cp.columnSpectrumLength) : null;
      cp.fromSpectrum(rowSpec!, bt, b < 0 ? null : bt, offA, offB, keep);
      if (keep !== null) save!.push(keep);
    }
    tProducts += now() - tp;
  }
  return { spectra: spectraTime, products: tProducts - spectraTime };
}

/** Profile and nugget of the rows written by {@link computeBtPairs}: row k of Bᵀ = s ⊙ C(s ⊙ g_k) + nugget·g_k. */
export function finishBtRows(
  g: Operator,
  s: readonly number[] | undefined,
  nugget: number,
  rows: Int32Array,
  slots: Int32Array,
  bt: Float64Array,
  n: number,
): void {
  if (s === undefined && nugget === 0) return;
  for (let j = 0; j < rows.length; j++) {
    const o = slots[j] * n;
    if (s !== undefined) for (let i = 0; i < n; i++) bt[o + i] *= s[i];
    if (nugget !== 0) addOperatorRow(g, rows[j], nugget, bt, o);
  }
}

/**
 * The holder's cached row spectra when they were taken with this padding and std profile (in
 * {@link computeBtPairs}' pair order); otherwise null, and a stale cache is dropped.
 */
export function matchingSpectra(holder: StructuredProblem, cp: CirculantProduct, s: readonly number[] | undefined): Float64Array[] | null {
  const cache = holder.cache;
  if (cache !== null && cache.px === cp.px && cache.py === cp.py && cache.pz === cp.pz && sameProfile(cache.profile, s))
    return cache.spectra;
  holder.cache = null;
  return null;
}

/** Keeps `spectra` (every pair's, saved by {@link computeBtPairs}) on the holder for this padding and profile. */
export function keepSpectra(
  holder: StructuredProblem,
  cp: CirculantProduct,
  s: readonly number[] | undefined,
  spectra: Float64Array[],
): void {
  holder.cache = { px: cp.px, py: cp.py, pz: cp.pz, profile: s === undefined ? null : Float64Array.from(s), spectra };
}

/**
 * Factors the posterior through the FFT path and computes the mean. Throws InputError for a bad
 * prior or problem, NotPositiveDefiniteError when K does not factor, and InputError when the prior
 * is not stationary on the grid (./compute.ts computePosterior falls back to the dense path).
 */
export function prepareStructuredPosterior(sp: StructuredProblem | Problem, prior: PriorSpec): StructuredPosteriorState {
  const p = structuredShapeProducts(sp, prior);
  return completeStructuredPosterior(p);
}

/**
 * The posterior of `prior` from shape products computed for another prior of the same covariance shape
 * ({@link covarianceShape}: the same terms up to one common variance factor, nugget and profile), e.g. the
 * worker's products for the starting rule: the same bits as {@link prepareStructuredPosterior} of `prior`.
 * Takes `p.Bt` over (it is scaled in place). Throws InputError for a bad prior and RangeError when the shapes differ.
 */
export function completeWithShapeProducts(p: ShapeProducts, prior: PriorSpec): StructuredPosteriorState {
  validatePrior(prior, p.setup.problem.grid);
  if (!hasCovarianceShape(p, prior))
    throw new RangeError('completeWithShapeProducts: the products were computed for another covariance shape');
  return completeStructuredPosterior(p, { ...p.setup, ...priorParts(prior) });
}

/**
 * The rest of the FFT path once the shape's Bᵀ (M × N, profile and shape nugget included; see
 * {@link covarianceShape}) is known: K = scale · G Bᵀᵀ + Cd, its Cholesky factor, α = K⁻¹ r, and the
 * mean in one pass with Bᵀ ← scale · Bᵀ in place (it becomes the state's Bᵀ). `setup` is the products' own, or
 * that of another prior of the same shape ({@link completeWithShapeProducts}). Throws NotPositiveDefiniteError
 * when K (or a full Cd) does not factor.
 */
export function completeStructuredPosterior(p: ShapeProducts, setup: StructuredSetup = p.setup): StructuredPosteriorState {
  const { Bt, spectraCached, times } = p;
  const { problem, prior, n, m, cp, variance } = setup;
  const grid = problem.grid;
  const g = problem.operator;
  const s = prior.stdProfile;
  const nugget = prior.nugget ?? 0;
  const t0 = now();
  const scale = setup.scale;
  const bt = Bt.data;

  // K = scale · G Bᵀᵀ (the shape's Bᵀ, symmetrised) + Cd, its factor, α. Bᵀ itself is scaled in the mean's pass below.
  const K = p.gram === undefined ? operatorTimesTransposedSymmetric(g, Bt) : { rows: m, cols: m, data: p.gram.data.slice() };
  if (scale !== 1) for (let i = 0; i < K.data.length; i++) K.data[i] *= scale;
  addDataCovariance(K, problem);
  const f = cholesky(K, { inPlace: true });
  if (!f.ok) {
    throw new NotPositiveDefiniteError('K = G Cm Gᵀ + Cd', f.pivot, 'check the data errors (σ > 0) or add a nugget to the prior');
  }
  const L = f.factor;
  let Ld: Matrix | undefined;
  if (problem.data.covariance !== undefined) {
    const fd = cholesky(problem.data.covariance);
    if (!fd.ok)
      throw new NotPositiveDefiniteError('problem.data.covariance', fd.pivot, 'the data covariance must be symmetric positive definite');
    Ld = fd.factor;
  }
  const m0 = meanVector(grid, prior);
  const gm0 = applyOperator(g, m0);
  const r = new Float64Array(m);
  for (let k = 0; k < m; k++) r[k] = problem.data.values[k] - gm0[k];
  const alpha = choleskySolve(L, r);
  // m̃ = m0 + Bᵀᵀ α, with Bᵀ ← scale · Bᵀ four rows at a time just before they are read (one trip through memory).
  const mean = plusRowCombination(m0, bt, alpha, n, scale);
  const priorVariance = new Float64Array(n);
  for (let i = 0; i < n; i++) priorVariance[i] = (s === undefined ? 1 : s[i] * s[i]) * variance + nugget;
  const factorTime = now() - t0;
  const base = {
    problem,
    prior,
    m0,
    Bt,
    L,
    r,
    alpha,
    mean,
    priorVariance,
    products: cp === null ? ('lag' as const) : ('circulant' as const),
    padding: cp === null ? [] : [cp.px, cp.py, cp.pz].slice(0, grid.shape.length),
    spectraCached,
  };
  const timings = { spectra: times.spectra, products: times.products, factor: factorTime };
  return Ld === undefined ? { ...base, timings } : { ...base, Ld, timings };
}

/**
 * The order in which data rows are paired into complex transforms (rows order[2p], order[2p+1]).
 * A transform's x-pass skips the grid rows that are zero in both vectors of its pair, so sparse
 * rows are sorted by the first, then the last grid row they touch: neighbours then cover similar
 * grid rows (for straight rays across the grid, rays along x pair with rays along x). Dense
 * operators (every row touches every grid row) keep the natural order. Any pairing gives the same products up to round-off; this one
 * depends on G only, so cached spectra stay matched to their rows.
 */
export function pairOrder(g: Operator, nx: number, m: number): Int32Array {
  const order = new Int32Array(m);
  for (let k = 0; k < m; k++) order[k] = k;
  const { first, last } = operatorRowExtents(g);
  const lo = new Int32Array(m);
  const hi = new Int32Array(m);
  for (let k = 0; k < m; k++) {
    // Columns grow with the row index iy of the grid, so the extreme columns give the extreme rows.
    lo[k] = last[k] < 0 ? 0 : Math.floor(first[k] / nx);
    hi[k] = last[k] < 0 ? -1 : Math.floor(last[k] / nx);
  }
  return order.sort((x, y) => lo[x] - lo[y] || hi[x] - hi[y] || x - y);
}

function addDataCovariance(K: Matrix, problem: Problem): void {
  const m = K.rows;
  const { sigma, covariance } = problem.data;
  if (sigma !== undefined) {
    for (let k = 0; k < m; k++) K.data[k * m + k] += sigma[k] * sigma[k];
  } else {
    for (let i = 0; i < m * m; i++) K.data[i] += covariance!.data[i];
  }
}

/** Pointwise posterior standard deviations √var (length N), single thread, block by block. */
export function structuredPosteriorStd(state: StructuredPosteriorState, block = VARIANCE_BLOCK): Float64Array {
  const n = state.Bt.cols;
  const v = new Float64Array(n);
  for (let c0 = 0; c0 < n; c0 += block) {
    const c1 = Math.min(n, c0 + block);
    // The WebAssembly SIMD kernel (same bits as structuredVarianceBlock, which it falls back to).
    wasmVarianceBlock(state.L, state.Bt, state.priorVariance, c0, c1, v.subarray(c0, c1));
  }
  for (let i = 0; i < n; i++) v[i] = Math.sqrt(v[i]);
  return v;
}

/**
 * The data fit of the FFT-path mean (fresh arrays): predicted = G m̃; residuals (d − G m̃)/σ for a
 * diagonal Cd, Ld⁻¹ (d − G m̃) for a full Cd = Ld Ldᵀ (Tarantola 2005, §3.2: the misfit in the data
 * norm); χ² = Σ residual². Shared by the summary and the worker's mean-first partial, so both agree
 * bit for bit.
 */
export function structuredDataFit(state: Pick<StructuredPosteriorState, 'problem' | 'Ld' | 'mean'>): {
  predicted: Float64Array;
  residuals: Float64Array;
  chi2: number;
} {
  const { problem, Ld, mean } = state;
  const m = problem.data.values.length;
  const predicted = applyOperator(problem.operator, mean);
  const misfit = new Float64Array(m);
  for (let k = 0; k < m; k++) misfit[k] = problem.data.values[k] - predicted[k];
  let residuals: Float64Array;
  if (Ld !== undefined) {
    residuals = solveLower(Ld, misfit);
  } else {
    residuals = new Float64Array(m);
    for (let k = 0; k < m; k++) residuals[k] = misfit[k] / problem.data.sigma![k];
  }
  let chi2 = 0;
  for (let k = 0; k < m; k++) chi2 += residuals[k] * residuals[k];
  return { predicted, residuals, chi2 };
}

/** The full PosteriorSummary (path 'fft'); `std` may be passed when already computed. */
export function structuredPosteriorSummary(state: StructuredPosteriorState, std?: Float64Array): PosteriorSummary {
  const { problem, L, Ld, r, alpha, mean, priorVariance } = state;
  const n = mean.length;
  const m = r.length;
  const sd = std ?? structuredPosteriorStd(state);
  const priorStd = new Float64Array(n);
  const varianceReduction = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const pv = priorVariance[i];
    priorStd[i] = Math.sqrt(pv);
    varianceReduction[i] = pv > 0 ? 1 - (sd[i] * sd[i]) / pv : 0;
  }
  const { predicted, residuals, chi2 } = structuredDataFit(state);
  // log N(d; G m0, K) = −½ rᵀα − Σ log L_kk − (M/2) log 2π (Rasmussen & Williams 2006, Alg. 2.1).
  let rAlpha = 0;
  let logDiag = 0;
  for (let k = 0; k < m; k++) {
    rAlpha += r[k] * alpha[k];
    logDiag += Math.log(L.data[k * m + k]);
  }
  const logEvidence = -0.5 * rAlpha - logDiag - 0.5 * m * Math.log(2 * Math.PI);
  // tr R = tr(L⁻¹ (K − Cd) L⁻ᵀ) = M − ‖L⁻¹ Ld‖_F² (derived; Ld = diag σ for a diagonal Cd).
  const ld = Ld ?? diagonalMatrix(problem.data.sigma!);
  const X = solveLowerMatrix(L, ld);
  let fro = 0;
  for (const v of X.data) fro += v * v;
  // The data-fit reference: weights = eig(X Xᵀ) = eig(L⁻¹ Cd L⁻ᵀ) (./fitReference.ts).
  const fitReference = dataFitReference(weightsFromWhitened(X), chi2);
  const [lo, hi] = chiSquareInterval(m);
  const summary = {
    mean,
    std: sd,
    priorStd,
    varianceReduction,
    predicted,
    residuals,
    chi2,
    logEvidence,
    resolutionTrace: m - fro,
    fitReference,
    dataMisfit: rAlpha,
    reducedMisfitInterval95: [lo / m, hi / m] as const,
    dataCount: m,
    parameterCount: n,
    path: 'fft' as const,
  };
  return summary;
}

function diagonalMatrix(v: ArrayLike<number>): Matrix {
  const k = v.length;
  const out = matrix(k, k);
  for (let i = 0; i < k; i++) out.data[i * k + i] = v[i];
  return out;
}
