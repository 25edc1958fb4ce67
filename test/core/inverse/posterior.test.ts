/**
 * Statistical and behavioural checks of the data-space posterior. The algebra itself is checked
 * against scipy in test/reference/posterior.test.ts; here, seeded Monte-Carlo runs check that the
 * posterior is calibrated: truth drawn from the prior, data from truth plus noise. Tolerances are
 * derived (binomial and χ² limits at two-sided 0.1%), never tuned to our own output.
 */
import { describe, expect, it } from 'vitest';
import { NotPositiveDefiniteError } from '../../../src/core/errors.ts';
import { cellCoordinates, type Grid } from '../../../src/core/grid/grid.ts';
import { chiSquareQuantile, logGamma } from '../../../src/core/inverse/chisquare.ts';
import { logEvidenceFromFactor } from '../../../src/core/inverse/evidence.ts';
import {
  posteriorCovariance,
  posteriorRealisations,
  posteriorSummary,
  preparePosterior,
  preparePosteriorFromCovariance,
  resolutionRow,
} from '../../../src/core/inverse/posterior.ts';
import { cholesky, solveLower } from '../../../src/core/linalg/cholesky.ts';
import { fromRows, identity, matrix, type Matrix } from '../../../src/core/linalg/matrix.ts';
import { applyOperator, type Operator } from '../../../src/core/linalg/operator.ts';
import { covarianceMatrix, meanVector } from '../../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';

/**
 * Two-sided 0.1% limits of a Binomial(n, p) count: the exact 0.05% and 99.95% quantiles, summing the
 * pmf C(n,k) pᵏ (1−p)ⁿ⁻ᵏ (textbook definition; ln C(n,k) by logGamma). The normal approximation is
 * too narrow in the upper tail for p = 2.5% (it gives 57.4 where the exact point is 59). For n = 1500
 * these limits equal scipy.stats.binom.ppf([0.0005, 0.9995], n, p) for every p used here (checked by hand).
 */
function binomialLimits(n: number, p: number): [number, number] {
  const logPmf = (k: number) => logGamma(n + 1) - logGamma(k + 1) - logGamma(n - k + 1) + k * Math.log(p) + (n - k) * Math.log1p(-p);
  let cdf = 0;
  let lo = -1;
  for (let k = 0; k <= n; k++) {
    cdf += Math.exp(logPmf(k));
    if (lo < 0 && cdf >= 0.0005) lo = k;
    if (cdf >= 0.9995) return [lo, k];
  }
  return [lo, n];
}

/** Standard normal two-sided quantiles for 68.27% and 95% (A&S Table 26.1: z = 1 and 1.959964). */
const Z68 = 1;
const P68 = 0.6826894921370859; // erf(1/√2), A&S Table 7.1 (memory)
const Z95 = 1.959963984540054;

const grid: Grid = { shape: [40], spacing: [1], origin: [0.5] };
const prior: PriorSpec = { mean: { constant: 2 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 6 }], nugget: 0.01 };

/** 10 smoothing windows (M = 10 so that the NIST table row df = 10 applies directly). */
function windows(): Operator {
  const { x } = cellCoordinates(grid);
  const G = matrix(10, 40);
  for (let k = 0; k < 10; k++) {
    for (let j = 0; j < 40; j++) G.data[k * 40 + j] = Math.exp(-0.5 * ((x[j] - (2 + 4 * k)) / 1.5) ** 2);
  }
  return { kind: 'dense', matrix: G };
}

const G = windows();
const SIGMA = 0.2;
const sigma = new Float64Array(10).fill(SIGMA);
const Cm = covarianceMatrix(grid, prior);
const m0 = meanVector(grid, prior);
const Lm = (() => {
  const f = cholesky(Cm);
  if (!f.ok) throw new Error('test prior does not factor');
  return f.factor;
})();

function drawTruth(z: Float64Array): Float64Array {
  const out = Float64Array.from(m0);
  for (let i = 0; i < 40; i++) for (let k = 0; k <= i; k++) out[i] += Lm.data[i * 40 + k] * z[k];
  return out;
}

