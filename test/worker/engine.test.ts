/**
 * The engine's progressive posterior: on the FFT path the mean and data fit go out first (one
 * `partial`), then the full result, all under the request's id; the partial's numbers are the
 * final result's, bit for bit, and moving its buffers leaves the result intact.
 */
import { parseProblemFile } from '../../src/core/io/problemFile.ts';
import { transferables } from '../../src/worker/protocol.ts';
import { describe, expect, it } from 'vitest';
import { answerRequest, Engine, PARTIAL_MIN_FLOPS, problemView, type EngineOptions } from '../../src/worker/engine.ts';
import type { PosteriorPartial, PosteriorResult, WorkerReply, WorkerRequest } from '../../src/worker/protocol.ts';
import { varianceFlops } from '../../src/core/parallel/blocks.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { M, PRIOR, profileProblem, sameBits } from './problems.ts';

type Job = Exclude<WorkerRequest, { kind: 'cancel' }>;

/** Replies as the main thread would get them: structured-cloned with the transfer list (which detaches the sender's buffers). */
async function replies(
  problem: Problem,
  options: EngineOptions,
  job: Omit<Extract<Job, { kind: 'posterior' }>, 'problemVersion'> = { id: 7, kind: 'posterior', prior: PRIOR },
) {
  const engine = new Engine(options);
  await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem });
  const out: WorkerReply[] = [];
  await answerRequest(engine, { ...job, problemVersion: 1 }, (reply, transfer = []) => out.push(structuredClone(reply, { transfer })));
  return out;
}

const kinds = (rs: WorkerReply[]) => rs.filter((r) => r.type !== 'progress').map((r) => r.type);
const partialOf = (rs: WorkerReply[]) => (rs.find((r) => r.type === 'partial') as Extract<WorkerReply, { type: 'partial' }>).partial;
const resultOf = (rs: WorkerReply[]) =>
  (rs.find((r) => r.type === 'result') as Extract<WorkerReply, { type: 'result' }>).result as PosteriorResult;

describe('Engine: posterior mean before the bands (FFT path)', () => {
  for (const errors of ['diagonal', 'full'] as const) {
    it(`${errors} Cd: one partial, then the result, same id; mean, fit and prior part bit-identical to the result`, async () => {
      const rs = await replies(profileProblem(160, errors), { partialMinFlops: 0 });
      expect(kinds(rs)).toEqual(['partial', 'result']);
      expect(rs.every((r) => r.id === 7)).toBe(true);
      const p: PosteriorPartial = partialOf(rs);
      const { summary, priorMean } = resultOf(rs);
      expect(p.path).toBe('fft');
      expect(summary.path).toBe('fft');
      // Non-empty: a result buffer shared with the (transferred) partial would arrive detached, length 0.
      expect(summary.mean.length).toBe(160);
      expect(summary.std.length).toBe(160);
      expect(sameBits(p.mean, summary.mean)).toBe(true);
      expect(sameBits(p.predicted, summary.predicted)).toBe(true);
      expect(sameBits(p.residuals, summary.residuals)).toBe(true);
      expect(sameBits(p.priorMean, priorMean)).toBe(true);
      expect(sameBits(p.priorStd, summary.priorStd)).toBe(true);
      expect(Object.is(p.chi2, summary.chi2)).toBe(true);
      expect(summary.fitReference!.expected).toBeGreaterThan(0);
      expect([p.dataCount, p.parameterCount]).toEqual([M, 160]);
      // The mean moved away from the prior mean (the data say something), so equal bits are not trivial.
      expect(p.mean.some((v, i) => Math.abs(v - p.priorMean[i]) > 1e-3)).toBe(true);
    });
  }

  it('the partial is sent only when the variance solve is worth waiting for (boundary at partialMinFlops)', async () => {
    const work = varianceFlops(M, 160);
    expect(kinds(await replies(profileProblem(160, 'diagonal'), { partialMinFlops: work }))).toEqual(['partial', 'result']);
    expect(kinds(await replies(profileProblem(160, 'diagonal'), { partialMinFlops: work + 1 }))).toEqual(['result']);
    // Default threshold: this small problem (1.2e4 multiply-adds) is far below it.
    expect(work).toBeLessThan(PARTIAL_MIN_FLOPS);
    expect(kinds(await replies(profileProblem(160, 'diagonal'), {}))).toEqual(['result']);
  });

  it('the dense path (N < 128) stays single-shot', async () => {
    const rs = await replies(profileProblem(100, 'diagonal'), { partialMinFlops: 0 });
    expect(kinds(rs)).toEqual(['result']);
    expect(resultOf(rs).summary.path).toBe('dense');
  });

  it('a bad prior gives one error reply with the id and the field, no partial', async () => {
    const bad = { ...PRIOR, terms: [{ kernel: 'exponential' as const, variance: 1, length: -2 }] };
    const rs = await replies(profileProblem(160, 'diagonal'), { partialMinFlops: 0 }, { id: 9, kind: 'posterior', prior: bad });
    expect(kinds(rs)).toEqual(['error']);
    const e = rs.find((r) => r.type === 'error') as Extract<WorkerReply, { type: 'error' }>;
    expect(e.id).toBe(9);
    expect(e.error.field).toMatch(/length/);
  });
});

