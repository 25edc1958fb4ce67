/**
 * Bᵀ = G Cm split over worker_threads (src/core/parallel/products.ts): the split state equals the
 * single-thread prepareStructuredPosterior bit for bit (Object.is on every entry of Bᵀ, L, α, the
 * mean and diag Cm) for 1-D, 2-D and 3-D grids, odd M, sparse and dense G, profile + nugget, with and
 * without cached spectra, shared Bᵀ and rows transferred back, caller share on and off, pools of
 * 2 and 3 threads. The split mean is also checked against the dense scipy route of
 * test/bench/dense_route.py (Debian python3-scipy: Cm entry by entry, cho_factor / cho_solve;
 * Tarantola 2005 §3.2) to 1e-10 relative.
 */
import { afterAll, describe, expect, it } from 'vitest';
import {
  pairOrder,
  prepareStructuredPosterior,
  structuredProblem,
  type RowProducts,
  type StructuredPosteriorState,
} from '../../../src/core/inverse/structured.ts';
import { matrix } from '../../../src/core/linalg/matrix.ts';
import { sparseFromCoordinates, sparseToDense, type SparseMatrix } from '../../../src/core/linalg/sparse.ts';
import { operatorTimesTransposedSymmetric, type Operator } from '../../../src/core/linalg/operator.ts';
import { nodeBlockPool } from '../../../src/core/parallel/node.ts';
import { portPool, answerTask, type TaskPort, type TaskReply, type TaskRequest } from '../../../src/core/parallel/pool.ts';
import {
  pairRanges,
  prepareStructuredPosteriorParallel,
  productsWorthSplitting,
  ProductsThreadState,
  runProductsTask,
  structuredShapeProductsParallel,
  type ParallelProductsOptions,
} from '../../../src/core/parallel/products.ts';
import type { ProductsTask } from '../../../src/core/parallel/tasks.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import { benchProblem } from '../../bench/cases/fft.ts';
import { benchProblem3 } from '../../bench/cases/fft3.ts';
import { denseScipyRoute } from '../../reference/python.ts';

const pools = [nodeBlockPool(2), nodeBlockPool(3)];
afterAll(async () => {
  await Promise.all(pools.map((p) => p.close()));
});

const matern = (length: number): PriorSpec => ({ mean: { constant: 0.1 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length }] });

/** 24 × 20 cells (N = 480) with 37 straight rays (odd M): the rays of benchProblem(24) folded onto the smaller grid. */
function sparse2d(): Problem {
  const p = benchProblem(24, 37);
  const g = p.operator.matrix as SparseMatrix;
  const sub = { ...g, cols: 480, colIdx: g.colIdx.map((c) => c % 480) };
  return { ...p, grid: { shape: [24, 20], spacing: [1, 1] }, operator: { kind: 'sparse', matrix: sub } };
}

function dense2d(): Problem {
  const p = sparse2d();
  return { ...p, operator: { kind: 'dense', matrix: sparseToDense(p.operator.matrix as SparseMatrix) } };
}

/** 1-D grid of 150 cells, 15 data (odd), dense seeded G, σ = 0.1. */
function dense1d(): Problem {
  const n = 150;
  const m = 15;
  const rng = new Random(11);
  const g = matrix(m, n);
  rng.fillNormal(g.data);
  const values = rng.fillNormal(new Float64Array(m));
  return {
    grid: { shape: [n], spacing: [0.5] },
    operator: { kind: 'dense', matrix: g },
    data: { values, sigma: new Float64Array(m).fill(0.1) },
  };
}

/** 3-D: 8 × 8 × 8 cells (N = 512), 37 straight rays between opposite faces (odd M; test/bench/cases/fft3.ts). */
function sparse3d(): Problem {
  return benchProblem3(8, 37);
}

function withProfile(prior: PriorSpec, n: number): PriorSpec {
  return { ...prior, nugget: 0.01, stdProfile: Array.from({ length: n }, (_, i) => 0.5 + 0.4 * Math.sin(i / 9)) };
}

/** Entries of two states that differ (Object.is), per field; all zero when bit-identical. */
function differences(a: StructuredPosteriorState, b: StructuredPosteriorState): Record<string, number> {
  const count = (x: Float64Array, y: Float64Array) =>
    x.length !== y.length ? -1 : x.reduce((k, v, i) => k + (Object.is(v, y[i]) ? 0 : 1), 0);
  return {
    Bt: count(a.Bt.data, b.Bt.data),
    L: count(a.L.data, b.L.data),
    alpha: count(a.alpha, b.alpha),
    mean: count(a.mean, b.mean),
    priorVariance: count(a.priorVariance, b.priorVariance),
  };
}
const none = { Bt: 0, L: 0, alpha: 0, mean: 0, priorVariance: 0 };

