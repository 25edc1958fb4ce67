/** Small seeded test problems for the tuning tests (invented; sizes chosen to keep the tests fast). */
import { expect, it } from 'vitest';
import { cholesky } from '../../../src/core/linalg/cholesky.ts';
import { BAND_LEVELS, type CalibrationResult } from '../../../src/core/tuning/calibration.ts';
import { matrix, type Matrix } from '../../../src/core/linalg/matrix.ts';
import type { Operator } from '../../../src/core/linalg/operator.ts';
import { sparseFromCoordinates } from '../../../src/core/linalg/sparse.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { covarianceMatrix, meanVector } from '../../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import { rayOperator } from '../../../src/core/problems/rays.ts';

/** Dense M × N operator of local averages: datum i averages `width` cells from a random start. */
export function averagingOperator(m: number, n: number, width: number, rng: Random): Operator {
  const g = matrix(m, n);
  for (let i = 0; i < m; i++) {
    const start = Math.floor(rng.nextDouble() * (n - width + 1));
    for (let j = start; j < start + width; j++) g.data[i * n + j] = 1 / width;
  }
  return { kind: 'dense', matrix: g };
}

/** Sparse operator observing cell idx[i] directly. */
export function pointOperator(idx: readonly number[], n: number): Operator {
  return {
    kind: 'sparse',
    matrix: sparseFromCoordinates(
      idx.length,
      n,
      idx.map((_, i) => i),
      idx,
      idx.map(() => 1),
    ),
  };
}

/** A draw m0 + L z from the prior (own Cholesky, MT19937 normals). */
export function drawTruth(grid: Grid, prior: PriorSpec, rng: Random): Float64Array {
  const c = covarianceMatrix(grid, prior);
  const f = cholesky(c);
  if (!f.ok) throw new Error('test prior does not factor');
  const n = c.rows;
  const z = rng.fillNormal(new Float64Array(n));
  const out = meanVector(grid, prior);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let k = 0; k <= i; k++) s += f.factor.data[i * n + k] * z[k];
    out[i] += s;
  }
  return out;
}

/** d = G m + σ e. */
export function simulateData(g: Operator, m: Float64Array, sigma: Float64Array, rng: Random): Float64Array {
  const gd = g.kind === 'dense' ? g.matrix : null;
  const out = new Float64Array(sigma.length);
  for (let i = 0; i < out.length; i++) {
    let s = 0;
    if (gd) for (let j = 0; j < gd.cols; j++) s += gd.data[i * gd.cols + j] * m[j];
    else {
      const sp = g.matrix as { rowPtr: Int32Array; colIdx: Int32Array; values: Float64Array };
      for (let p = sp.rowPtr[i]; p < sp.rowPtr[i + 1]; p++) s += sp.values[p] * m[sp.colIdx[p]];
    }
    out[i] = s + sigma[i] * rng.nextNormal();
  }
  return out;
}

/** A 1-D problem on `n` cells with `m` averaging data simulated from `truthPrior`. */
export function smallProblem(seed: number, truthPrior: PriorSpec, n = 40, m = 25, sigma = 0.1): Problem {
  const rng = new Random(seed);
  const grid: Grid = { shape: [n], spacing: [1] };
  const operator = averagingOperator(m, n, 3, rng);
  const truth = drawTruth(grid, truthPrior, rng);
  const s = new Float64Array(m).fill(sigma);
  return { grid, operator, data: { values: simulateData(operator, truth, s, rng), sigma: s }, truth };
}

/** The same problem with a full, correlated data covariance Cd_ij = σ² exp(−|i−j|/2). */
export function withCorrelatedErrors(p: Problem, sigma: number): Problem {
  const m = p.data.values.length;
  const cov: Matrix = matrix(m, m);
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) cov.data[i * m + j] = sigma * sigma * Math.exp(-Math.abs(i - j) / 2);
  return { ...p, data: { values: p.data.values, covariance: cov } };
}

