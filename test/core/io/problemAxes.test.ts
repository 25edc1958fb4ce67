import { describe, expect, it } from 'vitest';
import { parseProblemFile, writeProblemFile } from '../../../src/core/io/problemFile.ts';
import { expectFileError } from './expectError.ts';

// An invented 2 × 4 problem on a 2 × 2 horizontal grid (a trench: both axes horizontal).
const problem = (grid: Record<string, unknown>) =>
  JSON.stringify({
    kind: 'priorscope.problem',
    version: 1,
    grid: { shape: [2, 2], spacing: [1, 1], ...grid },
    operator: {
      dense: [
        [1, 0, 0, 1],
        [0, 1, 1, 0],
      ],
    },
    data: { values: [1, 2], sigma: [0.1, 0.2] },
  });

describe('grid.axes in problem files', () => {
  it('reads axis names, trims them, and writes them back', () => {
    const { problem: p, warnings } = parseProblemFile('t.json', problem({ axes: [' easting', 'northing '] }));
    expect(warnings).toEqual([]);
    expect(p.grid.axes).toEqual(['easting', 'northing']);
    const again = parseProblemFile('t2.json', writeProblemFile(p).json).problem;
    expect(again.grid.axes).toEqual(['easting', 'northing']);
  });

  it('leaves them out when absent', () => {
    expect(parseProblemFile('t.json', problem({})).problem.grid.axes).toBeUndefined();
  });

  it.each([
    ['one name on a 2-D grid', ['x'], 't.json: grid.axes must be an array of 2 names (strings), got an array of length 1'],
    ['a number', ['x', 3], 't.json: grid.axes[1] must be a string, got 3'],
    ['an empty name', ['x', '  '], 't.json: grid.axes[1] must be a name of 1 to 40 characters, got ""'],
    ['the same name twice', ['x', 'x'], 't.json: grid.axes[1] must be a name different from grid.axes[0], got "x"'],
    ['not an array', 'x', 't.json: grid.axes must be an array of 2 names (strings), got "x"'],
  ])('rejects %s', (_what, axes, message) => {
    expectFileError(() => parseProblemFile('t.json', problem({ axes })), message);
  });
});
