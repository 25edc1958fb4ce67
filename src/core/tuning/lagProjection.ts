/**
 * P = G Cm Gᵀ for an operator with few non-zeros (point data: stations, samples, wells), straight from the lag
 * table of the prior (../prior/lag.ts), with no N × N matrix and no transform:
 *
 *   P_ab = Σ_{i ∈ row a} Σ_{j ∈ row b} g_ai s_i · T(j − i) · s_j g_bj  +  η (G Gᵀ)_ab,
 *
 * where T holds Σ_t variance_t ρ_t(h_t) for every grid offset, s is the standard-deviation profile (ones when
 * absent) and η the nugget. These are exactly the entries that the dense route reads from the assembled Cm
 * (../prior/covariance.ts assembleCovariance: s_i s_j T(j − i), then η on the diagonal), so the two agree to
 * round-off of the summation order (test/core/tuning/lagProjection.test.ts, against the dense route and against
 * numpy). Cost: the lag table ((2nx − 1)(2ny − 1) kernel values, each term) plus nnz(G)² / 2 look-ups, against
 * ⌈M/2⌉ two-dimensional transforms on the FFT route: for 200 point data on a 40 × 40 grid, 6,241 kernel values
 * and 20,000 look-ups instead of 100 transforms of the 80 × 80 embedding.
 *
 * Used under the `auto` route wherever the FFT route would run (./dataSpace.ts projectedPriorCovariance) when
 * nnz(G)² ≤ {@link LAG_PROJECTION_LOOKUPS}; a forced route ('dense' or 'fft') is honoured as asked.
 */
import type { Grid } from '../grid/grid.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { matchOperator, operatorGram, type Operator } from '../linalg/operator.ts';
import { lagIndex, lagTable, type LagTable } from '../prior/lag.ts';
import { validatePrior } from '../prior/covariance.ts';
import type { PriorSpec } from '../prior/spec.ts';

/**
 * Largest nnz(G)² taken through the lag table (2²⁶ ≈ 6.7·10⁷ look-ups, some 0.1 s): point data up to about
 * 8,000 values, or a few hundred short paths. Above it the FFT route's cost, which grows with M and not with
 * nnz², is the smaller (a choice from the costs above, not a measured crossing).
 */
export const LAG_PROJECTION_LOOKUPS = 2 ** 26;

/** True when the lag-table projection applies to this operator on this grid (sparse, few non-zeros, ≤ 2-D). */
export function lagProjectionApplies(g: Operator, grid: Grid): boolean {
  if (grid.shape.length > 2) return false;
  return matchOperator(g, {
    dense: () => false,
    sparse: (a) => {
      const nnz = a.rowPtr[a.rows] ?? 0;
      return nnz * nnz <= LAG_PROJECTION_LOOKUPS;
    },
  });
}

/**
 * G S T S Gᵀ for any table T of the grid's offsets (../prior/lag.ts layout) and the standard-deviation profile s
 * (ones when absent), without a nugget: the prior's kernel part here, a term's derivative table in
 * ./typeII.ts. Needs a sparse operator.
 */
export function projectLagTable(g: Operator, grid: Grid, table: LagTable, stdProfile: readonly number[] | undefined): Matrix {
  const sparse = matchOperator(g, { dense: () => null, sparse: (a) => a });
  if (sparse === null) throw new RangeError('projectLagTable: needs a sparse operator');
  const T = table.values;
  const nx = grid.shape[0] ?? 1;
  const { rows: m, rowPtr, colIdx, values } = sparse;
  const nnz = rowPtr[m] ?? 0;
  const ex = new Int32Array(nnz);
  const ey = new Int32Array(nnz);
  const w = new Float64Array(nnz);
  const s = stdProfile;
  for (let k = 0; k < nnz; k++) {
    const c = colIdx[k] ?? 0;
    const ix = c % nx;
    ex[k] = ix;
    ey[k] = (c - ix) / nx;
    w[k] = (values[k] ?? 0) * (s === undefined ? 1 : (s[c] ?? 0));
  }
  const width = 2 * nx - 1;
  const zero = lagIndex(table, 0, 0);
  const out = matrix(m, m);
  const od = out.data;
  for (let a = 0; a < m; a++) {
    const a0 = rowPtr[a] ?? 0;
    const a1 = rowPtr[a + 1] ?? 0;
    for (let b = a; b < m; b++) {
      const b0 = rowPtr[b] ?? 0;
      const b1 = rowPtr[b + 1] ?? 0;
      let sum = 0;
      for (let ka = a0; ka < a1; ka++) {
        const base = zero - ey[ka] * width - ex[ka];
        let inner = 0;
        for (let kb = b0; kb < b1; kb++) inner += T[base + ey[kb] * width + ex[kb]] * w[kb];
        sum += w[ka] * inner;
      }
      od[a * m + b] = sum;
      od[b * m + a] = sum;
    }
  }
  return out;
}

/** P = G Cm Gᵀ through the lag table (see the module comment). Validates the prior. */
export function lagTableProjection(g: Operator, grid: Grid, prior: PriorSpec): Matrix {
  validatePrior(prior, grid);
  const out = projectLagTable(g, grid, lagTable(grid, prior.terms), prior.stdProfile);
  const od = out.data;
  const eta = prior.nugget ?? 0;
  if (eta !== 0) {
    const gram = operatorGram(g);
    for (let k = 0; k < od.length; k++) od[k] += eta * gram.data[k];
  }
  return out;
}
