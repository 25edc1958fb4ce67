/**
 * The FFT-path posterior on 3-D grids against the dense 3-D route (prior/covariance.ts covarianceMatrix +
 * inverse/posterior.ts): mean, std, predictions, evidence and tr R to 1e-10, for every kernel, rotated 3-D
 * anisotropy, sums, nugget and std profile (the cases of test/core/fft/cases.ts). The dense 3-D route is itself
 * checked against scipy (test/reference/dense3d.test.ts), so the chain reaches an outside reference.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { choosePosteriorPath, FFT_MIN_CELLS } from '../../../src/core/inverse/auto.ts';
import { computePosterior } from '../../../src/core/inverse/compute.ts';
import { nodeBlockPool } from '../../../src/core/parallel/node.ts';
import { projectedPriorCovariance } from '../../../src/core/tuning/dataSpace.ts';
import { posteriorSummary, preparePosterior } from '../../../src/core/inverse/posterior.ts';
import { structuredPosteriorDraws, structuredResolutionRow } from '../../../src/core/inverse/structuredDraws.ts';
import { resolutionRow } from '../../../src/core/inverse/posterior.ts';
import { prepareStructuredPosterior, structuredPosteriorSummary, structuredProblem } from '../../../src/core/inverse/structured.ts';
import { cellCount, type Grid } from '../../../src/core/grid/grid.ts';
import { sparseFromCoordinates } from '../../../src/core/linalg/sparse.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { COVARIANCE_CASES_3D, relErr, seededVector } from '../fft/cases.ts';

/** Straight "rays" through a 3-D grid: datum k sums a seeded run of cells along x, y or z (path-like rows). */
function lineOperator(grid: Grid, m: number, seed: number): Problem['operator'] {
  const [nx, ny, nz] = grid.shape as [number, number, number];
  const u = seededVector(4 * m, seed);
  const ri: number[] = [];
  const ci: number[] = [];
  const v: number[] = [];
  for (let k = 0; k < m; k++) {
    const axis = k % 3;
    const pick = (x: number, n: number) => Math.min(n - 1, Math.floor(((x + 1) / 2) * n));
    const ix = pick(u[4 * k]!, nx);
    const iy = pick(u[4 * k + 1]!, ny);
    const iz = pick(u[4 * k + 2]!, nz);
    const len = axis === 0 ? nx : axis === 1 ? ny : nz;
    for (let t = 0; t < len; t++) {
      const [x, y, z] = axis === 0 ? [t, iy, iz] : axis === 1 ? [ix, t, iz] : [ix, iy, t];
      ri.push(k);
      ci.push(x + nx * (y + ny * z));
      v.push(grid.spacing[axis]! * (1 + 0.1 * u[4 * k + 3]!));
    }
  }
  return { kind: 'sparse', matrix: sparseFromCoordinates(m, cellCount(grid), ri, ci, v) };
}

function problemFor(grid: Grid, m: number, seed: number): Problem {
  return {
    grid,
    operator: lineOperator(grid, m, seed),
    data: { values: seededVector(m, seed + 1), sigma: Float64Array.from(seededVector(m, seed + 2), (x) => 0.1 + 0.03 * x) },
  };
}