/** Label, problem, prior, and how the rows are computed (auto: circulant below 3-D, lag sums for these 3-D rays). */
const problems: [string, () => Problem, (n: number) => PriorSpec, RowProducts][] = [
  ['2-D sparse G, odd M', sparse2d, () => matern(3), 'auto'],
  ['2-D dense G, odd M', dense2d, () => matern(3), 'auto'],
  ['1-D dense G, odd M', dense1d, () => matern(4), 'auto'],
  ['2-D sparse G with profile + nugget', sparse2d, (n) => withProfile(matern(3), n), 'auto'],
  ['1-D dense G with profile + nugget', dense1d, (n) => withProfile(matern(4), n), 'auto'],
  ['3-D sparse G, odd M, circulant', sparse3d, () => matern(2), 'circulant'],
  ['3-D sparse G with profile + nugget, circulant', sparse3d, (n) => withProfile(matern(2), n), 'circulant'],
  ['3-D sparse G, odd M, lag sums', sparse3d, () => matern(2), 'auto'],
  ['3-D sparse G with profile + nugget, lag sums', sparse3d, (n) => withProfile(matern(2), n), 'lag'],
];
const variants: [string, number, ParallelProductsOptions][] = [
  ['pool 2, caller share, shared Bᵀ', 0, {}],
  ['pool 2, caller share, rows transferred', 0, { shared: false }],
  ['pool 3, caller idle, shared Bᵀ', 1, { callerShare: false }],
  ['pool 3, caller share, rows transferred', 1, { shared: false }],
];

describe('prepareStructuredPosteriorParallel: bit-identical to one thread', () => {
  for (const [label, make, priorOf, products] of problems) {
    it.each(variants)(`${label}: %s, cold then cached`, async (_v, k, opts) => {
      const problem = make();
      const n = problem.grid.shape.reduce((a, b) => a * b, 1);
      const prior = priorOf(n);
      const changed: PriorSpec = { ...prior, terms: [{ kernel: 'matern', nu: 1.5, variance: 2, length: 5 }] };
      const sp = structuredProblem(problem, { products });
      const oneThread = (p: PriorSpec) => prepareStructuredPosterior(structuredProblem(problem, { products }), p);
      const cold = await prepareStructuredPosteriorParallel(sp, prior, pools[k], opts);
      expect(cold.spectraCached).toBe(false);
      expect(cold.products).toBe(label.endsWith('lag sums') ? 'lag' : 'circulant');
      expect(differences(cold, oneThread(prior))).toEqual(none);
      const warm = await prepareStructuredPosteriorParallel(sp, changed, pools[k], opts);
      // Lag sums keep no spectra: every prior is computed afresh.
      expect(warm.spectraCached).toBe(cold.products === 'circulant');
      expect(differences(warm, oneThread(changed))).toEqual(none);
    });
  }

  it('with Bᵀ shared and G sparse the threads form K = G Bᵀᵀ in their own rows’ columns: the one-thread K bit for bit; not for a dense G or rows sent back', async () => {
    for (const [make, prior] of [
      [sparse3d, withProfile(matern(2), 512)],
      [sparse2d, matern(3)],
    ] as const) {
      const problem = make();
      for (const k of [0, 1]) {
        const p = await structuredShapeProductsParallel(structuredProblem(problem), prior, pools[k]);
        const K = operatorTimesTransposedSymmetric(problem.operator, p.Bt);
        expect(p.gram).toBeDefined();
        expect(p.gram!.data.reduce((c, v, i) => c + (Object.is(v, K.data[i]) ? 0 : 1), 0)).toBe(0);
      }
      const sent = await structuredShapeProductsParallel(structuredProblem(problem), prior, pools[0], { shared: false });
      expect(sent.gram).toBeUndefined();
    }
    const dense = await structuredShapeProductsParallel(structuredProblem(dense2d()), matern(3), pools[0]);
    expect(dense.gram).toBeUndefined();
  });

  it('without a cache budget nothing is cached, and the result is still identical', async () => {
    const problem = sparse2d();
    const sp = structuredProblem(problem, { cacheBytes: 0 });
    for (const prior of [matern(3), matern(4)]) {
      const st = await prepareStructuredPosteriorParallel(sp, prior, pools[0]);
      expect(st.spectraCached).toBe(false);
      expect(differences(st, prepareStructuredPosterior(problem, prior))).toEqual(none);
    }
  });

  it('a profile change recomputes the spectra (the cache key includes the profile)', async () => {
    const problem = sparse2d();
    const sp = structuredProblem(problem);
    await prepareStructuredPosteriorParallel(sp, withProfile(matern(3), 480), pools[0]);
    const other = { ...matern(3), stdProfile: Array.from({ length: 480 }, (_, i) => 1 + (i % 3) / 10) };
    const st = await prepareStructuredPosteriorParallel(sp, other, pools[0]);
    expect(st.spectraCached).toBe(false);
    expect(differences(st, prepareStructuredPosterior(problem, other))).toEqual(none);
  });

  it('two problems alternating on one pool: each thread is sent G again when it holds the other one', async () => {
    const a = structuredProblem(sparse2d());
    const b = structuredProblem(dense1d());
    for (let r = 0; r < 2; r++) {
      const sa = await prepareStructuredPosteriorParallel(a, matern(3), pools[0]);
      const sb = await prepareStructuredPosteriorParallel(b, matern(4), pools[0]);
      expect(differences(sa, prepareStructuredPosterior(a.problem, matern(3)))).toEqual(none);
      expect(differences(sb, prepareStructuredPosterior(b.problem, matern(4)))).toEqual(none);
    }
  });

  it('64² with M = 400 (the benchmark problem): identical to one thread, and the mean matches the dense scipy route to 1e-10', async () => {
    const p = benchProblem(64);
    const prior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 8 }] };
    const st = await prepareStructuredPosteriorParallel(p, prior, pools[0]);
    expect(differences(st, prepareStructuredPosterior(p, prior))).toEqual(none);
    const out = { problems: [denseScipyRoute(p, 8)] };
    const ref = out.problems[0].mean;
    let d = 0;
    let scale = 0;
    for (let i = 0; i < ref.length; i++) {
      d = Math.max(d, Math.abs(st.mean[i] - ref[i]));
      scale = Math.max(scale, Math.abs(ref[i]));
    }
    expect(d).toBeLessThanOrEqual(1e-10 * scale);
  }, 60_000);
});

