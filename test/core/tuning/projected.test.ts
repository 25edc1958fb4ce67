/**
 * The FFT route of prior selection (src/core/tuning/projected.ts) against the dense route: the
 * projection P = G Cm Gᵀ (1-D and 2-D, sums, anisotropy, std profile, nugget, dense and sparse G),
 * and every criterion built on it (evidence, leave-one-out, discrepancy, prior predictive check,
 * evidence map, profiles, type-II gradient and fit). The dense route is the independent side here:
 * Cm assembled entry by entry from the kernel formulas, no transform; the dense route itself is
 * checked against scipy in test/reference/tuning.test.ts and the FFT route in
 * test/reference/tuning_fft.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../../src/core/errors.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { structuredProblem } from '../../../src/core/inverse/structured.ts';
import type { Matrix } from '../../../src/core/linalg/matrix.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import { discrepancyScale, leaveOneOut, priorCriteria, priorPredictiveCheck } from '../../../src/core/tuning/criteria.ts';
import {
  prepareDataSide,
  projectedPriorCovariance,
  TUNING_DENSE_LIMIT,
  tuningRoute,
  type TuningRoute,
} from '../../../src/core/tuning/dataSpace.ts';
import { evidenceMap, evidenceProfile } from '../../../src/core/tuning/evidenceMap.ts';
import { evidenceGradient, hyperParameters, logEvidence, maximiseEvidence } from '../../../src/core/tuning/typeII.ts';
import { averagingOperator, rayProblem, smallProblem, withCorrelatedErrors } from './helpers.ts';

/** max |a − b| / max |b|: the norm-wise relative difference. */
function relDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  let s = 0;
  for (let i = 0; i < b.length; i++) {
    d = Math.max(d, Math.abs(a[i] - b[i]));
    s = Math.max(s, Math.abs(b[i]));
  }
  return d / s;
}
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.max(1, Math.abs(b));

const matern: PriorSpec = { mean: { constant: 0.2 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 0.5, length: 4 }], nugget: 1e-3 };
const grid1: Grid = { shape: [90], spacing: [0.5] };
const rng = new Random(77);
const profile90 = Array.from({ length: 90 }, (_, i) => 0.5 + 0.01 * i);
const dense1: Problem = (() => {
  const p = smallProblem(3, matern, 90, 30, 0.1);
  return { ...p, grid: grid1, operator: averagingOperator(30, 90, 4, rng) };
})();
const ray2 = rayProblem(5, 18, 13, 40, matern);
const profile2 = Array.from({ length: 18 * 13 }, (_, i) => 1 + 0.3 * Math.sin(i / 17));

const projectionCases: [string, Problem, PriorSpec][] = [
  [
    '1-D, dense G, Matérn 5/2 + nugget',
    dense1,
    { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 2.5, variance: 2, length: 3 }], nugget: 0.01 },
  ],
  [
    '1-D, dense G, exponential with a std profile',
    dense1,
    { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 5 }], stdProfile: profile90 },
  ],
  [
    '2-D rays, gaussian + exponential sum',
    ray2,
    {
      mean: { constant: 0 },
      terms: [
        { kernel: 'gaussian', variance: 0.3, length: 4 },
        { kernel: 'exponential', variance: 0.1, length: 1.5 },
      ],
    },
  ],
  [
    '2-D rays, rotated anisotropic Matérn 3/2',
    ray2,
    { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, lengths: [6, 2], angle: 30 }] },
  ],
  [
    '2-D rays, spherical with std profile and nugget',
    ray2,
    { mean: { constant: 1 }, terms: [{ kernel: 'spherical', variance: 0.7, length: 5 }], stdProfile: profile2, nugget: 0.02 },
  ],
];

