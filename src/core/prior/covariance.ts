/**
 * Prior covariance Cm and mean m0 on a regular grid.
 *
 *   Cm[i][j] = s_i s_j Σ_t variance_t ρ_t(h_t(x_j − x_i)) + nugget·δ_ij        (./spec.ts)
 *
 * PUBLIC API: covarianceMatrix, covarianceApply, priorVariance, meanVector, validatePrior.
 *
 * Assembly goes through a lag table (./lag.ts): ρ is evaluated once per distinct index offset
 * ((2nx−1)(2ny−1)(2nz−1) values, 2N−1 in 1-D) and each matrix row is copied from contiguous slices of the
 * table, so assembly costs O(N²) memory writes and only O(N) kernel evaluations.
 */
import { cellCount, type Geometry, isCellList } from '../grid/grid.ts';
import { pairwiseCovariance } from './cells.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { lagIndex, lagTable, type LagTable } from './lag.ts';
import type { PriorSpec } from './spec.ts';
import { validatePrior } from './validate.ts';

export { meanVector } from './mean.ts';
export { validatePrior } from './validate.ts';

/** Dense prior covariance Cm (N × N) on the grid. Validates the prior first (InputError). */
export function covarianceMatrix(grid: Geometry, prior: PriorSpec): Matrix {
  validatePrior(prior, grid);
  // Cell lists have no regular offsets: Cm from the pairwise offsets of their centres (./cells.ts).
  if (isCellList(grid)) return pairwiseCovariance(grid, prior);
  return assembleCovariance(prior, lagTable(grid, prior.terms));
}

/** Dense Cm from an already computed lag table (no validation). */
export function assembleCovariance(prior: PriorSpec, table: LagTable): Matrix {
  const { nx, ny, nz, values } = table;
  const n = nx * ny * nz;
  const c = matrix(n, n);
  const d = c.data;
  for (let iz = 0; iz < nz; iz++) {
    for (let iy = 0; iy < ny; iy++) {
      for (let ix = 0; ix < nx; ix++) {
        const i = ix + nx * (iy + ny * iz);
        const oi = i * n;
        for (let jz = 0; jz < nz; jz++) {
          for (let jy = 0; jy < ny; jy++) {
            // Row i, cells (0..nx−1, jy, jz): offsets Δix = −ix … nx−1−ix, contiguous in the table.
            const a = lagIndex(table, -ix, jy - iy, jz - iz);
            d.set(values.subarray(a, a + nx), oi + (jy + ny * jz) * nx);
          }
        }
      }
    }
  }
  const s = prior.stdProfile;
  if (s !== undefined) {
    for (let i = 0; i < n; i++) {
      const si = s[i];
      const oi = i * n;
      for (let j = 0; j < n; j++) d[oi + j] = si * s[j] * d[oi + j];
    }
  }
  const nugget = prior.nugget ?? 0;
  if (nugget !== 0) for (let i = 0; i < n; i++) d[i * n + i] += nugget;
  return c;
}

/**
 * Prior variance per cell, the diagonal of Cm: s_i² Σ_t variance_t ρ_t(0) + nugget, without
 * forming Cm (ρ_t(0) = 1 for every kernel; it is evaluated, not assumed).
 */
export function priorVariance(grid: Geometry, prior: PriorSpec): Float64Array {
  validatePrior(prior, grid);
  const t = lagTable({ shape: [1], spacing: [1] }, prior.terms).values[0];
  const n = cellCount(grid);
  const out = new Float64Array(n);
  const s = prior.stdProfile;
  const nugget = prior.nugget ?? 0;
  for (let i = 0; i < n; i++) {
    const si = s === undefined ? 1 : s[i];
    out[i] = si * si * t + nugget;
  }
  return out;
}

/** out = Cm x; returns `out`. */
export type CovarianceApply = (x: ArrayLike<number>, out?: Float64Array) => Float64Array;

/**
 * The product x ↦ Cm x. Given `dense` (a Cm already assembled by {@link covarianceMatrix}) it is a
 * plain dense product; otherwise it runs over the lag table without storing Cm (O(N²) flops and
 * O(N) memory per product), for operators too large to keep (used by Lanczos eigenvalue estimates).
 */
export function covarianceApply(grid: Geometry, prior: PriorSpec, given?: Matrix): CovarianceApply {
  validatePrior(prior, grid);
  const n = cellCount(grid);
  // A cell list has no lag table to run over: its product is always the dense one.
  const dense = given ?? (isCellList(grid) ? pairwiseCovariance(grid, prior) : undefined);
  if (dense !== undefined) {
    if (dense.rows !== n || dense.cols !== n) {
      throw new RangeError(`covarianceApply: dense matrix is ${dense.rows}×${dense.cols}, grid has ${n} cells`);
    }
    const d = dense.data;
    return (x, out = new Float64Array(n)) => {
      for (let i = 0; i < n; i++) {
        let acc = 0;
        const oi = i * n;
        for (let j = 0; j < n; j++) acc += d[oi + j] * x[j];
        out[i] = acc;
      }
      return out;
    };
  }
  if (isCellList(grid)) throw new Error('unreachable: cell lists take the dense product');
  const table = lagTable(grid, prior.terms);
  const { nx, ny, nz, values } = table;
  const s = prior.stdProfile;
  const nugget = prior.nugget ?? 0;
  const sx = new Float64Array(n);
  return (x, out = new Float64Array(n)) => {
    for (let j = 0; j < n; j++) sx[j] = (s === undefined ? 1 : s[j]) * x[j];
    for (let i = 0; i < n; i++) {
      const ix = i % nx;
      const iy = Math.floor(i / nx) % ny;
      const iz = Math.floor(i / (nx * ny));
      let acc = 0;
      for (let jz = 0; jz < nz; jz++) {
        for (let jy = 0; jy < ny; jy++) {
          const a = lagIndex(table, -ix, jy - iy, jz - iz);
          const o = (jy + ny * jz) * nx;
          for (let jx = 0; jx < nx; jx++) acc += values[a + jx] * sx[o + jx];
        }
      }
      out[i] = (s === undefined ? 1 : s[i]) * acc + nugget * x[i];
    }
    return out;
  };
}
