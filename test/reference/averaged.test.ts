/**
 * The hyperparameter-averaged posterior (src/core/tuning/averaged.ts) against direct summation in
 * numpy/scipy over every cell of a small map (test/reference/averaged_reference.py: its own Cm,
 * model-space posterior, scipy logpdf evidences, and the mixture variance from the second moment
 * rather than our "mean of variances + variance of means" form).
 */
import { describe, expect, it } from 'vitest';
import { toRows } from '../../src/core/linalg/matrix.ts';
import { cellCoordinates } from '../../src/core/grid/grid.ts';
import { meanVector } from '../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import { evidenceMap } from '../../src/core/tuning/evidenceMap.ts';
import { averagedPosterior, averagingWeights, type HyperPrior } from '../../src/core/tuning/averaged.ts';
import { smallProblem } from '../core/tuning/helpers.ts';
import { runPython } from './python.ts';

const truth: PriorSpec = { mean: { constant: 0.3 }, terms: [{ kernel: 'exponential', variance: 1, length: 4 }], nugget: 1e-3 };
const problem = smallProblem(31, truth, 24, 10, 0.2);
const axes = { lengths: { min: 1, max: 12, count: 5 }, variances: { min: 0.2, max: 5, count: 4 } };
const map = evidenceMap(problem, truth, { term: 0, ...axes });

interface Ref {
  mean: number[];
  std: number[];
  weights: number[];
  logZ: number[];
}

const refs = Object.fromEntries(
  (['log-uniform', 'uniform'] as HyperPrior[]).map((hyper) => [
    hyper,
    runPython<Ref>('averaged_reference.py', {
      x: Array.from(cellCoordinates(problem.grid).x),
      G: toRows(problem.operator.matrix as Parameters<typeof toRows>[0]),
      d: Array.from(problem.data.values),
      sigma: Array.from(problem.data.sigma!),
      m0: Array.from(meanVector(problem.grid, truth)),
      nugget: truth.nugget,
      lengths: Array.from(map.lengths),
      variances: Array.from(map.variances),
      hyper,
    }),
  ]),
) as Record<HyperPrior, Ref>;

const maxAbs = (a: ArrayLike<number>, b: ArrayLike<number>) => {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
};

describe.each(['log-uniform', 'uniform'] as const)(
  'averaged posterior, %s hyper-prior, against direct summation (numpy/scipy)',
  (hyper) => {
    const ref = refs[hyper];
    it('the map evidences and the weights agree with scipy logpdf and the stated hyper-prior mass', () => {
      expect(maxAbs(map.logEvidence, ref.logZ)).toBeLessThan(1e-8);
      expect(maxAbs(averagingWeights(map, hyper), ref.weights)).toBeLessThan(1e-9);
    });
    it('mean and standard deviation over all 20 cells agree to 1e-8', () => {
      const a = averagedPosterior(problem, truth, map, { hyperPrior: hyper, minWeight: 0 });
      expect(a.cellsUsed).toBe(20);
      expect(maxAbs(a.mean, ref.mean)).toBeLessThan(1e-8);
      expect(maxAbs(a.std, ref.std)).toBeLessThan(1e-8);
    });
    it('skipping cells below the default weight 1e-6 changes the result by less than the skipped weight allows', () => {
      const a = averagedPosterior(problem, truth, map, { hyperPrior: hyper });
      expect(a.skippedWeight).toBeLessThan(20 * 1e-6);
      const scale = Math.max(...ref.std) + Math.max(...ref.mean.map(Math.abs));
      expect(maxAbs(a.mean, ref.mean)).toBeLessThan(1e-3 * scale);
    });
  },
);

describe('averaging weights', () => {
  it('are proportional to the evidence under the log-uniform hyper-prior and skip non-finite cells', () => {
    const w = averagingWeights({
      lengths: Float64Array.of(1, 2),
      variances: Float64Array.of(1),
      logEvidence: Float64Array.of(Math.log(3), Math.log(1)),
    });
    expect(w[0]).toBeCloseTo(0.75, 15);
    expect(w[1]).toBeCloseTo(0.25, 15);
    const u = averagingWeights({
      lengths: Float64Array.of(1, 2),
      variances: Float64Array.of(1),
      logEvidence: Float64Array.of(Math.log(3), Number.NaN),
    });
    expect(Array.from(u)).toEqual([1, 0]);
    // uniform: mass ∝ ℓ σ², so the cell at ℓ = 2 doubles: 3·1 : 1·2
    const v = averagingWeights(
      { lengths: Float64Array.of(1, 2), variances: Float64Array.of(1), logEvidence: Float64Array.of(Math.log(3), 0) },
      'uniform',
    );
    expect(v[0]).toBeCloseTo(0.6, 15);
    expect(v[1]).toBeCloseTo(0.4, 15);
  });
});
