/**
 * Outside check of prior selection on the FFT route (src/core/tuning/projected.ts: P = G Cm Gᵀ by
 * circulant products, no N × N matrix) on a grid above TUNING_DENSE_LIMIT, where `auto` takes that
 * route: Debian's python3-scipy / python3-numpy through test/reference/tuning_reference.py (the
 * dense-route script, reused unchanged; it builds Cm itself from the kernel formulas):
 * - log evidence vs scipy.stats.multivariate_normal.logpdf;
 * - prior predictive statistic and p-value vs numpy rᵀK⁻¹r and scipy.stats.chi2.sf;
 * - leave-one-out vs brute-force model-space refits with one datum removed (numpy);
 * - discrepancy scale: χ² of the model-space posterior mean at the found scale equals M.
 */
import { describe, expect, it } from 'vitest';
import { cellCoordinates } from '../../src/core/grid/grid.ts';
import { toRows } from '../../src/core/linalg/matrix.ts';
import { meanVector } from '../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import { discrepancyScale, leaveOneOut, priorPredictiveCheck } from '../../src/core/tuning/criteria.ts';
import { TUNING_DENSE_LIMIT, tuningRoute } from '../../src/core/tuning/dataSpace.ts';
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

const N = TUNING_DENSE_LIMIT + 76;
const truth: PriorSpec = { mean: { constant: 0.5 }, terms: [{ kernel: 'exponential', variance: 1, length: 40 }], nugget: 1e-3 };
const candidates: { name: string; prior: PriorSpec; py: { kernel: string; variance: number; length: number }[] }[] = [
  {
    name: 'Matérn 3/2 + nugget',
    prior: { mean: { constant: 0.3 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 2, length: 30 }], nugget: 1e-3 },
    py: [{ kernel: 'matern32', variance: 2, length: 30 }],
  },
  {
    name: 'gaussian + exponential, too narrow',
    prior: {
      mean: { constant: 0 },
      terms: [
        { kernel: 'gaussian', variance: 0.3, length: 60 },
        { kernel: 'exponential', variance: 0.05, length: 15 },
      ],
      nugget: 1e-3,
    },
    py: [
      { kernel: 'gaussian', variance: 0.3, length: 60 },
      { kernel: 'exponential', variance: 0.05, length: 15 },
    ],
  },
];

// 14 local averages of 3 cells on 1100 cells (dense G; the script takes G row by row).
const problem = smallProblem(21, truth, N, 14, 0.15);
const scales = candidates.map((c) => discrepancyScale(problem, c.prior));
const ref = runPython<{ results: Ref[] }>('tuning_reference.py', {
  cases: candidates.map((c, k) => ({
    x: Array.from(cellCoordinates(problem.grid).x),
    G: toRows(problem.operator.matrix as Parameters<typeof toRows>[0]),
    d: Array.from(problem.data.values),
    sigma: Array.from(problem.data.sigma!),
    m0: Array.from(meanVector(problem.grid, c.prior)),
    terms: c.py,
    nugget: c.prior.nugget,
    ...(scales[k].status === 'found' ? { scale: scales[k].scale } : {}),
  })),
}).results;

describe.each(candidates.map((c, k) => [c.name, k] as const))(`FFT route, ${N} cells: %s`, (_name, k) => {
  const prior = candidates[k].prior;
  const r = ref[k];
  it('auto takes the FFT route here', () => expect(tuningRoute(problem, prior)).toBe('fft'));
  it('log evidence equals scipy multivariate_normal.logpdf to 1e-10 relative', () => {
    expect(Math.abs(logEvidence(problem, prior) - r.logpdf)).toBeLessThanOrEqual(1e-10 * Math.max(1, Math.abs(r.logpdf)));
  });
  it('prior predictive statistic and upper p-value equal numpy rᵀK⁻¹r and scipy chi2.sf', () => {
    const c = priorPredictiveCheck(problem, prior);
    expect(Math.abs(c.statistic - r.quad)).toBeLessThanOrEqual(1e-9 * r.quad);
    expect(Math.abs(c.pUpper - r.sf)).toBeLessThanOrEqual(1e-10 + 1e-8 * r.sf);
  });
  it('closed-form leave-one-out equals brute-force refits with one datum removed', () => {
    const loo = leaveOneOut(problem, prior);
    r.loo.forEach((want, i) => expect(Math.abs(loo.contributions[i] - want)).toBeLessThanOrEqual(1e-7 * Math.max(1, Math.abs(want))));
  });
  it('the discrepancy scale makes the model-space posterior χ² equal M (or says why not)', () => {
    const d = scales[k];
    if (d.status === 'found') expect(Math.abs(r.chi2_scaled! - d.target)).toBeLessThanOrEqual(1e-6 * d.target);
    else expect(d.status === 'mean-fits' ? d.chi2Range[0] <= d.target : d.chi2Range[1] >= d.target).toBe(true);
  });
});

it('at least one discrepancy case found a scale (the root find is exercised)', () => {
  expect(scales.some((s) => s.status === 'found')).toBe(true);
});
