import { describe, expect, it } from 'vitest';
import { writeCsv } from '../../../src/core/io/csv.ts';
import { FileFormatError } from '../../../src/core/io/errors.ts';
import { writeMatrixMarketCoordinate } from '../../../src/core/io/matrixMarket.ts';
import { writeNpy, writeNpyMatrix } from '../../../src/core/io/npy.ts';
import { parseProblemFile, writeProblemFile } from '../../../src/core/io/problemFile.ts';
import { fromRows, toRows } from '../../../src/core/linalg/matrix.ts';
import { operatorToDense } from '../../../src/core/linalg/operator.ts';
import { sparseFromCoordinates } from '../../../src/core/linalg/sparse.ts';
import { DEMOS } from '../../../src/core/problems/demos.ts';
import { expectFileError } from './expectError.ts';
import { mutateText, rng } from './random.ts';

// An invented 2 × 3 problem: 2 data on a 3-cell line.
const G = [
  [1, 0.5, 0],
  [0, 0.5, 1],
];
const problem = (over: Record<string, unknown> = {}, data: Record<string, unknown> = {}) =>
  JSON.stringify({
    kind: 'priorscope.problem',
    version: 1,
    grid: { shape: [3], spacing: [2] },
    operator: { dense: G },
    data: { values: [1, 2], sigma: [0.1, 0.2], ...data },
    ...over,
  });
const siblings = (files: Record<string, Uint8Array | string>) => (name: string) => {
  const f = files[name];
  if (f === undefined) throw new Error(`no such file (${name})`);
  return typeof f === 'string' ? new TextEncoder().encode(f) : f;
};

