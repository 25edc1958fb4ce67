/**
 * Criteria with a full data covariance and edge cases. The diagonal-Cd cases are checked against
 * scipy/numpy in test/reference/tuning.test.ts; here leave-one-out with correlated errors is
 * checked against brute-force conditioning (one Cholesky of K with row and column i removed,
 * Rasmussen & Williams 2006 eq. A.6 for the Gaussian conditional), the discrepancy scale against
 * the posterior module's χ² (src/core/inverse/posterior.ts, itself checked against scipy), and the
 * prior predictive check against its own nominal 95% level by repeated simulation (binomial limits).
 */
import { describe, expect, it } from 'vitest';
import { posteriorSummary, preparePosterior } from '../../../src/core/inverse/posterior.ts';
import { cholesky, choleskySolve } from '../../../src/core/linalg/cholesky.ts';
import { matrix, type Matrix } from '../../../src/core/linalg/matrix.ts';
import { covarianceMatrix, meanVector } from '../../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import {
  CRITERIA_DIFFER_EXPLANATION,
  discrepancyScale,
  leaveOneOut,
  priorCriteria,
  priorPredictiveCheck,
} from '../../../src/core/tuning/criteria.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import { drawTruth, pointOperator, simulateData, smallProblem, withCorrelatedErrors } from './helpers.ts';

const prior: PriorSpec = { mean: { constant: 0.2 }, terms: [{ kernel: 'gaussian', variance: 0.6, length: 3 }], nugget: 1e-3 };

/** K = G Cm Gᵀ + Cd with plain triple loops (dense G). */
function dataCovariance(p: Problem, pr: PriorSpec): { K: Matrix; r: Float64Array } {
  const g = p.operator.matrix as Matrix;
  const c = covarianceMatrix(p.grid, pr);
  const m0 = meanVector(p.grid, pr);
  const m = g.rows;
  const n = g.cols;
  const K = matrix(m, m);
  for (let a = 0; a < m; a++) {
    for (let b = 0; b < m; b++) {
      let s = 0;
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) s += g.data[a * n + i] * c.data[i * n + j] * g.data[b * n + j];
      K.data[a * m + b] = s + p.data.covariance!.data[a * m + b];
    }
  }
  const r = p.data.values.map((v, a) => {
    let s = 0;
    for (let j = 0; j < n; j++) s += g.data[a * n + j] * m0[j];
    return v - s;
  });
  return { K, r };
}

describe('leave-one-out with correlated data errors', () => {
  const p = withCorrelatedErrors(smallProblem(51, prior, 25, 14, 0.1), 0.1);
  const loo = leaveOneOut(p, prior);
  const { K, r } = dataCovariance(p, prior);
  const m = r.length;
  it('equals the Gaussian conditional of r_i given the other residuals, datum by datum', () => {
    for (let i = 0; i < m; i++) {
      const keep = Array.from({ length: m }, (_, k) => k).filter((k) => k !== i);
      const Kr = matrix(m - 1, m - 1);
      keep.forEach((a, x) => keep.forEach((b, y) => (Kr.data[x * (m - 1) + y] = K.data[a * m + b])));
      const f = cholesky(Kr);
      if (!f.ok) throw new Error('reduced K does not factor');
      const kx = Float64Array.from(keep, (a) => K.data[i * m + a]);
      const w = choleskySolve(f.factor, kx);
      const mu = keep.reduce((s, a, x) => s + w[x] * r[a], 0);
      const v = K.data[i * m + i] - kx.reduce((s, k, x) => s + k * w[x], 0);
      const want = -0.5 * Math.log(2 * Math.PI * v) - (r[i] - mu) ** 2 / (2 * v);
      expect(Math.abs(loo.contributions[i] - want)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(want)));
      expect(Math.abs(loo.std[i] - Math.sqrt(v))).toBeLessThanOrEqual(1e-9 * Math.sqrt(v));
      expect(Math.abs(loo.mean[i] - (p.data.values[i] - r[i] + mu))).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(p.data.values[i])));
    }
  });
});

