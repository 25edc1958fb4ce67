/**
 * Column split of the posterior standard deviations over worker_threads (src/core/parallel):
 * the split result equals the single-thread structuredPosteriorStd bit for bit (Object.is per
 * cell) for several pool sizes and block alignments, and both match the dense scipy route of
 * test/bench/dense_route.py (Debian python3-scipy: Cm entry by entry, cho_factor,
 * solve_triangular; Tarantola 2005 §3.2) to 1e-10 relative.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { prepareStructuredPosterior, structuredPosteriorStd, VARIANCE_BLOCK } from '../../../src/core/inverse/structured.ts';
import { columnRanges, parallelPosteriorStd, runVarianceTask, varianceTask } from '../../../src/core/parallel/blocks.ts';
import { nodeBlockPool } from '../../../src/core/parallel/node.ts';
import type { SparseMatrix } from '../../../src/core/linalg/sparse.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { benchProblem } from '../../bench/cases/fft.ts';
import { denseScipyRoute } from '../../reference/python.ts';

const pools = [nodeBlockPool(2), nodeBlockPool(3)];
afterAll(async () => {
  await Promise.all(pools.map((p) => p.close()));
});

const prior = (n: number): PriorSpec => ({ mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: n / 8 }] });

describe('columnRanges', () => {
  it.each([
    [1000, 2],
    [1000, 7],
    [64, 4],
    [65, 2],
    [5, 3],
  ])('n = %i in %i parts: contiguous, covering, starts aligned to VARIANCE_BLOCK', (n, parts) => {
    const r = columnRanges(n, parts);
    expect(r[0][0]).toBe(0);
    expect(r[r.length - 1][1]).toBe(n);
    for (let k = 1; k < r.length; k++) expect(r[k][0]).toBe(r[k - 1][1]);
    for (const [c0, c1] of r) {
      expect(c0 % VARIANCE_BLOCK).toBe(0);
      expect(c1).toBeGreaterThan(c0);
    }
    expect(r.length).toBeLessThanOrEqual(parts);
  });
  it('refuses a part count below 1', () => {
    expect(() => columnRanges(10, 0)).toThrow('parts must be an integer ≥ 1, got 0');
  });
});

describe('split standard deviations', () => {
  // 24 × 20 cells (N = 480, not a multiple of 64), 37 data (not a multiple of 4): every tail path runs.
  const problem = benchProblem(24, 37);
  const grid = { shape: [24, 20], spacing: [1, 1] };
  const p2: typeof problem = { ...problem, grid };
  const g = problem.operator.matrix as SparseMatrix;
  const sub = { ...g, cols: 480, colIdx: g.colIdx.map((c) => c % 480) };
  const small = { ...p2, operator: { kind: 'sparse' as const, matrix: sub } };
  const state = prepareStructuredPosterior(small, prior(24));
  const single = structuredPosteriorStd(state);

  it.each([0, 1])('pool %i: bit-identical to the single-thread run', async (k) => {
    const split = await parallelPosteriorStd(state, pools[k]);
    expect(split.length).toBe(single.length);
    const differ = Array.from(split).filter((v, i) => !Object.is(v, single[i]));
    expect(differ).toEqual([]);
  });

  it.each([0, 1])('pool %i, Bᵀ in shared memory (as the split products leave it): no copy in the task, bit-identical', async (k) => {
    const data = new Float64Array(new SharedArrayBuffer(state.Bt.data.length * 8));
    data.set(state.Bt.data);
    const shared = { ...state, Bt: { ...state.Bt, data } };
    const task = varianceTask(shared.L, shared.Bt, shared.priorVariance, 64, 128);
    expect(task.bt).toBe(data);
    expect([task.cols, task.first]).toEqual([shared.Bt.cols, 64]);
    const split = await parallelPosteriorStd(shared, pools[k]);
    expect(Array.from(split).filter((v, i) => !Object.is(v, single[i]))).toEqual([]);
    // The caller's arrays are still there (nothing was transferred away).
    expect(shared.priorVariance.length).toBe(single.length);
    expect(shared.L.data.length).toBe(state.L.data.length);
  });

  it('unaligned ranges run in-thread are bit-identical too', () => {
    const n = state.Bt.cols;
    const cuts = [0, 7, 130, 131, 300, n];
    const v = new Float64Array(n);
    for (let k = 0; k + 1 < cuts.length; k++)
      v.set(runVarianceTask(varianceTask(state.L, state.Bt, state.priorVariance, cuts[k], cuts[k + 1])), cuts[k]);
    for (let i = 0; i < n; i++) expect(Object.is(Math.sqrt(v[i]), single[i])).toBe(true);
  });

  it('64² with M = 400 (the benchmark problem), split anyway, matches the dense scipy route to 1e-10', async () => {
    const p = benchProblem(64);
    const st = prepareStructuredPosterior(p, prior(64));
    const split = await parallelPosteriorStd(st, pools[0]);
    const one = structuredPosteriorStd(st);
    expect(Array.from(split).every((v, i) => Object.is(v, one[i]))).toBe(true);
    const out = { problems: [denseScipyRoute(p, 8)] };
    const ref = out.problems[0];
    let d = 0;
    for (let i = 0; i < split.length; i++) d = Math.max(d, Math.abs(split[i] - ref.std[i]));
    expect(d).toBeLessThanOrEqual(1e-10 * Math.max(...ref.std));
  }, 60_000);

  it('a closed pool refuses work', async () => {
    const p = nodeBlockPool(1);
    await p.close();
    await expect(p.run(varianceTask(state.L, state.Bt, state.priorVariance, 0, 4))).rejects.toThrow('worker pool is closed');
  });
});