describe('parseProblemFile', () => {
  it('reads a dense problem with every optional field', () => {
    const text = problem(
      {
        title: 'invented',
        truth: [1, 2, 3],
        quantity: { name: 'slowness', unit: 's/m' },
        grid: { shape: [3], spacing: [2], origin: [10], unit: 'm' },
      },
      { unit: 'ms' },
    );
    const { problem: p, warnings } = parseProblemFile('p.json', text);
    expect(p.data.unit).toBe('ms');
    expect(warnings).toEqual([]);
    expect(p.grid).toEqual({ shape: [3], spacing: [2], origin: [10], unit: 'm' });
    expect(p.operator.kind).toBe('dense');
    expect(toRows(operatorToDense(p.operator))).toEqual(G);
    expect(Array.from(p.data.values)).toEqual([1, 2]);
    expect(Array.from(p.data.sigma!)).toEqual([0.1, 0.2]);
    expect(Array.from(p.truth!)).toEqual([1, 2, 3]);
    expect(p.quantity).toEqual({ name: 'slowness', unit: 's/m' });
    expect(p.title).toBe('invented');
  });

  it('reads a sparse operator with duplicates summed', () => {
    const text = problem({ operator: { sparse: { rows: [0, 0, 1, 0], cols: [0, 1, 2, 0], values: [0.5, 0.5, 1, 0.5] } } });
    const { problem: p } = parseProblemFile('p.json', text);
    expect(p.operator.kind).toBe('sparse');
    expect(toRows(operatorToDense(p.operator))).toEqual([
      [1, 0.5, 0],
      [0, 0, 1],
    ]);
  });

  it('reads a full data covariance', () => {
    const { problem: p } = parseProblemFile(
      'p.json',
      problem(
        {},
        {
          sigma: undefined,
          covariance: [
            [1, 0.5],
            [0.5, 2],
          ],
        },
      ),
    );
    expect(toRows(p.data.covariance!)).toEqual([
      [1, 0.5],
      [0.5, 2],
    ]);
    expect(p.data.sigma).toBeUndefined();
  });

  it.each([
    ['G.csv', writeCsv(fromRows(G), ['a', 'b', 'c'])],
    ['G.mtx', writeMatrixMarketCoordinate(sparseFromCoordinates(2, 3, [0, 0, 1, 1], [0, 1, 1, 2], [1, 0.5, 0.5, 1]))],
    ['G.npy', writeNpyMatrix(fromRows(G))],
    ['sub/G.NPY', writeNpyMatrix(fromRows(G))],
  ])('reads the operator from a sibling %s', (name, content) => {
    const { problem: p } = parseProblemFile('p.json', problem({ operator: { file: name } }), {
      readSibling: siblings({ [name]: content }),
    });
    expect(toRows(operatorToDense(p.operator))).toEqual(G);
  });

  it("says when the operator CSV's first row was read as a header", () => {
    const { warnings } = parseProblemFile('p.json', problem({ operator: { file: 'G.csv' } }), {
      readSibling: siblings({ 'G.csv': writeCsv(fromRows(G), ['a', 'b', 'c']) }),
    });
    expect(warnings.map((w) => w.message)).toEqual([
      'p.json: operator.file G.csv: line 1 read as a header (column names "a,b,c"), not as numbers',
    ]);
  });

  it('warns about unknown fields and keeps going', () => {
    const { warnings } = parseProblemFile(
      'p.json',
      problem({ author: 'x', grid: { shape: [3], spacing: [2], colour: 1 } }, { weights: [1] }),
    );
    expect(warnings.map((w) => w.field)).toEqual(['author', 'grid.colour', 'data.weights']);
    expect(warnings[0].message).toBe(
      'p.json: unknown field author ignored (known here: kind, version, title, grid, cells, operator, data, truth, quantity)',
    );
  });

  // The bad-input cases, one line each: file, field, expectation.
  it.each([
    [
      'not JSON',
      'kind: problem',
      'p.json: is not valid JSON: line 1, column 1: expected a value (number, string, array, object, true, false or null), got "kind: proble"',
    ],
    [
      'wrong kind',
      problem({ kind: 'priorscope.prior' }),
      'p.json: kind must be "priorscope.problem" (this is a prior file), got "priorscope.prior"',
    ],
    ['wrong version', problem({ version: '1' }), 'p.json: version must be 1 (the version this program reads), got "1"'],
    ['missing grid', problem({ grid: undefined }), 'p.json: grid must be an object with shape and spacing, got nothing'],
    ['missing data', problem({ data: undefined }), 'p.json: data must be an object with values and sigma or covariance, got nothing'],
    ['missing operator', problem({ operator: undefined }), 'p.json: operator must be an object with dense, sparse or file, got nothing'],
    [
      'missing sigma',
      problem({}, { sigma: undefined }),
      'p.json: data.sigma must be an array of 2 numbers > 0 (or give data.covariance), got nothing',
    ],
    [
      'grid shape 4-D',
      problem({ grid: { shape: [2, 2, 2, 1], spacing: [1, 1, 1, 1] } }),
      'p.json: grid.shape must be [nx], [nx, ny] or [nx, ny, nz] (positive integers), got an array of length 4',
    ],
    ['grid shape fraction', problem({ grid: { shape: [2.5], spacing: [1] } }), 'p.json: grid.shape[0] must be an integer ≥ 1, got 2.5'],
    [
      'grid spacing count',
      problem({ grid: { shape: [3], spacing: [1, 1] } }),
      'p.json: grid.spacing must be an array of 1 numbers, got an array of length 2',
    ],
    ['grid spacing zero', problem({ grid: { shape: [3], spacing: [0] } }), 'p.json: grid.spacing[0] must be > 0, got 0'],
    [
      'G rows vs data',
      problem({ operator: { dense: [G[0]] } }),
      'p.json: operator.dense must be an array of 2 rows (one per datum in data.values), got an array of length 1',
    ],
    [
      'G cols vs grid',
      problem({ grid: { shape: [4], spacing: [1] } }),
      'p.json: operator.dense[0] must be an array of 4 numbers (one per grid cell), got an array of length 3',
    ],
    ['sigma length', problem({}, { sigma: [1] }), 'p.json: data.sigma must be an array of 2 numbers, got an array of length 1'],
    ['truth length', problem({ truth: [1] }), 'p.json: truth must be an array of 3 numbers, got an array of length 1'],
    [
      'string in G',
      problem({
        operator: {
          dense: [
            [1, '0.5', 0],
            [0, 0.5, 1],
          ],
        },
      }),
      'p.json: operator.dense[0][1] must be a finite number, got "0.5"',
    ],
    ['overflowing number', problem().replace('[1,2]', '[1,1e999]'), 'p.json: data.values[1] must be a finite number, got Infinity'],
    ['NaN string', problem({}, { values: [1, 'NaN'] }), 'p.json: data.values[1] must be a finite number, got "NaN"'],
    ['negative sigma', problem({}, { sigma: [0.1, -1] }), 'p.json: data.sigma[1] must be > 0, got -1'],
    ['data unit not text', problem({}, { unit: 5 }), 'p.json: data.unit must be a string, got 5'],
    [
      'both sigma and covariance',
      problem(
        {},
        {
          covariance: [
            [1, 0],
            [0, 1],
          ],
        },
      ),
      'p.json: data must be an object with either sigma or covariance, not both, got "both"',
    ],
    [
      'non-symmetric covariance',
      problem(
        {},
        {
          sigma: undefined,
          covariance: [
            [1, 0.5],
            [0.4, 1],
          ],
        },
      ),
      'p.json: data.covariance[1][0] must be equal to data.covariance[0][1] = 0.5 (the covariance must be symmetric), got 0.4',
    ],
    [
      'non-PD covariance',
      problem(
        {},
        {
          sigma: undefined,
          covariance: [
            [1, 2],
            [2, 1],
          ],
        },
      ),
      'p.json: data.covariance must be positive definite, got a matrix whose Cholesky factorisation fails at row 1 (pivot -3)',
    ],
    [
      'covariance shape',
      problem(
        {},
        {
          sigma: undefined,
          covariance: [
            [1, 0, 0],
            [0, 1, 0],
          ],
        },
      ),
      'p.json: data.covariance[0] must be an array of 2 numbers, got an array of length 3',
    ],
    [
      'sparse index',
      problem({ operator: { sparse: { rows: [0, 2], cols: [0, 1], values: [1, 1] } } }),
      'p.json: operator.sparse.rows[1] must be an integer from 0 to 1 (zero-based datum index), got 2',
    ],
    [
      'sparse lengths',
      problem({ operator: { sparse: { rows: [0], cols: [0, 1], values: [1, 1] } } }),
      'p.json: operator.sparse.rows must be an array of 2 row indices, got an array of length 1',
    ],
    [
      'two operator forms',
      problem({ operator: { dense: G, file: 'G.npy' } }),
      'p.json: operator must be an object with exactly one of dense, sparse, file, got "dense and file"',
    ],
    [
      'operator file type',
      problem({ operator: { file: 'G.txt' } }),
      'p.json: operator.file must be the name of a .csv, .mtx (Matrix Market) or .npy file, got "G.txt"',
    ],
    ['missing sibling', problem({ operator: { file: 'G.npy' } }), 'p.json: operator.file "G.npy" could not be read: no such file (G.npy)'],
    [
      'sibling of wrong shape',
      problem({ operator: { file: 'H.npy' } }),
      'p.json: operator.file "H.npy" must hold a 2 × 3 matrix (data × grid cells), got 3 × 2',
    ],
    [
      'unreadable sibling content',
      problem({ operator: { file: 'bad.csv' } }),
      'bad.csv: line 2, column 3 must be a finite number, got "x"',
    ],
    ['1-D npy sibling', problem({ operator: { file: 'v.npy' } }), 'v.npy: must hold a 2-dimensional array, got shape (6,)'],
    ['quantity without name', problem({ quantity: { unit: 'm' } }), 'p.json: quantity.name must be a string, got nothing'],
  ])('rejects: %s', (_name, text, message) => {
    const read = siblings({
      'H.npy': writeNpy([3, 2], [1, 2, 3, 4, 5, 6]),
      'bad.csv': '1,2,3\n4,5,x\n',
      'v.npy': writeNpy([6], [1, 2, 3, 4, 5, 6]),
    });
    expectFileError(() => parseProblemFile('p.json', text, { readSibling: read }), message);
  });

  it.each([
    ['NaN', problem().replace('0.2]', 'NaN]')],
    ['-Infinity', problem().replace('[1,2]', '[1,-Infinity]')],
    ['Infinity', '{\n  "kind": "priorscope.problem",\n  "data": {"values": [Infinity]}\n}'],
  ])('rejects a literal %s, naming its line and column', (word, text) => {
    // Expected position found independently of the parser: the first occurrence of the word.
    const at = text.indexOf(word);
    const line = text.slice(0, at).split('\n').length;
    const column = at - text.lastIndexOf('\n', at - 1);
    expectFileError(
      () => parseProblemFile('p.json', text),
      `p.json: is not valid JSON: line ${line}, column ${column}: NaN and Infinity are not JSON numbers; every number must be finite`,
    );
  });

  it('without file access a sibling reference is a clear error', () => {
    expectFileError(
      () => parseProblemFile('p.json', problem({ operator: { file: 'G.npy' } })),
      'p.json: operator.file "G.npy" cannot be read here (no access to files next to p.json)',
    );
  });
});

