/**
 * The worker side of prior selection (src/worker/tuning.ts): the row-by-row evidence map must give
 * the core's whole-map numbers, cancellation must stop between rows, both through a flag and
 * through the queue's supersede / cancel path, and merged calibration chunks must keep the
 * identities that hold for any calibration result. The core itself is checked against scipy and
 * brute force in test/core/tuning and test/reference.
 */
import { describe, expect, it } from 'vitest';
import { patchTerm } from '../../src/core/kernels/spec.ts';
import { demoById } from '../../src/core/problems/demos.ts';
import {
  calibrate,
  evidenceMap,
  leaveOneOut,
  logEvidence,
  priorPredictiveCheck,
  termLength,
  tuningRoute,
} from '../../src/core/tuning/index.ts';
import { prepareStructuredPosterior } from '../../src/core/inverse/structured.ts';
import { structuredPosteriorDraws } from '../../src/core/inverse/structuredDraws.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import { rayProblem } from '../core/tuning/helpers.ts';
import { posteriorSummary, preparePosterior } from '../../src/core/inverse/posterior.ts';
import { calibrationChunks, mapByRows, mergeCalibration, runTuning, scoreCandidates } from '../../src/worker/tuning.ts';
import { LatestWinsQueue } from '../../src/worker/queue.ts';
import { runningCount } from '../../src/worker/tuningSignals.ts';
import type { WorkerRequest } from '../../src/worker/protocol.ts';
import { Engine } from '../../src/worker/engine.ts';

const { problem, startPrior } = demoById('borehole-log').build();
const t0 = startPrior.terms[0];
const lengths = { min: 0.2 * termLength(t0), max: 5 * termLength(t0), count: 7 };
const variances = { min: 0.01 * t0.variance, max: 100 * t0.variance, count: 5 };

describe('evidence map by rows', () => {
  it('equals the core whole-map call cell by cell, with the same maximum', async () => {
    const whole = evidenceMap(problem, startPrior, { term: 0, lengths, variances });
    const rows = await mapByRows(problem, startPrior, 0, lengths, variances, () => {}, { aborted: false });
    expect(rows.cancelled).toBe(false);
    expect(Array.from(rows.lengths)).toEqual(Array.from(whole.lengths));
    // Same arithmetic on the same inputs: identical doubles.
    expect(Array.from(rows.logEvidence)).toEqual(Array.from(whole.logEvidence));
    expect(rows.best).toEqual(whole.best);
    expect(rows.method).toBe(whole.method);
  });

  it('also with the eigen shortcut (≥ 24 variances) and a prior without nugget', async () => {
    const prior = { ...startPrior, nugget: 0 };
    const v = { ...variances, count: 30 };
    const whole = evidenceMap(problem, prior, { term: 0, lengths, variances: v });
    const rows = await mapByRows(problem, prior, 0, lengths, v, () => {}, { aborted: false });
    expect(whole.method).toBe('eigen');
    expect(rows.method).toBe('eigen');
    expect(Array.from(rows.logEvidence)).toEqual(Array.from(whole.logEvidence));
  });

  it('stops between rows when the flag is set, leaving later rows NaN', async () => {
    const flag = { aborted: false };
    let reports = 0;
    const map = await mapByRows(
      problem,
      startPrior,
      0,
      lengths,
      variances,
      () => {
        if (++reports === 2) flag.aborted = true;
      },
      flag,
    );
    expect(map.cancelled).toBe(true);
    expect(map.methodByLength).toHaveLength(2);
    expect(Number.isFinite(map.logEvidence[2 * variances.count - 1])).toBe(true);
    expect(map.logEvidence.slice(2 * variances.count).every((x) => Number.isNaN(x))).toBe(true);
  });

  it('rejects an oversized axis with the field named', async () => {
    await expect(mapByRows(problem, startPrior, 0, { ...lengths, count: 5000 }, variances, () => {}, { aborted: false })).rejects.toThrow(
      /lengths\.count/,
    );
  });
});

