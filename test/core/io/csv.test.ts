import { describe, expect, it } from 'vitest';
import { csvColumns, headerNote, looksNumeric, parseCsv, writeCsv } from '../../../src/core/io/csv.ts';
import { FileFormatError } from '../../../src/core/io/errors.ts';
import { matrix } from '../../../src/core/linalg/matrix.ts';
import { mutateText, randInt, rng } from './random.ts';
import { expectFileError } from './expectError.ts';

const rows = (t: ReturnType<typeof parseCsv>) =>
  Array.from({ length: t.matrix.rows }, (_, i) => Array.from(t.matrix.data.subarray(i * t.matrix.cols, (i + 1) * t.matrix.cols)));

describe('parseCsv', () => {
  it.each([
    [
      'plain',
      '1,2,3\n4,5,6\n',
      null,
      [
        [1, 2, 3],
        [4, 5, 6],
      ],
    ],
    [
      'header and CRLF',
      'a,b\r\n1,-2.5e-3\r\n3,.5\r\n',
      ['a', 'b'],
      [
        [1, -0.0025],
        [3, 0.5],
      ],
    ],
    [
      'tabs',
      '1\t2\n3\t4',
      null,
      [
        [1, 2],
        [3, 4],
      ],
    ],
    [
      'semicolons',
      '1;2\n3;4',
      null,
      [
        [1, 2],
        [3, 4],
      ],
    ],
    [
      'blank and comment lines, spaces',
      '# made up\n\n 1 , 2 \n\n3,4\n',
      null,
      [
        [1, 2],
        [3, 4],
      ],
    ],
    ['quoted header with comma names', '"a","x,y"\n5,6\n', ['a', 'x,y'], [[5, 6]]],
    ['single column', '7\n8\n', null, [[7], [8]]],
  ])('%s', (_name, text, header, expected) => {
    const t = parseCsv('t.csv', text);
    expect(t.header).toEqual(header);
    expect(rows(t)).toEqual(expected);
  });

  it.each([
    ['1,2\n3,abc\n', 't.csv: line 2, column 2 must be a finite number, got "abc"'],
    ['1,2\n3,NaN\n', 't.csv: line 2, column 2 must be a finite number, got "NaN"'],
    ['1,2\n3,Infinity\n', 't.csv: line 2, column 2 must be a finite number, got "Infinity"'],
    ['1,2\n3,1e999\n', 't.csv: line 2, column 2 must be a finite number, got "1e999"'],
    ['1,2\n3,0x10\n', 't.csv: line 2, column 2 must be a finite number, got "0x10"'],
    ['1,2\n\n3,\n', 't.csv: line 3, column 2 must be a finite number, got ""'],
    ['a,b\n1,2\n3\n', 't.csv: line 3 has 1 column, expected 2 (as in line 1)'],
    ['1,2,3\n4,5\n', 't.csv: line 2 has 2 columns, expected 3 (as in line 1)'],
    ['"a,b\n1\n', 't.csv: line 1 has an unterminated or misplaced double quote'],
    ['\n# only a comment\n', 't.csv: contains no rows of numbers'],
    ['a,b\n', 't.csv: has a header line (line 1) but no rows of numbers'],
  ])('rejects %j', (text, message) => {
    expectFileError(() => parseCsv('t.csv', text), message);
  });

  it('names line and column on the error object', () => {
    try {
      parseCsv('t.csv', '1,2\n3,x\n');
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(FileFormatError);
      expect((e as FileFormatError).line).toBe(2);
      expect((e as FileFormatError).column).toBe(2);
    }
  });

  it('header: false reads the first row as data and reports its text cell', () => {
    expect(() => parseCsv('t.csv', 'a,b\n1,2', { header: false })).toThrow('t.csv: line 1, column 1 must be a finite number, got "a"');
  });

  it('refuses text that is not UTF-8', () => {
    expect(() => parseCsv('t.csv', Uint8Array.from([0x31, 0x2c, 0xff, 0xfe]))).toThrow('t.csv: is not UTF-8 text');
  });

  it('gives named columns', () => {
    const c = csvColumns('t.csv', parseCsv('t.csv', 'x,y\n1,2\n3,4\n'));
    expect(Array.from(c.get('x')!)).toEqual([1, 3]);
    expect(Array.from(c.get('y')!)).toEqual([2, 4]);
    expect(() => csvColumns('t.csv', parseCsv('t.csv', 'x,x\n1,2\n'))).toThrow('appears twice');
  });
});

describe('writeCsv', () => {
  it('round-trips random doubles exactly, with and without a header', () => {
    const r = rng(7);
    for (let trial = 0; trial < 20; trial++) {
      const m = matrix(1 + randInt(r, 5), 1 + randInt(r, 5));
      for (let k = 0; k < m.data.length; k++) m.data[k] = (r() - 0.5) * 10 ** (randInt(r, 40) - 20);
      const header = trial % 2 ? Array.from({ length: m.cols }, (_, j) => (j === 0 ? 'a;b' : `c "${j}"`)) : undefined;
      const back = parseCsv('w.csv', writeCsv(m, header));
      expect(back.header).toEqual(header ?? null);
      expect(Array.from(back.matrix.data)).toEqual(Array.from(m.data));
    }
  });
  it('refuses non-finite values', () => {
    expect(() => writeCsv(matrix(1, 1, Float64Array.of(NaN)))).toThrow(RangeError);
  });
});

