/**
 * Circulant-embedding realisations: sample covariance against Cm (prior/covariance.ts) within
 * χ² limits, independence of the two fields of one complex draw, seeding, padding growth and
 * the fallbacks. Tolerances are derived (χ² quantiles from src/core/inverse/chisquare.ts, itself
 * checked against the NIST table and scipy.stats.chi2.ppf); seeds are fixed.
 */
import { describe, expect, it } from 'vitest';
import { circulantRealisations, circulantSampler, nonNegativeEmbedding } from '../../../src/core/fft/realisations.ts';
import { minimalPadding } from '../../../src/core/fft/embedding.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { chiSquareQuantile } from '../../../src/core/inverse/chisquare.ts';
import { cholesky, solveLower } from '../../../src/core/linalg/cholesky.ts';
import type { Matrix } from '../../../src/core/linalg/matrix.ts';
import { covarianceMatrix, meanVector } from '../../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { seededVector } from './cases.ts';

/** Whitened deviations w_r = L⁻¹ (x_r − m0), Cm = L Lᵀ; one row per realisation. */
function whiten(x: Matrix, grid: Grid, prior: PriorSpec): Float64Array[] {
  const f = cholesky(covarianceMatrix(grid, prior));
  if (!f.ok) throw new Error('test prior is not positive definite');
  const m0 = meanVector(grid, prior);
  const n = x.cols;
  return Array.from({ length: x.rows }, (_, r) => {
    const d = new Float64Array(n);
    for (let i = 0; i < n; i++) d[i] = x.data[r * n + i] - m0[i];
    return solveLower(f.factor, d);
  });
}

/** Two-sided χ²_df acceptance interval at total level α. */
function chi2Limits(df: number, alpha: number): [number, number] {
  return [chiSquareQuantile(alpha / 2, df), chiSquareQuantile(1 - alpha / 2, df)];
}

const ALPHA = 1e-4;

const STAT_CASES: { name: string; grid: Grid; prior: PriorSpec }[] = [
  {
    name: '2-D matern 1.5 rotated, trend mean',
    grid: { shape: [6, 5], spacing: [1, 0.8] },
    prior: {
      mean: { trend: { intercept: 2, slope: [0.1, 0.3] } },
      terms: [{ kernel: 'matern', nu: 1.5, variance: 1.5, lengths: [3, 1.2], angle: 40 }],
    },
  },
  {
    name: '1-D exponential with profile and nugget',
    grid: { shape: [25], spacing: [0.5] },
    prior: {
      mean: { constant: -1 },
      nugget: 0.05,
      stdProfile: Array.from(seededVector(25, 3), (v) => 1 + 0.5 * v),
      terms: [{ kernel: 'exponential', variance: 1, length: 2 }],
    },
  },
  {
    name: '3-D matern 1.5 rotated (three angles), trend with a z slope, nugget',
    grid: { shape: [5, 4, 3], spacing: [1, 0.8, 1.5] },
    prior: {
      mean: { trend: { intercept: 1, slope: [0.1, -0.2, 0.3] } },
      nugget: 0.03,
      terms: [{ kernel: 'matern', nu: 1.5, variance: 1.2, lengths: [3, 1.5, 2.2], angles: [30, -20, 40] }],
    },
  },
  {
    name: '3-D gaussian isotropic with a std profile',
    grid: { shape: [4, 3, 5], spacing: [1, 1, 0.7] },
    prior: {
      mean: { constant: 0 },
      nugget: 0.01,
      stdProfile: Array.from(seededVector(60, 8), (v) => 1 + 0.3 * v),
      terms: [{ kernel: 'gaussian', variance: 1, length: 1.6 }],
    },
  },
];

/**
 * Whitened draws w (count of them, length n) must look like N(0, I): with S = (1/K) Σ w wᵀ,
 * Σ_i K S_ii = Σ_r ‖w_r‖² ~ χ²(K N) exactly, and √K S_ij (i < j) → N(0, 1), asymptotically
 * independent, so K Σ_{i<j} S_ij² ≈ χ²(N(N−1)/2). Both inside two-sided limits at ALPHA.
 */
