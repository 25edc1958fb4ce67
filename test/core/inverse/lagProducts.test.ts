/**
 * Rows of Bᵀ = G Cm by direct sums over the lag table (src/core/inverse/lagProducts.ts): the WebAssembly kernel
 * and its JavaScript twin give the same bits on every path of the kernel (lines of 16 x and more, pairs, an odd
 * last x, rows with no entries), and both equal G times the dense Cm (src/core/prior/covariance.ts, itself checked
 * against scipy in test/reference) to round-off, rotated anisotropy, sums, nugget and a std profile included.
 * The route rule takes the sums for short rays on a 3-D grid and keeps circulant embedding below 3-D and for a
 * dense operator.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { lagProductsPreferred, lagRowsInto } from '../../../src/core/inverse/lagProducts.ts';
import { prepareStructuredPosterior, structuredProblem } from '../../../src/core/inverse/structured.ts';
import { structuredProjection } from '../../../src/core/tuning/projected.ts';
import { cellCount, type Grid } from '../../../src/core/grid/grid.ts';
import { sparseFromCoordinates, sparseToDense, type SparseMatrix } from '../../../src/core/linalg/sparse.ts';
import { covarianceMatrix } from '../../../src/core/prior/covariance.ts';
import { lagTable } from '../../../src/core/prior/lag.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { disableWasmForTesting, wasmAvailable } from '../../../src/core/wasm/varianceBlock.ts';
import { benchProblem3 } from '../../bench/cases/fft3.ts';
import { relErr, seededVector } from '../fft/cases.ts';

afterEach(() => disableWasmForTesting(false));

/** m rows of seeded entries on the grid (row 0 left empty), `perRow` cells each. */
function seededRows(grid: Grid, m: number, perRow: number, seed: number): SparseMatrix {
  const n = cellCount(grid);
  const u = seededVector(2 * m * perRow, seed);
  const ri: number[] = [];
  const ci: number[] = [];
  const v: number[] = [];
  for (let k = 1; k < m; k++) {
    for (let e = 0; e < perRow; e++) {
      ri.push(k);
      ci.push(Math.min(n - 1, Math.floor(((u[2 * (k * perRow + e)]! + 1) / 2) * n)));
      v.push(0.5 + u[2 * (k * perRow + e) + 1]!);
    }
  }
  return sparseFromCoordinates(m, n, ri, ci, v);
}

const rotated: PriorSpec = {
  mean: { constant: 0 },
  terms: [
    { kernel: 'matern', nu: 2.5, variance: 1.3, lengths: [5, 2, 3], angles: [30, -20, 10] },
    { kernel: 'exponential', variance: 0.4, length: 2 },
  ],
};

/** Rows of C(s ⊙ G) by the route under test, all rows in natural order. */
function lagRows(grid: Grid, g: SparseMatrix, prior: PriorSpec): Float64Array {
  const rows = Int32Array.from({ length: g.rows }, (_, k) => k);
  const bt = new Float64Array(g.rows * cellCount(grid)).fill(Number.NaN);
  lagRowsInto(lagTable(grid, prior.terms), g, prior.stdProfile, rows, rows, bt);
  return bt;
}

/** The same rows from the dense Cm: (s ⊙ g_k)ᵀ C, where C = Cm without its nugget and profile. */
function denseRows(grid: Grid, g: SparseMatrix, prior: PriorSpec): Float64Array {
  const n = cellCount(grid);
  const c = covarianceMatrix(grid, { ...prior, nugget: 0, stdProfile: undefined }).data;
  const gd = sparseToDense(g).data;
  const s = prior.stdProfile;
  const out = new Float64Array(g.rows * n);
  for (let k = 0; k < g.rows; k++)
    for (let a = 0; a < n; a++) {
      const w = gd[k * n + a]! * (s === undefined ? 1 : s[a]!);
      if (w !== 0) for (let j = 0; j < n; j++) out[k * n + j] += w * c[a * n + j]!;
    }
  return out;
}