describe('parseCsv on mutated input (seeded)', () => {
  it('either parses or throws a FileFormatError, never anything else', () => {
    const r = rng(2024);
    const base = 'a,b,c\n1,2,3\n4.5,-6e2,7\n"8",9,10\n';
    let parsed = 0;
    let refused = 0;
    for (let trial = 0; trial < 1500; trial++) {
      const text = mutateText(r, base);
      try {
        const t = parseCsv('m.csv', text);
        expect(t.matrix.data.every(Number.isFinite)).toBe(true);
        parsed++;
      } catch (e) {
        if (!(e instanceof FileFormatError)) throw new Error(`non-FileFormatError for ${JSON.stringify(text)}: ${String(e)}`);
        expect(e.message.startsWith('m.csv: ')).toBe(true);
        refused++;
      }
    }
    // Both outcomes must occur, or the mutations are not exercising the parser.
    expect(parsed).toBeGreaterThan(50);
    expect(refused).toBeGreaterThan(50);
  });
});

/**
 * The battery's CSV cases: each was read wrongly or blamed on the size before.
 * Expected messages are written by hand from the file text.
 */
describe('parseCsv never guesses (seeded corpus of the battery cases)', () => {
  it.each([
    ['bad first row: text beside a number', 'abc,1\n2,3\n', 't.csv: line 1, column 1 must be a finite number, got "abc"'],
    ['first row NaN', 'NaN,1\n2,3\n', 't.csv: line 1, column 1 must be a finite number, got "NaN"'],
    ['first row NaN, one column', 'NaN\n2\n', 't.csv: line 1, column 1 must be a finite number, got "NaN"'],
    ['first row 1e400', '1e400,1\n2,3\n', 't.csv: line 1, column 1 must be a finite number, got "1e400"'],
    ['first row Infinity alone', '-Infinity\n2\n', 't.csv: line 1, column 1 must be a finite number, got "-Infinity"'],
    ['first row hexadecimal', '0x10,1\n2,3\n', 't.csv: line 1, column 1 must be a finite number, got "0x10"'],
    ['quoted NaN first', '"NaN","1"\n2,3\n', 't.csv: line 1, column 1 must be a finite number, got "NaN"'],
    ['bare CR line ends', '1,2\r3,x\r', 't.csv: line 2, column 2 must be a finite number, got "x"'],
    [
      'decimal commas with semicolons',
      '1,25;0,1\n2,5;0,2\n',
      't.csv: line 1, column 1 must be a finite number, got "1,25" (a decimal comma? write numbers with a dot, e.g. 1.25)',
    ],
    [
      'decimal commas under a header',
      'value,sigma\n1,25,0,1\n',
      't.csv: line 2 has 4 columns, expected 2 (as in line 1); if the file uses decimal commas, write numbers with a dot or separate columns by semicolons',
    ],
  ])('%s', (_name, text, message) => {
    expectFileError(() => parseCsv('t.csv', text), message);
  });

  it.each([
    [
      'quoted numbers (RFC 4180) are numbers, not a header',
      '"1","2.5"\n3,"4"\n',
      null,
      [
        [1, 2.5],
        [3, 4],
      ],
    ],
    [
      'bare CR line ends',
      '1,2\r3,4\r',
      null,
      [
        [1, 2],
        [3, 4],
      ],
    ],
    ['bare CR with a header', 'a,b\r1,2\r', ['a', 'b'], [[1, 2]]],
    [
      'mixed line ends',
      '1,2\r\n3,4\r5,6\n7,8',
      null,
      [
        [1, 2],
        [3, 4],
        [5, 6],
        [7, 8],
      ],
    ],
  ])('%s', (_name, text, header, expected) => {
    const t = parseCsv('t.csv', text);
    expect(t.header).toEqual(header);
    expect(rows(t)).toEqual(expected);
  });

  it('keeps the file line of every row, and of the header (bare CR counts as a line end)', () => {
    const t = parseCsv('t.csv', '# c\rx,y\r\r1,2\r3,4\n');
    expect(t.headerLine).toBe(2);
    expect(t.rowLines).toEqual([4, 5]);
    expect(headerNote('t.csv', t)).toBe('t.csv: line 2 read as a header (column names "x,y"), not as numbers');
    expect(headerNote('t.csv', parseCsv('t.csv', '1,2\n'))).toBeNull();
  });

  it('writeCsv refuses header names that would read back as numbers', () => {
    expect(() => writeCsv(matrix(1, 1, Float64Array.of(1)), ['2'])).toThrow(RangeError);
    expect(() => writeCsv(matrix(1, 1, Float64Array.of(1)), ['NaN'])).toThrow(RangeError);
  });
});

describe('parseCsv properties on mutated input (seeded)', () => {
  it('a header has no number-like cell, every value is the number its cell spells, rows keep their lines', () => {
    const r = rng(4403);
    const bases = ['a,b,c\n1,2,3\n4.5,-6e2,7\n"8",9,10\n', '1;2\r3;4\r', '"1",2\r\n3,4\r\n# x\n5,6\n'];
    let parsed = 0;
    for (let trial = 0; trial < 1500; trial++) {
      const text = mutateText(r, bases[trial % bases.length]);
      let t: ReturnType<typeof parseCsv>;
      try {
        t = parseCsv('m.csv', text);
      } catch (e) {
        if (!(e instanceof FileFormatError)) throw e;
        continue;
      }
      parsed++;
      if (t.header) expect(t.header.some(looksNumeric)).toBe(false);
      const lines = text.split(/\r\n|\r|\n/);
      expect(t.rowLines.length).toBe(t.matrix.rows);
      for (let i = 0; i < t.matrix.rows; i++) {
        const raw = lines[t.rowLines[i] - 1];
        if (raw.includes('"')) continue;
        const cells = raw.split(t.delimiter).map((c) => Number(c.trim()));
        expect(cells).toEqual(Array.from(t.matrix.data.subarray(i * t.matrix.cols, (i + 1) * t.matrix.cols)));
      }
    }
    expect(parsed).toBeGreaterThan(100);
  });
});
