/**
 * The FFT-path posterior on 3-D grids against the dense 3-D route (prior/covariance.ts covarianceMatrix +
 * inverse/posterior.ts): mean, std, predictions, evidence and tr R to 1e-10, for every kernel, rotated 3-D
 * anisotropy, sums, nugget and std profile (the cases of test/core/fft/cases.ts). The dense 3-D route is itself
 * checked against scipy (test/reference/dense3d.test.ts), so the chain reaches an outside reference.
 */
import { describe, expect, it } from 'vitest';
import { choosePosteriorPath, FFT_MIN_CELLS } from '../../../src/core/inverse/auto.ts';
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
  for (const c of COVARIANCE_CASES_3D) {
    it(`${c.name} (${c.grid.shape.join(' × ')}): mean, std, predictions, evidence, tr R and a resolution row to 1e-10`, () => {
      const problem = problemFor(c.grid, 19, 7);
      const state = prepareStructuredPosterior(problem, c.prior);
      const ours = structuredPosteriorSummary(state);
      const dense = posteriorSummary(preparePosterior(problem, c.prior));
      expect(ours.path).toBe('fft');
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
    const sp = structuredProblem(problem);
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
