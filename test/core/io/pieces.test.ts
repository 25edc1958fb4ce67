/**
 * The problem-from-pieces reader (src/core/io/pieces.ts): data CSV / .npy, covariance, grid form,
 * cross-checks of the shapes, and seeded mutation tests in the style of the other io parsers.
 * Expected values here are written by hand from the file text (not copied from our output).
 */
import { describe, expect, it } from 'vitest';
import {
  assembleProblem,
  checkGridForm,
  parseCovarianceFile,
  parseDataCsv,
  parseDataFile,
  parseDataNpy,
  parseOperatorFile,
} from '../../../src/core/io/pieces.ts';
import { FileFormatError } from '../../../src/core/io/errors.ts';
import { writeNpy } from '../../../src/core/io/npy.ts';
import { writeMatrixMarketArray } from '../../../src/core/io/matrixMarket.ts';
import { matrix } from '../../../src/core/linalg/matrix.ts';
import { expectFileError } from './expectError.ts';
import { mutateBytes, mutateText, randInt, rng } from './random.ts';

const enc = (s: string) => new TextEncoder().encode(s);
const file = (name: string, text: string) => ({ name, bytes: enc(text) });

describe('parseDataCsv', () => {
  it.each([
    ['header value,sigma', 'value,sigma\n1.5,0.1\n-2,0.2\n', [1.5, -2], [0.1, 0.2]],
    ['header in another order with an extra column, case-insensitive', 'x,SIGMA,Value\n0,0.5,3\n1,0.25,4\n', [3, 4], [0.5, 0.25]],
    ['no header, two columns', '# made up\n1,0.1\n\n2,0.2\n', [1, 2], [0.1, 0.2]],
    ['no header, one column', '7\n8\n9\n', [7, 8, 9], null],
    ['header value only', 'value\n7\n8\n', [7, 8], null],
    ['alias names std and d', 'd;std\n1;2\n', [1], [2]],
  ])('%s', (_n, text, values, sigma) => {
    const r = parseDataCsv('d.csv', text);
    expect(Array.from(r.values)).toEqual(values);
    expect(r.sigma ? Array.from(r.sigma) : null).toEqual(sigma);
  });

  it.each([
    ['value,sigma\n1,0.1\n2,0\n', 'd.csv: line 3, column 2 (sigma) must be > 0, got 0'],
    ['# c\nvalue,sigma\n\n1,0.1\n2,-3\n', 'd.csv: line 5, column 2 (sigma) must be > 0, got -3'],
    ['1,0.1\n\n# c\n2,-1\n', 'd.csv: line 4, column 2 (sigma) must be > 0, got -1'],
    ['1,2,3\n', 'd.csv: without a header must have 1 column (value) or 2 columns (value, sigma), got 3 columns'],
    ['x,y\n1,2\n', 'd.csv: header (line 1) must name a value column (value, values, data, d), got "x,y"'],
    ['value,data\n1,2\n', 'd.csv: line 1 names 2 columns value/values/data/d, expected one'],
    ['value,sigma\n1,abc\n', 'd.csv: line 2, column 2 must be a finite number, got "abc"'],
    ['value,sigma\n1,NaN\n', 'd.csv: line 2, column 2 must be a finite number, got "NaN"'],
    ['value,sigma\n1,0.1\n2\n', 'd.csv: line 3 has 1 column, expected 2 (as in line 1)'],
    ['', 'd.csv: contains no rows of numbers'],
  ])('refuses %j', (text, message) => {
    expectFileError(() => parseDataCsv('d.csv', text), message);
  });
});

