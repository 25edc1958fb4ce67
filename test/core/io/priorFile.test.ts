import { describe, expect, it } from 'vitest';
import { FileFormatError } from '../../../src/core/io/errors.ts';
import { parsePriorFile, priorToJson, writePriorFile } from '../../../src/core/io/priorFile.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { expectFileError } from './expectError.ts';
import { mutateText, rng } from './random.ts';

const GRID_2D = { shape: [4, 3], spacing: [1, 2] };
const GRID_1D = { shape: [5], spacing: [0.5] };

const base = (over: Record<string, unknown> = {}) =>
  JSON.stringify({
    kind: 'priorscope.prior',
    version: 1,
    mean: { constant: 2 },
    terms: [{ kernel: 'exponential', variance: 1.5, length: 3 }],
    ...over,
  });

describe('parsePriorFile', () => {
  it('reads every documented field', () => {
    const text = JSON.stringify({
      kind: 'priorscope.prior',
      version: 1,
      mean: { trend: { intercept: 1, slope: [0.5, -0.25] } },
      terms: [
        { kernel: 'matern', variance: 2, lengths: [10, 4], angle: 30, nu: 2.5 },
        { kernel: 'spherical', variance: 0.5, length: 7 },
      ],
      nugget: 0.01,
      stdProfile: Array.from({ length: 12 }, (_, k) => 1 + k / 10),
    });
    const { prior, warnings } = parsePriorFile('q.json', text, { grid: GRID_2D });
    expect(warnings).toEqual([]);
    expect(prior.mean).toEqual({ trend: { intercept: 1, slope: [0.5, -0.25] } });
    expect(prior.terms[0]).toEqual({ kernel: 'matern', variance: 2, lengths: [10, 4], angle: 30, nu: 2.5 });
    expect(prior.terms[1]).toEqual({ kernel: 'spherical', variance: 0.5, length: 7 });
    expect(prior.nugget).toBe(0.01);
    expect(prior.stdProfile).toHaveLength(12);
  });

  it('warns about unknown fields at every level, naming them', () => {
    const text = base({ colour: 'red', mean: { constant: 0, note: 1 }, terms: [{ kernel: 'gaussian', variance: 1, length: 2, sill: 3 }] });
    const { warnings } = parsePriorFile('q.json', text);
    expect(warnings.map((w) => w.message)).toEqual([
      'q.json: unknown field colour ignored (known here: kind, version, mean, terms, nugget, stdProfile)',
      'q.json: unknown field mean.note ignored (known here: constant, values, trend)',
      'q.json: unknown field terms[0].sill ignored (known here: kernel, variance, length, lengths, angle, angles, nu)',
    ]);
  });

  it('warns about angle on an isotropic term and nu on a non-Matérn term, keeping them', () => {
    const { prior, warnings } = parsePriorFile(
      'q.json',
      base({ terms: [{ kernel: 'gaussian', variance: 1, length: 2, angle: 10, nu: 1 }] }),
    );
    expect(warnings).toHaveLength(2);
    expect(prior.terms[0]).toEqual({ kernel: 'gaussian', variance: 1, length: 2, angle: 10, nu: 1 });
  });

  it.each([
    [
      '{"kind": "priorscope.prior",',
      'q.json: is not valid JSON: line 1, column 29: expected a double-quoted field name, got the end of the file',
    ],
    [
      '{"kind": "priorscope.prior", "version": 1, "nugget": NaN}',
      'q.json: is not valid JSON: line 1, column 54: NaN and Infinity are not JSON numbers; every number must be finite',
    ],
    ['[1, 2]', 'q.json: (top level) must be an object, got an array of length 2'],
    [base({ kind: 'priorscope.problem' }), 'q.json: kind must be "priorscope.prior" (this is a problem file), got "priorscope.problem"'],
    [base({ kind: 'something' }), 'q.json: kind must be "priorscope.prior", got "something"'],
    [base({ version: 2 }), 'q.json: version must be 1 (the version this program reads), got 2'],
    [base({ mean: undefined }), 'q.json: mean must be an object with constant, values or trend, got nothing'],
    [
      base({ mean: { constant: 1, values: [1] } }),
      'q.json: mean must be an object with exactly one of constant, values, trend, got "constant and values"',
    ],
    [base({ mean: { constant: '1' } }), 'q.json: mean.constant must be a finite number, got "1"'],
    [base({ mean: { values: [1, 'x'] } }), 'q.json: mean.values[1] must be a finite number, got "x"'],
    [base({ terms: [] }), 'q.json: terms must be a non-empty array of covariance terms (or give a nugget > 0), got an array of length 0'],
    [
      base({ terms: [{ kernel: 'cubic', variance: 1, length: 1 }] }),
      'q.json: terms[0].kernel must be one of "exponential", "gaussian", "matern", "spherical", got "cubic"',
    ],
    [base({ terms: [{ kernel: 'gaussian', variance: -1, length: 1 }] }), 'q.json: terms[0].variance must be > 0, got -1'],
    [
      base({ terms: [{ kernel: 'gaussian', variance: 'NaN', length: 1 }] }),
      'q.json: terms[0].variance must be a finite number > 0, got "NaN"',
    ],
    [base({ terms: [{ kernel: 'gaussian', variance: 1, length: 0 }] }), 'q.json: terms[0].length must be > 0, got 0'],
    [
      base({ terms: [{ kernel: 'gaussian', variance: 1 }] }),
      'q.json: terms[0].length must be a finite number > 0 (or give lengths [l1, l2] in 2-D), got nothing',
    ],
    [
      base({ terms: [{ kernel: 'gaussian', variance: 1, length: 1, lengths: [1, 2] }] }),
      'q.json: terms[0] must be a term with either length (isotropic) or lengths (anisotropic 2-D), not both, got "both"',
    ],
    [
      base({ terms: [{ kernel: 'gaussian', variance: 1, lengths: [1] }] }),
      'q.json: terms[0].lengths must be an array of 2 numbers, got an array of length 1',
    ],
    [
      base({ terms: [{ kernel: 'matern', variance: 1, length: 1 }] }),
      'q.json: terms[0].nu must be a finite number > 0 for the matern kernel, got nothing',
    ],
    [base({ terms: [{ kernel: 'matern', variance: 1, length: 1, nu: 0 }] }), 'q.json: terms[0].nu must be > 0, got 0'],
    [base({ terms: [{ kernel: 'matern', variance: 1, length: 1, nu: -0.5 }] }), 'q.json: terms[0].nu must be > 0, got -0.5'],
    [base({ nugget: -0.1 }), 'q.json: nugget must be ≥ 0, got -0.1'],
    [base({ stdProfile: [1, 0] }), 'q.json: stdProfile[1] must be > 0, got 0'],
    [
      '{"kind": "priorscope.prior", "version": 1, "mean": {"constant": 1e400}, "terms": []}',
      'q.json: mean.constant must be a finite number, got Infinity',
    ],
  ])('rejects %s', (text, message) => {
    expectFileError(() => parsePriorFile('q.json', text), message);
  });

  it.each([
    [
      base({ mean: { values: [1, 2, 3] } }),
      GRID_1D,
      'q.json: mean.values must be an array of 5 numbers (one per grid cell), got an array of length 3',
    ],
    [
      base({ stdProfile: [1, 1] }),
      GRID_1D,
      'q.json: stdProfile must be an array of 5 numbers (one per grid cell), got an array of length 2',
    ],
    [
      base({ mean: { trend: { intercept: 0, slope: [1, 2] } } }),
      GRID_1D,
      'q.json: mean.trend.slope must be an array of 1 number (one per grid axis), got an array of length 2',
    ],
    [
      base({ terms: [{ kernel: 'gaussian', variance: 1, lengths: [1, 2] }] }),
      GRID_1D,
      'q.json: terms[0].lengths needs a 2-D or 3-D grid; on this 1-D grid give terms[0].length',
    ],
  ])('checks against the grid: %s', (text, grid, message) => {
    expect(() => parsePriorFile('q.json', text)).not.toThrow();
    expectFileError(() => parsePriorFile('q.json', text, { grid }), message);
  });
});