describe.each(projectionCases)('projected prior covariance: %s', (_name, problem, prior) => {
  const dense = projectedPriorCovariance(problem, prior, { route: 'dense' });
  const holder = structuredProblem(problem);
  const fft = projectedPriorCovariance(problem, prior, { route: 'fft', structured: holder });
  it('the FFT route equals the dense route to 1e-10 relative, symmetric', () => {
    expect(relDiff(fft.data, dense.data)).toBeLessThan(1e-10);
    const m = fft.rows;
    for (let i = 0; i < m; i++) for (let j = 0; j < i; j++) expect(fft.data[i * m + j]).toBe(fft.data[j * m + i]);
  });
  it('a second call reuses the cached row spectra and gives the same matrix', () => {
    expect(holder.cache).not.toBeNull();
    const again = projectedPriorCovariance(problem, prior, { route: 'fft', structured: holder });
    expect(relDiff(again.data, fft.data)).toBeLessThan(1e-14);
  });
});

describe('route rule and errors', () => {
  const at = (n: number): Problem => ({ ...dense1, grid: { shape: [n], spacing: [1] } });
  it(`dense up to ${TUNING_DENSE_LIMIT} cells, FFT above for a stationary prior`, () => {
    expect(tuningRoute(at(TUNING_DENSE_LIMIT), matern)).toBe('dense');
    expect(tuningRoute(at(TUNING_DENSE_LIMIT + 1), matern)).toBe('fft');
  });
  it('a large 3-axis grid takes the FFT route; forcing it on a 4-axis grid names the field', () => {
    expect(tuningRoute({ ...dense1, grid: { shape: [1100, 1, 1], spacing: [1, 1, 1] } }, matern)).toBe('fft');
    const p4: Problem = { ...dense1, grid: { shape: [45, 1, 2, 1], spacing: [1, 1, 1, 1] } };
    expect(() => projectedPriorCovariance(p4, matern, { route: 'fft' })).toThrow(InputError);
    expect(() => projectedPriorCovariance(p4, matern, { route: 'fft' })).toThrow(/route/);
  });
  it('a spectrum cache made for another problem is refused', () => {
    expect(() => projectedPriorCovariance(ray2, matern, { route: 'fft', structured: structuredProblem(dense1) })).toThrow(/structured/);
  });
});

/** Problems for the criteria: a 2-D ray survey, and a 1-D one with correlated data errors. */
const criteriaCases: [string, Problem, PriorSpec][] = [
  ['2-D rays, Matérn + nugget', ray2, matern],
  [
    '1-D, full Cd, sum with std profile',
    withCorrelatedErrors(dense1, 0.1),
    { ...projectionCases[1][2], terms: [...projectionCases[1][2].terms, { kernel: 'gaussian', variance: 0.2, length: 8 }] },
  ],
];

