/**
 * Inputs whose scale cannot be computed in double precision are refused at the field: a prior mean
 * of 1e308, σ of 1e-300 and a std profile of 1e300 used to give null results with exit 0.
 * validatePrior runs in every core computation (CLI and worker), the problem rules in both problem
 * readers.
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../../src/core/errors.ts';
import { parseProblemFile } from '../../../src/core/io/problemFile.ts';
import { assembleProblem } from '../../../src/core/io/pieces.ts';
import { meanVector } from '../../../src/core/prior/mean.ts';
import { covarianceMatrix } from '../../../src/core/prior/covariance.ts';
import { validatePrior } from '../../../src/core/prior/validate.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { expectFileError } from './expectError.ts';

const grid = { shape: [3], spacing: [1] };
const ok: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 2 }] };

describe('scale of the prior', () => {
  it.each([
    [
      { ...ok, mean: { constant: 1e308 } },
      'mean.constant must be a mean of magnitude ≤ 1e+50 (results at this scale cannot be computed in double precision; change the unit), got 1e+308',
    ],
    [
      { ...ok, stdProfile: [1, 1e300, 1] },
      'stdProfile[1] must be a standard-deviation multiplier from 1e-50 to 1e+50 (results at this scale cannot be computed in double precision; change the unit), got 1e+300',
    ],
    [
      { ...ok, terms: [{ kernel: 'exponential', variance: 1e-300, length: 2 }] },
      'terms[0].variance must be a variance whose square root is from 1e-50 to 1e+50 (results at this scale cannot be computed in double precision; change the unit), got 1e-300',
    ],
  ] as [PriorSpec, string][])('%#: refused in validatePrior and in the computations that call it', (prior, message) => {
    expect(() => validatePrior(prior, grid)).toThrow(InputError);
    expect(() => validatePrior(prior, grid)).toThrow(message);
    expect(() => covarianceMatrix(grid, prior)).toThrow(message);
    expect(() => meanVector(grid, prior)).toThrow(message);
  });

  it('accepts ordinary and borderline scales', () => {
    expect(() => validatePrior({ ...ok, mean: { constant: 1e50 }, stdProfile: [1e-50, 1, 1e50] }, grid)).not.toThrow();
  });
});

describe('scale of the problem', () => {
  const problem = (data: Record<string, unknown>, dense = [[1, 0, 0]]) =>
    JSON.stringify({ kind: 'priorscope.problem', version: 1, grid, operator: { dense }, data: { values: [1], sigma: [0.1], ...data } });
  it.each([
    [
      problem({ sigma: [1e-300] }),
      'p.json: data.sigma[0] must be from 1e-50 to 1e+50 (results at this scale cannot be computed in double precision; change the unit), got 1e-300',
    ],
    [
      problem({ values: [1e200] }),
      'p.json: data.values[0] must be of magnitude ≤ 1e+50 (results at this scale cannot be computed in double precision; change the unit), got 1e+200',
    ],
    [
      problem({}, [[1e300, 0, 0]]),
      'p.json: operator must be a matrix with entries of magnitude ≤ 1e+50 (results at this scale cannot be computed in double precision; change the unit), got 1e+300',
    ],
  ])('%#', (text, message) => {
    expectFileError(() => parseProblemFile('p.json', text), message);
  });

  it('the pieces reader applies the same rule', () => {
    const enc = (s: string) => new TextEncoder().encode(s);
    expectFileError(
      () =>
        assembleProblem({
          grid: { shape: [2], spacing: [1] },
          operator: { name: 'G.csv', bytes: enc('1,0\n') },
          data: { name: 'd.csv', bytes: enc('1.5,1e-300\n') },
        }),
      'd.csv: data.sigma[0] must be from 1e-50 to 1e+50 (results at this scale cannot be computed in double precision; change the unit), got 1e-300',
    );
  });
});
