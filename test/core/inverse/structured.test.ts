/**
 * The FFT-path posterior against the dense path (prior/covariance.ts covarianceMatrix +
 * inverse/posterior.ts, written independently by other modules) on small grids; the outside check
 * against scipy is in test/reference/fft_posterior.test.ts.
 */
import { computePosteriorSerial } from '../../../src/core/inverse/compute.ts';
import { FFT_MIN_CELLS } from '../../../src/core/inverse/auto.ts';
import { cellCount } from '../../../src/core/grid/grid.ts';
import { describe, expect, it } from 'vitest';
import { posteriorSummary, preparePosterior } from '../../../src/core/inverse/posterior.ts';
import {
  completeWithShapeProducts,
  covarianceShape,
  prepareStructuredPosterior,
  structuredShapeProducts,
  structuredPosteriorStd,
  structuredPosteriorSummary,
  structuredProblem,
} from '../../../src/core/inverse/structured.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { denseToSparse, sparseToDense } from '../../../src/core/linalg/sparse.ts';
import { matrix } from '../../../src/core/linalg/matrix.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { rayOperator } from '../../../src/core/problems/rays.ts';
import { rayFan, relErr, seededVector } from '../fft/cases.ts';
import { sameBits } from '../../worker/problems.ts';

const grid: Grid = { shape: [12, 9], spacing: [1, 0.8] };
const n = 108;

function rayProblem(m: number, seed: number, fullCd = false): Problem {
  const operator = rayOperator(grid, rayFan(grid, m, seed));
  const values = seededVector(m, seed + 1);
  if (!fullCd) return { grid, operator, data: { values, sigma: Float64Array.from(seededVector(m, seed + 2), (v) => 0.05 + 0.02 * v) } };
  // Cd = 0.01 (I + 0.3 correlation between neighbours): symmetric positive definite (diagonally dominant).
  const cd = matrix(m, m);
  for (let i = 0; i < m; i++) {
    cd.data[i * m + i] = 0.01;
    if (i > 0) cd.data[i * m + i - 1] = cd.data[(i - 1) * m + i] = 0.003;
  }
  return { grid, operator, data: { values, covariance: cd } };
}

const PRIORS: { name: string; prior: PriorSpec }[] = [
  {
    name: 'matern 1.5 rotated, constant mean',
    prior: { mean: { constant: 0.2 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, lengths: [4, 2], angle: 30 }] },
  },
  {
    name: 'exponential + gaussian sum, trend mean',
    prior: {
      mean: { trend: { intercept: 1, slope: [0.1, -0.05] } },
      terms: [
        { kernel: 'exponential', variance: 0.4, length: 2 },
        { kernel: 'gaussian', variance: 0.6, lengths: [5, 1.5], angle: 110 },
      ],
    },
  },
  {
    name: 'spherical with nugget and std profile',
    prior: {
      mean: { constant: 0 },
      nugget: 0.02,
      stdProfile: Array.from(seededVector(n, 9), (v) => 1 + 0.4 * v),
      terms: [{ kernel: 'spherical', variance: 2, length: 6 }],
    },
  },
];

function expectSameSummary(ours: ReturnType<typeof structuredPosteriorSummary>, dense: ReturnType<typeof posteriorSummary>): void {
  expect(ours.path).toBe('fft');
  expect(relErr(ours.mean, dense.mean)).toBeLessThan(1e-10);
  expect(relErr(ours.std, dense.std)).toBeLessThan(1e-10);
  expect(relErr(ours.priorStd, dense.priorStd)).toBeLessThan(1e-10);
  expect(relErr(ours.predicted, dense.predicted)).toBeLessThan(1e-10);
  expect(relErr(ours.residuals, dense.residuals)).toBeLessThan(1e-8); // residuals are small differences
  expect(Math.abs(ours.logEvidence - dense.logEvidence)).toBeLessThan(1e-10 * Math.abs(dense.logEvidence));
  expect(Math.abs(ours.resolutionTrace - dense.resolutionTrace)).toBeLessThan(1e-10 * dense.resolutionTrace);
  expect(ours.dataCount).toBe(dense.dataCount);
  expect(ours.parameterCount).toBe(dense.parameterCount);
}

