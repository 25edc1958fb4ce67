/**
 * Per-replicate random streams (calibrate's `streamSeed`, the command line's shards) and the type-II
 * optimiser's box bounds.
 * - replicateSeed depends only on (seed, index) and gives distinct seeds to the first 20000 replicates;
 * - a run over replicates [a, b) gives exactly the per-replicate coverages of those replicates in a run
 *   over [0, R): a replicate's numbers do not depend on which others run with it;
 * - with per-replicate streams the posterior stays calibrated (binomial limits as in calibration.test.ts);
 * - bounds: a bound the evidence pushes against holds the parameter there, bounds on held parameters and
 *   empty ranges are InputErrors.
 */
import { describe, expect, it } from 'vitest';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { calibrate, replicateSeed } from '../../../src/core/tuning/calibration.ts';
import { maximiseEvidence } from '../../../src/core/tuning/typeII.ts';
import { coverageTests, smallProblem } from './helpers.ts';

const prior: PriorSpec = { mean: { constant: 1 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 0.5, length: 4 }], nugget: 1e-4 };
const problem = smallProblem(43, prior, 30, 15, 0.1);

describe('per-replicate streams', () => {
  it('replicateSeed: a function of (seed, index) only, distinct over 20000 replicates, 32-bit', () => {
    expect(replicateSeed(7, 3)).toBe(replicateSeed(7, 3));
    const seen = new Set<number>();
    for (let i = 0; i < 20000; i++) {
      const s = replicateSeed(123456789, i);
      expect(Number.isInteger(s) && s >= 0 && s <= 0xffffffff).toBe(true);
      seen.add(s);
    }
    expect(seen.size).toBe(20000);
    expect(replicateSeed(1, 0)).not.toBe(replicateSeed(2, 0));
    expect(() => replicateSeed(1, -1)).toThrow(/^replicate must be an integer ≥ 0/);
  });

  it('a range of replicates gives the same numbers as in the whole run', () => {
    const seed = 99;
    const whole = calibrate(problem, prior, prior, { replicates: 9, draws: 4, seed, streamSeed: (r) => replicateSeed(seed, r) });
    const part = calibrate(problem, prior, prior, { replicates: 4, draws: 4, seed, streamSeed: (r) => replicateSeed(seed, 3 + r) });
    expect(Array.from(part.replicateCoverage68)).toEqual(Array.from(whole.replicateCoverage68.subarray(3, 7)));
    expect(Array.from(part.replicateCoverage95)).toEqual(Array.from(whole.replicateCoverage95.subarray(3, 7)));
    // The single stream (no streamSeed) gives other numbers for the same seed: the option is what makes ranges exact.
    const single = calibrate(problem, prior, prior, { replicates: 9, draws: 4, seed });
    expect(Array.from(single.replicateCoverage68)).not.toEqual(Array.from(whole.replicateCoverage68));
  });

  describe('calibrated with per-replicate streams', () => {
    const R = 300;
    const res = calibrate(problem, prior, prior, { replicates: R, draws: 9, seed: 5, streamSeed: (r) => replicateSeed(5, r) });
    coverageTests(res, R, [0, 10, 20, 29]);
  });
});

describe('maximiseEvidence with bounds', () => {
  const start: PriorSpec = { mean: { constant: 1 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 0.2, length: 2 }], nugget: 1e-4 };
  const free = maximiseEvidence(problem, start, { fixed: ['nugget'] });
  const best = free.parameters.find((p) => p.name === 'terms[0].length')!.value;
  it('an upper bound below the free optimum holds the length on it, without a standard error', () => {
    const r = maximiseEvidence(problem, start, { fixed: ['nugget'], bounds: { 'terms[0].length': [0.5, best / 2] } });
    const len = r.parameters.find((p) => p.name === 'terms[0].length')!;
    expect(len.value).toBeCloseTo(best / 2, 10);
    expect(len.atBound).toBe('high');
    expect(Number.isNaN(len.standardError)).toBe(true);
    expect(r.converged).toBe(true);
    expect(r.logEvidence).toBeLessThan(free.logEvidence);
    expect(r.parameters.find((p) => p.name === 'terms[0].variance')!.atBound).toBeNull();
  });
  it('bounds that contain the optimum change nothing but the path', () => {
    const r = maximiseEvidence(problem, start, { fixed: ['nugget'], bounds: { 'terms[0].length': [best / 10, best * 10] } });
    expect(Math.abs(r.logEvidence - free.logEvidence)).toBeLessThan(1e-8);
    expect(r.parameters.every((p) => p.atBound === null)).toBe(true);
  });
  it('a bound on a held parameter, or an empty or non-positive range, is an InputError', () => {
    expect(() => maximiseEvidence(problem, start, { fixed: ['nugget'], bounds: { nugget: [1e-6, 1] } })).toThrow(
      /^bounds\.nugget must be the name of a free parameter/,
    );
    expect(() => maximiseEvidence(problem, start, { bounds: { 'terms[0].length': [3, 2] } })).toThrow(
      /^bounds\.terms\[0\]\.length must be \[lo, hi\] with lo ≤ hi and lo > 0/,
    );
    expect(() => maximiseEvidence(problem, start, { bounds: { 'terms[0].variance': [0, 2] } })).toThrow(/lo > 0/);
  });
});