describe('errors', () => {
  it('a bad prior rejects with the InputError of the single-thread path', async () => {
    const bad: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: -1, length: 3 }] };
    let single = '';
    try {
      prepareStructuredPosterior(sparse2d(), bad);
    } catch (e) {
      single = (e as Error).message;
    }
    expect(single).not.toBe('');
    await expect(prepareStructuredPosteriorParallel(sparse2d(), bad, pools[0])).rejects.toThrow(single);
  });

  it('a worker that fails rejects with a message naming the task kind and the cause', async () => {
    const p = sparse2d();
    const task: ProductsTask = {
      kind: 'products',
      token: 987654,
      grid: p.grid,
      prior: matern(3),
      operator: null,
      rows: Int32Array.of(0, 1),
      cacheBytes: 0,
      out: null,
      lag: false,
      gram: null,
    };
    await expect(pools[0].runProducts(task, 1)).rejects.toThrow(
      'products worker: products task: this thread holds no operator for problem token 987654',
    );
  });

  it('a port outside the pool is refused', async () => {
    const p = sparse2d();
    const task: ProductsTask = {
      kind: 'products',
      token: 1,
      grid: p.grid,
      prior: matern(3),
      operator: p.operator,
      rows: Int32Array.of(0),
      cacheBytes: 0,
      out: null,
      lag: false,
      gram: null,
    };
    await expect(pools[0].runProducts(task, 2)).rejects.toThrow('products task: port must be an integer in 0 … 1, got 2');
  });

  it('a closed pool rejects the split', async () => {
    const pool = nodeBlockPool(2);
    await pool.close();
    await expect(prepareStructuredPosteriorParallel(sparse2d(), matern(3), pool)).rejects.toThrow('worker pool is closed');
  });
});