describe('calibration over seeded replicates (truth from the prior, data = G truth + noise)', () => {
  const R = 1500;
  const normals = new Random(987654).fillNormal(new Float64Array(R * 50));
  let in68 = 0;
  let in95 = 0;
  let chiTruthAbove95 = 0;
  let chiTruthBelow025 = 0;
  let misfitAbove975 = 0;
  let misfitBelow025 = 0;
  for (let rep = 0; rep < R; rep++) {
    const truth = drawTruth(normals.subarray(rep * 50, rep * 50 + 40));
    const e = normals.subarray(rep * 50 + 40, rep * 50 + 50);
    const values = applyOperator(G, truth).map((v, k) => v + SIGMA * e[k]);
    const problem: Problem = { grid, operator: G, data: { values, sigma } };
    const s = posteriorSummary(preparePosteriorFromCovariance(problem, Cm, m0));
    // One cell per replicate (cycling), so the Bernoulli trials are independent.
    const cell = (rep * 7) % 40;
    const dev = Math.abs(truth[cell] - s.mean[cell]);
    if (dev <= Z68 * s.std[cell]) in68++;
    if (dev <= Z95 * s.std[cell]) in95++;
    // χ² of the residuals at the truth: Σ e² ~ χ²_10.
    const chiTruth = e.reduce((a, v) => a + v * v, 0);
    // NIST/SEMATECH e-Handbook §1.3.6.7.4, df = 10: upper 5% point 18.30704, lower 2.5% point 3.24697.
    if (chiTruth > 18.30704) chiTruthAbove95++;
    if (chiTruth < 3.24697) chiTruthBelow025++;
    // rᵀ K⁻¹ r ~ χ²_10 under the model (derived, see types.ts); NIST df = 10: 3.24697 and 20.48318.
    if (s.dataMisfit! > 20.48318) misfitAbove975++;
    if (s.dataMisfit! < 3.24697) misfitBelow025++;
  }
  const within = (count: number, p: number) => {
    const [lo, hi] = binomialLimits(R, p);
    expect(count).toBeGreaterThanOrEqual(lo);
    expect(count).toBeLessThanOrEqual(hi);
  };
  it('68% posterior bands cover the truth at the nominal rate', () => within(in68, P68));
  it('95% posterior bands cover the truth at the nominal rate', () => within(in95, 0.95));
  it('χ² of residuals at the truth exceeds the NIST 95% point 5% of the time', () => within(chiTruthAbove95, 0.05));
  it('χ² of residuals at the truth falls below the NIST 2.5% point 2.5% of the time', () => within(chiTruthBelow025, 0.025));
  it('the prior-predictive misfit rᵀK⁻¹r follows χ²_M (NIST 2.5% / 97.5% points)', () => {
    within(misfitAbove975, 0.025);
    within(misfitBelow025, 0.025);
  });
});

/** Full Cd with neighbouring data correlated (0.5 on the first off-diagonal, σ² on the diagonal). */
function banded(): Matrix {
  const C = matrix(10, 10);
  for (let k = 0; k < 10; k++) {
    C.data[k * 10 + k] = SIGMA * SIGMA;
    if (k > 0) C.data[k * 10 + k - 1] = C.data[(k - 1) * 10 + k] = 0.5 * SIGMA * SIGMA;
  }
  return C;
}