describe('structured posterior equals the dense posterior', () => {
  for (const { name, prior } of PRIORS) {
    for (const fullCd of [false, true]) {
      it(`${name}, ${fullCd ? 'full' : 'diagonal'} Cd: mean, std, evidence, tr R to 1e-10`, () => {
        const problem = rayProblem(17, 3, fullCd);
        expectSameSummary(
          structuredPosteriorSummary(prepareStructuredPosterior(problem, prior)),
          posteriorSummary(preparePosterior(problem, prior)),
        );
      });
    }
  }

  it('dense G (same rays as a dense matrix) gives the same result as sparse G', () => {
    const sparse = rayProblem(11, 5);
    const dense: Problem = { ...sparse, operator: { kind: 'dense', matrix: sparseToDense(sparse.operator.matrix as never) } };
    const a = structuredPosteriorSummary(prepareStructuredPosterior(sparse, PRIORS[0].prior));
    const b = structuredPosteriorSummary(prepareStructuredPosterior(dense, PRIORS[0].prior));
    expect(relErr(a.mean, b.mean)).toBeLessThan(1e-12);
    expect(relErr(a.std, b.std)).toBeLessThan(1e-12);
  });

  it('an odd number of data (last row transformed alone) matches dense', () => {
    const problem = rayProblem(1, 8);
    expectSameSummary(
      structuredPosteriorSummary(prepareStructuredPosterior(problem, PRIORS[1].prior)),
      posteriorSummary(preparePosterior(problem, PRIORS[1].prior)),
    );
  });
});

describe('row-spectrum cache', () => {
  it('a kernel change reuses the spectra and matches a fresh run; a profile change does not reuse them', () => {
    const problem = rayProblem(9, 21);
    const sp = structuredProblem(problem);
    const first = prepareStructuredPosterior(sp, PRIORS[0].prior);
    expect(first.spectraCached).toBe(false);
    const changed: PriorSpec = { ...PRIORS[0].prior, terms: [{ kernel: 'gaussian', variance: 3, length: 2.5 }] };
    const warm = prepareStructuredPosterior(sp, changed);
    expect(warm.spectraCached).toBe(true);
    const cold = prepareStructuredPosterior(problem, changed);
    expect(warm.mean).toEqual(cold.mean);
    const withProfile = prepareStructuredPosterior(sp, PRIORS[2].prior);
    expect(withProfile.spectraCached).toBe(false);
    expectSameSummary(structuredPosteriorSummary(withProfile), posteriorSummary(preparePosterior(problem, PRIORS[2].prior)));
  });

  it('1-D grid, dense G: cached run equals the dense posterior after a prior change', () => {
    const g1: Grid = { shape: [40], spacing: [0.5] };
    const G = matrix(6, 40);
    for (let k = 0; k < 6; k++) for (let j = 0; j < 40; j++) G.data[k * 40 + j] = Math.exp(-0.5 * ((j - 6 * k - 4) / 3) ** 2);
    const problem: Problem = {
      grid: g1,
      operator: { kind: 'dense', matrix: G },
      data: { values: seededVector(6, 3), sigma: new Float64Array(6).fill(0.1) },
    };
    const sp = structuredProblem(problem);
    prepareStructuredPosterior(sp, { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 2 }] });
    const prior: PriorSpec = { mean: { constant: 1 }, terms: [{ kernel: 'matern', nu: 2.5, variance: 2, length: 3 }] };
    const warm = prepareStructuredPosterior(sp, prior);
    expect(warm.spectraCached).toBe(true);
    expectSameSummary(structuredPosteriorSummary(warm), posteriorSummary(preparePosterior(problem, prior)));
  });

  it('with a zero cache budget nothing is kept and results are unchanged', () => {
    const problem = rayProblem(9, 22);
    const sp = structuredProblem(problem, { cacheBytes: 0 });
    const a = prepareStructuredPosterior(sp, PRIORS[1].prior);
    const b = prepareStructuredPosterior(sp, PRIORS[1].prior);
    expect(sp.cache).toBeNull();
    expect(b.spectraCached).toBe(false);
    expect(b.mean).toEqual(a.mean);
  });
});

