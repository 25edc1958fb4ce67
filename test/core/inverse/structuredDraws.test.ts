/**
 * FFT-path posterior draws and resolution rows (src/core/inverse/structuredDraws.ts) against the
 * dense path (src/core/inverse/posterior.ts, which builds Cm and factors it) and against the
 * posterior mean / std, with statistical limits derived from the sample size (seeded).
 */
import { describe, expect, it } from 'vitest';
import { posteriorCovariance, posteriorRealisations, preparePosterior, resolutionRow } from '../../../src/core/inverse/posterior.ts';
import { prepareStructuredPosterior, structuredPosteriorStd } from '../../../src/core/inverse/structured.ts';
import { noiseSeed, structuredPosteriorDraws, structuredResolutionRow } from '../../../src/core/inverse/structuredDraws.ts';
import { chiSquareQuantile } from '../../../src/core/inverse/chisquare.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import type { Matrix } from '../../../src/core/linalg/matrix.ts';
import { matrix } from '../../../src/core/linalg/matrix.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { rayOperator } from '../../../src/core/problems/rays.ts';
import { rayFan, relErr, seededVector } from '../fft/cases.ts';

const grid: Grid = { shape: [12, 9], spacing: [1, 0.8] };
const n = 108;
const m = 30;

function problem(fullCd: boolean): Problem {
  const operator = rayOperator(grid, rayFan(grid, m, 3));
  const values = seededVector(m, 4);
  if (!fullCd) return { grid, operator, data: { values, sigma: Float64Array.from(seededVector(m, 5), (v) => 0.1 + 0.03 * v) } };
  const cd = matrix(m, m);
  for (let i = 0; i < m; i++) {
    cd.data[i * m + i] = 0.02;
    if (i > 0) cd.data[i * m + i - 1] = cd.data[(i - 1) * m + i] = 0.006;
  }
  return { grid, operator, data: { values, covariance: cd } };
}

const PRIORS: { name: string; prior: PriorSpec }[] = [
  {
    name: 'rotated matern, trend mean',
    prior: {
      mean: { trend: { intercept: 1, slope: [0.1, -0.05] } },
      terms: [{ kernel: 'matern', nu: 1.5, variance: 1, lengths: [4, 2], angle: 30 }],
    },
  },
  {
    name: 'spherical + nugget + profile',
    prior: {
      mean: { constant: 0.3 },
      nugget: 0.02,
      stdProfile: Array.from(seededVector(n, 9), (v) => 1 + 0.4 * v),
      terms: [{ kernel: 'spherical', variance: 2, length: 6 }],
    },
  },
];

describe('structuredResolutionRow equals the dense resolutionRow', () => {
  for (const { name, prior } of PRIORS) {
    for (const fullCd of [false, true]) {
      it(`${name}, ${fullCd ? 'full' : 'diagonal'} Cd`, () => {
        const p = problem(fullCd);
        const st = prepareStructuredPosterior(p, prior);
        const dense = preparePosterior(p, prior);
        for (const cell of [0, 17, 54, 107])
          expect(relErr(structuredResolutionRow(st, cell), resolutionRow(dense, cell))).toBeLessThan(1e-10);
      });
    }
  }
  it('checks the cell', () => {
    const st = prepareStructuredPosterior(problem(false), PRIORS[0].prior);
    expect(() => structuredResolutionRow(st, 108)).toThrow('cell must be an integer in [0, 107], got 108');
    expect(() => structuredResolutionRow(st, 1.5)).toThrow(/cell must be an integer/);
  });
});

function columnStats(x: Matrix): { mean: Float64Array; variance: Float64Array } {
  const { rows, cols, data } = x;
  const mean = new Float64Array(cols);
  const variance = new Float64Array(cols);
  for (let r = 0; r < rows; r++) for (let i = 0; i < cols; i++) mean[i] += data[r * cols + i] / rows;
  for (let r = 0; r < rows; r++) for (let i = 0; i < cols; i++) variance[i] += (data[r * cols + i] - mean[i]) ** 2 / (rows - 1);
  return { mean, variance };
}

// Family-wise error 1e-3 over the n cells (Bonferroni): per-cell level α = 1e-3 / n.
const S = 2000;
const alpha = 1e-3 / n;
// |z| limit for N(0, 1): z² ~ χ²₁, so P(|z| > √q(1 − α)) = α.
const zLimit = Math.sqrt(chiSquareQuantile(1 - alpha, 1));
// (S − 1) s² / σ² ~ χ²_{S−1} for Gaussian samples.
const varLo = chiSquareQuantile(alpha / 2, S - 1) / (S - 1);
const varHi = chiSquareQuantile(1 - alpha / 2, S - 1) / (S - 1);