describe('parseDataCsv never guesses (battery cases)', () => {
  it('refuses two whole-number columns with no decimal point anywhere (maybe decimal commas), with a hint', () => {
    expectFileError(
      () => parseDataCsv('d.csv', '1,25\n2,5\n0,75\n'),
      'd.csv: line 1 "1,25" could be value, sigma or one number with a decimal comma; write decimals with a dot (1.25), or add the header line value,sigma if these are whole-number values and sigmas',
    );
    expectFileError(
      () => parseDataCsv('d.csv', '# x\r"3","2"\r'),
      'd.csv: line 2 "\\"3\\",\\"2\\"" could be value, sigma or one number with a decimal comma; write decimals with a dot (1.25), or add the header line value,sigma if these are whole-number values and sigmas',
    );
  });

  it('reads the same numbers once a decimal point or a header settles it', () => {
    expect(Array.from(parseDataCsv('d.csv', '1,25\n2.5,5\n').sigma!)).toEqual([25, 5]);
    expect(Array.from(parseDataCsv('d.csv', 'value,sigma\n1,25\n').sigma!)).toEqual([25]);
    expect(Array.from(parseDataCsv('d.csv', '1.25\n2.5\n').values)).toEqual([1.25, 2.5]);
  });

  it('says when the first row was read as a header, and names bad first-row cells otherwise', () => {
    expect(parseDataCsv('d.csv', 'value,sigma\n1.5,0.1\n').warnings.map((w) => w.message)).toEqual([
      'd.csv: line 1 read as a header (column names "value,sigma"), not as numbers',
    ]);
    expect(parseDataCsv('d.csv', '1.5,0.1\n').warnings).toEqual([]);
    expectFileError(() => parseDataCsv('d.csv', '1.5,abc\n2,0.1\n3,0.1\n'), 'd.csv: line 1, column 2 must be a finite number, got "abc"');
  });

  it('names the sigma line by the file line with bare CR line ends', () => {
    expectFileError(() => parseDataCsv('d.csv', 'value,sigma\r\r1.5,0.1\r2,-1\r'), 'd.csv: line 4, column 2 (sigma) must be > 0, got -1');
  });

  it('assembleProblem passes the header note of the operator CSV on', () => {
    const warnings: import('../../../src/core/io/errors.ts').FileWarning[] = [];
    assembleProblem(
      { grid: { shape: [2], spacing: [1] }, operator: file('G.csv', 'c1,c2\n1,0\n'), data: file('d.csv', '1.5,0.5\n') },
      warnings,
    );
    expect(warnings.map((w) => w.message)).toEqual(['G.csv: line 1 read as a header (column names "c1,c2"), not as numbers']);
  });
});

describe('parseDataNpy', () => {
  it('reads (M,) values and (M, 2) value/sigma', () => {
    expect(Array.from(parseDataNpy('d.npy', writeNpy([3], [1, 2, 3])).values)).toEqual([1, 2, 3]);
    const r = parseDataNpy('d.npy', writeNpy([2, 2], [1, 0.5, 2, 0.25]));
    expect(Array.from(r.values)).toEqual([1, 2]);
    expect(Array.from(r.sigma!)).toEqual([0.5, 0.25]);
  });
  it.each([
    [[2, 3], [1, 2, 3, 4, 5, 6], 'd.npy: must hold shape (M,) (values) or (M, 2) (value, sigma), got shape (2, 3)'],
    [[2, 2], [1, 0.5, 2, -1], 'd.npy: row 1, column 1 (sigma) must be > 0, got -1'],
    [[0], [], 'd.npy: must hold at least one datum, got shape (0,)'],
  ])('refuses shape %j', (shape, data, message) => {
    expectFileError(() => parseDataNpy('d.npy', writeNpy(shape, data)), message);
  });
  it('refuses a file that is not .npy', () => {
    expectFileError(
      () => parseDataNpy('d.npy', enc('1,2\n')),
      'd.npy: is not a NumPy .npy file (it does not start with the bytes "\\x93NUMPY")',
    );
  });
});

describe('file kinds by extension', () => {
  it('refuses unknown extensions with the allowed list', () => {
    expectFileError(() => parseDataFile(file('d.xlsx', '')), 'd.xlsx: cannot be read as data: the name must end in .csv, .npy');
    expectFileError(
      () => parseOperatorFile(file('G.json', '')),
      'G.json: cannot be read as the operator G: the name must end in .csv, .mtx (Matrix Market), .npy',
    );
  });
  it('reads G from Matrix Market coordinate as sparse and CSV as dense', () => {
    const g = parseOperatorFile(file('G.mtx', '%%MatrixMarket matrix coordinate real general\n2 3 2\n1 1 0.5\n2 3 2\n'));
    expect(g.kind).toBe('sparse');
    expect(parseOperatorFile(file('G.csv', '1,2,3\n4,5,6\n')).kind).toBe('dense');
  });
});