/** Smallest k with P(X ≤ k) ≥ q for X ~ Bin(n, p): exact pmf by the ratio recursion in logs. */
export function binomialQuantile(n: number, p: number, q: number): number {
  let logPmf = n * Math.log(1 - p);
  let cdf = 0;
  for (let k = 0; k <= n; k++) {
    cdf += Math.exp(logPmf);
    if (cdf >= q) return k;
    logPmf += Math.log((n - k) / (k + 1)) + Math.log(p / (1 - p));
  }
  return n;
}

/**
 * An invented 2-D survey on an nx × ny grid of 1 m cells: m straight rays, alternately from the
 * left to the right edge and from the bottom to the top, end points from a seeded generator, data
 * simulated from `truthPrior` (dense draw) with noise σ.
 */
export function rayProblem(seed: number, nx: number, ny: number, m: number, truthPrior: PriorSpec, sigma = 0.05): Problem {
  const rng = new Random(seed);
  const grid: Grid = { shape: [nx, ny], spacing: [1, 1] };
  const rays = Array.from({ length: m }, (_, k) => {
    const a = -0.5 + ny * rng.nextDouble();
    const b = -0.5 + ny * rng.nextDouble();
    const c = -0.5 + nx * rng.nextDouble();
    const e = -0.5 + nx * rng.nextDouble();
    return k % 2 === 0
      ? { from: [-0.5, a] as const, to: [nx - 0.5, b] as const }
      : { from: [c, -0.5] as const, to: [e, ny - 0.5] as const };
  });
  const operator = rayOperator(grid, rays);
  const truth = drawTruth(grid, truthPrior, rng);
  const s = new Float64Array(m).fill(sigma);
  return { grid, operator, data: { values: simulateData(operator, truth, s, rng), sigma: s }, truth };
}

/**
 * The coverage checks of a calibration whose truth is drawn from the inversion prior (Cook,
 * Gelman & Rubin 2006; Talts et al. 2018): per-cell hit counts of both bands inside exact binomial
 * limits (Bonferroni over 2·cells.length two-sided tests at a total 0.001), and the average
 * coverage within 4 standard errors of nominal, from the spread of the independent replicates.
 * Registers the tests in the calling describe block.
 */
export function coverageTests(
  res: Pick<
    CalibrationResult,
    'cellCoverage68' | 'cellCoverage95' | 'coverage68' | 'coverage95' | 'replicateCoverage68' | 'replicateCoverage95'
  >,
  replicates: number,
  cells: readonly number[],
): void {
  const a = 0.001 / (2 * cells.length);
  it.each([
    ['inner', BAND_LEVELS.inner.nominal, res.cellCoverage68] as const,
    ['outer', BAND_LEVELS.outer.nominal, res.cellCoverage95] as const,
  ])('%s band: per-cell hit counts lie within exact binomial limits', (_band, p, cov) => {
    const lo = binomialQuantile(replicates, p, a / 2);
    const hi = binomialQuantile(replicates, p, 1 - a / 2);
    for (const c of cells) {
      const count = Math.round(cov[c] * replicates);
      expect(count).toBeGreaterThanOrEqual(lo);
      expect(count).toBeLessThanOrEqual(hi);
    }
  });
  it('average coverage is within 4 standard errors of nominal (spread of independent replicates)', () => {
    for (const [avg, per, p] of [
      [res.coverage68, res.replicateCoverage68, BAND_LEVELS.inner.nominal],
      [res.coverage95, res.replicateCoverage95, BAND_LEVELS.outer.nominal],
    ] as const) {
      const mean = per.reduce((x, y) => x + y, 0) / per.length;
      const sd = Math.sqrt(per.reduce((x, y) => x + (y - mean) ** 2, 0) / (per.length - 1));
      expect(Math.abs(mean - avg)).toBeLessThan(1e-12);
      expect(Math.abs(avg - p)).toBeLessThan((4 * sd) / Math.sqrt(per.length));
    }
  });
}
