/**
 * Outside checks of src/core/tuning against Debian's python3-scipy / python3-numpy
 * (test/reference/tuning_reference.py builds Cm, K and the refits itself from the kernel formulas):
 * - log evidence vs scipy.stats.multivariate_normal.logpdf;
 * - prior predictive p-value vs scipy.stats.chi2.sf;
 * - closed-form leave-one-out vs brute-force model-space refits with one datum removed (numpy);
 * - discrepancy scale: χ² of the model-space posterior mean at the found scale equals M.
 */
import { describe, expect, it } from 'vitest';
import { toRows } from '../../src/core/linalg/matrix.ts';
import { cellCoordinates } from '../../src/core/grid/grid.ts';
import { meanVector } from '../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { discrepancyScale, leaveOneOut, priorPredictiveCheck } from '../../src/core/tuning/criteria.ts';
import { logEvidence } from '../../src/core/tuning/typeII.ts';
import { smallProblem } from '../core/tuning/helpers.ts';
import { runPython } from './python.ts';

interface Ref {
  logpdf: number;
  quad: number;
  sf: number;
  loo: number[];
  chi2_scaled?: number;
}

const truth: PriorSpec = { mean: { constant: 0.5 }, terms: [{ kernel: 'exponential', variance: 1, length: 4 }], nugget: 1e-3 };
const candidates: { name: string; problemSeed: number; prior: PriorSpec; py: { kernel: string; variance: number; length: number }[] }[] = [
  { name: 'exponential, as simulated', problemSeed: 11, prior: truth, py: [{ kernel: 'exponential', variance: 1, length: 4 }] },
  {
    name: 'gaussian + exponential, trend mean, too narrow',
    problemSeed: 12,
    prior: {
      mean: { trend: { intercept: 0.2, slope: [0.01] } },
      terms: [
        { kernel: 'gaussian', variance: 0.3, length: 6 },
        { kernel: 'exponential', variance: 0.05, length: 1.5 },
      ],
      nugget: 1e-3,
    },
    py: [
      { kernel: 'gaussian', variance: 0.3, length: 6 },
      { kernel: 'exponential', variance: 0.05, length: 1.5 },
    ],
  },
  {
    name: 'matern 3/2, too wide',
    problemSeed: 13,
    prior: { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 20, length: 10 }], nugget: 1e-3 },
    py: [{ kernel: 'matern32', variance: 20, length: 10 }],
  },
];

const problems: Problem[] = candidates.map((c) => smallProblem(c.problemSeed, truth, 30, 18, 0.15));
const scales = candidates.map((c, k) => discrepancyScale(problems[k], c.prior));

const ref = runPython<{ results: Ref[] }>('tuning_reference.py', {
  cases: candidates.map((c, k) => {
    const p = problems[k];
    const d = scales[k];
    return {
      x: Array.from(cellCoordinates(p.grid).x),
      G: toRows(p.operator.matrix as Parameters<typeof toRows>[0]),
      d: Array.from(p.data.values),
      sigma: Array.from(p.data.sigma!),
      m0: Array.from(meanVector(p.grid, c.prior)),
      terms: c.py,
      nugget: c.prior.nugget,
      ...(d.status === 'found' ? { scale: d.scale } : {}),
    };
  }),
}).results;

describe.each(candidates.map((c, k) => [c.name, k] as const))('%s', (_name, k) => {
  const p = problems[k];
  const prior = candidates[k].prior;
  const r = ref[k];
  it('log evidence equals scipy multivariate_normal.logpdf to 1e-10 relative', () => {
    expect(Math.abs(logEvidence(p, prior) - r.logpdf)).toBeLessThanOrEqual(1e-10 * Math.max(1, Math.abs(r.logpdf)));
  });
  it('prior predictive statistic and upper p-value equal numpy rᵀK⁻¹r and scipy chi2.sf', () => {
    const c = priorPredictiveCheck(p, prior);
    expect(Math.abs(c.statistic - r.quad)).toBeLessThanOrEqual(1e-10 * r.quad);
    expect(Math.abs(c.pUpper - r.sf)).toBeLessThanOrEqual(1e-10 + 1e-8 * r.sf);
  });
  it('closed-form leave-one-out equals brute-force refits with one datum removed', () => {
    const loo = leaveOneOut(p, prior);
    r.loo.forEach((want, i) => expect(Math.abs(loo.contributions[i] - want)).toBeLessThanOrEqual(1e-8 * Math.max(1, Math.abs(want))));
    const sum = r.loo.reduce((a, b) => a + b, 0);
    expect(Math.abs(loo.logScore - sum)).toBeLessThanOrEqual(1e-8 * Math.max(1, Math.abs(sum)));
  });
  it('discrepancy scale makes the model-space posterior χ² equal M (or says why not)', () => {
    const d = scales[k];
    if (d.status === 'found') {
      expect(Math.abs(r.chi2_scaled! - d.target)).toBeLessThanOrEqual(1e-7 * d.target);
    } else {
      // Not found: the range of achievable χ² must exclude M.
      expect(d.status === 'mean-fits' ? d.chi2Range[0] <= d.target : d.chi2Range[1] >= d.target).toBe(true);
    }
  });
});

it('at least two of the discrepancy cases found a scale (the test exercises the root find)', () => {
  expect(scales.filter((s) => s.status === 'found').length).toBeGreaterThanOrEqual(2);
});
