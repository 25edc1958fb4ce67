import { describe, expect, it } from 'vitest';
import { priorRealisations } from '../../../src/core/sampling/realisations.ts';
import { covarianceMatrix, meanVector } from '../../../src/core/prior/covariance.ts';
import { InputError, NotPositiveDefiniteError } from '../../../src/core/errors.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';

/**
 * Two-sided normal critical value for a Bonferroni-corrected family: the smallest z with
 * P(|Z| > z) ≤ α/K, using the Mills-ratio bound P(|Z| > z) ≤ 2φ(z)/z (Abramowitz & Stegun 26.2.12
 * asymptotic, memory; the bound holds for all z > 0), solved by bisection. Using an upper bound on
 * the tail makes z slightly conservative.
 */
function bonferroniZ(alpha: number, k: number): number {
  const tail = (z: number) => (2 * Math.exp(-0.5 * z * z)) / (z * Math.sqrt(2 * Math.PI));
  let lo = 1;
  let hi = 40;
  for (let it = 0; it < 200; it++) {
    const mid = 0.5 * (lo + hi);
    if (tail(mid) > alpha / k) lo = mid;
    else hi = mid;
  }
  return hi;
}

/**
 * Sample mean and covariance (about the known m0) of `count` realisations against m0 and Cm.
 * For x ~ N(m0, C), x̄_i has standard error √(C_ii / n), and S_ij = (1/n) Σ (x_i − m0_i)(x_j − m0_j)
 * has Var S_ij = (C_ii C_jj + C_ij²) / n, since by Isserlis' theorem E[x_i² x_j²] = C_ii C_jj + 2 C_ij²
 * (zero-mean). By the CLT each standardised entry is ≈ N(0, 1); with K = N + N(N+1)/2 entries tested
 * and family error α = 1e-3 each |error| must stay below z(α/K)·se (Bonferroni).
 */
function checkMoments(grid: Grid, prior: PriorSpec, count: number, seed: number): { worst: number; z: number } {
  const x = priorRealisations(grid, prior, count, seed);
  const m0 = meanVector(grid, prior);
  const c = covarianceMatrix(grid, prior);
  const n = c.rows;
  const z = bonferroniZ(1e-3, n + (n * (n + 1)) / 2);
  let worst = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let r = 0; r < count; r++) s += x.data[r * n + i];
    const se = Math.sqrt(c.data[i * n + i] / count);
    worst = Math.max(worst, Math.abs(s / count - m0[i]) / se);
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let r = 0; r < count; r++) s += (x.data[r * n + i] - m0[i]) * (x.data[r * n + j] - m0[j]);
      const cij = c.data[i * n + j];
      const se = Math.sqrt((c.data[i * n + i] * c.data[j * n + j] + cij * cij) / count);
      worst = Math.max(worst, Math.abs(s / count - cij) / se);
    }
  }
  return { worst, z };
}

const g1: Grid = { shape: [10], spacing: [0.5], origin: [1] };
const p1: PriorSpec = {
  mean: { trend: { intercept: 3, slope: [-0.5] } },
  terms: [
    { kernel: 'exponential', variance: 1, length: 1.5 },
    { kernel: 'gaussian', variance: 0.5, length: 0.6 },
  ],
  nugget: 0.05,
  stdProfile: [1, 1.2, 1.4, 1.6, 1.8, 2, 1.5, 1, 0.8, 0.6],
};
const g2: Grid = { shape: [4, 3], spacing: [1, 1.5] };
const p2: PriorSpec = { mean: { constant: -2 }, terms: [{ kernel: 'matern', variance: 2, lengths: [3, 1], angle: 35, nu: 1.5 }] };

describe('priorRealisations', () => {
  it('bonferroniZ reproduces the two-sided normal quantile to within the Mills-ratio slack', () => {
    // Φ⁻¹(1 − 0.025) = 1.959964 (A&S Table 26.1, memory); the bound is conservative by < 0.5 there.
    const z = bonferroniZ(0.05, 1);
    expect(z).toBeGreaterThan(1.959964);
    expect(z).toBeLessThan(2.5);
  });

  it.each([
    ['1-D, two terms, nugget, std profile, trend', g1, p1],
    ['2-D rotated anisotropic Matérn', g2, p2],
  ] as [string, Grid, PriorSpec][])('%s: sample mean and covariance match m0 and Cm within Bonferroni limits', (_d, grid, prior) => {
    const { worst, z } = checkMoments(grid, prior, 20000, 7);
    expect(worst).toBeLessThan(z);
  });

  it('same seed, same numbers; another seed, other numbers; rows continue one stream', () => {
    const a = priorRealisations(g2, p2, 3, 42);
    const b = priorRealisations(g2, p2, 3, 42);
    const c = priorRealisations(g2, p2, 3, 43);
    expect(Array.from(a.data)).toEqual(Array.from(b.data));
    expect(Array.from(a.data)).not.toEqual(Array.from(c.data));
    expect([a.rows, a.cols]).toEqual([3, 12]);
    const first = priorRealisations(g2, p2, 1, 42);
    expect(Array.from(first.data)).toEqual(Array.from(a.data.subarray(0, 12)));
    expect(priorRealisations(g2, p2, 0, 1).rows).toBe(0);
  });

  it('rejects bad count and seed with InputError', () => {
    expect(() => priorRealisations(g2, p2, -1, 1)).toThrow(InputError);
    expect(() => priorRealisations(g2, p2, 1.5, 1)).toThrow('count must be a non-negative integer, got 1.5');
    expect(() => priorRealisations(g2, p2, 1, -3)).toThrow('seed must be an integer between 0 and 4294967295, got -3');
    expect(() => priorRealisations(g2, p2, 1, 2 ** 32)).toThrow(InputError);
  });

  it('a non-factorable prior throws NotPositiveDefiniteError with the suggested nugget', () => {
    const bad: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 1, length: 10 }] };
    let err: unknown;
    try {
      priorRealisations({ shape: [100], spacing: [1] }, bad, 2, 1);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(NotPositiveDefiniteError);
    expect((err as Error).message).toMatch(
      /^prior covariance Cm is not positive definite \(Cholesky failed at row \d+\): add a nugget of about 1\.0e-8/,
    );
  });
});
