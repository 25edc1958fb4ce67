/**
 * Simulation-based calibration on the FFT route (structured posterior, circulant prior draws; see
 * src/core/tuning/calibration.ts): with the truth drawn from the inversion prior, the band
 * coverages must stay inside the same derived binomial limits as on the dense route
 * (test/core/tuning/calibration.test.ts; Cook, Gelman & Rubin 2006; Talts et al. 2018) and the
 * ranks must be uniform. Seeded, so deterministic.
 */
import { describe, expect, it } from 'vitest';
import { chiSquareQuantile } from '../../../src/core/inverse/chisquare.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { calibrate } from '../../../src/core/tuning/calibration.ts';
import { TUNING_DENSE_LIMIT } from '../../../src/core/tuning/dataSpace.ts';
import { coverageTests, rayProblem, smallProblem } from './helpers.ts';

const prior: PriorSpec = { mean: { constant: 1 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 0.5, length: 4 }], nugget: 1e-4 };
const R = 300;
const cases = [
  // Above the limit: 'auto' takes the FFT route by itself.
  ['1-D, 1100 cells, auto route', smallProblem(41, prior, TUNING_DENSE_LIMIT + 76, 15, 0.1), 'auto', [0, 300, 550, 800, 1099]],
  // A small 2-D ray survey with the route forced.
  ['2-D rays 14 × 12, FFT route forced', rayProblem(43, 14, 12, 20, prior, 0.05), 'fft', [0, 40, 83, 120, 167]],
] as const;

describe.each(cases)('calibration on the FFT route: %s', (_name, problem, route, cells) => {
  const res = calibrate(problem, prior, prior, { replicates: R, draws: 9, seed: 2024, keepRanks: true, route });
  const n = res.cellCoverage68.length;
  it('ran on the FFT route with exact (unclipped) prior draws', () => {
    expect(res.route).toEqual({ truth: 'fft', inversion: 'fft' });
    expect(res.approximateDraws).toBeUndefined();
    expect(res.replicates).toBe(R);
  });
  // 5 cells × 2 levels, Bonferroni over 10 two-sided tests at a total 0.001 (as the dense test).
  coverageTests(res, R, cells);
  it('ranks of two cells are uniform on 0…9 (χ²₉ below its 0.999 quantile, Bonferroni over 2)', () => {
    const limit = chiSquareQuantile(1 - 0.001 / 2, 9);
    for (const c of [cells[1], cells[3]]) {
      const counts = new Float64Array(10);
      for (let r = 0; r < R; r++) counts[res.ranks![r * n + c]]++;
      const e = R / 10;
      const chi2 = counts.reduce((s, k) => s + ((k - e) * (k - e)) / e, 0);
      expect(chi2).toBeLessThan(limit);
    }
  });
  it('is deterministic for a seed', () => {
    const again = calibrate(problem, prior, prior, { replicates: 3, draws: 9, seed: 2024, route });
    expect(Array.from(again.replicateCoverage68)).toEqual(Array.from(res.replicateCoverage68.subarray(0, 3)));
  });
});

it('a prior 16× too narrow under-covers on the FFT route (the test can fail)', () => {
  const problem = rayProblem(43, 14, 12, 20, prior, 0.05);
  const narrow: PriorSpec = { ...prior, terms: [{ ...prior.terms[0], variance: prior.terms[0].variance / 16 }] };
  const res = calibrate(problem, prior, narrow, { replicates: 60, draws: 4, seed: 7, route: 'fft' });
  expect(res.coverage95).toBeLessThan(0.8);
});