describe('structured posterior on 3-D grids equals the dense 3-D posterior', () => {
  // Both ways of computing the rows of Bᵀ: circulant embedding and direct sums over the lag table.
  for (const c of COVARIANCE_CASES_3D)
    for (const products of ['circulant', 'lag'] as const) {
      it(`${c.name} (${c.grid.shape.join(' × ')}), rows by ${products}: mean, std, predictions, evidence, tr R and a resolution row to 1e-10`, () => {
        const problem = problemFor(c.grid, 19, 7);
        const state = prepareStructuredPosterior(structuredProblem(problem, { products }), c.prior);
        const ours = structuredPosteriorSummary(state);
        const dense = posteriorSummary(preparePosterior(problem, c.prior));
        expect(ours.path).toBe('fft');
        expect(state.products).toBe(products);
        expect(relErr(ours.mean, dense.mean)).toBeLessThan(1e-10);
        expect(relErr(ours.std, dense.std)).toBeLessThan(1e-10);
        expect(relErr(ours.priorStd, dense.priorStd)).toBeLessThan(1e-10);
        expect(relErr(ours.predicted, dense.predicted)).toBeLessThan(1e-10);
        expect(Math.abs(ours.logEvidence - dense.logEvidence)).toBeLessThan(1e-10 * Math.abs(dense.logEvidence));
        expect(Math.abs(ours.resolutionTrace - dense.resolutionTrace)).toBeLessThan(1e-10 * dense.resolutionTrace);
        const cell = Math.floor(cellCount(c.grid) / 3);
        expect(relErr(structuredResolutionRow(state, cell), resolutionRow(preparePosterior(problem, c.prior), cell))).toBeLessThan(1e-10);
      });
    }

  it('a cached spectrum (second prior on the same problem) gives the fresh result', () => {
    const c = COVARIANCE_CASES_3D[4]!;
    const problem = problemFor(c.grid, 13, 3);
    const sp = structuredProblem(problem, { products: 'circulant' });
    prepareStructuredPosterior(sp, COVARIANCE_CASES_3D[0]!.prior);
    const warm = prepareStructuredPosterior(sp, c.prior);
    expect(warm.spectraCached).toBe(true);
    expect(relErr(warm.mean, posteriorSummary(preparePosterior(problem, c.prior)).mean)).toBeLessThan(1e-10);
  });

  it('the automatic route takes FFT for a stationary prior on a large 3-D grid and says so; says so', () => {
    const grid: Grid = { shape: [16, 16, 12], spacing: [1, 1, 2] };
    expect(cellCount(grid)).toBeGreaterThanOrEqual(FFT_MIN_CELLS);
    const prior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 3 }] };
    const d = choosePosteriorPath(problemFor(grid, 10, 1), prior);
    expect(d.path).toBe('fft');
    expect(d.reason).toMatch(/FFT/);
  });

  it('posterior draws on the FFT route: their mean over 2000 draws is the posterior mean within 5 standard errors (std / √K)', () => {
    const c = COVARIANCE_CASES_3D[3]!;
    const problem = problemFor(c.grid, 11, 4);
    const state = prepareStructuredPosterior(problem, c.prior);
    const summary = structuredPosteriorSummary(state);
    const k = 2000;
    const draws = structuredPosteriorDraws(state, k, 17).realisations;
    const n = draws.cols;
    let worst = 0;
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let r = 0; r < k; r++) s += draws.data[r * n + i]!;
      worst = Math.max(worst, Math.abs(s / k - summary.mean[i]!) / (summary.std[i]! / Math.sqrt(k)));
    }
    // 240 cells: max |z| over 240 nearly independent normals exceeds 5 with probability ≈ 1.4e-4.
    expect(worst).toBeLessThan(5);
  });
});

describe('the 3-D checks can fail: a wrong axis order is caught', () => {
  it('the FFT posterior on the grid with y and z swapped (shape and spacing) is far from the dense posterior on the true grid', () => {
    const c = COVARIANCE_CASES_3D[4]!; // 8 × 6 × 5, spacing 1, 0.7, 1.3, rotated anisotropy
    const problem = problemFor(c.grid, 19, 7);
    const [nx, ny, nz] = c.grid.shape as [number, number, number];
    const [dx, dy, dz] = c.grid.spacing as [number, number, number];
    const swapped: Problem = { ...problem, grid: { shape: [nx, nz, ny], spacing: [dx, dz, dy] } };
    const dense = posteriorSummary(preparePosterior(problem, c.prior));
    const right = structuredPosteriorSummary(prepareStructuredPosterior(problem, c.prior));
    const wrong = structuredPosteriorSummary(prepareStructuredPosterior(swapped, c.prior));
    expect(relErr(right.mean, dense.mean)).toBeLessThan(1e-10);
    expect(relErr(wrong.mean, dense.mean)).toBeGreaterThan(1e-3);
    expect(relErr(wrong.std, dense.std)).toBeGreaterThan(1e-3);
  });

  it('the state names one embedding size per axis (px, py, pz ≥ 2n − 1)', () => {
    const c = COVARIANCE_CASES_3D[6]!; // 5 × 1 × 7
    const state = prepareStructuredPosterior(structuredProblem(problemFor(c.grid, 9, 2), { products: 'circulant' }), c.prior);
    expect(state.products).toBe('circulant');
    expect(state.padding).toHaveLength(3);
    state.padding.forEach((p, a) => expect(p).toBeGreaterThanOrEqual(2 * c.grid.shape[a]! - 1));
  });
});

