import { describe, expect, it } from 'vitest';
import { validatePrior } from '../../../src/core/prior/covariance.ts';
import { InputError } from '../../../src/core/errors.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';

const g1: Grid = { shape: [20], spacing: [1] };
const g2: Grid = { shape: [4, 5], spacing: [1, 1] };
const ok: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 2 }] };
const term = (t: object): PriorSpec => ({ ...ok, terms: [{ ...ok.terms[0], ...t } as PriorSpec['terms'][number]] });
const bad = (p: unknown) => p as PriorSpec;

// [description, grid, prior, field path, fragment of the expectation]
const table: [string, Grid, PriorSpec, string, string][] = [
  ['variance 0', g1, term({ variance: 0 }), 'terms[0].variance', '> 0'],
  ['variance negative', g1, term({ variance: -1 }), 'terms[0].variance', '> 0'],
  ['variance NaN', g1, term({ variance: NaN }), 'terms[0].variance', 'finite'],
  ['variance Infinity', g1, term({ variance: Infinity }), 'terms[0].variance', 'finite'],
  ['length 0', g1, term({ length: 0 }), 'terms[0].length', '> 0'],
  ['length missing', g1, term({ length: undefined }), 'terms[0].length', 'correlation length'],
  ['lengths in 1-D', g1, term({ length: undefined, lengths: [1, 2] }), 'terms[0].lengths', '1-D'],
  ['length and lengths', g2, term({ lengths: [1, 2] }), 'terms[0].lengths', 'absent when length'],
  ['lengths wrong size', g2, term({ length: undefined, lengths: [1] }), 'terms[0].lengths', '2 lengths'],
  ['lengths[1] ≤ 0', g2, term({ length: undefined, lengths: [1, -3] }), 'terms[0].lengths[1]', '> 0'],
  ['ν ≤ 0', g1, term({ kernel: 'matern', nu: 0 }), 'terms[0].nu', '> 0'],
  ['ν NaN', g1, term({ kernel: 'matern', nu: NaN }), 'terms[0].nu', '> 0'],
  ['unknown kernel', g1, term({ kernel: 'cubic' }), 'terms[0].kernel', 'one of exponential, gaussian, matern, spherical'],
  ['angle NaN', g2, term({ length: undefined, lengths: [1, 2], angle: NaN }), 'terms[0].angle', 'finite'],
  ['angle Infinity', g2, term({ angle: Infinity }), 'terms[0].angle', 'finite'],
  ['nugget < 0', g1, { ...ok, nugget: -0.1 }, 'nugget', '≥ 0'],
  ['nugget NaN', g1, { ...ok, nugget: NaN }, 'nugget', 'finite'],
  ['stdProfile short', g1, { ...ok, stdProfile: [1, 2] }, 'stdProfile', '20 numbers'],
  ['stdProfile entry 0', g1, { ...ok, stdProfile: Array.from({ length: 20 }, (_, i) => (i === 12 ? 0 : 1)) }, 'stdProfile[12]', '> 0'],
  ['mean.values wrong length', g2, { ...ok, mean: { values: [1, 2, 3] } }, 'mean.values', '20 numbers'],
  [
    'mean.values NaN',
    g1,
    { ...ok, mean: { values: Array.from({ length: 20 }, (_, i) => (i === 3 ? NaN : 0)) } },
    'mean.values[3]',
    'finite',
  ],
  ['trend slope wrong length (2-D)', g2, { ...ok, mean: { trend: { intercept: 0, slope: [1] } } }, 'mean.trend.slope', '2 numbers'],
  ['trend slope wrong length (1-D)', g1, { ...ok, mean: { trend: { intercept: 0, slope: [1, 2] } } }, 'mean.trend.slope', '1 number'],
  ['trend intercept missing', g1, bad({ ...ok, mean: { trend: { slope: [1] } } }), 'mean.trend.intercept', 'finite'],
  ['mean missing', g1, bad({ terms: ok.terms }), 'mean', 'one of'],
  ['mean with two forms', g1, bad({ ...ok, mean: { constant: 1, values: [] } }), 'mean', 'exactly one'],
  ['empty terms, no nugget', g1, { ...ok, terms: [] }, 'terms', 'nugget > 0'],
  ['empty terms, zero nugget', g1, { ...ok, terms: [], nugget: 0 }, 'terms', 'nugget > 0'],
  ['terms not an array', g1, bad({ ...ok, terms: {} }), 'terms', 'array'],
  ['bad grid', { shape: [0], spacing: [1] }, ok, 'grid.shape[0]', 'positive integer'],
];

describe('validatePrior', () => {
  it.each(table)('%s → InputError at the field', (_d, grid, prior, field, fragment) => {
    let err: unknown;
    try {
      validatePrior(prior, grid);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    const e = err as InputError;
    expect(e.field).toBe(field);
    expect(e.message.startsWith(`${field} must be `)).toBe(true);
    expect(e.message).toContain(fragment);
  });

  it('names the received value in the message', () => {
    expect(() => validatePrior(term({ length: -2 }), g1)).toThrow(
      'terms[0].length must be a finite number > 0 (the correlation length), got -2',
    );
  });

  it.each([
    ['a valid 1-D prior', g1, ok],
    ['ν on a non-Matérn kernel (ignored by design)', g1, term({ nu: 3 })],
    ['Matérn without ν (kernel default)', g1, term({ kernel: 'matern' })],
    ['pure nugget', g1, { ...ok, terms: [], nugget: 1 }],
    ['2-D anisotropic with angle', g2, term({ length: undefined, lengths: [1, 2], angle: -45 })],
    ['2-D trend', g2, { ...ok, mean: { trend: { intercept: 1, slope: [0, 1] } } }],
  ] as [string, Grid, PriorSpec][])('accepts %s', (_d, grid, prior) => {
    expect(() => validatePrior(prior, grid)).not.toThrow();
  });
});