describe('parseCovarianceFile', () => {
  it('accepts an SPD matrix from CSV, .npy and Matrix Market array', () => {
    const c = [4, 1, 1, 3];
    expect(Array.from(parseCovarianceFile(file('C.csv', '4,1\n1,3\n'), 2).data)).toEqual(c);
    expect(Array.from(parseCovarianceFile({ name: 'C.npy', bytes: writeNpy([2, 2], c) }, 2).data)).toEqual(c);
    expect(Array.from(parseCovarianceFile(file('C.mtx', writeMatrixMarketArray(matrix(2, 2, Float64Array.from(c)))), 2).data)).toEqual(c);
  });
  it.each([
    ['4,1\n1.5,3\n', 2, 'C.csv: entry (row 1, column 0) must equal entry (row 0, column 1) = 1 (a covariance is symmetric), got 1.5'],
    // eigenvalues of [[1,2],[2,1]] are 3 and -1: not positive definite; the second pivot is 1 - 4 = -3
    ['1,2\n2,1\n', 2, 'C.csv: must be positive definite, got a matrix whose Cholesky factorisation fails at row 1 (pivot -3)'],
    ['1,0\n0,1\n', 3, 'C.csv: must hold a 3 × 3 matrix (one row and column per datum), got 2 × 2'],
  ])('refuses %j', (text, m, message) => {
    expectFileError(() => parseCovarianceFile(file('C.csv', text), m), message);
  });
});

describe('checkGridForm', () => {
  it('keeps valid fields and drops an empty unit', () => {
    expect(checkGridForm({ shape: [4, 3], spacing: [1, 2], origin: [0, -1], unit: '' })).toEqual({
      shape: [4, 3],
      spacing: [1, 2],
      origin: [0, -1],
    });
  });
  it.each([
    [{ shape: [0], spacing: [1] }, 'grid form: nx must be a positive integer, got 0'],
    [{ shape: [3, 2.5], spacing: [1, 1] }, 'grid form: ny must be a positive integer, got 2.5'],
    [{ shape: [3], spacing: [-1] }, 'grid form: dx must be a finite number > 0, got -1'],
    [{ shape: [3, 3], spacing: [1, Number.NaN] }, 'grid form: dy must be a finite number > 0, got NaN'],
    [{ shape: [3, 3], spacing: [1] }, 'grid form: spacing must be 2 numbers, got an array of length 1'],
    [{ shape: [3], spacing: [1], origin: [Infinity] }, 'grid form: x0 must be a finite number, got Infinity'],
  ])('refuses %j', (g, message) => {
    expectFileError(() => checkGridForm(g), message);
  });
});