describe('computePosterior on 3-D grids (the entry of the worker engine and the command line)', () => {
  const pool = nodeBlockPool(2);
  afterAll(() => pool.close());
  const grid: Grid = { shape: [10, 7, 6], spacing: [1, 0.8, 1.4] }; // 420 cells ≥ FFT_MIN_CELLS
  const prior: PriorSpec = {
    mean: { constant: 0.2 },
    nugget: 0.01,
    terms: [{ kernel: 'matern', nu: 1.5, variance: 1, lengths: [4, 2, 3], angles: [25, -10, 15] }],
  };

  it('auto takes the FFT route and says so; mean and std equal the dense route (requested) to 1e-10', async () => {
    const problem = problemFor(grid, 41, 5);
    const fft = await computePosterior(problem, prior);
    const dense = await computePosterior(problem, prior, { path: 'dense' });
    expect([fft.decision.path, fft.summary.path]).toEqual(['fft', 'fft']);
    expect(fft.decision.reason).toMatch(/FFT: stationary prior on a regular grid of 420 cells/);
    expect(fft.decision.reason).toMatch(/rows of G Cm summed from the lag table/);
    expect([dense.decision.path, dense.summary.path]).toEqual(['dense', 'dense']);
    expect(relErr(fft.summary.mean, dense.summary.mean)).toBeLessThan(1e-10);
    expect(relErr(fft.summary.std, dense.summary.std)).toBeLessThan(1e-10);
  });

  it('split over 2 threads (products and std, forced): the same bits as one thread', async () => {
    const problem = problemFor(grid, 41, 5);
    const one = await computePosterior(problem, prior);
    const two = await computePosterior(problem, prior, { pool: { get: () => pool, threads: 2, force: true } });
    expect(two.threadsUsed).toBe(2);
    expect(Array.from(two.summary.mean)).toEqual(Array.from(one.summary.mean));
    expect(Array.from(two.summary.std)).toEqual(Array.from(one.summary.std));
  });

  it('below FFT_MIN_CELLS a 3-D problem stays on the dense route and says why', async () => {
    const small: Grid = { shape: [4, 3, 5], spacing: [1, 1, 1] };
    const r = await computePosterior(problemFor(small, 7, 1), prior);
    expect(r.decision.path).toBe('dense');
    expect(r.decision.reason).toMatch(/60 cells, below 128/);
  });
});

describe('prior selection on 3-D grids: the projection P = G Cm Gᵀ of the criteria (tuning/dataSpace.ts)', () => {
  for (const c of COVARIANCE_CASES_3D)
    for (const products of ['circulant', 'lag'] as const) {
      it(`${c.name}, rows by ${products}: the FFT route's P equals the dense route's to 1e-10`, () => {
        const problem = problemFor(c.grid, 15, 9);
        const fft = projectedPriorCovariance(problem, c.prior, { route: 'fft', structured: structuredProblem(problem, { products }) });
        const dense = projectedPriorCovariance(problem, c.prior, { route: 'dense' });
        expect(relErr(fft.data, dense.data)).toBeLessThan(1e-10);
      });
    }
});