describe('cancellation through the queue', () => {
  const req = (id: number): Extract<WorkerRequest, { kind: 'evidenceMap' }> => ({
    id,
    kind: 'evidenceMap',
    problemVersion: 1,
    prior: startPrior,
    term: 0,
    lengths,
    variances,
  });

  it('a newer request of the same channel aborts the running one; cancel aborts by id', async () => {
    const queue = new LatestWinsQueue<WorkerRequest & { id: number }>();
    // Running job 1: the queue supersedes it as soon as it has finished its first row.
    let pushed = false;
    const run1 = runTuning(problem, req(1), () => {
      if (!pushed) {
        pushed = true;
        queue.push('evidenceMap', req(2));
      }
    });
    const r1 = await run1;
    expect(r1.cancelled).toBe(true);
    expect(r1.methodByLength.length).toBeLessThan(lengths.count);
    // A push on another channel does not abort it.
    let other = false;
    const r3 = await runTuning(problem, req(3), () => {
      if (!other) {
        other = true;
        queue.push('posterior', { id: 9, kind: 'posterior', problemVersion: 1, prior: startPrior });
      }
    });
    expect(r3.cancelled).toBe(false);
    // cancel of a running (no longer waiting) request.
    let sent = false;
    let removed: boolean | null = null;
    const r4 = await runTuning(problem, req(4), () => {
      if (!sent) {
        sent = true;
        removed = queue.remove(4);
      }
    });
    expect(removed).toBe(true);
    expect(r4.cancelled).toBe(true);
    // Loading a new problem aborts running tuning work of every channel.
    let loaded = false;
    const r5 = await runTuning(problem, req(5), () => {
      if (!loaded) {
        loaded = true;
        queue.push('problem', { id: 10, kind: 'loadDemo', version: 2, demoId: 'borehole-log' });
      }
    });
    expect(r5.cancelled).toBe(true);
    expect(runningCount()).toBe(0);
  });

  it('runs through the engine for the loaded problem', async () => {
    const engine = new Engine();
    await engine.handle({ id: 1, kind: 'loadDemo', version: 3, demoId: 'borehole-log' });
    const map = await engine.handle({ ...req(2), problemVersion: 3 });
    expect(map.best).toEqual(evidenceMap(problem, startPrior, { term: 0, lengths, variances }).best);
    await expect(engine.handle({ ...req(3), problemVersion: 2 })).rejects.toThrow(/problem 2/);
  });
});

describe('calibration chunks', () => {
  it('splits replicates into at most 10 chunks with consecutive seeds', () => {
    const c = calibrationChunks(25, 4294967295);
    expect(c.reduce((a, x) => a + x.replicates, 0)).toBe(25);
    expect(c.length).toBeLessThanOrEqual(10);
    expect(c[0].seed).toBe(4294967295);
    expect(c[1].seed).toBe(0);
    expect(() => calibrationChunks(0, 1)).toThrow(/replicates/);
  });

  it('merged chunks keep the identities of a single calibration result', () => {
    const a = calibrate(problem, startPrior, startPrior, { replicates: 3, draws: 9, seed: 5 });
    const b = calibrate(problem, startPrior, startPrior, { replicates: 5, draws: 9, seed: 6 });
    const m = mergeCalibration([a, b]);
    const n = problem.grid.shape[0];
    const mean = (x: Float64Array) => x.reduce((s, v) => s + v, 0) / x.length;
    expect(m.replicates).toBe(8);
    // Each replicate covers N cells, so the pooled fraction is the mean of the per-replicate ones
    // and of the per-cell ones.
    expect(m.coverage68).toBeCloseTo(mean(m.replicateCoverage68), 12);
    expect(m.coverage95).toBeCloseTo(mean(m.cellCoverage95), 12);
    expect(m.rankHistogram.reduce((s, v) => s + v, 0)).toBe(8 * n);
    expect(m.coverage68).toBeCloseTo((3 * a.coverage68 + 5 * b.coverage68) / 8, 12);
    // A single part merges to itself.
    expect(mergeCalibration([a]).coverage95).toBe(a.coverage95);
  });
});

describe('candidate scores', () => {
  it('are the core numbers of each candidate; a failing candidate says why', async () => {
    const other = { ...startPrior, terms: [patchTerm(t0, { length: termLength(t0) / 3 })] };
    const bad = { ...startPrior, terms: [{ ...t0, variance: -1 }] };
    const s = await scoreCandidates(problem, [startPrior, other, bad], 2, 7, () => {}, { aborted: false });
    expect(s).toHaveLength(3);
    for (const [k, prior] of [startPrior, other].entries()) {
      const c = s[k];
      if (!c.ok) throw new Error(c.error);
      expect(c.logEvidence).toBe(logEvidence(problem, prior));
      expect(c.looLogScore).toBe(leaveOneOut(problem, prior).logScore);
      expect(c.predictiveP).toBe(priorPredictiveCheck(problem, prior).pTwoSided);
      const post = posteriorSummary(preparePosterior(problem, prior));
      expect(c.chi2OverExpected).toBe(post.chi2 / post.fitReference!.expected);
      expect(c.chi2Interval95OverExpected).toEqual(post.fitReference!.interval95.map((q) => q / post.fitReference!.expected));
      expect(c.chi2UpperTail).toBe(post.fitReference!.upperTail);
      expect(c.draws.rows).toBe(2);
    }
    expect(s[0].ok && s[1].ok && s[0].logEvidence !== s[1].logEvidence).toBe(true);
    const b = s[2];
    expect(b.ok).toBe(false);
    if (!b.ok) expect(b.error).toMatch(/variance/);
  });
});