describe('prior file round trip', () => {
  const specs: PriorSpec[] = [
    { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 2 }] },
    {
      mean: { values: [0.1, 0.2, 0.30000000000000004] },
      terms: [{ kernel: 'matern', variance: 1 / 3, length: Math.PI, nu: 0.75 }],
      nugget: 1e-9,
      stdProfile: [1, 2, 3],
    },
    {
      mean: { trend: { intercept: -4, slope: [1e-7, 2] } },
      terms: [
        { kernel: 'gaussian', variance: 2, lengths: [5, 1], angle: -37.5 },
        { kernel: 'spherical', variance: 0.2, length: 9 },
      ],
      nugget: 0,
    },
  ];
  it.each(specs.map((s, k) => [k, s] as const))('spec %i: parse(write(spec)) deep-equals spec and write is a fixed point', (_k, spec) => {
    const text = writePriorFile(spec);
    const { prior, warnings } = parsePriorFile('q.json', text);
    expect(warnings).toEqual([]);
    expect(prior).toEqual(spec);
    expect(writePriorFile(prior)).toBe(text);
    expect(JSON.parse(text)).toEqual(priorToJson(spec));
  });
  it('the writer refuses a spec that would not read back', () => {
    expect(() => writePriorFile({ mean: { constant: NaN }, terms: [{ kernel: 'gaussian', variance: 1, length: 1 }] })).toThrow(
      'prior: mean.constant must be a finite number, got null',
    );
  });
});

describe('parsePriorFile on mutated input (seeded)', () => {
  it('either parses or throws a FileFormatError', () => {
    const r = rng(4242);
    const text = writePriorFile(specs2());
    let parsed = 0;
    let refused = 0;
    for (let trial = 0; trial < 2000; trial++) {
      const t = mutateText(r, text);
      try {
        parsePriorFile('m.json', t, { grid: GRID_2D });
        parsed++;
      } catch (e) {
        if (!(e instanceof FileFormatError)) throw new Error(`non-FileFormatError for ${JSON.stringify(t)}: ${String(e)}`);
        expect(e.message.startsWith('m.json: ')).toBe(true);
        refused++;
      }
    }
    expect(parsed).toBeGreaterThan(50);
    expect(refused).toBeGreaterThan(50);
  });
});

function specs2(): PriorSpec {
  return {
    mean: { trend: { intercept: 1, slope: [0.5, 2] } },
    terms: [
      { kernel: 'matern', variance: 2, lengths: [3, 1.5], angle: 20, nu: 1.5 },
      { kernel: 'exponential', variance: 0.3, length: 2 },
    ],
    nugget: 0.01,
  };
}
