/**
 * The battery's JSON cases (issues 16 part 1, 14 part 5, 11 part 7): duplicate keys, a missing
 * field beside an unknown one, angles beyond any rotation, and the field that disagrees with the
 * others. Each failed (or passed silently) before its fix. Expected messages are written by hand.
 */
import { describe, expect, it } from 'vitest';
import { findDuplicateKey, parseJsonText, suggestField } from '../../../src/core/io/json.ts';
import { parsePriorFile } from '../../../src/core/io/priorFile.ts';
import { parseProblemFile } from '../../../src/core/io/problemFile.ts';
import { FileFormatError } from '../../../src/core/io/errors.ts';
import { expectFileError } from './expectError.ts';
import { mutateText, randInt, rng } from './random.ts';

const GRID_1D = { shape: [5], spacing: [0.5] };

describe('duplicate JSON keys are refused, naming the field and line', () => {
  it.each([
    ['{"a": 1, "a": 2}', 'd.json: field a appears twice (line 1); each field may appear once in an object, remove one of them'],
    [
      '{\n "data": {"values": [1],\n  "sigma": [1], "sigma": [2]}}',
      'd.json: field data.sigma appears twice (line 3); each field may appear once in an object, remove one of them',
    ],
    [
      '{"terms": [{"kernel": "x"}, {"length": 1, "len\\u0067th": 2}]}',
      'd.json: field terms[1].length appears twice (line 1); each field may appear once in an object, remove one of them',
    ],
  ])('%j', (text, message) => {
    expectFileError(() => parseJsonText('d.json', text), message);
  });

  it('allows the same name in different objects and strings that look like keys', () => {
    expect(parseJsonText('d.json', '{"a": {"a": 1}, "b": [{"a": 1}, {"a": 2}], "c": "\\"a\\": 1, \\"a\\""}')).toEqual({
      a: { a: 1 },
      b: [{ a: 1 }, { a: 2 }],
      c: '"a": 1, "a"',
    });
  });

  it('a problem file with two data.sigma is refused (the last one used to win)', () => {
    const text =
      '{"kind": "priorscope.problem", "version": 1, "grid": {"shape": [2], "spacing": [1]}, "operator": {"dense": [[1, 0]]}, "data": {"values": [1], "sigma": [0.1], "sigma": [5]}}';
    expectFileError(
      () => parseProblemFile('p.json', text),
      'p.json: field data.sigma appears twice (line 1); each field may appear once in an object, remove one of them',
    );
  });

  it('property: on random objects with and without a repeated key, the finder agrees with a parse of each object (seeded)', () => {
    const r = rng(16);
    for (let t = 0; t < 300; t++) {
      const keys = Array.from({ length: 1 + randInt(r, 5) }, () => 'k' + randInt(r, 6));
      const body = keys.map((k, i) => `"${k}": ${i % 2 ? '[1, {"k0": 2}]' : '"x,\\"y"'}`).join(', ');
      const text = `{"outer": [0, {${body}}]}`;
      const hasDup = new Set(keys).size !== keys.length;
      const found = findDuplicateKey(text);
      expect(found !== null).toBe(hasDup);
      if (found) expect(found.field).toMatch(/^outer\[1\]\.k\d$/);
    }
  });
});

describe('a missing field beside an unknown one says which and suggests', () => {
  it('"range" instead of "length"', () => {
    const text = JSON.stringify({
      kind: 'priorscope.prior',
      version: 1,
      mean: { constant: 0 },
      terms: [{ kernel: 'exponential', variance: 1, range: 3 }],
    });
    expectFileError(
      () => parsePriorFile('q.json', text, { grid: GRID_1D }),
      'q.json: terms[0].length must be a finite number > 0 (or give lengths [l1, l2] in 2-D), got nothing; unknown field terms[0].range given (did you mean length?)',
    );
  });

  it('a typo in a required top-level field', () => {
    const text = JSON.stringify({ kind: 'priorscope.prior', version: 1, maen: { constant: 0 }, terms: [] });
    expectFileError(
      () => parsePriorFile('q.json', text, { grid: GRID_1D }),
      'q.json: mean must be an object with constant, values or trend, got nothing; unknown field maen given (did you mean mean?)',
    );
  });

  it('the warning for an unknown field suggests too; unrelated names get no suggestion', () => {
    expect(suggestField('range', ['kernel', 'variance', 'length'])).toBe('length');
    expect(suggestField('lenght', ['kernel', 'variance', 'length'])).toBe('length');
    expect(suggestField('author', ['kernel', 'variance', 'length'])).toBeNull();
  });
});

describe('angles and the odd field out', () => {
  it('an angle of 1e308 is refused at the field', () => {
    const text = JSON.stringify({
      kind: 'priorscope.prior',
      version: 1,
      mean: { constant: 0 },
      terms: [{ kernel: 'exponential', variance: 1, lengths: [1, 2], angle: 1e308 }],
    });
    expectFileError(
      () => parsePriorFile('q.json', text, { grid: { shape: [3, 3], spacing: [1, 1] } }),
      'q.json: terms[0].angle must be an angle in degrees from -360 to 360, got 1e+308',
    );
  });

  it('3 operator rows, 3 sigmas, 4 values: data.values is named', () => {
    const text = JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      grid: { shape: [2], spacing: [1] },
      operator: {
        dense: [
          [1, 0],
          [0, 1],
          [1, 1],
        ],
      },
      data: { values: [1, 2, 3, 4], sigma: [0.1, 0.1, 0.1] },
    });
    expectFileError(
      () => parseProblemFile('p.json', text),
      'p.json: data.values must be an array of 3 numbers (as data.sigma and operator.dense have 3), got an array of length 4',
    );
  });

  it('4 values, 4 sigmas, 3 operator rows: the operator is named', () => {
    const text = JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      grid: { shape: [2], spacing: [1] },
      operator: {
        dense: [
          [1, 0],
          [0, 1],
          [1, 1],
        ],
      },
      data: { values: [1, 2, 3, 4], sigma: [0.1, 0.1, 0.1, 0.1] },
    });
    expect(() => parseProblemFile('p.json', text)).toThrow('p.json: operator.dense must be an array of 4 rows');
  });
});

describe('JSON problem and prior on mutated input (seeded): parse or one-line FileFormatError', () => {
  it('never anything else, and a parsed file has no duplicate keys', () => {
    const r = rng(1614);
    const base =
      '{"kind": "priorscope.prior", "version": 1, "mean": {"constant": 0}, "terms": [{"kernel": "exponential", "variance": 1, "length": 3}]}';
    let parsed = 0;
    let refused = 0;
    for (let t = 0; t < 1500; t++) {
      const text = mutateText(r, base);
      try {
        parsePriorFile('m.json', text, { grid: GRID_1D });
        expect(findDuplicateKey(text)).toBeNull();
        parsed++;
      } catch (e) {
        if (!(e instanceof FileFormatError)) throw new Error(`non-FileFormatError for ${JSON.stringify(text)}: ${String(e)}`);
        expect(e.message.includes('\n')).toBe(false);
        refused++;
      }
    }
    expect(parsed).toBeGreaterThan(5); // most edits break the JSON syntax
    expect(refused).toBeGreaterThan(20);
  });
});
