/**
 * The engine's progressive posterior: on the FFT path the mean and data fit go out first (one
 * `partial`), then the full result, all under the request's id; the partial's numbers are the
 * final result's, bit for bit, and moving its buffers leaves the result intact.
 */
import { describe, expect, it } from 'vitest';
import { answerRequest, Engine, PARTIAL_MIN_FLOPS, type EngineOptions } from '../../src/worker/engine.ts';
import type { PosteriorPartial, PosteriorResult, WorkerReply, WorkerRequest } from '../../src/worker/protocol.ts';
import { varianceFlops } from '../../src/core/parallel/blocks.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { M, PRIOR, profileProblem, sameBits } from './problems.ts';

type Job = Exclude<WorkerRequest, { kind: 'cancel' }>;

/** Replies as the main thread would get them: structured-cloned with the transfer list (which detaches the sender's buffers). */
async function replies(problem: Problem, options: EngineOptions, job: Omit<Extract<Job, { kind: 'posterior' }>, 'problemVersion'> = { id: 7, kind: 'posterior', prior: PRIOR }) {
  const engine = new Engine(options);
  await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem });
  const out: WorkerReply[] = [];
  await answerRequest(engine, { ...job, problemVersion: 1 }, (reply, transfer = []) => out.push(structuredClone(reply, { transfer })));
  return out;
}

const kinds = (rs: WorkerReply[]) => rs.filter((r) => r.type !== 'progress').map((r) => r.type);
const partialOf = (rs: WorkerReply[]) => (rs.find((r) => r.type === 'partial') as Extract<WorkerReply, { type: 'partial' }>).partial;
const resultOf = (rs: WorkerReply[]) => (rs.find((r) => r.type === 'result') as Extract<WorkerReply, { type: 'result' }>).result as PosteriorResult;

describe('Engine: posterior mean before the bands (FFT path)', () => {
  for (const errors of ['diagonal', 'full'] as const) {
    it(`${errors} Cd: one partial, then the result, same id; mean, fit and prior part bit-identical to the result`, async () => {
      const rs = await replies(profileProblem(160, errors), { partialMinFlops: 0 });
      expect(kinds(rs)).toEqual(['partial', 'result']);
      expect(rs.every((r) => r.id === 7)).toBe(true);
      const p: PosteriorPartial = partialOf(rs);
      const { summary, priorMean, chi2Interval } = resultOf(rs);
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
      expect(p.chi2Interval).toEqual(chi2Interval);
      expect([p.dataCount, p.parameterCount]).toEqual([M, 160]);
      // The mean moved away from the prior mean (the data say something), so equal bits are not trivial.
      expect(p.mean.some((v, i) => Math.abs(v - p.priorMean[i]!) > 1e-3)).toBe(true);
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
