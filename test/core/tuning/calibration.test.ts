/**
 * Simulation-based calibration: when the truth and the inversion prior agree, coverage of the
 * ±1σ / ±1.96σ bands must be within binomial limits and ranks uniform (Talts et al. 2018;
 * Cook, Gelman & Rubin 2006); a mismatched prior must visibly fail. Seeded, so deterministic.
 */
import { describe, expect, it } from 'vitest';
import { chiSquareQuantile } from '../../../src/core/inverse/chisquare.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { calibrate, calibrationTable } from '../../../src/core/tuning/calibration.ts';
import { scalePrior } from '../../../src/core/tuning/criteria.ts';
import { coverageTests, smallProblem, withCorrelatedErrors } from './helpers.ts';

const prior: PriorSpec = { mean: { constant: 1 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 0.5, length: 4 }], nugget: 1e-4 };
const problem = smallProblem(41, prior, 30, 15, 0.1);
const R = 400;
const res = calibrate(problem, prior, prior, { replicates: R, draws: 9, seed: 2024, keepRanks: true });

describe('calibration with the truth drawn from the inversion prior', () => {
  // 5 cells × 2 levels, Bonferroni over 10 two-sided tests at a total 0.001 (a correct
  // implementation fails this test about once in a thousand seeds).
  coverageTests(res, R, [0, 7, 14, 21, 29]);
  it('ranks of one cell are uniform on 0…9 (χ²₉ below its 0.999 quantile)', () => {
    for (const c of [3, 17]) {
      const counts = new Float64Array(10);
      for (let r = 0; r < R; r++) counts[res.ranks![r * 30 + c]]++;
      const e = R / 10;
      const x2 = counts.reduce((s, o) => s + (o - e) ** 2 / e, 0);
      expect(x2).toBeLessThan(chiSquareQuantile(0.999, 9));
    }
    expect(res.rankHistogram.reduce((x, y) => x + y, 0)).toBe(R * 30);
  });
  it('is deterministic for a seed', () => {
    const again = calibrate(problem, prior, prior, { replicates: 5, draws: 3, seed: 2024 });
    const twice = calibrate(problem, prior, prior, { replicates: 5, draws: 3, seed: 2024 });
    expect(Array.from(again.cellCoverage68)).toEqual(Array.from(twice.cellCoverage68));
    expect(Array.from(again.rankHistogram)).toEqual(Array.from(twice.rankHistogram));
  });
  it('holds with correlated data errors too (full Cd)', () => {
    const p2 = withCorrelatedErrors(problem, 0.1);
    const r2 = calibrate(p2, prior, prior, { replicates: 200, draws: 4, seed: 7 });
    const per = r2.replicateCoverage95;
    const sd = Math.sqrt(per.reduce((x, y) => x + (y - r2.coverage95) ** 2, 0) / (per.length - 1));
    expect(Math.abs(r2.coverage95 - 0.95)).toBeLessThan((4 * sd) / Math.sqrt(per.length));
  });
});

describe('calibration cross-table', () => {
  const narrow = scalePrior(prior, 1 / 16);
  const table = calibrationTable(problem, [prior, narrow], { replicates: 60, draws: 4, seed: 99 });
  it('the diagonal is near nominal; truth from the wide prior inverted with a 16× narrower one under-covers', () => {
    expect(table.results[0][0].coverage68).toBeGreaterThan(0.6);
    expect(table.results[1][1].coverage68).toBeGreaterThan(0.6);
    // Posterior std with the narrow prior is far too small for truths of the wide one.
    expect(table.coverage68[0 * 2 + 1]).toBeLessThan(0.45);
    // The other way round the bands are too wide: over-coverage.
    expect(table.coverage95[1 * 2 + 0]).toBeGreaterThan(0.97);
  });
  it('stops at a signal between replicates and reports what it completed', () => {
    const signal = { aborted: false };
    const r = calibrate(problem, prior, prior, {
      replicates: 50,
      draws: 2,
      seed: 3,
      signal,
      onProgress: (f) => (signal.aborted = f >= 0.1),
    });
    expect(r.cancelled).toBe(true);
    expect(r.replicates).toBe(5);
    expect(r.replicateCoverage68.length).toBe(5);
  });
  it('rejects bad options with the field named', () => {
    expect(() => calibrate(problem, prior, prior, { replicates: 0, seed: 1 })).toThrow(/^replicates must be an integer from 1/);
    expect(() => calibrate(problem, prior, prior, { replicates: 2, seed: -1 })).toThrow(/^seed must be an integer/);
    expect(() => calibrationTable(problem, [], { replicates: 2, seed: 1 })).toThrow(/^candidates must be between 1 and 8 priors/);
    expect(() =>
      calibrate(problem, { ...prior, terms: [{ kernel: 'exponential', variance: -1, length: 1 }] }, prior, { replicates: 1, seed: 1 }),
    ).toThrow(/^truthPrior\.terms\[0\]\.variance/);
  });
});
