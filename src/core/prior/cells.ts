/**
 * Prior covariance on a cell list (the user's own mesh, ../grid/grid.ts CellList): no regular offsets, so no
 * lag table and no FFT; Cm is assembled from the pairwise offsets x_j − x_i of the centres with the same
 * kernel table and scaled distance (anisotropy, rotation R = Rz·Ry·Rx) as the grid route (./lag.ts):
 *
 *   Cm[i][j] = s_i s_j Σ_t variance_t ρ_t(h_t(x_j − x_i)) + nugget·δ_ij
 *
 * O(N²) kernel evaluations (the grid route needs O(N)); only the upper triangle is evaluated and mirrored,
 * so Cm is exactly symmetric. Size limit: MAX_CELL_LIST (measured, see DEVELOPERS.md "Cell lists").
 * PUBLIC API: pairwiseCovariance, covarianceRow, MAX_CELL_LIST.
 */
import { InputError } from '../errors.ts';
import { type CellList, cellCoordinates, type Geometry } from '../grid/grid.ts';
import { correlationFunction } from '../kernels/correlation.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { scaledDistance } from './lag.ts';
import type { PriorSpec } from './spec.ts';

/**
 * Largest cell list accepted: a dense N × N Cm of 8,192 cells is 537 MB, assembled in about 4 s on one core of
 * the development machine (2 × matern terms; DEVELOPERS.md), and the posterior factors need a few more.
 */
export const MAX_CELL_LIST = 8192;

/** Dense Cm (N × N) for a validated prior on a cell list. */
export function pairwiseCovariance(cells: CellList, prior: PriorSpec): Matrix {
  const n = cells.x.length;
  if (n > MAX_CELL_LIST) {
    throw new InputError(
      'cells.centres',
      `at most ${MAX_CELL_LIST} cell centres (a dense Cm of N² numbers; coarsen the mesh, or use a regular grid, which takes the FFT route)`,
      `${n} centres`,
    );
  }
  const { x, y, z } = cells;
  const c = matrix(n, n);
  const d = c.data;
  for (const term of prior.terms) {
    const rho = correlationFunction(term.kernel, term.nu);
    const h = scaledDistance(term);
    const v = term.variance;
    for (let i = 0; i < n; i++) {
      const oi = i * n;
      for (let j = i; j < n; j++) d[oi + j] += v * rho(h(x[j] - x[i], y[j] - y[i], z[j] - z[i]));
    }
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) d[i * n + j] = d[j * n + i];
  const s = prior.stdProfile;
  if (s !== undefined) {
    for (let i = 0; i < n; i++) {
      const oi = i * n;
      for (let j = 0; j < n; j++) d[oi + j] = s[i] * s[j] * d[oi + j];
    }
  }
  const nugget = prior.nugget ?? 0;
  if (nugget !== 0) for (let i = 0; i < n; i++) d[i * n + i] += nugget;
  return c;
}

/**
 * Row i of Cm on any geometry (a grid or a cell list) from the offsets x_j − x_i of the cell centres, without
 * forming Cm: O(N) kernel evaluations per term (the correlation of one cell with every other, for the volume and
 * cells screens). The same formula, kernel table and scaled distance as {@link pairwiseCovariance}.
 */
export function covarianceRow(g: Geometry, prior: PriorSpec, i: number): Float64Array {
  const { x, y, z } = cellCoordinates(g);
  const n = x.length;
  if (!Number.isInteger(i) || i < 0 || i >= n) throw new InputError('cell', `an integer cell index from 0 to ${n - 1}`, i);
  const out = new Float64Array(n);
  for (const term of prior.terms) {
    const rho = correlationFunction(term.kernel, term.nu);
    const h = scaledDistance(term);
    const v = term.variance;
    for (let j = 0; j < n; j++) out[j] += v * rho(h(x[j] - x[i], y[j] - y[i], z[j] - z[i]));
  }
  const s = prior.stdProfile;
  if (s !== undefined) for (let j = 0; j < n; j++) out[j] *= s[i] * s[j];
  out[i] += prior.nugget ?? 0;
  return out;
}