function expectWhite(w: readonly Float64Array[], count: number, n: number): void {
  let diag = 0;
  for (const v of w) for (let i = 0; i < n; i++) diag += v[i] * v[i];
  const [dlo, dhi] = chi2Limits(count * n, ALPHA);
  expect(diag).toBeGreaterThan(dlo);
  expect(diag).toBeLessThan(dhi);
  let off = 0;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      let sij = 0;
      for (const v of w) sij += v[i] * v[j];
      off += (sij * sij) / count;
    }
  }
  const [olo, ohi] = chi2Limits((n * (n - 1)) / 2, ALPHA);
  expect(off).toBeGreaterThan(olo);
  expect(off).toBeLessThan(ohi);
}

describe('sample covariance of circulant-embedding realisations matches Cm', () => {
  for (const { name, grid, prior } of STAT_CASES) {
    it(`${name}: whitened diagonal and off-diagonal sums inside χ² limits (α = ${ALPHA} each)`, () => {
      const count = 4000;
      const res = circulantRealisations(grid, prior, count, 12345);
      expect(res.path).toBe('fft');
      expect(res.clipped).toBe(false);
      expectWhite(whiten(res.realisations, grid, prior), count, res.realisations.cols);
    });
  }

  it('single-field draws (odd count, P normals, Hermitian spectrum) pass the same χ² checks', () => {
    const { grid, prior } = STAT_CASES[0];
    const sampler = circulantSampler(grid, prior);
    const count = 4000;
    const n = 30;
    const data = new Float64Array(count * n);
    for (let r = 0; r < count; r++) data.set(sampler.draw(1, 5000 + r).data, r * n);
    expectWhite(whiten({ rows: count, cols: n, data }, grid, prior), count, n);
  });

  it('the two fields of one complex draw are uncorrelated: (K/2) Σ_ij X_ij² inside χ²(N²) limits', () => {
    const { grid, prior } = STAT_CASES[0];
    const count = 4000;
    const w = whiten(circulantRealisations(grid, prior, count, 777).realisations, grid, prior);
    const n = w[0].length;
    const pairs = count / 2;
    let stat = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let c = 0;
        for (let p = 0; p < pairs; p++) c += w[2 * p][i] * w[2 * p + 1][j];
        stat += (c * c) / pairs;
      }
    }
    const [lo, hi] = chi2Limits(n * n, ALPHA);
    expect(stat).toBeGreaterThan(lo);
    expect(stat).toBeLessThan(hi);
  });

  it('a wrong covariance is rejected by the same statistic (the test can fail)', () => {
    const { grid, prior } = STAT_CASES[0];
    const longer: PriorSpec = { ...prior, terms: [{ kernel: 'matern', nu: 1.5, variance: 1.5, lengths: [3.6, 1.2], angle: 40 }] };
    const w = whiten(circulantRealisations(grid, longer, 4000, 12345).realisations, grid, prior);
    const n = w[0].length;
    let off = 0;
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        let sij = 0;
        for (const v of w) sij += v[i] * v[j];
        off += (sij * sij) / 4000;
      }
    }
    expect(off).toBeGreaterThan(chi2Limits((n * (n - 1)) / 2, ALPHA)[1]);
  });
});

describe('3-D realisations', () => {
  it('drawn on a 3-D grid with the y and z spacings swapped, they are rejected by the same statistic (the test can fail)', () => {
    const { grid, prior } = STAT_CASES[2]!;
    const swapped: Grid = { shape: grid.shape, spacing: [grid.spacing[0]!, grid.spacing[2]!, grid.spacing[1]!] };
    const w = whiten(circulantRealisations(swapped, prior, 4000, 99).realisations, grid, prior);
    const n = w[0]!.length;
    let off = 0;
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        let sij = 0;
        for (const v of w) sij += v[i]! * v[j]!;
        off += (sij * sij) / 4000;
      }
    }
    expect(off).toBeGreaterThan(chi2Limits((n * (n - 1)) / 2, ALPHA)[1]);
  });

  it('padding grows on every axis holding cells until the embedding is non-negative (Gaussian, long length)', () => {
    const grid: Grid = { shape: [8, 6, 5], spacing: [1, 1, 1] };
    const search = nonNegativeEmbedding(grid, [{ kernel: 'gaussian', variance: 1, length: 3 }]);
    expect(search.tried.length).toBeGreaterThan(1);
    expect(search.tried[0]).toEqual([minimalPadding(8, true), minimalPadding(6, true), minimalPadding(5, true)]);
    expect(search.tried[1]).toEqual(search.tried[0]!.map((p) => 2 * p));
    expect(search.nonNegative).toBe(true);
    const sampler = circulantSampler(grid, {
      mean: { constant: 0 },
      terms: [{ kernel: 'gaussian', variance: 1, length: 3 }],
      nugget: 1e-6,
    });
    expect(sampler.path).toBe('fft');
    expect(sampler.padding).toEqual(search.tried[search.tried.length - 1]);
  });
});