describe('assembleProblem', () => {
  const G = '%%MatrixMarket matrix coordinate real general\n2 3 3\n1 1 1\n1 2 1\n2 3 0.5\n';
  it('builds a problem whose operator, data and grid are the inputs', () => {
    const p = assembleProblem({
      grid: { shape: [3], spacing: [2], unit: 'm' },
      operator: file('G.mtx', G),
      data: file('d.csv', 'value,sigma\n1,0.1\n2,0.2\n'),
      title: 'T',
    });
    expect(p.grid).toEqual({ shape: [3], spacing: [2], unit: 'm' });
    expect(p.operator.kind).toBe('sparse');
    expect(Array.from(p.data.values)).toEqual([1, 2]);
    expect(Array.from(p.data.sigma!)).toEqual([0.1, 0.2]);
    expect(p.title).toBe('T');
  });
  it('takes a full covariance when the data has no sigma', () => {
    const p = assembleProblem({
      grid: { shape: [3], spacing: [1] },
      operator: file('G.mtx', G),
      data: file('d.csv', '1\n2\n'),
      covariance: file('C.csv', '2,1\n1,2\n'),
    });
    expect(Array.from(p.data.covariance!.data)).toEqual([2, 1, 1, 2]);
    expect(p.data.sigma).toBeUndefined();
  });
  it.each([
    [
      { shape: [4], spacing: [1] },
      'value,sigma\n1,1\n2,1\n',
      undefined,
      'G.mtx: must have 4 columns (one per grid cell, 4 in the grid form), got 3',
    ],
    [{ shape: [3], spacing: [1] }, 'value,sigma\n1,1\n', undefined, 'G.mtx: must have 1 rows (one per datum in d.csv), got 2'],
    [{ shape: [3], spacing: [1] }, '1\n2\n', undefined, 'd.csv: must have a sigma column (value, sigma), or give a data covariance file'],
    [
      { shape: [3], spacing: [1] },
      '1,1\n2,1.5\n',
      file('C.csv', '1,0\n0,1\n'),
      'd.csv: has a sigma column and a covariance file (C.csv) was given too; give exactly one of them',
    ],
  ])('refuses mismatched pieces (%#)', (grid, data, covariance, message) => {
    expectFileError(
      () => assembleProblem({ grid, operator: file('G.mtx', G), data: file('d.csv', data), ...(covariance ? { covariance } : {}) }),
      message,
    );
  });
});

describe('pieces on mutated input (seeded)', () => {
  /** Either a valid result or a FileFormatError naming the file; both outcomes must occur. */
  function fuzz(trials: number, seed: number, attempt: (r: () => number) => { name: string; run: () => void }, atLeast = trials / 30) {
    const r = rng(seed);
    let parsed = 0;
    let refused = 0;
    for (let t = 0; t < trials; t++) {
      const { name, run } = attempt(r);
      try {
        run();
        parsed++;
      } catch (e) {
        if (!(e instanceof FileFormatError)) throw new Error(`non-FileFormatError for a mutated ${name}: ${String(e)}`);
        expect(e.message.startsWith(`${e.file}: `)).toBe(true);
        refused++;
      }
    }
    expect(parsed).toBeGreaterThan(atLeast);
    expect(refused).toBeGreaterThan(atLeast);
  }

  it('data CSV', () => {
    fuzz(1500, 7, (r) => {
      const text = mutateText(r, 'value,sigma\n1,0.5\n-2.5e1,0.25\n3,1\n');
      return {
        name: 'data CSV',
        run: () => {
          const d = parseDataCsv('m.csv', text);
          expect(d.values.every(Number.isFinite)).toBe(true);
          if (d.sigma) expect(d.sigma.every((s) => s > 0 && Number.isFinite(s))).toBe(true);
        },
      };
    });
  });

  it('data .npy', () => {
    const base = writeNpy([3, 2], [1, 0.5, 2, 0.25, 3, 1]);
    fuzz(
      1500,
      11,
      (r) => {
        const bytes = mutateBytes(r, base);
        return {
          name: 'data .npy',
          run: () => {
            const d = parseDataNpy('m.npy', bytes);
            if (d.sigma) expect(d.sigma.every((s) => s > 0)).toBe(true);
          },
        };
      },
      10,
    ); // most byte edits break the header, so fewer parse: at least 10 of 1500 must
  });

  it('whole assembly with a mutated covariance', () => {
    fuzz(800, 13, (r) => {
      const text = mutateText(r, '2,0.5,0\n0.5,2,0.5\n0,0.5,2\n');
      const grid = randInt(r, 5) === 0 ? { shape: [randInt(r, 3)], spacing: [1] } : { shape: [2], spacing: [1] };
      return {
        name: 'covariance CSV',
        run: () => {
          const p = assembleProblem({
            grid,
            operator: file('G.csv', '1,0\n0,1\n1,1\n'),
            data: file('d.csv', '1\n2\n3\n'),
            covariance: file('C.csv', text),
          });
          expect(p.data.covariance!.rows).toBe(3);
        },
      };
    });
  });
});
