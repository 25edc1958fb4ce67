/**
 * Rows of Bᵀ = G Cm by direct sums over the prior's lag table (../prior/lag.ts), for a sparse operator with few
 * non-zeros per row (straight rays, point data) on a regular grid: before the profile and nugget (./structured.ts
 * finishBtRows), row k is
 *
 *   C(s ⊙ g_k)[j] = Σ_{a ∈ row k} g_ka s_a T(j − a),
 *
 * the same entries the dense route reads from the assembled Cm (../prior/covariance.ts: s_i s_j T(j − i)), in
 * nnz(g_k) · N multiply-adds. The circulant route (./structured.ts computeBtPairs) costs two transforms of the
 * (2n − 1)-padded embedding per pair of rows whatever the rows hold, so for short rays on a 3-D grid the direct
 * sums are far cheaper: 20³ cells with 500 rays of about 32 cells each are 1.3·10⁸ multiply-adds, against 250
 * pairs of transforms of 64³ points ({@link lagProductsPreferred} chooses).
 *
 * For each grid line (iy, iz) the table entries of one source cell are contiguous in x, so a row is a sum of
 * shifted table lines: the WebAssembly SIMD kernel (../wasm/lagRows.ts) runs two x at a time, and the JavaScript
 * loop here is its twin and fallback. Each output is summed from 0 one entry at a time in the row's stored order,
 * so both give the same bits, and a row does not depend on which other rows are computed with it (any split over
 * threads equals one thread).
 *
 * PUBLIC API: lagProductsPreferred, circulantWork, lagWork, LAG_MULTIPLY_ADD_COST, lagRowsInto.
 */
import type { Grid } from '../grid/grid.ts';
import { productPadding } from '../fft/embedding.ts';
import type { Operator } from '../linalg/operator.ts';
import type { LagTable } from '../prior/lag.ts';
import type { SparseMatrix } from '../linalg/sparse.ts';
import { wasmLagRows } from '../wasm/lagRows.ts';

/**
 * Cost of one direct-sum multiply-add in units of one point of one pair's transforms on the circulant route.
 * Measured on the project machine (Node 20, one thread, medians of 3): 20³ with 500 rays (nnz 16,034, so
 * 1.28·10⁸ multiply-adds) 43–48 ms by the WebAssembly kernel with the rows copied out (30 ms without the copy),
 * against 350–400 ms for the transforms (250 pairs of 64³ points, 5.3–6.1 ns a point): 0.36 ns a multiply-add,
 * 0.07 of a point. 32³ with 1,000 rays: 445–500 ms against 1.1–1.4 s. The JavaScript loop (no WebAssembly
 * SIMD) is about 8 times slower; the rule does not depend on the runtime, so that case keeps the same route.
 */
export const LAG_MULTIPLY_ADD_COST = 0.07;

/**
 * Whether the direct sums are cheaper than the circulant route for these rows: a sparse operator on a 3-D grid, and
 * nnz(G) · N · {@link LAG_MULTIPLY_ADD_COST} below ⌈M/2⌉ · px · py · pz (the points the transforms cover).
 * Depends on the grid and G only (not on caches or the runtime), so every thread and every call takes the
 * same route for the same problem. Not below 3-D: there the embedding pads each axis to about twice its length
 * (4 × the cells in 2-D, against 8 × in 3-D) and a prior change reuses the cached row spectra at half the cost,
 * the interactive case the 2-D route was measured and tuned for (test/bench/cases/parallel.ts); `lag` can still be
 * asked for (./structured.ts structuredProblem).
 */
export function lagProductsPreferred(g: Operator, grid: Grid): boolean {
  if (g.kind !== 'sparse' || grid.shape.length < 3) return false;
  return lagWork(g, grid.shape) < circulantWork(g.matrix.rows, grid.shape);
}

/** Points the circulant route transforms for M data rows: ⌈M/2⌉ pairs × px × py × pz (the embedding; pz = 1 below 3-D). */
export function circulantWork(m: number, shape: readonly number[]): number {
  let padded = 1;
  for (const k of shape) padded *= productPadding(k);
  return Math.ceil(m / 2) * padded;
}

/** The lag sums' work in the same unit: nnz(G) · N · {@link LAG_MULTIPLY_ADD_COST} (needs a sparse G). */
export function lagWork(g: Operator, shape: readonly number[]): number {
  if (g.kind !== 'sparse') throw new RangeError('lagWork: lag-table sums need a sparse operator');
  let n = 1;
  for (const k of shape) n *= k;
  return (g.matrix.rowPtr[g.matrix.rows] ?? 0) * n * LAG_MULTIPLY_ADD_COST;
}

/**
 * Rows `rows[i]` of C(s ⊙ G) into `bt` at row slot `slots[i]` · N (see the module comment; the profile and the
 * nugget are applied after, as for the circulant route). `table` is the lag table of the prior's shape.
 */
export function lagRowsInto(
  table: LagTable,
  g: SparseMatrix,
  s: readonly number[] | undefined,
  rows: Int32Array,
  slots: Int32Array,
  bt: Float64Array,
): void {
  const { nx, ny, nz } = table;
  const n = nx * ny * nz;
  const sx = 2 * nx - 1;
  const sxy = sx * (2 * ny - 1);
  const { rowPtr, colIdx, values } = g;
  let total = 0;
  for (const k of rows) total += rowPtr[k + 1] - rowPtr[k];
  // Each row's entries: weight g_ka s_a and the table offset of its cell, (nx − 1 − ax) + sx (ny − 1 − ay) + sxy (nz − 1 − az).
  const weights = new Float64Array(total);
  const offsets = new Int32Array(total);
  const start = new Int32Array(rows.length + 1);
  const slotOffsets = new Int32Array(rows.length);
  let e = 0;
  for (let r = 0; r < rows.length; r++) {
    const k = rows[r];
    start[r] = e;
    slotOffsets[r] = slots[r] * n;
    for (let p = rowPtr[k]; p < rowPtr[k + 1]; p++, e++) {
      const a = colIdx[p];
      const ax = a % nx;
      const ay = Math.floor(a / nx) % ny;
      const az = Math.floor(a / (nx * ny));
      weights[e] = s === undefined ? values[p] : values[p] * s[a];
      offsets[e] = nx - 1 - ax + sx * (ny - 1 - ay) + sxy * (nz - 1 - az);
    }
  }
  start[rows.length] = e;
  if (wasmLagRows({ nx, ny, nz, table: table.values }, weights, offsets, start, rows.length, bt, slotOffsets)) return;
  const t = table.values;
  for (let r = 0; r < rows.length; r++) {
    let o = slotOffsets[r];
    for (let iz = 0; iz < nz; iz++) {
      for (let iy = 0; iy < ny; iy++, o += nx) {
        const line = sx * iy + sxy * iz;
        for (let x = 0; x < nx; x++) bt[o + x] = 0;
        for (let q = start[r]; q < start[r + 1]; q++) {
          const w = weights[q];
          const p = offsets[q] + line;
          for (let x = 0; x < nx; x++) bt[o + x] += w * t[p + x];
        }
      }
    }
  }
}