describe('seeding', () => {
  const { grid, prior } = STAT_CASES[0];
  it('same seed, same numbers; another seed, other numbers', () => {
    const a = circulantRealisations(grid, prior, 3, 42).realisations.data;
    expect(circulantRealisations(grid, prior, 3, 42).realisations.data).toEqual(a);
    expect(circulantRealisations(grid, prior, 3, 43).realisations.data).not.toEqual(a);
  });
  it('the first realisations do not depend on how many are drawn (pairs share one draw)', () => {
    const a = circulantRealisations(grid, prior, 4, 9).realisations.data;
    const b = circulantRealisations(grid, prior, 2, 9).realisations.data;
    expect(Array.from(a.subarray(0, b.length))).toEqual(Array.from(b));
  });
});

describe('padding growth', () => {
  it('1-D exponential: the minimal embedding is non-negative at every length (convex decreasing covariance; Dietrich & Newsam 1997, memory)', () => {
    for (const length of [0.5, 3, 30, 300]) {
      const s = nonNegativeEmbedding({ shape: [40], spacing: [1] }, [{ kernel: 'exponential', variance: 1, length }]);
      expect(s.nonNegative).toBe(true);
      expect(s.embedding.px).toBe(minimalPadding(40, true));
    }
  });

  it('gaussian: padding grows with the correlation length (Dietrich & Newsam 1997; Wood & Chan 1994)', () => {
    const grid: Grid = { shape: [32, 32], spacing: [1, 1] };
    const sizes = [1, 4, 6, 12].map((length) =>
      nonNegativeEmbedding(grid, [{ kernel: 'gaussian', variance: 1, length }], { maxCells: 1 << 20 }),
    );
    expect(sizes[0].embedding.px).toBe(64); // short length: minimal embedding suffices
    for (const s of sizes) expect(s.nonNegative).toBe(true);
    for (let k = 1; k < sizes.length; k++) expect(sizes[k].embedding.px).toBeGreaterThanOrEqual(sizes[k - 1].embedding.px);
    expect(sizes[2].embedding.px).toBeGreaterThan(64);
    expect(sizes[3].embedding.px).toBeGreaterThan(sizes[2].embedding.px);
    // Each doubling was needed: the size before the final one had a negative eigenvalue.
    for (const s of sizes) expect(s.tried.length).toBe(Math.log2(s.embedding.px / 64) + 1);
  });

  it('matern: longer lengths need at least as much padding (Graham et al. 2018)', () => {
    const grid: Grid = { shape: [24], spacing: [1] };
    const px = [2, 8, 32].map(
      (length) => nonNegativeEmbedding(grid, [{ kernel: 'matern', nu: 2.5, variance: 1, length }], { maxCells: 1 << 16 }).embedding.px,
    );
    for (let k = 1; k < px.length; k++) expect(px[k]).toBeGreaterThanOrEqual(px[k - 1]);
  });
});

describe('fallbacks when the embedding stays indefinite within the memory bound', () => {
  const grid: Grid = { shape: [16, 16], spacing: [1, 1] };
  const prior: PriorSpec = { mean: { constant: 0 }, nugget: 1e-6, terms: [{ kernel: 'gaussian', variance: 1, length: 5 }] };
  it('small N: dense Cholesky, reported as path dense', () => {
    const s = circulantSampler(grid, prior, { maxCells: 32 * 32 });
    expect(s.path).toBe('dense');
    expect(s.clipped).toBe(false);
    expect(s.clippedRelativeTrace).toBeGreaterThan(0);
    expect(s.draw(2, 1).rows).toBe(2);
  });
  it('large N (denseLimit below N): eigenvalues clipped, error reported', () => {
    const s = circulantSampler(grid, prior, { maxCells: 32 * 32, denseLimit: 100 });
    expect(s.path).toBe('fft');
    expect(s.clipped).toBe(true);
    expect(s.clippedRelativeTrace).toBeGreaterThan(0);
    expect(s.clippedRelativeTrace).toBeLessThan(1);
    expect(s.padding).toEqual([32, 32]);
  });
  it('names the field for a bad count', () => {
    expect(() => circulantRealisations(grid, prior, -1, 1)).toThrow(/count must be a whole number/);
  });
});