describe.each(['diagonal', 'full'] as const)('posterior realisations, %s Cd', (cdKind) => {
  const { x } = cellCoordinates(grid);
  const values = applyOperator(
    G,
    x.map((v) => 2 + Math.sin(v / 5)),
  ).map((v, k) => v + 0.1 * Math.cos(k));
  const problem: Problem = { grid, operator: G, data: cdKind === 'diagonal' ? { values, sigma } : { values, covariance: banded() } };
  const state = preparePosterior(problem, prior);
  const s = posteriorSummary(state);
  const C = posteriorCovariance(state);
  const fc = cholesky(C);
  const S = 4000;
  const draws = posteriorRealisations(state, S, 2024);
  const n = 40;
  it('is reproducible for a seed and differs across seeds', () => {
    const a = posteriorRealisations(state, 3, 11);
    expect(Array.from(a.data)).toEqual(Array.from(posteriorRealisations(state, 3, 11).data));
    expect(Array.from(a.data)).not.toEqual(Array.from(posteriorRealisations(state, 3, 12).data));
  });
  it('whitened draws L̃⁻¹(m_s − m̃) have unit variance in total: Σ y² ~ χ²_{S·N}', () => {
    expect(fc.ok).toBe(true);
    if (!fc.ok) return;
    let total = 0;
    const ybar = new Float64Array(n);
    for (let q = 0; q < S; q++) {
      const y = solveLower(
        fc.factor,
        draws.data.subarray(q * n, (q + 1) * n).map((v, i) => v - s.mean[i]),
      );
      for (let i = 0; i < n; i++) {
        total += y[i] * y[i];
        ybar[i] += y[i] / S;
      }
    }
    expect(total).toBeGreaterThan(chiSquareQuantile(0.0005, S * n));
    expect(total).toBeLessThan(chiSquareQuantile(0.9995, S * n));
    // Sample mean: S ‖ȳ‖² ~ χ²_N exactly for Gaussian draws.
    const mah = S * ybar.reduce((a, v) => a + v * v, 0);
    expect(mah).toBeGreaterThan(chiSquareQuantile(0.0005, n));
    expect(mah).toBeLessThan(chiSquareQuantile(0.9995, n));
  });
  it('per-cell sample variances match the posterior std ((S−1) s²/σ² ~ χ²_{S−1}, Bonferroni over 40 cells)', () => {
    const p = 0.001 / (2 * n);
    const lo = chiSquareQuantile(p, S - 1);
    const hi = chiSquareQuantile(1 - p, S - 1);
    for (let i = 0; i < n; i++) {
      let mean = 0;
      for (let q = 0; q < S; q++) mean += draws.data[q * n + i] / S;
      let ss = 0;
      for (let q = 0; q < S; q++) ss += (draws.data[q * n + i] - mean) ** 2;
      const stat = ss / (s.std[i] * s.std[i]);
      expect(stat).toBeGreaterThan(lo);
      expect(stat).toBeLessThan(hi);
    }
  });
  it('sample covariance between two cells matches the posterior covariance (Fisher z, 3.29 sd)', () => {
    // Fisher's z of a sample correlation is ≈ N(atanh ρ, 1/(S−3)) (Fisher 1921; common practice).
    for (const [i, j] of [
      [5, 7],
      [12, 30],
      [20, 21],
    ] as const) {
      let mi = 0,
        mj = 0;
      for (let q = 0; q < S; q++) {
        mi += draws.data[q * n + i] / S;
        mj += draws.data[q * n + j] / S;
      }
      let sii = 0,
        sjj = 0,
        sij = 0;
      for (let q = 0; q < S; q++) {
        const a = draws.data[q * n + i] - mi;
        const b = draws.data[q * n + j] - mj;
        sii += a * a;
        sjj += b * b;
        sij += a * b;
      }
      const rSample = sij / Math.sqrt(sii * sjj);
      const rTrue = C.data[i * n + j] / Math.sqrt(C.data[i * n + i] * C.data[j * n + j]);
      expect(Math.abs(Math.atanh(rSample) - Math.atanh(rTrue))).toBeLessThan(3.2905 / Math.sqrt(S - 3));
    }
  });
});

describe('special cases and edge behaviour', () => {
  it('one datum, one cell: the textbook normal-normal update', () => {
    // m ~ N(μ, τ²), d = m + e, e ~ N(0, s²): mean (τ² d + s² μ)/(τ² + s²), variance τ² s²/(τ² + s²),
    // evidence N(d; μ, τ² + s²) (Gelman et al., Bayesian Data Analysis, §2.5, memory).
    const tau2 = 2.5,
      s2 = 0.4,
      mu = 1.2,
      d = 3.1;
    const problem: Problem = {
      grid: { shape: [1], spacing: [1] },
      operator: { kind: 'dense', matrix: fromRows([[1]]) },
      data: { values: Float64Array.of(d), sigma: Float64Array.of(Math.sqrt(s2)) },
    };
    const st = preparePosteriorFromCovariance(problem, fromRows([[tau2]]), [mu]);
    const s = posteriorSummary(st);
    expect(s.mean[0]).toBeCloseTo((tau2 * d + s2 * mu) / (tau2 + s2), 14);
    expect(s.std[0] ** 2).toBeCloseTo((tau2 * s2) / (tau2 + s2), 14);
    const v = tau2 + s2;
    expect(s.logEvidence).toBeCloseTo((-0.5 * (d - mu) ** 2) / v - 0.5 * Math.log(2 * Math.PI * v), 14);
    expect(s.resolutionTrace).toBeCloseTo(tau2 / (tau2 + s2), 14);
    expect(logEvidenceFromFactor(st.L, st.r, st.alpha)).toBe(s.logEvidence);
  });
  it('clamps variances that rounding pushes below zero and never returns NaN', () => {
    const n = 30;
    const problem: Problem = {
      grid: { shape: [n], spacing: [1] },
      operator: { kind: 'dense', matrix: identity(n) },
      data: { values: new Float64Array(n).fill(1), sigma: new Float64Array(n).fill(1e-9) },
    };
    const s = posteriorSummary(
      preparePosterior(problem, { mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 1e6, length: 3 }], nugget: 1 }),
    );
    // True posterior variance ≈ σ² = 1e-18, but Cm_ii − Σ W_ki² cancels two numbers of size
    // Cm_ii ≈ 1e6, so the computed value carries an absolute error of a few ε·Cm_ii (ε = 2.2e-16;
    // standard floating-point error analysis, common practice): std ≤ √(100 ε Cm_ii) ≈ 1.5e-4.
    const bound = Math.sqrt(100 * 2.220446049250313e-16 * (1e6 + 1));
    s.std.forEach((v) => {
      expect(Number.isNaN(v)).toBe(false);
      expect(v).toBeGreaterThanOrEqual(0);
      expect(v).toBeLessThan(bound);
    });
    s.varianceReduction.forEach((v) => expect(v).toBeLessThanOrEqual(1));
  });
  it('resolution trace of an almost noise-free, fully observed problem is ≈ N', () => {
    const n = 12;
    const problem: Problem = {
      grid: { shape: [n], spacing: [1] },
      operator: { kind: 'dense', matrix: identity(n) },
      data: { values: new Float64Array(n), sigma: new Float64Array(n).fill(1e-6) },
    };
    // Derived: with G = I, R = Cm (Cm + σ²I)⁻¹ = I − σ² (Cm + σ²I)⁻¹, so ‖R − I‖ ≤ σ²/λmin(Cm) and
    // λmin(Cm) ≥ nugget = 0.1: every entry of R − I is below 1e-11, tr R within n·1e-11 of n.
    const state = preparePosterior(problem, {
      mean: { constant: 0 },
      terms: [{ kernel: 'exponential', variance: 1, length: 2 }],
      nugget: 0.1,
    });
    const s = posteriorSummary(state);
    expect(Math.abs(s.resolutionTrace - n)).toBeLessThan(n * 1e-11);
    resolutionRow(state, 3).forEach((v, j) => expect(Math.abs(v - (j === 3 ? 1 : 0))).toBeLessThan(1e-11));
  });
});