describe('structuredPosteriorDraws', () => {
  for (const { name, prior } of PRIORS) {
    for (const fullCd of [false, true]) {
      it(`${name}, ${fullCd ? 'full' : 'diagonal'} Cd: sample mean and variance match the posterior mean and std`, () => {
        const p = problem(fullCd);
        const st = prepareStructuredPosterior(p, prior);
        const r = structuredPosteriorDraws(st, S, 2026);
        expect(r.clipped).toBe(false);
        expect(r.realisations.rows).toBe(S);
        expect(r.realisations.cols).toBe(n);
        const std = structuredPosteriorStd(st);
        const { mean, variance } = columnStats(r.realisations);
        let movedByData = 0;
        for (let i = 0; i < n; i++) {
          const sd = std[i];
          expect(Math.abs(mean[i] - st.mean[i])).toBeLessThan((zLimit * sd) / Math.sqrt(S));
          const ratio = variance[i] / (sd * sd);
          expect(ratio).toBeGreaterThan(varLo);
          expect(ratio).toBeLessThan(varHi);
          if (sd * sd < 0.7 * st.priorVariance[i]) movedByData++;
        }
        // The data reduce the variance in many cells, so matching the posterior (not the prior) matters.
        expect(movedByData).toBeGreaterThan(10);
      });
    }
  }

  it('cross-covariance: a random projection vᵀx has the variance vᵀ C̃ v (C̃ from the dense posterior)', () => {
    const p = problem(false);
    const prior = PRIORS[0].prior;
    const draws = structuredPosteriorDraws(prepareStructuredPosterior(p, prior), S, 77).realisations;
    const C = posteriorCovariance(preparePosterior(p, prior));
    const v = seededVector(n, 12);
    let want = 0;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) want += v[i] * C.data[i * n + j] * v[j];
    const proj = matrix(S, 1);
    for (let s = 0; s < S; s++) {
      let a = 0;
      for (let i = 0; i < n; i++) a += v[i] * draws.data[s * n + i];
      proj.data[s] = a;
    }
    const ratio = columnStats(proj).variance[0] / want;
    // One test at level 1e-3.
    expect(ratio).toBeGreaterThan(chiSquareQuantile(5e-4, S - 1) / (S - 1));
    expect(ratio).toBeLessThan(chiSquareQuantile(1 - 5e-4, S - 1) / (S - 1));
  });

  it('agrees statistically with the dense path draws (two-sample mean and log-variance tests)', () => {
    const p = problem(true);
    const prior = PRIORS[1].prior;
    const a = columnStats(structuredPosteriorDraws(prepareStructuredPosterior(p, prior), S, 5).realisations);
    const b = columnStats(posteriorRealisations(preparePosterior(p, prior), S, 6));
    for (let i = 0; i < n; i++) {
      // x̄a − x̄b ~ N(0, 2σ²/S); σ² estimated by the pooled variance (S large).
      const pooled = (a.variance[i] + b.variance[i]) / 2;
      expect(Math.abs(a.mean[i] - b.mean[i])).toBeLessThan(zLimit * Math.sqrt((2 * pooled) / S));
      // log s²: variance ≈ 2/(S − 1) each (delta method on χ²_{S−1}/(S−1)).
      expect(Math.abs(Math.log(a.variance[i] / b.variance[i]))).toBeLessThan(zLimit * Math.sqrt(4 / (S - 1)));
    }
  });

  it('same seed, same numbers; another seed, other numbers; argument checks', () => {
    const st = prepareStructuredPosterior(problem(false), PRIORS[0].prior);
    const x = structuredPosteriorDraws(st, 3, 11).realisations;
    expect(Array.from(x.data)).toEqual(Array.from(structuredPosteriorDraws(st, 3, 11).realisations.data));
    expect(Array.from(x.data)).not.toEqual(Array.from(structuredPosteriorDraws(st, 3, 12).realisations.data));
    expect(noiseSeed(0xffffffff)).not.toBe(0xffffffff);
    expect(noiseSeed(0)).not.toBe(0);
    expect(() => structuredPosteriorDraws(st, -1, 1)).toThrow('count must be a non-negative integer, got -1');
    expect(() => structuredPosteriorDraws(st, 2, -5)).toThrow(/seed/);
  });
});
