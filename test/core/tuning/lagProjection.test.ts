/**
 * The lag-table projection P = G Cm Gᵀ (src/core/tuning/lagProjection.ts) for operators with few non-zeros:
 * against numpy's G C Gᵀ from an independently built Cm (test/reference/lag_projection.py), against the
 * dense and FFT routes, and taken by the `auto` route where the FFT route would run.
 */
import { describe, expect, it } from 'vitest';
import { cellCoordinates, type Grid } from '../../../src/core/grid/grid.ts';
import { sparseFromCoordinates } from '../../../src/core/linalg/sparse.ts';
import type { Operator } from '../../../src/core/linalg/operator.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import { projectedPriorCovariance, TUNING_DENSE_LIMIT } from '../../../src/core/tuning/dataSpace.ts';
import { LAG_PROJECTION_LOOKUPS, lagProjectionApplies, lagTableProjection } from '../../../src/core/tuning/lagProjection.ts';
import { runPython } from '../../reference/python.ts';

/** Rows of 1–3 entries (points and short averages), some cells shared between rows, seeded. */
function fewEntries(m: number, n: number, rng: Random): { op: Operator; rows: number[]; cols: number[]; values: number[] } {
  const rows: number[] = [];
  const cols: number[] = [];
  const values: number[] = [];
  for (let a = 0; a < m; a++) {
    const k = 1 + (a % 3);
    for (let e = 0; e < k; e++) {
      rows.push(a);
      cols.push(Math.floor(rng.nextDouble() * n));
      values.push(0.5 + rng.nextDouble());
    }
  }
  return { op: { kind: 'sparse', matrix: sparseFromCoordinates(m, n, rows, cols, values) }, rows, cols, values };
}

/** A problem around an operator (data values 0, σ = 1: the projection does not read them). */
const asProblem = (grid: Grid, operator: Operator, m: number): Problem => ({
  title: 'lag projection',
  grid,
  operator,
  data: { values: new Float64Array(m), sigma: new Float64Array(m).fill(1) },
});

const maxRel = (a: ArrayLike<number>, b: ArrayLike<number>) => {
  let scale = 0;
  for (let i = 0; i < b.length; i++) scale = Math.max(scale, Math.abs(b[i]));
  let d = 0;
  for (let i = 0; i < b.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
  return d / scale;
};

describe('lag-table projection', () => {
  const grid: Grid = { shape: [13, 9], spacing: [2, 1.5], origin: [5, -3] };
  const n = 13 * 9;
  const rng = new Random(31);
  const s = Array.from({ length: n }, () => 0.5 + rng.nextDouble());
  const prior: PriorSpec = {
    mean: { constant: 0 },
    terms: [
      { kernel: 'exponential', variance: 1.7, lengths: [9, 3], angle: 25 },
      { kernel: 'gaussian', variance: 0.4, length: 4 },
    ],
    stdProfile: s,
    nugget: 0.03,
  };
  const m = 40;
  const { op, rows, cols, values } = fewEntries(m, n, rng);

  it('equals numpy G C Gᵀ with C built independently (rotated lengths, sum, std profile, nugget) to 1e-12', () => {
    const { x, y } = cellCoordinates(grid);
    const ref = runPython<{ P: number[] }>('lag_projection.py', {
      x: Array.from(x),
      y: Array.from(y),
      t1: { variance: 1.7, l1: 9, l2: 3, angle: 25 },
      t2: { variance: 0.4, length: 4 },
      s,
      nugget: 0.03,
      m,
      rows,
      cols,
      values,
    });
    expect(maxRel(lagTableProjection(op, grid, prior).data, ref.P)).toBeLessThan(1e-12);
  });

  it('equals the dense route (1-D and 2-D) to round-off, and the FFT route to 1e-10', () => {
    const problem = asProblem(grid, op, m);
    const stationary: PriorSpec = { mean: { constant: 0 }, terms: prior.terms, nugget: 0.03 };
    const dense = projectedPriorCovariance(problem, stationary, { route: 'dense' });
    const fft = projectedPriorCovariance(problem, stationary, { route: 'fft' });
    const lag = lagTableProjection(op, grid, stationary);
    expect(maxRel(lag.data, dense.data)).toBeLessThan(1e-13);
    expect(maxRel(lag.data, fft.data)).toBeLessThan(1e-10);
    const g1: Grid = { shape: [50], spacing: [0.5] };
    const one = fewEntries(12, 50, new Random(5)).op;
    const p1: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 2, length: 3 }] };
    expect(
      maxRel(lagTableProjection(one, g1, p1).data, projectedPriorCovariance(asProblem(g1, one, 12), p1, { route: 'dense' }).data),
    ).toBeLessThan(1e-13);
  });

  it('is what `auto` takes above the dense limit for few non-zeros, and not for a dense operator or many non-zeros', () => {
    const big: Grid = { shape: [40, 40], spacing: [1, 1] };
    expect(40 * 40).toBeGreaterThan(TUNING_DENSE_LIMIT);
    const pts = fewEntries(30, 1600, new Random(9)).op;
    const stationary: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 6 }] };
    const problem = asProblem(big, pts, 30);
    const auto = projectedPriorCovariance(problem, stationary);
    expect(auto.data).toEqual(lagTableProjection(pts, big, stationary).data);
    expect(maxRel(auto.data, projectedPriorCovariance(problem, stationary, { route: 'fft' }).data)).toBeLessThan(1e-10);
    expect(lagProjectionApplies(pts, big)).toBe(true);
    expect(lagProjectionApplies({ kind: 'dense', matrix: { rows: 1, cols: 1600, data: new Float64Array(1600) } }, big)).toBe(false);
    const many = Math.ceil(Math.sqrt(LAG_PROJECTION_LOOKUPS)) + 1;
    const wide = sparseFromCoordinates(
      1,
      many,
      new Array(many).fill(0),
      Array.from({ length: many }, (_, k) => k),
      new Array(many).fill(1),
    );
    expect(lagProjectionApplies({ kind: 'sparse', matrix: wide }, { shape: [many], spacing: [1] })).toBe(false);
  });
});