describe('discrepancy principle', () => {
  it('with a full Cd: the posterior module’s χ² at the scaled prior equals M', () => {
    // Distinct observed cells: P = G Cm Gᵀ has full rank, so χ²(s → ∞) = 0 and a root exists.
    // (smallProblem's random windows can repeat, and a repeated window with two different noisy
    // values leaves a misfit that no prior variance removes: the 'unreachable' case below.)
    const rng = new Random(52);
    const grid: Grid = { shape: [30], spacing: [1] };
    const operator = pointOperator(
      Array.from({ length: 14 }, (_, k) => 2 * k + 1),
      30,
    );
    const values = simulateData(operator, drawTruth(grid, prior, rng), new Float64Array(14).fill(0.1), rng);
    const p = withCorrelatedErrors({ grid, operator, data: { values, sigma: new Float64Array(14).fill(0.1) } }, 0.1);
    const d = discrepancyScale(p, { ...prior, terms: [{ ...prior.terms[0], variance: 0.01 }] });
    expect(d.status).toBe('found');
    expect(d.chi2Range[1]).toBeLessThan(1e-12);
    const chi2 = posteriorSummary(preparePosterior(p, d.prior!)).chi2;
    expect(Math.abs(chi2 - 14)).toBeLessThanOrEqual(1e-8 * 14);
  });
  it('expected-value form with a full Cd: at the found scale the posterior module’s χ² equals its expected value M − tr R', () => {
    const rng = new Random(57);
    const grid: Grid = { shape: [30], spacing: [1] };
    const operator = pointOperator(
      Array.from({ length: 14 }, (_, k) => 2 * k + 1),
      30,
    );
    const values = simulateData(operator, drawTruth(grid, prior, rng), new Float64Array(14).fill(0.1), rng);
    const p = withCorrelatedErrors({ grid, operator, data: { values, sigma: new Float64Array(14).fill(0.1) } }, 0.1);
    const d = discrepancyScale(p, prior, { form: 'expected' });
    expect(d.form).toBe('expected');
    expect(d.status).toBe('found');
    const s = posteriorSummary(preparePosterior(p, d.prior!));
    expect(Math.abs(s.chi2 - (14 - s.resolutionTrace))).toBeLessThanOrEqual(1e-8 * 14);
    expect(Math.abs(d.target - s.fitReference!.expected)).toBeLessThanOrEqual(1e-8 * 14);
    expect(() => discrepancyScale(p, prior, { form: 'expected', target: 3 })).toThrow(
      /^target must be left out with the expected-value form/,
    );
  });
  it('a custom target is met', () => {
    const p = smallProblem(53, prior, 25, 14, 0.1);
    const d = discrepancyScale(p, prior, { target: 8 });
    expect(d.status).toBe('found');
    expect(Math.abs(posteriorSummary(preparePosterior(p, d.prior!)).chi2 - 8)).toBeLessThanOrEqual(1e-8 * 8);
  });
  it('says "mean-fits" when the prior mean alone explains the data to the noise level', () => {
    const p = smallProblem(54, prior, 25, 14, 0.1);
    const values = new Float64Array(14).fill(0.2); // G m0 for an averaging operator and constant mean 0.2
    const d = discrepancyScale({ ...p, data: { ...p.data, values } }, prior);
    expect(d.status).toBe('mean-fits');
    expect(d.chi2Range[0]).toBeLessThan(1e-20);
  });
  it('says "unreachable" when more data than cells leave a misfit no variance can remove', () => {
    const p = smallProblem(55, prior, 5, 12, 0.1);
    const d = discrepancyScale(p, prior, { target: 1e-3 });
    expect(d.status).toBe('unreachable');
    expect(d.chi2Range[1]).toBeGreaterThan(1e-3);
  });
  it('a non-positive target is an InputError naming it', () => {
    expect(() => discrepancyScale(smallProblem(56, prior), prior, { target: 0 })).toThrow(/^target must be a finite χ² target > 0, got 0/);
  });
});

describe('prior predictive check', () => {
  it('data simulated from the prior fall inside the 95% χ²_M interval at the nominal rate (binomial limits)', () => {
    const R = 200;
    let inside = 0;
    let pSum = 0;
    for (let s = 0; s < R; s++) {
      const c = priorPredictiveCheck(smallProblem(1000 + s, prior, 20, 10, 0.1), prior);
      if (c.plausible) inside++;
      pSum += c.pUpper;
    }
    // Bin(200, 0.95): P(X ≤ 177) = 1.9e-4 and P(X = 200) = 3.5e-5 (scipy.stats.binom(200, 0.95).cdf
    // and .pmf, Debian python3-scipy 1.10.1, computed when writing this test), so [178, 199] fails a
    // correct implementation with probability ≈ 2.3e-4.
    expect(inside).toBeGreaterThanOrEqual(178);
    expect(inside).toBeLessThanOrEqual(199);
    // p-values are uniform under the model: mean 1/2 with sd 1/√(12·200) ≈ 0.02.
    expect(Math.abs(pSum / R - 0.5)).toBeLessThan(4 * Math.sqrt(1 / 12 / R));
  });
  it('a prior 100× too narrow is flagged (tiny upper p-value)', () => {
    const p = smallProblem(60, prior, 25, 14, 0.1);
    const c = priorPredictiveCheck(p, { ...prior, terms: [{ ...prior.terms[0], variance: 0.006 }], nugget: 1e-5 });
    expect(c.pUpper).toBeLessThan(1e-3);
    expect(c.plausible).toBe(false);
  });
});

it('priorCriteria bundles the criteria consistently and carries the explanation', () => {
  const p = smallProblem(61, prior);
  const all = priorCriteria(p, prior);
  expect(all.leaveOneOut.logScore).toBe(leaveOneOut(p, prior).logScore);
  expect(all.priorPredictive.statistic).toBeCloseTo(priorPredictiveCheck(p, prior).statistic, 12);
  expect(all.explanation).toBe(CRITERIA_DIFFER_EXPLANATION);
  expect(all.logEvidence).toBeCloseTo(posteriorSummary(preparePosterior(p, prior)).logEvidence, 10);
});