describe('pieces', () => {
  it.each([
    [19, 2],
    [200, 3],
    [1, 4],
    [7, 7],
  ])('pairRanges(%i, %i): contiguous, covering, nearly equal, no empty range', (pairs, parts) => {
    const r = pairRanges(pairs, parts);
    expect(r[0][0]).toBe(0);
    expect(r[r.length - 1][1]).toBe(pairs);
    for (let k = 1; k < r.length; k++) expect(r[k][0]).toBe(r[k - 1][1]);
    const sizes = r.map(([a, b]) => b - a);
    expect(Math.min(...sizes)).toBeGreaterThan(0);
    expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
    expect(r.length).toBe(Math.min(pairs, parts));
  });

  it.each([[[0, 10, 30, 37]], [[0, 2, 36, 37]], [[0, 37]]])(
    'in-thread shares cut at pair boundaries %j give the single-thread Bᵀ bit for bit (profile + nugget)',
    (cuts) => {
      const problem = sparse2d();
      const prior = withProfile(matern(3), 480);
      const one = prepareStructuredPosterior(problem, prior);
      const order = pairOrder(problem.operator, 24, 37);
      const bt = new Float64Array(37 * 480);
      const state = new ProductsThreadState();
      for (let k = 0; k + 1 < cuts.length; k++) {
        const rows = order.slice(cuts[k], cuts[k + 1]);
        const r = runProductsTask(
          {
            kind: 'products',
            token: 5,
            grid: problem.grid,
            prior,
            operator: problem.operator,
            rows,
            cacheBytes: 0,
            out: null,
            lag: one.products === 'lag',
            gram: null,
          },
          state,
        );
        for (let i = 0; i < rows.length; i++) bt.set(r.rows!.subarray(i * 480, (i + 1) * 480), rows[i] * 480);
      }
      expect(bt.reduce((c, v, i) => c + (Object.is(v, one.Bt.data[i]) ? 0 : 1), 0)).toBe(0);
    },
  );

  it('productsWorthSplitting on the lag route counts the sums, not the transforms they replace', () => {
    // 32³ with 100 point data: the transforms would cover 50 × 64³ points (split), the sums are 100 × 32³ multiply-adds (not).
    const n = 32 ** 3;
    const points: Operator = {
      kind: 'sparse',
      matrix: sparseFromCoordinates(
        100,
        n,
        Array.from({ length: 100 }, (_, k) => k),
        Array.from({ length: 100 }, (_, k) => (k * 331) % n),
        Array.from({ length: 100 }, () => 1),
      ),
    };
    expect(productsWorthSplitting(100, [32, 32, 32], 2)).toBe(true);
    expect(productsWorthSplitting(100, [32, 32, 32], 2, points)).toBe(false);
    // The 20³ rays of the benchmark: enough sums to split either way.
    const rays = benchProblem3(20, 500);
    expect(productsWorthSplitting(500, rays.grid.shape, 2, rays.operator)).toBe(true);
  });

  it('productsWorthSplitting: never on one thread; no at 64² with M = 400 (no gain measured with cached spectra), yes at 128² and at 64² with M = 800', () => {
    expect(productsWorthSplitting(400, [128, 128], 1)).toBe(false);
    expect(productsWorthSplitting(400, [64, 64], 2)).toBe(false);
    expect(productsWorthSplitting(800, [64, 64], 2)).toBe(true);
    expect(productsWorthSplitting(400, [128, 128], 2)).toBe(true);
    expect(productsWorthSplitting(20, [16, 16], 2)).toBe(false);
  });
});

describe('portPool with pinned tasks (in-thread ports)', () => {
  /** Ports that answer with answerTask after a delay, recording which port ran which task. */
  function fakePorts(delays: number[], log: [number, number][]): TaskPort[] {
    return delays.map((ms, i) => {
      let reply: (r: TaskReply) => void = () => {};
      const state = new ProductsThreadState();
      return {
        post: (message: TaskRequest) => {
          log.push([i, message.id]);
          setTimeout(() => reply(answerTask(message, state).reply), ms);
        },
        listen: (onReply) => {
          reply = onReply;
        },
        terminate: () => {},
      };
    });
  }

  it('a pinned task waits for its own port even when another port is free', async () => {
    const log: [number, number][] = [];
    const pool = portPool(fakePorts([30, 1], log));
    const p = sparse2d();
    const task = (rows: number[]): ProductsTask => ({
      kind: 'products',
      token: 3,
      grid: p.grid,
      prior: matern(3),
      operator: p.operator,
      rows: Int32Array.from(rows),
      cacheBytes: 0,
      out: null,
      lag: false,
      gram: null,
    });
    const results = await Promise.all([
      pool.runProducts(task([0, 1]), 0),
      pool.runProducts(task([2, 3]), 0),
      pool.runProducts(task([4]), 1),
    ]);
    expect(log.map(([port]) => port).sort()).toEqual([0, 0, 1]);
    expect(log.filter(([port]) => port === 0).map(([, id]) => id)).toEqual([0, 1]);
    expect(results.map((r) => r.rows!.length)).toEqual([2 * 480, 2 * 480, 480]);
    await pool.close();
  });

  it('started(): resolves once every port has answered a ping, and only pings once', async () => {
    const log: [number, number][] = [];
    const pool = portPool(fakePorts([25, 5], log));
    let done = false;
    const first = pool.started!().then(() => {
      done = true;
    });
    await new Promise((r) => setTimeout(r, 12));
    expect(done).toBe(false); // port 0 has not answered yet
    await first;
    expect(log.map(([port]) => port).sort()).toEqual([0, 1]);
    await pool.started!();
    expect(log.length).toBe(2);
    await pool.close();
  });
});
