/**
 * `priorscope posterior` reports the data-fit reference: chi2Expected = M − tr R,
 * chi2Interval95 the central 95% interval of χ² itself, chi2TailProbability = P(χ² ≥ chi2), on the
 * borehole demo written by `priorscope demo` (its χ² = 7.2 with M = 50 was flagged against χ²_50).
 */
import { beforeAll, expect, it } from 'vitest';
import { WeightedChiSquare } from '../../src/core/inverse/fitReference.ts';
import { runCommand, tempDir } from './run.ts';

let dir: string;
beforeAll(async () => {
  dir = tempDir();
  const r = await runCommand(['demo', 'borehole-log', '--out', 'p.json', '--prior', 'q.json'], dir);
  expect(r.code, r.err).toBe(0);
});

it('posterior prints chi2Expected, chi2Interval95 and chi2TailProbability, consistent with each other and with tr R', async () => {
  const r = await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json'], dir);
  expect(r.code, r.err).toBe(0);
  const j = JSON.parse(r.out) as {
    chi2: number;
    chi2Expected: number;
    chi2Interval95: [number, number];
    chi2TailProbability: number;
    dataCount: number;
    resolutionTrace: number;
  };
  expect(Math.abs(j.chi2Expected - (j.dataCount - j.resolutionTrace))).toBeLessThanOrEqual(1e-9 * j.dataCount);
  expect(j.chi2Interval95[0]).toBeLessThan(j.chi2Expected);
  expect(j.chi2Interval95[1]).toBeGreaterThan(j.chi2Expected);
  // The borehole demo's fit is as expected: inside the interval, tail probability well away from 0 and 1.
  expect(j.chi2).toBeGreaterThan(j.chi2Interval95[0]);
  expect(j.chi2).toBeLessThan(j.chi2Interval95[1]);
  expect(j.chi2TailProbability).toBeGreaterThan(0.025);
  expect(j.chi2TailProbability).toBeLessThan(0.975);
  // The interval is much narrower than a χ²_M one would be and sits around M − tr R, not M.
  expect(j.chi2Interval95[1]).toBeLessThan(j.dataCount / 2);
  expect(new WeightedChiSquare([1]).quantile(0.5)).toBeCloseTo(0.454936423119572, 12); // χ²₁ median, A&S Table 26.8 (memory)
});