describe('bad input', () => {
  const problem = (data: Problem['data']): Problem => ({
    grid: { shape: [3], spacing: [1] },
    operator: { kind: 'dense', matrix: identity(3) },
    data,
  });
  const C3: Matrix = identity(3);
  it('names the field and what was expected', () => {
    expect(() =>
      preparePosteriorFromCovariance(problem({ values: new Float64Array(3), sigma: Float64Array.of(1, 0, 1) }), C3, [0, 0, 0]),
    ).toThrow('problem.data.sigma[1] must be a finite number > 0, got 0');
    expect(() =>
      preparePosteriorFromCovariance(problem({ values: new Float64Array(2), sigma: new Float64Array(2).fill(1) }), C3, [0, 0, 0]),
    ).toThrow('problem.data.values must be 3 numbers (one per operator row), got an array of length 2');
    expect(() => preparePosteriorFromCovariance(problem({ values: new Float64Array(3) }), C3, [0, 0, 0])).toThrow(
      'problem.data must be exactly one of sigma or covariance, got "neither"',
    );
    expect(() =>
      preparePosteriorFromCovariance(problem({ values: Float64Array.of(0, NaN, 0), sigma: new Float64Array(3).fill(1) }), C3, [0, 0, 0]),
    ).toThrow('problem.data.values[1] must be a finite number, got NaN');
    expect(() =>
      preparePosteriorFromCovariance(problem({ values: new Float64Array(3), sigma: new Float64Array(3).fill(1) }), identity(4), [0, 0, 0]),
    ).toThrow('prior covariance Cm must be a 3×3 matrix, got "4×4"');
  });
  it('resolutionRow and posteriorRealisations check their arguments', () => {
    const st = preparePosteriorFromCovariance(problem({ values: new Float64Array(3), sigma: new Float64Array(3).fill(1) }), C3, [0, 0, 0]);
    expect(() => resolutionRow(st, 3)).toThrow('cell must be an integer in [0, 2], got 3');
    expect(() => posteriorRealisations(st, -1, 1)).toThrow('count must be a non-negative integer, got -1');
    expect(() => posteriorRealisations(st, 2, -5)).toThrow(/seed/);
  });
  it('an indefinite full Cd or K gives NotPositiveDefiniteError with a hint', () => {
    const bad = fromRows([
      [1, 2, 0],
      [2, 1, 0],
      [0, 0, 1],
    ]);
    expect(() => preparePosteriorFromCovariance(problem({ values: new Float64Array(3), covariance: bad }), C3, [0, 0, 0])).toThrow(
      NotPositiveDefiniteError,
    );
    const negCm = fromRows([
      [-5, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
    ]);
    expect(() =>
      preparePosteriorFromCovariance(problem({ values: new Float64Array(3), sigma: new Float64Array(3).fill(1) }), negCm, [0, 0, 0]),
    ).toThrow(/data-space covariance K is not positive definite \(Cholesky failed at row 0\): K = G Cm Gᵀ \+ Cd must be positive definite/);
  });
});