describe('large grids (FFT route above TUNING_DENSE_LIMIT cells)', () => {
  const prior: PriorSpec = { mean: { constant: 0.1 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 0.4, length: 5 }], nugget: 1e-4 };
  // 36 × 32 = 1152 cells: above the limit, small enough for the dense route to run as the check.
  const big = rayProblem(61, 36, 32, 60, prior, 0.05);
  const rel = (a: number, b: number): number => Math.abs(a - b) / Math.max(1, Math.abs(b));
  const relDiff = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
    let d = 0;
    let s = 0;
    for (let i = 0; i < b.length; i++) {
      d = Math.max(d, Math.abs(a[i] - b[i]));
      s = Math.max(s, Math.abs(b[i]));
    }
    return d / s;
  };

  it('candidate scores take the FFT route and equal the dense numbers to 1e-9', async () => {
    expect(tuningRoute(big, prior)).toBe('fft');
    const other: PriorSpec = { ...prior, terms: [patchTerm(prior.terms[0], { length: 2 })] };
    const s = await scoreCandidates(big, [prior, other], 3, 11, () => {}, { aborted: false });
    for (const [k, p] of [prior, other].entries()) {
      const c = s[k];
      if (!c.ok) throw new Error(c.error);
      const dense = { route: 'dense' } as const;
      expect(rel(c.logEvidence, logEvidence(big, p, dense))).toBeLessThan(1e-9);
      expect(rel(c.looLogScore, leaveOneOut(big, p, dense).logScore)).toBeLessThan(1e-9);
      const ppc = priorPredictiveCheck(big, p, dense);
      expect(rel(c.predictiveReduced, ppc.reduced)).toBeLessThan(1e-9);
      expect(Math.abs(c.predictiveP - ppc.pTwoSided)).toBeLessThan(1e-9);
      const post = posteriorSummary(preparePosterior(big, p));
      expect(rel(c.chi2OverExpected, post.chi2 / post.fitReference!.expected)).toBeLessThan(1e-9);
      expect(rel(c.chi2Interval95OverExpected[1], post.fitReference!.interval95[1] / post.fitReference!.expected)).toBeLessThan(1e-7);
      expect(relDiff(c.mean, post.mean)).toBeLessThan(1e-9);
      expect(relDiff(c.std, post.std)).toBeLessThan(1e-9);
      // The draws are the structured posterior's seeded draws, number for number.
      const want = structuredPosteriorDraws(prepareStructuredPosterior(big, p), 3, 11).realisations;
      expect(c.draws.rows).toBe(3);
      expect(Array.from(c.draws.data)).toEqual(Array.from(want.data));
    }
  });

  it('the map by rows (one spectrum cache per request) equals the whole-map core call', async () => {
    const axis = { lengths: { min: 2, max: 10, count: 3 }, variances: { min: 0.05, max: 3, count: 4 } };
    const whole = evidenceMap(big, prior, { term: 0, ...axis });
    const rows = await mapByRows(big, prior, 0, axis.lengths, axis.variances, () => {}, { aborted: false });
    whole.logEvidence.forEach((v, k) => expect(rows.logEvidence[k]).toBe(v));
    expect(rows.best!.index).toBe(whole.best!.index);
    const dense = evidenceMap(big, prior, { term: 0, ...axis, route: 'dense' });
    dense.logEvidence.forEach((v, k) => expect(rel(rows.logEvidence[k], v)).toBeLessThan(1e-9));
  });

  it('calibration chunks report the FFT route and merge it', async () => {
    const res = await runTuning<'calibration'>(
      big,
      { id: 1, kind: 'calibration', problemVersion: 0, prior, replicates: 4, draws: 3, seed: 9 },
      () => {},
      { aborted: false },
    );
    expect(res.route).toEqual({ truth: 'fft', inversion: 'fft' });
    expect(res.replicates).toBe(4);
  });
});
