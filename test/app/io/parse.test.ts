/** Picking the problem file among several files, and the sibling lookup (src/app/io/parse.ts). */
import { describe, expect, it } from 'vitest';
import { parseRequest } from '../../../src/app/io/parse.ts';
import { FileFormatError } from '../../../src/core/io/errors.ts';

const enc = (s: string) => new TextEncoder().encode(s);
const problem = (file: string) =>
  JSON.stringify({
    kind: 'priorscope.problem',
    version: 1,
    title: 'P',
    grid: { shape: [2], spacing: [1] },
    operator: { file },
    data: { values: [1], sigma: [1] },
  });

function message(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(FileFormatError);
    return (e as Error).message;
  }
  throw new Error('expected a FileFormatError');
}

describe('parseRequest problemFiles', () => {
  it('reads the .json and the sibling it names, by base name', () => {
    const r = parseRequest({
      kind: 'problemFiles',
      files: [
        { name: 'G.csv', bytes: enc('0.5,0.5\n') },
        { name: 'p.json', bytes: enc(problem('sub/G.csv')) },
      ],
    });
    expect(r.kind).toBe('problem');
    if (r.kind === 'problem') {
      expect(r.label).toBe('p.json');
      expect(Array.from(r.problem.operator.kind === 'dense' ? r.problem.operator.matrix.data : [])).toEqual([0.5, 0.5]);
    }
  });
  it.each([
    [
      [{ name: 'p.json', text: problem('G.mtx') }],
      'p.json: operator.file "G.mtx" could not be read: it was not among the chosen files (choose G.mtx together with p.json)',
    ],
    [
      [{ name: 'G.csv', text: '1\n' }],
      'G.csv: none of the chosen files is a problem file (.json); to load G and data files without one, use "Load from pieces"',
    ],
    [
      [
        { name: 'a.json', text: '{}' },
        { name: 'b.json', text: '{}' },
      ],
      'a.json, b.json: choose exactly one problem .json file (with the files it names)',
    ],
    [
      [
        { name: 'p.json', text: problem('G.csv') },
        { name: 'G.csv', text: '1,2\n3,x\n' },
      ],
      'G.csv: line 2, column 2 must be a finite number, got "x"',
    ],
  ])('refuses %#', (files, expected) => {
    expect(message(() => parseRequest({ kind: 'problemFiles', files: files.map((f) => ({ name: f.name, bytes: enc(f.text) })) }))).toBe(
      expected,
    );
  });
});

describe('parseRequest: 3-D problems', () => {
  it('loads a 3-D grid (the workbench shows it as sections) with its 3-D positions', () => {
    const text = JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      grid: { shape: [1, 1, 2], spacing: [1, 1, 1] },
      operator: { dense: [[1, 1]] },
      data: { values: [1], sigma: [1], positions: [[0, 0, -1]] },
    });
    const r = parseRequest({ kind: 'problemFiles', files: [{ name: 'v.json', bytes: enc(text) }] });
    if (r.kind !== 'problem') throw new Error(`expected a problem, got ${r.kind}`);
    expect(r.problem.grid).toMatchObject({ shape: [1, 1, 2] });
    expect(r.problem.data.geometry?.kind).toBe('points');
  });
});