describe.each(criteriaCases)('criteria on both routes: %s', (_name, problem, prior) => {
  const on = (route: TuningRoute) => ({ route });
  it('log evidence, leave-one-out, discrepancy and predictive check agree to 1e-9', () => {
    expect(rel(logEvidence(problem, prior, on('fft')), logEvidence(problem, prior, on('dense')))).toBeLessThan(1e-9);
    const la = leaveOneOut(problem, prior, on('fft'));
    const lb = leaveOneOut(problem, prior, on('dense'));
    expect(rel(la.logScore, lb.logScore)).toBeLessThan(1e-9);
    expect(relDiff(la.contributions, lb.contributions)).toBeLessThan(1e-9);
    const da = discrepancyScale(problem, prior, on('fft'));
    const db = discrepancyScale(problem, prior, on('dense'));
    expect(da.status).toBe(db.status);
    if (db.status === 'found') expect(rel(da.scale, db.scale)).toBeLessThan(1e-9);
    expect(rel(da.chi2Range[0], db.chi2Range[0])).toBeLessThan(1e-9);
    const pa = priorPredictiveCheck(problem, prior, on('fft'));
    const pb = priorPredictiveCheck(problem, prior, on('dense'));
    expect(rel(pa.statistic, pb.statistic)).toBeLessThan(1e-9);
    expect(Math.abs(pa.pTwoSided - pb.pTwoSided)).toBeLessThan(1e-9);
    const ca = priorCriteria(problem, prior, on('fft'));
    expect(ca.leaveOneOut.logScore).toBe(la.logScore);
  });
  it('the evidence map agrees cell by cell (eigen and Cholesky paths) with the same best cell', () => {
    for (const method of ['eigen', 'cholesky'] as const) {
      const opts = { term: 0, lengths: { min: 1.5, max: 9, count: 4 }, variances: { min: 0.02, max: 5, count: 5 }, method };
      const a = evidenceMap(problem, prior, { ...opts, route: 'fft' });
      const b = evidenceMap(problem, prior, { ...opts, route: 'dense' });
      expect(a.method).toBe(b.method);
      b.logEvidence.forEach((v, k) => expect(rel(a.logEvidence[k], v)).toBeLessThan(1e-9));
      expect(a.best!.index).toBe(b.best!.index);
    }
  });
  it('the nugget and ν profiles agree to 1e-9', () => {
    const nug = [1e-4, 1e-3, 1e-2, 0.1];
    const a = evidenceProfile(problem, prior, { parameter: 'nugget' }, { values: nug, method: 'eigen', route: 'fft' });
    const b = evidenceProfile(problem, prior, { parameter: 'nugget' }, { values: nug, method: 'eigen', route: 'dense' });
    b.logEvidence.forEach((v, k) => expect(rel(a.logEvidence[k], v)).toBeLessThan(1e-9));
    const t = prior.terms.findIndex((x) => x.kernel === 'matern');
    if (t >= 0) {
      const nus = [0.5, 1.5, 2.5];
      const c = evidenceProfile(problem, prior, { parameter: 'nu', term: t }, { values: nus, route: 'fft' });
      const d = evidenceProfile(problem, prior, { parameter: 'nu', term: t }, { values: nus, route: 'dense' });
      d.logEvidence.forEach((v, k) => expect(rel(c.logEvidence[k], v)).toBeLessThan(1e-9));
    }
  });
  it('the type-II evidence gradient agrees to 1e-7 relative', () => {
    const params = hyperParameters(prior);
    const a = evidenceGradient(problem, prior, params, prepareDataSide(problem, on('fft')));
    const b = evidenceGradient(problem, prior, params, prepareDataSide(problem, on('dense')));
    expect(a.gradient.length).toBe(params.length);
    expect(rel(a.logEvidence, b.logEvidence)).toBeLessThan(1e-9);
    expect(relDiff(a.gradient, b.gradient)).toBeLessThan(1e-7);
  });
});

it('type-II fits on both routes reach the same optimum', () => {
  const start: PriorSpec = { mean: { constant: 0.2 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 2 }], nugget: 1e-3 };
  const fixed = ['nugget'];
  const a = maximiseEvidence(ray2, start, { route: 'fft', fixed });
  const b = maximiseEvidence(ray2, start, { route: 'dense', fixed });
  expect(a.converged && b.converged).toBe(true);
  expect(rel(a.logEvidence, b.logEvidence)).toBeLessThan(1e-9);
  a.parameters.forEach((p, k) => expect(Math.abs(p.coordinate - b.parameters[k].coordinate)).toBeLessThan(1e-5));
});

it('above the limit, auto takes the FFT route and matches the forced dense route', () => {
  const big = smallProblem(9, matern, TUNING_DENSE_LIMIT + 76, 20, 0.1);
  expect(tuningRoute(big, matern)).toBe('fft');
  expect(rel(logEvidence(big, matern), logEvidence(big, matern, { route: 'dense' }))).toBeLessThan(1e-9);
  const p: Matrix = projectedPriorCovariance(big, matern);
  expect(relDiff(p.data, projectedPriorCovariance(big, matern, { route: 'dense' }).data)).toBeLessThan(1e-10);
});
