/**
 * The data-fit reference (src/core/inverse/fitReference.ts) against an independent Python
 * computation (test/reference/fit_reference.py, Debian python3-scipy / python3-numpy):
 * - weights: scipy.linalg.eigh(Cd, K) generalised eigenvalues with K = G Cm Gᵀ + Cd formed by numpy,
 *   against our eig(X Xᵀ), X = L⁻¹ S, on the borehole demo (dense route);
 * - CDF and quantiles: Imhof's integral (Imhof 1961, Biometrika 48:419, eq. 3.2) integrated by
 *   QUADPACK (scipy.integrate.quad, Fourier-weighted QAWF for the oscillating tail) and inverted by
 *   scipy.optimize.brentq, against our Gauss–Legendre panels with the truncation bound;
 * - a numpy Monte Carlo of Σ λ_j z_j², within 4.5 binomial standard errors (Bonferroni over the
 *   ≈ 20 points compared keeps the family-wise false alarm rate below 1e-4).
 */
import { describe, expect, it } from 'vitest';
import { dataFitReference, fitWeights, WeightedChiSquare } from '../../src/core/inverse/fitReference.ts';
import { preparePosterior, posteriorSummary } from '../../src/core/inverse/posterior.ts';
import { matrix } from '../../src/core/linalg/matrix.ts';
import { operatorToDense } from '../../src/core/linalg/operator.ts';
import { covarianceMatrix } from '../../src/core/prior/covariance.ts';
import { demoById } from '../../src/core/problems/demos.ts';
import { runPython } from './python.ts';

const borehole = demoById('borehole-log').build();
const state = preparePosterior(borehole.problem, borehole.startPrior);
const m = state.L.rows;
const S = matrix(m, m);
borehole.problem.data.sigma!.forEach((s, k) => (S.data[k * m + k] = s));
const demoWeights = fitWeights(state.L, S);

const weightSets: number[][] = [
  [1, 0.5],
  [0.9, 0.3, 0.3, 0.1, 0.01],
  [1, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2],
  Array.from({ length: 50 }, (_, i) => Math.exp(-i / 5)),
  Array.from(demoWeights),
];
const P = [0.001, 0.025, 0.5, 0.975, 0.999];
const cases = weightSets.map((weights) => {
  const q = new WeightedChiSquare(weights);
  const sd = Math.sqrt(q.variance);
  return { weights, x: [0.3 * q.mean, q.mean - sd, q.mean, q.mean + sd, q.mean + 3 * sd], p: P };
});
const DRAWS = 200000;
const ref = runPython<{ cases: { cdf: number[]; quantiles: number[]; mcCdf: number[] }[]; weights: number[][] }>('fit_reference.py', {
  cases,
  mc: { draws: DRAWS, seed: 20261204 },
  matrices: [
    {
      G: Array.from({ length: m }, (_, k) => Array.from(operatorToDense(borehole.problem.operator).data.subarray(k * 200, (k + 1) * 200))),
      Cm: Array.from({ length: 200 }, (_, i) =>
        Array.from(covarianceMatrix(borehole.problem.grid, borehole.startPrior).data.subarray(i * 200, (i + 1) * 200)),
      ),
      sigma: Array.from(borehole.problem.data.sigma!),
    },
  ],
});

describe('data-fit reference against scipy and numpy', () => {
  it('weights eig(L⁻¹ Cd L⁻ᵀ) equal scipy.linalg.eigh(Cd, K) on the borehole demo to 1e-10, and sum to M − tr R', () => {
    const want = ref.weights[0];
    expect(want.length).toBe(m);
    want.forEach((w, k) => expect(Math.abs(demoWeights[k] - w)).toBeLessThanOrEqual(1e-10));
    const s = posteriorSummary(state);
    const sum = demoWeights.reduce((a, b) => a + b, 0);
    expect(Math.abs(sum - (m - s.resolutionTrace))).toBeLessThanOrEqual(1e-10 * m);
    expect(Math.abs(s.fitReference!.expected - sum)).toBeLessThanOrEqual(1e-12 * m);
  });
  cases.forEach((c, k) => {
    it(`CDF and quantiles of case ${k + 1} (${c.weights.length} weights) agree with Imhof by QUADPACK (CDF 1e-8 absolute, quantiles 1e-7 relative)`, () => {
      const q = new WeightedChiSquare(c.weights);
      c.x.forEach((x, j) => expect(Math.abs(q.cdf(x) - ref.cases[k].cdf[j])).toBeLessThanOrEqual(1e-8));
      c.p.forEach((p, j) => {
        const want = ref.cases[k].quantiles[j];
        expect(Math.abs(q.quantile(p) - want)).toBeLessThanOrEqual(1e-7 * want);
      });
    });
    it(`CDF of case ${k + 1} agrees with a numpy Monte Carlo of ${DRAWS} draws (4.5 binomial standard errors)`, () => {
      const q = new WeightedChiSquare(c.weights);
      c.x.forEach((x, j) => {
        const f = q.cdf(x);
        const se = Math.sqrt(Math.max(f * (1 - f), 1 / DRAWS) / DRAWS);
        expect(Math.abs(ref.cases[k].mcCdf[j] - f)).toBeLessThanOrEqual(4.5 * se);
      });
    });
  });
  it('dataFitReference on the borehole demo: expected M − tr R, interval from the quantiles, upper tail = 1 − CDF', () => {
    const s = posteriorSummary(state);
    const r = dataFitReference(demoWeights, s.chi2)!;
    const q = new WeightedChiSquare(demoWeights);
    expect(r.interval95[0]).toBeCloseTo(q.quantile(0.025), 12);
    expect(r.interval95[1]).toBeCloseTo(q.quantile(0.975), 12);
    expect(Math.abs(r.upperTail - (1 - q.cdf(s.chi2)))).toBeLessThanOrEqual(1e-14);
  });
});