describe('lag-table rows of Bᵀ', () => {
  const grids: [string, Grid][] = [
    ['x lines of 19 (a 16-block, one pair, an odd last x)', { shape: [19, 4, 3], spacing: [1, 0.7, 1.3] }],
    ['x lines of 34 (two 16-blocks and a pair)', { shape: [34, 3, 2], spacing: [0.5, 1, 1] }],
    ['x lines of 5 (pairs and an odd last x only)', { shape: [5, 6, 7], spacing: [1, 1, 0.8] }],
    ['x lines of 1', { shape: [1, 9, 8], spacing: [1, 1, 1] }],
  ];
  for (const [label, grid] of grids) {
    it(`${label}: WebAssembly and JavaScript give the same bits, and both equal G times the dense Cm to 1e-13`, () => {
      const n = cellCount(grid);
      const g = seededRows(grid, 9, 7, n);
      const prior: PriorSpec = { ...rotated, stdProfile: Array.from(seededVector(n, 3), (x) => 1 + 0.3 * x) };
      const wasm = lagRows(grid, g, prior);
      disableWasmForTesting(true);
      const js = lagRows(grid, g, prior);
      disableWasmForTesting(false);
      expect(wasmAvailable()).toBe(true);
      expect(js.reduce((k, v, i) => k + (Object.is(v, wasm[i]) ? 0 : 1), 0)).toBe(0);
      // Row 0 has no entries: zeros, not the NaN the buffer was filled with.
      expect(Array.from(wasm.subarray(0, n)).every((v) => v === 0)).toBe(true);
      expect(relErr(wasm, denseRows(grid, g, prior))).toBeLessThan(1e-13);
    });
  }

  it('a wrong table (the grid with y and z swapped) is caught by the dense comparison', () => {
    const grid: Grid = { shape: [6, 5, 4], spacing: [1, 1, 1] };
    const g = seededRows(grid, 6, 5, 2);
    const rows = Int32Array.from({ length: 6 }, (_, k) => k);
    const bt = new Float64Array(6 * 120);
    lagRowsInto(lagTable({ shape: [6, 4, 5], spacing: [1, 1, 1] }, rotated.terms), g, undefined, rows, rows, bt);
    expect(relErr(bt, denseRows(grid, g, rotated))).toBeGreaterThan(1e-3);
  });

  it('the posterior from lag sums equals the one from circulant products to 1e-12 (nugget and profile included)', () => {
    const problem = benchProblem3(9, 23);
    const n = 729;
    const prior: PriorSpec = { ...rotated, nugget: 0.02, stdProfile: Array.from(seededVector(n, 5), (x) => 1 + 0.2 * x) };
    const lag = prepareStructuredPosterior(structuredProblem(problem, { products: 'lag' }), prior);
    const circ = prepareStructuredPosterior(structuredProblem(problem, { products: 'circulant' }), prior);
    expect([lag.products, circ.products]).toEqual(['lag', 'circulant']);
    expect(lag.padding).toEqual([]);
    expect(relErr(lag.Bt.data, circ.Bt.data)).toBeLessThan(1e-12);
    expect(relErr(lag.mean, circ.mean)).toBeLessThan(1e-12);
  });

  it('a projection with a derivative kernel (type-II gradients) from the lag table equals the circulant one to 1e-12', () => {
    const problem = benchProblem3(9, 21);
    const prior: PriorSpec = { ...rotated, stdProfile: Array.from(seededVector(729, 8), (x) => 1 + 0.2 * x) };
    // An even function of the offset (a stand-in for a term's derivative): a Gaussian bump in the scaled offset.
    const kernel = (ox: number, oy: number, oz: number) => Math.exp(-(ox * ox + 0.5 * oy * oy + 2 * oz * oz) / 9);
    const lag = structuredProjection(structuredProblem(problem, { products: 'lag' }), prior, kernel);
    const circ = structuredProjection(structuredProblem(problem, { products: 'circulant' }), prior, kernel);
    expect(relErr(lag.data, circ.data)).toBeLessThan(1e-12);
    // And not the prior's own projection (the kernel was used).
    expect(relErr(lag.data, structuredProjection(structuredProblem(problem, { products: 'lag' }), prior).data)).toBeGreaterThan(1e-2);
  });

  it('lag sums need a sparse operator: asking for them with a dense G is refused with the reason', () => {
    const problem = benchProblem3(6, 4);
    const dense = {
      ...problem,
      operator: { kind: 'dense' as const, matrix: sparseToDense((problem.operator as { matrix: SparseMatrix }).matrix) },
    };
    expect(() => prepareStructuredPosterior(structuredProblem(dense, { products: 'lag' }), rotated)).toThrow(/sparse operator/);
  });
});

describe('lagProductsPreferred: the cheaper route for the rows', () => {
  it('straight rays on 20³ and 32³: the lag sums; the same rays as a dense G, or a 2-D grid: circulant', () => {
    for (const [n, m] of [
      [20, 500],
      [32, 1000],
    ] as const) {
      const p = benchProblem3(n, m);
      expect(lagProductsPreferred(p.operator, p.grid)).toBe(true);
    }
    const p = benchProblem3(8, 10);
    const dense = { kind: 'dense' as const, matrix: sparseToDense((p.operator as { matrix: SparseMatrix }).matrix) };
    expect(lagProductsPreferred(dense, p.grid)).toBe(false);
    const flat: Grid = { shape: [64, 64], spacing: [1, 1] };
    expect(lagProductsPreferred({ kind: 'sparse', matrix: seededRows(flat, 40, 5, 1) }, flat)).toBe(false);
  });

  it('dense enough rows on a 3-D grid go back to circulant embedding (every cell in every row)', () => {
    const grid: Grid = { shape: [12, 12, 12], spacing: [1, 1, 1] };
    const n = cellCount(grid);
    const all = sparseFromCoordinates(
      4,
      n,
      Array.from({ length: 4 * n }, (_, i) => Math.floor(i / n)),
      Array.from({ length: 4 * n }, (_, i) => i % n),
      Array.from({ length: 4 * n }, () => 1),
    );
    expect(lagProductsPreferred({ kind: 'sparse', matrix: all }, grid)).toBe(false);
  });
});
