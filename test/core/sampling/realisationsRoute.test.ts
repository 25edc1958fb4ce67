/**
 * Route of priorRealisations (src/core/sampling/realisations.ts): dense Cholesky up to
 * DENSE_REALISATION_LIMIT cells
 * with the seeded stream unchanged (m0 + L z, z the first N·count normals of the seed, Rasmussen &
 * Williams 2006 App. A.2), circulant embedding above (Dietrich & Newsam 1997), whose per-cell
 * variance is checked against Cm_ii with χ² limits (a sample variance of K draws with known mean
 * is Cm_ii·χ²_K/K; quantiles from src/core/inverse/chisquare.ts, themselves checked against NIST
 * in test/core/inverse).
 */
import { describe, expect, it } from 'vitest';
import { patchTerm } from '../../../src/core/kernels/spec.ts';
import { circulantRealisations } from '../../../src/core/fft/realisations.ts';
import { chiSquareQuantile } from '../../../src/core/inverse/chisquare.ts';
import { cholesky } from '../../../src/core/linalg/cholesky.ts';
import { covarianceMatrix, meanVector } from '../../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import {
  DENSE_REALISATION_LIMIT,
  priorRealisations,
  priorRealisationsWithRoute,
  realisationsFromFactor,
} from '../../../src/core/sampling/realisations.ts';
import { Random } from '../../../src/core/sampling/random.ts';

const prior: PriorSpec = { mean: { constant: 1 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 2, length: 3 }], nugget: 0.01 };

describe('priorRealisations route', () => {
  it('dense up to the limit, with the old seeded stream', () => {
    const grid = { shape: [16, 12], spacing: [1, 1] };
    const r = priorRealisationsWithRoute(grid, prior, 3, 99);
    expect(r.route).toBe('dense');
    const f = cholesky(covarianceMatrix(grid, prior));
    if (!f.ok) throw new Error('test prior must factor');
    expect(Array.from(r.realisations.data)).toEqual(
      Array.from(realisationsFromFactor(f.factor, meanVector(grid, prior), 3, new Random(99)).data),
    );
  });
  it('circulant embedding above the limit: the sampler output, with a variance inside χ² limits', () => {
    const grid = { shape: [65, 64], spacing: [1, 1] };
    expect(65 * 64).toBeGreaterThan(DENSE_REALISATION_LIMIT);
    expect(priorRealisationsWithRoute({ shape: [33, 32], spacing: [1, 1] }, prior, 1, 5).route).toBe(
      33 * 32 > DENSE_REALISATION_LIMIT ? 'fft' : 'dense',
    );
    expect(priorRealisationsWithRoute({ shape: [32, 32], spacing: [1, 1] }, prior, 1, 5).route).toBe('dense');
    const K = 200;
    const r = priorRealisationsWithRoute(grid, prior, K, 5);
    expect(r.route).toBe('fft');
    expect(r.clipped).toBe(false);
    expect(Array.from(r.realisations.data.subarray(0, 100))).toEqual(
      Array.from(circulantRealisations(grid, prior, K, 5).realisations.data.subarray(0, 100)),
    );
    expect(priorRealisations(grid, prior, 2, 5).rows).toBe(2);
    // Cell 0 across K independent draws: Σ (x − m0)² / Cm_00 ~ χ²_K; two-sided 0.999 limits (seeded, so the test is deterministic).
    const n = 65 * 64;
    for (const cell of [0, 2080]) {
      let s = 0;
      for (let k = 0; k < K; k++) s += (r.realisations.data[k * n + cell] - 1) ** 2;
      const q = s / (2 + 0.01);
      expect(q).toBeGreaterThan(chiSquareQuantile(0.0005, K));
      expect(q).toBeLessThan(chiSquareQuantile(0.9995, K));
    }
  });

  it('the kept circulant sampler gives the same draws as a fresh one, and a changed prior is not served from it', () => {
    const grid = { shape: [40, 30], spacing: [1, 1] };
    const a = priorRealisations(grid, prior, 2, 11);
    const b = priorRealisations(grid, prior, 2, 11); // from the kept sampler
    expect(Array.from(b.data)).toEqual(Array.from(a.data));
    expect(Array.from(a.data)).toEqual(Array.from(circulantRealisations(grid, prior, 2, 11).realisations.data));
    const longer: PriorSpec = { ...prior, terms: [patchTerm(prior.terms[0], { length: 6 })] };
    const c = priorRealisations(grid, longer, 2, 11);
    expect(Array.from(c.data)).toEqual(Array.from(circulantRealisations(grid, longer, 2, 11).realisations.data));
    expect(Array.from(c.data)).not.toEqual(Array.from(a.data));
  });
});
