/**
 * Evidence maps: the eigendecomposition shortcut against direct evaluation (one independent
 * covarianceMatrix + Cholesky per cell, R&W 2006 Algorithm 2.1), to 1e-10; the profiles; input
 * errors; progress and cancellation. (The direct evaluation itself is checked against
 * scipy.stats.multivariate_normal.logpdf in test/reference/tuning.test.ts.)
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../../src/core/errors.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { patchTerm } from '../../../src/core/kernels/spec.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import {
  EIGEN_BREAK_EVEN,
  evidenceMap,
  evidenceProfile,
  logSpaced,
  setTermLength,
  withTerm,
} from '../../../src/core/tuning/evidenceMap.ts';
import { logEvidence } from '../../../src/core/tuning/typeII.ts';
import { drawTruth, pointOperator, simulateData, smallProblem, withCorrelatedErrors } from './helpers.ts';

const single: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 4 }] };
const withNuggetAndSecond: PriorSpec = {
  mean: { trend: { intercept: 0.1, slope: [0.02] } },
  terms: [
    { kernel: 'gaussian', variance: 0.5, length: 3 },
    { kernel: 'matern', nu: 2.5, variance: 0.8, length: 6 },
  ],
  nugget: 0.01,
};

function twoDProblem(): { problem: Problem; prior: PriorSpec } {
  const grid: Grid = { shape: [9, 7], spacing: [1, 0.5] };
  const prior: PriorSpec = {
    mean: { constant: 1 },
    terms: [{ kernel: 'matern', nu: 1.5, variance: 2, lengths: [3, 1], angle: 30 }],
    nugget: 1e-4,
  };
  const rng = new Random(77);
  const idx = Array.from({ length: 30 }, () => Math.floor(rng.nextDouble() * 63));
  const operator = pointOperator(idx, 63);
  const truth = drawTruth(grid, prior, rng);
  const sigma = new Float64Array(30).fill(0.2);
  return { problem: { grid, operator, data: { values: simulateData(operator, truth, sigma, rng), sigma } }, prior };
}

const cases: [string, Problem, PriorSpec, number][] = [
  ['single term, no nugget (Cd only)', smallProblem(3, single), single, 0],
  ['two terms and a nugget, trend mean, map over term 1', smallProblem(4, withNuggetAndSecond), withNuggetAndSecond, 1],
  ['correlated data errors (full Cd)', withCorrelatedErrors(smallProblem(5, single), 0.1), single, 0],
  ['2-D, anisotropic term, sparse point operator', twoDProblem().problem, twoDProblem().prior, 0],
];

describe.each(cases)('evidence map: %s', (_name, problem, prior, term) => {
  const opts = { term, lengths: { min: 0.5, max: 20, count: 5 }, variances: { min: 0.01, max: 50, count: 6 }, method: 'eigen' as const };
  const map = evidenceMap(problem, prior, opts);
  it('uses the eigen shortcut', () => {
    expect(map.method).toBe('eigen');
  });
  it('every cell equals a direct Cholesky evaluation of the full prior to 1e-10', () => {
    map.lengths.forEach((len, i) => {
      map.variances.forEach((v, j) => {
        const t = prior.terms[term];
        const direct = logEvidence(problem, withTerm(prior, term, { ...setTermLength(t, len), variance: v }));
        expect(Math.abs(map.logEvidence[i * map.variances.length + j] - direct)).toBeLessThanOrEqual(1e-10 * Math.max(1, Math.abs(direct)));
      });
    });
  });
  it('the Cholesky path gives the same map, and the best cell is the arg max', () => {
    const c = evidenceMap(problem, prior, { ...opts, method: 'cholesky' });
    expect(c.method).toBe('cholesky');
    c.logEvidence.forEach((v, k) => expect(Math.abs(v - map.logEvidence[k])).toBeLessThanOrEqual(1e-10 * Math.max(1, Math.abs(v))));
    const max = Math.max(...map.logEvidence);
    expect(map.best!.logEvidence).toBe(max);
    expect(map.logEvidence[map.best!.index]).toBe(max);
  });
});

describe('evidence map of one length of an anisotropic term (axis l1 / l2)', () => {
  const { problem, prior } = twoDProblem(); // lengths [3, 1], angle 30°
  const opts = { term: 0, lengths: { min: 0.5, max: 8, count: 4 }, variances: { min: 0.1, max: 10, count: 3 }, method: 'eigen' as const };
  it.each([
    ['l1', (len: number) => [len, 1] as const],
    ['l2', (len: number) => [3, len] as const],
  ] as const)(
    'axis %s moves that length alone: every cell equals the direct evaluation of the prior with those lengths',
    (axis, lengthsAt) => {
      const map = evidenceMap(problem, prior, { ...opts, axis });
      const t = prior.terms[0];
      map.lengths.forEach((len, i) =>
        map.variances.forEach((v, j) => {
          const direct = logEvidence(problem, { ...prior, terms: [patchTerm(t, { lengths: lengthsAt(len), variance: v })] });
          expect(Math.abs(map.logEvidence[i * map.variances.length + j] - direct)).toBeLessThanOrEqual(
            1e-10 * Math.max(1, Math.abs(direct)),
          );
        }),
      );
    },
  );
  it('the l2 map differs from the l1 and the proportional ("both") maps', () => {
    const l1 = evidenceMap(problem, prior, { ...opts, axis: 'l1' });
    const l2 = evidenceMap(problem, prior, { ...opts, axis: 'l2' });
    const both = evidenceMap(problem, prior, opts);
    expect(Math.max(...l2.logEvidence.map((v, k) => Math.abs(v - l1.logEvidence[k])))).toBeGreaterThan(1e-3);
    expect(Math.max(...l1.logEvidence.map((v, k) => Math.abs(v - both.logEvidence[k])))).toBeGreaterThan(1e-3);
  });
  it('an isotropic term has one length: axis l1 / l2 is refused naming the field', () => {
    expect(() => evidenceMap(smallProblem(3, single), single, { ...opts, axis: 'l2' })).toThrow(InputError);
    expect(() => evidenceMap(smallProblem(3, single), single, { ...opts, axis: 'l2' })).toThrow(
      /^axis must be "both" for term 0, which has one length/,
    );
  });
});

describe('profiles', () => {
  const problem = smallProblem(8, withNuggetAndSecond);
  it('nugget profile: eigen shortcut (C₁ = I) equals direct evaluation to 1e-10', () => {
    const values = [0, 1e-4, 1e-2, 0.3, 5];
    const prof = evidenceProfile(problem, withNuggetAndSecond, { parameter: 'nugget' }, { values, method: 'eigen' });
    expect(prof.method).toBe('eigen');
    values.forEach((v, k) => {
      const direct = logEvidence(problem, { ...withNuggetAndSecond, nugget: v });
      expect(Math.abs(prof.logEvidence[k] - direct)).toBeLessThanOrEqual(1e-10 * Math.max(1, Math.abs(direct)));
    });
  });
  it('ν profile equals direct evaluation at each ν and its best is the arg max', () => {
    const values = [0.5, 0.9, 1.5, 2.5, 4];
    const prof = evidenceProfile(problem, withNuggetAndSecond, { parameter: 'nu', term: 1 }, { values });
    values.forEach((v, k) => {
      const direct = logEvidence(problem, withTerm(withNuggetAndSecond, 1, { nu: v }));
      expect(prof.logEvidence[k]).toBe(direct);
    });
    expect(prof.best!.logEvidence).toBe(Math.max(...prof.logEvidence));
  });
  it('ν profile on a non-Matérn term names the field', () => {
    expect(() => evidenceProfile(problem, withNuggetAndSecond, { parameter: 'nu', term: 0 }, { values: [1] })).toThrow(
      /terms\[0\]\.kernel must be "matern"/,
    );
  });
});

describe('input errors and control', () => {
  const problem = smallProblem(9, single);
  it.each([
    [{ min: 0, max: 1, count: 3 }, /lengths\.min must be a finite number > 0, got 0/],
    [{ min: 2, max: 1, count: 3 }, /lengths\.max must be a finite number ≥ lengths\.min/],
    [{ min: 1, max: 2, count: 2.5 }, /lengths\.count must be an integer/],
  ])('bad length axis %j', (lengths, msg) => {
    expect(() => evidenceMap(problem, single, { term: 0, lengths, variances: { min: 1, max: 2, count: 2 } })).toThrow(msg);
  });
  it('a term index out of range is an InputError naming the field', () => {
    expect(() =>
      evidenceMap(problem, single, { term: 3, lengths: { min: 1, max: 2, count: 2 }, variances: { min: 1, max: 2, count: 2 } }),
    ).toThrow(InputError);
    expect(() =>
      evidenceMap(problem, single, { term: 3, lengths: { min: 1, max: 2, count: 2 }, variances: { min: 1, max: 2, count: 2 } }),
    ).toThrow(/^term must be an integer from 0 to 0/);
  });
  it('progress rises to 1; a signal stops the map and leaves NaN cells', () => {
    const seen: number[] = [];
    evidenceMap(problem, single, {
      term: 0,
      lengths: { min: 1, max: 8, count: 4 },
      variances: { min: 1, max: 2, count: 3 },
      method: 'eigen',
      onProgress: (f) => seen.push(f),
    });
    expect(seen.length).toBe(4);
    seen.forEach((f, k) => expect(f).toBeGreaterThan(k === 0 ? 0 : seen[k - 1]));
    expect(seen[seen.length - 1]).toBe(1);
    const signal = { aborted: false };
    const m = evidenceMap(problem, single, {
      term: 0,
      lengths: { min: 1, max: 8, count: 4 },
      variances: { min: 1, max: 2, count: 3 },
      signal,
      onProgress: (f) => {
        if (f >= 0.5) signal.aborted = true;
      },
    });
    expect(m.cancelled).toBe(true);
    expect(Number.isFinite(m.logEvidence[0])).toBe(true);
    expect(Number.isNaN(m.logEvidence[11])).toBe(true);
  });
  it("'auto' factors per cell on a short variance axis and uses the shortcut on a long one", () => {
    const lengths = { min: 1, max: 8, count: 2 };
    const short = evidenceMap(problem, single, { term: 0, lengths, variances: { min: 0.1, max: 10, count: EIGEN_BREAK_EVEN - 1 } });
    const long = evidenceMap(problem, single, { term: 0, lengths, variances: { min: 0.1, max: 10, count: EIGEN_BREAK_EVEN } });
    expect(short.method).toBe('cholesky');
    expect(short.note).toMatch(/fewer than 24 variances/);
    expect(long.method).toBe('eigen');
    expect(() => evidenceMap(problem, single, { term: 0, lengths, variances: lengths, method: 'fast' as 'eigen' })).toThrow(
      /^method must be "auto", "eigen" or "cholesky", got "fast"/,
    );
  });
  it('logSpaced hits both ends and is geometric', () => {
    const v = logSpaced({ min: 0.1, max: 1000, count: 5 });
    expect(Array.from(v).map((x) => Math.log10(x))).toEqual([-1, 0, 1, 2, 3].map((e) => expect.closeTo(e, 12)));
    expect(v[4]).toBe(1000);
  });
});