describe('problem file round trip', () => {
  it.each(DEMOS.map((d) => [d.id, d] as const))('demo %s: inline and with each sibling format', (_id, demo) => {
    const { problem: p } = demo.build();
    const inline = writeProblemFile(p);
    const back = parseProblemFile('p.json', inline.json).problem;
    expect(back).toEqual(p);
    expect(writeProblemFile(back).json).toBe(inline.json);
    for (const name of ['G.npy', 'G.mtx', 'G.csv']) {
      const w = writeProblemFile(p, { file: name });
      const b = parseProblemFile('p.json', w.json, { readSibling: siblings({ [name]: w.operatorFile!.bytes }) }).problem;
      expect(toRows(operatorToDense(b.operator))).toEqual(toRows(operatorToDense(p.operator)));
      expect(b.data).toEqual(p.data);
      expect(b.grid).toEqual(p.grid);
    }
  });
});

describe('parseProblemFile on mutated input (seeded)', () => {
  it('either parses or throws a FileFormatError', () => {
    const r = rng(77);
    const texts = [
      problem({ truth: [1, 2, 3], quantity: { name: 'q' } }),
      problem(
        { operator: { sparse: { rows: [0, 1], cols: [0, 2], values: [1, 1] } } },
        {
          sigma: undefined,
          covariance: [
            [1, 0.5],
            [0.5, 2],
          ],
        },
      ),
      problem({ operator: { file: 'G.npy' } }),
    ];
    const read = siblings({ 'G.npy': writeNpyMatrix(fromRows(G)) });
    let parsed = 0;
    let refused = 0;
    for (let trial = 0; trial < 3000; trial++) {
      const t = mutateText(r, texts[trial % 3]);
      try {
        parseProblemFile('m.json', t, { readSibling: read });
        parsed++;
      } catch (e) {
        if (!(e instanceof FileFormatError)) throw new Error(`non-FileFormatError for ${JSON.stringify(t)}: ${String(e)}`);
        refused++;
      }
    }
    expect(parsed).toBeGreaterThan(20);
    expect(refused).toBeGreaterThan(50);
  });
});