describe('products for the covariance shape, then scaled', () => {
  it('a prior of the same shape from another prior’s products: the same bits as a fresh run, and the dense posterior', () => {
    const problem = rayProblem(11, 5);
    for (const { prior } of PRIORS) {
      // Same shape: every variance and the nugget times 4 (so the ratios keep their bits), another mean.
      const other: PriorSpec = {
        ...prior,
        mean: { constant: -1.5 },
        terms: prior.terms.map((t) => ({ ...t, variance: 4 * t.variance })),
        ...(prior.nugget !== undefined ? { nugget: 4 * prior.nugget } : {}),
      };
      const products = structuredShapeProducts(problem, other);
      const reused = completeWithShapeProducts(products, prior);
      const fresh = prepareStructuredPosterior(problem, prior);
      expect(sameBits(reused.Bt.data, fresh.Bt.data)).toBe(true);
      expect(sameBits(reused.mean, fresh.mean)).toBe(true);
      expect(sameBits(reused.priorVariance, fresh.priorVariance)).toBe(true);
      expectSameSummary(structuredPosteriorSummary(reused), posteriorSummary(preparePosterior(problem, prior)));
    }
  });

  it('the shape divides by the first variance; another shape is refused', () => {
    const prior = PRIORS[1].prior;
    const { shape, scale } = covarianceShape({ ...prior, nugget: 0.2 });
    expect(scale).toBe(0.4);
    expect(shape.terms.map((t) => t.variance)).toEqual([1, 0.6 / 0.4]);
    expect(shape.nugget).toBe(0.2 / 0.4);
    const products = structuredShapeProducts(rayProblem(6, 2), prior);
    const longer: PriorSpec = { ...prior, terms: [{ kernel: 'exponential', variance: 0.4, length: 3 }, prior.terms[1]] };
    expect(() => completeWithShapeProducts(products, longer)).toThrow(/another covariance shape/);
  });
});

describe('progressive std by column blocks', () => {
  it('block widths 1, 7 and 256 give bit-identical standard deviations', () => {
    const state = prepareStructuredPosterior(rayProblem(13, 31), PRIORS[0].prior);
    const ref = structuredPosteriorStd(state, 256);
    expect(structuredPosteriorStd(state, 7)).toEqual(ref);
    expect(structuredPosteriorStd(state, 1)).toEqual(ref);
    expect(ref.every((v, i) => v > 0 && v <= Math.sqrt(state.priorVariance[i]) * (1 + 1e-12))).toBe(true);
  });
});

describe('path choice and bad input', () => {
  it('one route rule (FFT_MIN_CELLS): auto stays dense on this grid below 128 cells, fft on request', () => {
    const p = rayProblem(5, 40);
    expect(cellCount(p.grid)).toBeLessThan(FFT_MIN_CELLS);
    expect(computePosteriorSerial(p, PRIORS[0].prior).summary.path).toBe('dense');
    expect(computePosteriorSerial(p, PRIORS[0].prior, 'fft').summary.path).toBe('fft');
  });

  it('names the field when the data length does not match the operator', () => {
    const p = rayProblem(5, 41);
    const bad: Problem = { ...p, data: { ...p.data, values: new Float64Array(4) } };
    expect(() => prepareStructuredPosterior(bad, PRIORS[0].prior)).toThrow(/problem\.data\.values must be 5 values/);
  });

  it('names the field when the operator has the wrong number of columns', () => {
    const p = rayProblem(5, 42);
    const g = denseToSparse(matrix(5, n - 1));
    expect(() => prepareStructuredPosterior({ ...p, operator: { kind: 'sparse', matrix: g } }, PRIORS[0].prior)).toThrow(
      /problem\.operator must be a matrix with 108 columns/,
    );
  });

  it('reports a K that does not factor (σ = 0 and G = 0)', () => {
    const p = rayProblem(3, 43);
    const zero: Problem = {
      ...p,
      operator: { kind: 'sparse', matrix: denseToSparse(matrix(3, n)) },
      data: { values: new Float64Array(3), covariance: matrix(3, 3) },
    };
    expect(() => prepareStructuredPosterior(zero, PRIORS[0].prior)).toThrow(/not positive definite/);
  });
});