describe('Engine: the cached FFT state survives transferred results', () => {
  it('the same prior twice, then resolution and draws: identical results, nothing detached', async () => {
    const engine = new Engine({ partialMinFlops: 0 });
    await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem: profileProblem(160, 'diagonal') });
    const ask = async (job: Job) => {
      const out: WorkerReply[] = [];
      await answerRequest(engine, job, (reply, transfer = []) => out.push(structuredClone(reply, { transfer })));
      return out;
    };
    const first = resultOf(await ask({ id: 2, kind: 'posterior', prior: PRIOR, problemVersion: 1 }));
    const second = resultOf(await ask({ id: 3, kind: 'posterior', prior: PRIOR, problemVersion: 1 }));
    expect(second.summary.mean.length).toBe(160);
    expect(sameBits(first.summary.mean, second.summary.mean)).toBe(true);
    expect(sameBits(first.summary.std, second.summary.std)).toBe(true);
    const res = await ask({ id: 4, kind: 'resolution', prior: PRIOR, cell: 5, problemVersion: 1 });
    const row = (res.find((r) => r.type === 'result') as Extract<WorkerReply, { type: 'result' }>).result as { row: Float64Array };
    expect(row.row.length).toBe(160);
    expect(row.row.some((v) => v !== 0)).toBe(true);
  });
});

describe('Engine: FFT-path products over a thread pool', () => {
  it('a 96² grid with 160 rays splits the Bᵀ products over worker_threads; the result equals the one-thread engine bit for bit', async () => {
    const { nodeBlockPool } = await import('../../src/core/parallel/node.ts');
    const { benchProblem } = await import('../bench/cases/fft.ts');
    const { productsWorthSplitting } = await import('../../src/core/parallel/products.ts');
    const problem = benchProblem(96, 160);
    expect(productsWorthSplitting(160, problem.grid.shape, 2)).toBe(true);
    const pool = nodeBlockPool(2);
    let productTasks = 0;
    const counted = {
      ...pool,
      size: pool.size,
      run: pool.run.bind(pool),
      close: pool.close.bind(pool),
      runProducts: (t: never, port: number) => {
        productTasks++;
        return pool.runProducts(t, port);
      },
    };
    const prior = { mean: { constant: 0.2 }, terms: [{ kernel: 'matern' as const, nu: 1.5, variance: 1e-3, length: 12 }] };
    const run = async (options: EngineOptions) => {
      const engine = new Engine(options);
      await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem });
      return (await engine.handle({ id: 2, kind: 'posterior', prior, problemVersion: 1 })) as PosteriorResult;
    };
    try {
      const split = await run({ pool: { get: () => counted, threads: 2 } });
      const one = await run({});
      expect(productTasks).toBeGreaterThan(0);
      expect(split.summary.path).toBe('fft');
      expect(sameBits(split.summary.mean, one.summary.mean)).toBe(true);
      expect(sameBits(split.summary.std, one.summary.std)).toBe(true);
    } finally {
      await pool.close();
    }
  }, 60_000);
});

describe('problemView shares no buffer with the worker’s problem', () => {
  it('its grid (a cell list’s centres) and data geometry are copies: transferring the view leaves the worker’s intact', () => {
    const { problem } = parseProblemFile(
      'p.json',
      JSON.stringify({
        kind: 'priorscope.problem',
        version: 1,
        cells: {
          centres: [
            [0, 0],
            [1, 2],
            [3, 1],
          ],
        },
        operator: { dense: [[1, 1, 1]] },
        data: { values: [1], sigma: [0.1], positions: [[1, 1]] },
      }),
    );
    const view = problemView(problem, 1, { demoId: null, description: '', startPrior: null, truthPrior: null });
    const mine = new Set(transferables(problem));
    for (const b of transferables(view)) expect(mine.has(b)).toBe(false);
    expect(view.grid).toEqual(problem.grid);
    expect(view.geometry).toEqual(problem.data.geometry);
  });
});
