/**
 * The FFT-path posterior against Debian's scipy (test/reference/fft_reference.py 'posterior':
 * Cm built in numpy from the kernel formulas, K = G Cm Gᵀ + Cd, scipy.linalg.cho_factor/cho_solve;
 * Tarantola 2005 §3.2 data-space formulas, log evidence as in Rasmussen & Williams 2006 Alg. 2.1).
 */
import { describe, expect, it } from 'vitest';
import { prepareStructuredPosterior, structuredPosteriorSummary } from '../../src/core/inverse/structured.ts';
import type { Grid } from '../../src/core/grid/grid.ts';
import { sparseToDense } from '../../src/core/linalg/sparse.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { rayOperator } from '../../src/core/problems/rays.ts';
import { rayFan, relErr, seededVector } from '../core/fft/cases.ts';
import { runPython } from './python.ts';

interface Ref {
  mean: number[];
  std: number[];
  logEvidence: number;
  resolutionTrace: number;
  chi2: number;
  residuals: number[];
}

const grid: Grid = { shape: [14, 10], spacing: [0.5, 0.7] };
const CASES: { name: string; prior: PriorSpec; m: number }[] = [
  {
    name: 'matern 1.5 isotropic',
    m: 24,
    prior: { mean: { constant: 0.5 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1.2, length: 2 }] },
  },
  {
    name: 'matern 2.5 rotated + nugget',
    m: 30,
    prior: { mean: { constant: 0 }, nugget: 0.01, terms: [{ kernel: 'matern', nu: 2.5, variance: 1, lengths: [3, 1], angle: 60 }] },
  },
  {
    name: 'gaussian + exponential with profile, trend mean',
    m: 19,
    prior: {
      mean: { trend: { intercept: 0.3, slope: [0.2, 0.1] } },
      stdProfile: Array.from(seededVector(140, 77), (v) => 1 + 0.3 * v),
      terms: [
        { kernel: 'gaussian', variance: 0.5, lengths: [2, 4], angle: 15 },
        { kernel: 'exponential', variance: 0.5, length: 1 },
      ],
    },
  },
];

describe('structured posterior vs scipy cho_factor/cho_solve (Debian python3-scipy)', () => {
  const problems: Problem[] = CASES.map(({ m }, k) => ({
    grid,
    operator: rayOperator(grid, rayFan(grid, m, 50 + k)),
    data: { values: seededVector(m, 60 + k), sigma: Float64Array.from(seededVector(m, 70 + k), (v) => 0.1 + 0.05 * v) },
  }));
  const ref = runPython<{ results: Ref[] }>('fft_reference.py', {
    cases: CASES.map(({ prior }, k) => {
      const g = sparseToDense(problems[k].operator.matrix as never);
      return {
        op: 'posterior',
        grid,
        prior,
        g: { rows: g.rows, cols: g.cols, data: Array.from(g.data) },
        d: Array.from(problems[k].data.values),
        sigma: Array.from(problems[k].data.sigma!),
      };
    }),
  }).results;
  CASES.forEach(({ name, prior }, k) => {
    it(`${name}: mean, std, log evidence, tr R, χ² within 1e-10 relative`, () => {
      const s = structuredPosteriorSummary(prepareStructuredPosterior(problems[k], prior));
      const r = ref[k];
      expect(relErr(s.mean, r.mean)).toBeLessThan(1e-10);
      expect(relErr(s.std, r.std)).toBeLessThan(1e-10);
      expect(Math.abs(s.logEvidence - r.logEvidence)).toBeLessThan(1e-10 * Math.abs(r.logEvidence));
      expect(Math.abs(s.resolutionTrace - r.resolutionTrace)).toBeLessThan(1e-10 * r.resolutionTrace);
      expect(relErr(s.residuals, r.residuals)).toBeLessThan(1e-8);
      expect(Math.abs(s.chi2 - r.chi2)).toBeLessThan(1e-8 * r.chi2);
    });
  });
});
