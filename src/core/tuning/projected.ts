/**
 * P = G Cm Gᵀ (M × M), the one prior-dependent matrix that the data-space criteria need (evidence,
 * leave-one-out, discrepancy, prior predictive check), by one of two routes:
 *
 * - dense: Cm as an N × N matrix (../prior/covariance.ts), P = G Cm Gᵀ by the sparse / blocked
 *   products of ../linalg/operator.ts projectCovariance (N² doubles: 134 MB at 64², 2 GB at 128²);
 * - fft: for a prior stationary on a regular 1-D/2-D grid, row k of Bᵀ = G Cm is
 *   s ⊙ C(s ⊙ g_k) + η g_k by circulant embedding (../inverse/structured.ts computeBtPairs /
 *   finishBtRows: C v exact for any padding ≥ 2n − 1, since the embedding holds every lag of the
 *   grid), then P_ab = g_a · (Bᵀ)_b. Bᵀ is made in blocks of rows, so the memory is
 *   O(block · N + M²), never N × N. The row spectra F pad(s ⊙ g_k) depend on the problem and the
 *   std profile only; they are kept on the {@link StructuredProblem} passed in (the same cache the
 *   structured posterior fills), so a change of length, variance or ν costs one pointwise product
 *   and one transform per pair of data.
 *
 * Route rule (`auto`): fft when the prior is stationary on the grid and N > {@link TUNING_DENSE_LIMIT}.
 * The limit is not the speed crossing but the largest built-in demo (32² = 1024 cells). Measured
 * (bench problem of test/bench/cases/fft.ts, M = min(400, N/4), one run each, dense / FFT cold /
 * FFT with cached spectra): 16² 12 / 19 / 11 ms, 24² 21 / 34 / 7 ms, 32² 53 / 21 / 12 ms, 48² 227 /
 * 113 / 50 ms; 64² (M = 400) 500 / 120–180 / 80 ms (test/bench/tuningScale.ts). Up to it
 * every tuning result, seeded calibrations included, stays bit for bit what it was; above it the
 * dense route's N² memory is the reason to switch (the same limit as
 * ../sampling/realisations.ts DENSE_REALISATION_LIMIT). Both routes agree to round-off
 * (test/core/tuning/projected.test.ts: 1e-10 relative).
 *
 * The route choice lives in ./dataSpace.ts (projectedPriorCovariance), the dense product in
 * ../linalg/operator.ts (projectCovariance); this file holds the rule and the FFT route.
 *
 * PUBLIC API: TUNING_DENSE_LIMIT, TuningRoute, tuningRoute, structuredProjection.
 */
import { cellCount } from '../grid/grid.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { symmetrise } from '../linalg/products.ts';
import { operatorTimesTransposed } from '../linalg/operator.ts';
import { CirculantProduct, nonStationaryReason } from '../fft/covariance.ts';
import {
  computeBtPairs,
  finishBtRows,
  keepSpectra,
  lagShapeRows,
  matchingSpectra,
  structuredSetup,
  type StructuredProblem,
} from '../inverse/structured.ts';
import { offsetTable, type OffsetFunction } from '../prior/lag.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';

/** Largest N on the dense route under `auto` (the largest built-in demo; see the module comment). */
export const TUNING_DENSE_LIMIT = 1024;

export type TuningRoute = 'dense' | 'fft';

/** Rows of Bᵀ held at once on the FFT route (even, so blocks split the data pairs exactly). */
const BT_BLOCK_ROWS = 32;

/** The route prior selection takes for (problem, prior) (see the module comment). */
export function tuningRoute(problem: Problem, prior: PriorSpec): TuningRoute {
  if (cellCount(problem.grid) <= TUNING_DENSE_LIMIT) return 'dense';
  return nonStationaryReason(problem.grid, prior) === null ? 'fft' : 'dense';
}

/**
 * P = G Cm Gᵀ through circulant-embedding products (the FFT route of the module comment). Throws
 * InputError for a bad or non-stationary prior (../inverse/structured.ts structuredSetup).
 * Cost: ⌈M/2⌉ complex 2-D transforms (one product each with cached spectra) + M·nnz(G) for
 * the sparse G·Bᵀ (M²N for a dense G); memory BT_BLOCK_ROWS·N + M² doubles (+ the spectrum cache
 * within holder.cacheBytes).
 */
export function structuredProjection(holder: StructuredProblem, prior: PriorSpec, kernel?: OffsetFunction): Matrix {
  const setup = structuredSetup(holder, prior);
  const { n, m, order, problem } = setup;
  // With `kernel`: G S D S Gᵀ for that even function of the offset (a term's derivative), no nugget; the row
  // spectra depend on G and S only, so the cached ones serve (same padding).
  // On the lag route (setup.table; ../inverse/lagProducts.ts) the table of that function replaces the prior's.
  const base = setup.cp;
  const cp =
    base === null || kernel === undefined
      ? base
      : new CirculantProduct(problem.grid, prior, [base.px, base.py, base.pz], undefined, kernel);
  const table = setup.table === null ? null : kernel === undefined ? setup.table : offsetTable(problem.grid, kernel);
  const g = problem.operator;
  const s = prior.stdProfile;
  // The shape's product and nugget, P times the scale at the end (../inverse/structured.ts covarianceShape; as K in
  // completeStructuredPosterior); a term's derivative as given.
  const nugget = kernel === undefined ? (setup.shape.nugget ?? 0) : 0;
  const scale = kernel === undefined ? setup.scale : 1;
  const cached = cp === null ? null : matchingSpectra(holder, cp, s);
  const pairs = Math.ceil(m / 2);
  const fits = cp !== null && pairs * cp.columnSpectrumLength * 8 <= holder.cacheBytes;
  const save: Float64Array[] | null = cached === null && fits ? [] : null;
  const block = Math.min(BT_BLOCK_ROWS, m + (m % 2));
  const bt = new Float64Array(block * n);
  const slots = new Int32Array(block);
  for (let q = 0; q < block; q++) slots[q] = q;
  const p = matrix(m, m);
  const pd = p.data;
  for (let j0 = 0; j0 < m; j0 += block) {
    const j1 = Math.min(m, j0 + block);
    const rows = order.subarray(j0, j1);
    const sl = slots.subarray(0, j1 - j0);
    const spectra = cached === null ? null : cached.slice(j0 / 2, Math.ceil(j1 / 2));
    if (cp !== null) {
      computeBtPairs(cp, g, s, rows, sl, bt, spectra, save);
      finishBtRows(g, s, nugget, rows, sl, bt, n);
    } else if (table !== null) lagShapeRows(table, g, s, nugget, rows, sl, bt);
    // Columns rows[q] of P: P_a,rows[q] = g_a · (Bᵀ)_rows[q].
    const k = j1 - j0;
    const part = operatorTimesTransposed(g, { rows: k, cols: n, data: bt.subarray(0, k * n) });
    for (let a = 0; a < m; a++) for (let q = 0; q < k; q++) pd[a * m + rows[q]] = part.data[a * k + q];
  }
  if (save !== null && cp !== null) keepSpectra(holder, cp, s, save);
  if (scale !== 1) for (let i = 0; i < pd.length; i++) pd[i] *= scale;
  symmetrise(p);
  return p;
}
