import { describe, expect, it } from 'vitest';
import { FileFormatError } from '../../../src/core/io/errors.ts';
import { parseMatrixMarket, writeMatrixMarket } from '../../../src/core/io/matrixMarket.ts';
import { matrix, toRows } from '../../../src/core/linalg/matrix.ts';
import { operatorToDense, type Operator } from '../../../src/core/linalg/operator.ts';
import { sparseFromCoordinates } from '../../../src/core/linalg/sparse.ts';
import { expectFileError } from './expectError.ts';
import { mutateText, randInt, rng } from './random.ts';

const dense = (g: Operator) => toRows(operatorToDense(g));

// Layouts as described in the NIST Matrix Market report (NISTIR 5935): 1-based coordinates,
// column-major arrays, lower triangle for symmetric.
describe('parseMatrixMarket', () => {
  it('reads coordinate real general with comments and duplicates summed', () => {
    const g = parseMatrixMarket(
      'g.mtx',
      '%%MatrixMarket matrix coordinate real general\n% made up\n2 3 4\n1 1 1.5\n2 3 -2\n1 1 0.5\n2 1 4e-1\n',
    );
    expect(g.kind).toBe('sparse');
    expect(dense(g)).toEqual([
      [2, 0, 0],
      [0.4, 0, -2],
    ]);
  });
  it('reads array real general in column-major order', () => {
    const g = parseMatrixMarket('g.mtx', '%%MatrixMarket matrix array real general\n2 3\n1\n2\n3\n4\n5\n6\n');
    expect(g.kind).toBe('dense');
    expect(dense(g)).toEqual([
      [1, 3, 5],
      [2, 4, 6],
    ]);
  });
  it('mirrors symmetric coordinate and array files', () => {
    const c = parseMatrixMarket('s.mtx', '%%MatrixMarket matrix coordinate real symmetric\n2 2 2\n1 1 4\n2 1 1\n');
    expect(dense(c)).toEqual([
      [4, 1],
      [1, 0],
    ]);
    const a = parseMatrixMarket('s.mtx', '%%MATRIXMARKET Matrix Array Integer Symmetric\n2 2\n4\n1\n3\n');
    expect(dense(a)).toEqual([
      [4, 1],
      [1, 3],
    ]);
  });
  it.each([
    [
      'matrix coordinate real general\n1 1 0\n',
      'g.mtx: line 1 must be a banner "%%MatrixMarket matrix coordinate|array real general", got "matrix coordinate real general"',
    ],
    [
      '%%MatrixMarket matrix coordinate complex general\n1 1 0\n',
      'g.mtx: line 1: field must be "real" or "integer" (complex and pattern matrices are not supported), got "complex"',
    ],
    [
      '%%MatrixMarket matrix coordinate pattern general\n1 1 0\n',
      'g.mtx: line 1: field must be "real" or "integer" (complex and pattern matrices are not supported), got "pattern"',
    ],
    [
      '%%MatrixMarket matrix coordinate real hermitian\n1 1 0\n',
      'g.mtx: line 1: symmetry must be "general" or "symmetric", got "hermitian"',
    ],
    [
      '%%MatrixMarket matrix coordinate real general\n2 2 1\n3 1 1\n',
      'g.mtx: line 3, entry 1: row must be an integer from 1 to 2, got "3"',
    ],
    [
      '%%MatrixMarket matrix coordinate real general\n2 2 1\n1 0 1\n',
      'g.mtx: line 3, entry 2: column must be an integer from 1 to 2, got "0"',
    ],
    ['%%MatrixMarket matrix coordinate real general\n2 2 1\n1 1 nan\n', 'g.mtx: line 3, entry 3: value must be a finite number, got "nan"'],
    ['%%MatrixMarket matrix coordinate real general\n2 2 2\n1 1 1\n', 'g.mtx: ends after 1 of the 2 entries announced on line 2'],
    ['%%MatrixMarket matrix coordinate real general\n2 2 1\n1 1 1\n2 2 2\n', 'g.mtx: line 4: more entries than the 1 announced on line 2'],
    [
      '%%MatrixMarket matrix coordinate real symmetric\n2 2 1\n1 2 1\n',
      'g.mtx: line 3: a symmetric file stores the lower triangle only, got row 1 < column 2',
    ],
    ['%%MatrixMarket matrix array real general\n2 2\n1\n2\n3\n', 'g.mtx: has 3 values, expected 4 for a 2 × 2 array'],
    ['%%MatrixMarket matrix array real general\n2 2 4\n1\n2\n3\n4\n', 'g.mtx: line 2: size line must be "rows columns", got "2 2 4"'],
    ['%%MatrixMarket matrix array integer general\n1 1\n1.5\n', 'g.mtx: line 3, entry 1: value must be a finite integer, got "1.5"'],
    ['%%MatrixMarket matrix coordinate real general\n', 'g.mtx: has no size line after the banner'],
    [
      '%%MatrixMarket matrix coordinate real general\n99999999999 1 0\n',
      'g.mtx: line 2, entry 1: rows must be an integer from 1 to 10000000, got "99999999999"',
    ],
  ])('rejects %j', (text, message) => {
    expectFileError(() => parseMatrixMarket('g.mtx', text), message);
  });
});

describe('writeMatrixMarket', () => {
  it('round-trips dense and sparse operators exactly', () => {
    const r = rng(11);
    for (let trial = 0; trial < 10; trial++) {
      const m = matrix(1 + randInt(r, 6), 1 + randInt(r, 6));
      for (let k = 0; k < m.data.length; k++) m.data[k] = r() < 0.5 ? 0 : (r() - 0.5) * 10 ** (randInt(r, 30) - 15);
      const d: Operator = { kind: 'dense', matrix: m };
      const back = parseMatrixMarket('w.mtx', writeMatrixMarket(d, 'invented\ntwo lines'));
      expect(back.kind).toBe('dense');
      expect(dense(back)).toEqual(toRows(m));
      const ri: number[] = [],
        ci: number[] = [],
        v: number[] = [];
      m.data.forEach((x, k) => {
        if (x !== 0) {
          ri.push(Math.floor(k / m.cols));
          ci.push(k % m.cols);
          v.push(x);
        }
      });
      const s: Operator = { kind: 'sparse', matrix: sparseFromCoordinates(m.rows, m.cols, ri, ci, v) };
      const sb = parseMatrixMarket('w.mtx', writeMatrixMarket(s));
      expect(sb).toEqual(s);
    }
  });
});

describe('parseMatrixMarket on mutated input (seeded)', () => {
  it('either parses or throws a FileFormatError', () => {
    const r = rng(99);
    const bases = [
      '%%MatrixMarket matrix coordinate real general\n% c\n3 2 3\n1 1 1.5\n3 2 -2\n2 1 7\n',
      '%%MatrixMarket matrix array real symmetric\n2 2\n1\n0.5\n2\n',
    ];
    let parsed = 0;
    let refused = 0;
    for (let trial = 0; trial < 1500; trial++) {
      const text = mutateText(r, bases[trial % 2]);
      try {
        const g = parseMatrixMarket('m.mtx', text);
        expect(g.matrix.rows).toBeGreaterThan(0);
        parsed++;
      } catch (e) {
        if (!(e instanceof FileFormatError)) throw new Error(`non-FileFormatError for ${JSON.stringify(text)}: ${String(e)}`);
        refused++;
      }
    }
    expect(parsed).toBeGreaterThan(30);
    expect(refused).toBeGreaterThan(30);
  });
});
