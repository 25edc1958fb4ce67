import { describe, expect, it } from 'vitest';
import { parseProblemFile, writeProblemFile } from '../../../src/core/io/problemFile.ts';
import { gridProblem } from '../../../src/core/problems/spec.ts';
import { parseGeometryCsv } from '../../../src/core/io/geometryCsv.ts';
import { assembleProblem } from '../../../src/core/io/pieces.ts';
import { toRows } from '../../../src/core/linalg/matrix.ts';
import type { DataGeometry } from '../../../src/core/problems/spec.ts';
import { DEMOS } from '../../../src/core/problems/demos.ts';
import { expectFileError } from './expectError.ts';
import type { FileWarning } from '../../../src/core/io/errors.ts';

// Invented problems: three data on a 2 × 2 section (cells 10 m, first centre at (5, 5), so the
// grid spans 0–20 m along both axes), and three data on a 4-cell 1-D grid.
const twoD = (data: Record<string, unknown>, grid: Record<string, unknown> = {}) =>
  JSON.stringify({
    kind: 'priorscope.problem',
    version: 1,
    grid: { shape: [2, 2], spacing: [10, 10], origin: [5, 5], unit: 'm', axes: ['x', 'depth'], ...grid },
    operator: {
      dense: [
        [1, 0, 0, 1],
        [0, 1, 1, 0],
        [1, 1, 1, 1],
      ],
    },
    data: { values: [1, 2, 3], sigma: [0.1, 0.2, 0.3], ...data },
  });
const oneD = (data: Record<string, unknown>) =>
  JSON.stringify({
    kind: 'priorscope.problem',
    version: 1,
    grid: { shape: [4], spacing: [1] },
    operator: {
      dense: [
        [1, 0, 0, 0],
        [0, 1, 0, 0],
        [0, 0, 1, 1],
      ],
    },
    data: { values: [1, 2, 3], sigma: [0.1, 0.2, 0.3], ...data },
  });

const rowsOf = (g: DataGeometry | undefined) =>
  g === undefined
    ? undefined
    : g.kind === 'points'
      ? { positions: toRows(g.positions) }
      : { sources: toRows(g.sources), receivers: toRows(g.receivers) };

const SOURCES = [
  [0, 2],
  [0, 12],
  [0, 18],
];
const RECEIVERS = [
  [20, 3],
  [20, 15],
  [20, 19.5],
];

describe('data geometry in problem files', () => {
  it('reads positions in 1-D and 2-D (also outside the grid) and writes them back unchanged', () => {
    const a = parseProblemFile('a.json', oneD({ positions: [[0.5], [1.5], [-3]] }));
    expect(a.warnings).toEqual([]);
    expect(rowsOf(a.problem.data.geometry)).toEqual({ positions: [[0.5], [1.5], [-3]] });
    // Stations 1 m above a section whose top edge is at depth 0: outside the grid, accepted without a warning.
    const stations = [
      [5, -1],
      [15, -1],
      [25.5, -1],
    ];
    const b = parseProblemFile('b.json', twoD({ positions: stations }));
    expect(b.warnings).toEqual([]);
    expect(rowsOf(b.problem.data.geometry)).toEqual({ positions: stations });
    for (const p of [a.problem, b.problem]) {
      const again = parseProblemFile('again.json', writeProblemFile(p).json).problem;
      expect(rowsOf(again.data.geometry)).toEqual(rowsOf(p.data.geometry));
    }
  });

  it('reads sources and receivers and writes them back unchanged', () => {
    const { problem, warnings } = parseProblemFile('p.json', twoD({ sources: SOURCES, receivers: RECEIVERS }));
    expect(warnings).toEqual([]);
    expect(rowsOf(problem.data.geometry)).toEqual({ sources: SOURCES, receivers: RECEIVERS });
    const json = writeProblemFile(problem).json;
    expect(JSON.parse(json).data.sources).toEqual(SOURCES);
    expect(rowsOf(parseProblemFile('q.json', json).problem.data.geometry)).toEqual({ sources: SOURCES, receivers: RECEIVERS });
  });

  it('leaves the geometry out when absent', () => {
    const { problem } = parseProblemFile('p.json', twoD({}));
    expect(problem.data.geometry).toBeUndefined();
    expect(JSON.parse(writeProblemFile(problem).json).data).not.toHaveProperty('positions');
  });

  it('warns when a path misses the grid entirely, naming the rows, the grid outline and what to check', () => {
    // Path 1 runs above the section (depth −5 to −1); path 2 crosses it; path 0 touches only its corner (0, 0).
    const sources = [
      [-10, 10],
      [-5, -5],
      [0, 18],
    ];
    const receivers = [
      [10, -10],
      [30, -1],
      [20, 19],
    ];
    const { warnings } = parseProblemFile('p.json', twoD({ sources, receivers }));
    expect(warnings.map((w) => w.message)).toEqual([
      'p.json: 1 of 3 paths (data.sources → data.receivers, row 1) miss the grid entirely (it spans x 0 to 20 m, depth 0 to 20 m); ' +
        'check grid.origin (the first cell centre) and the order of grid.shape [nx, ny]',
    ]);
    // The same rays on a grid whose shape was swapped to [1, 4] with 10 m cells: the section is 10 m wide,
    // 40 m deep, so the ray to x = 30 m still crosses it, but with the origin moved 100 m away all miss.
    const moved = parseProblemFile('p.json', twoD({ sources, receivers }, { origin: [105, 5] }));
    expect(moved.warnings[0].message).toContain(
      '3 of 3 paths (data.sources → data.receivers, rows 0, 1 and 2) miss the grid entirely (it spans x 100 to 120 m',
    );
  });

  it.each([
    [
      'positions with a wrong count',
      oneD({ positions: [[0], [1]] }),
      'a.json: data.positions must be an array of 3 rows [x] (one per datum in data.values), got an array of length 2',
    ],
    [
      'a 2-D position on a 1-D grid',
      oneD({ positions: [[0], [1, 2], [3]] }),
      'a.json: data.positions[1] must be [x]: an array of 1 number, got an array of length 2',
    ],
    [
      'a missing coordinate',
      twoD({ positions: [[0, 1], [1, 2], [3]] }),
      'a.json: data.positions[2] must be [x, depth]: an array of 2 numbers, got an array of length 1',
    ],
    [
      'a non-finite coordinate',
      twoD({
        positions: [
          [0, 1],
          [1, null],
          [3, 4],
        ],
      }),
      'a.json: data.positions[1][1] must be a finite number, got null',
    ],
    [
      'a string coordinate',
      twoD({
        sources: SOURCES,
        receivers: [
          [20, 3],
          ['20', 15],
          [20, 19],
        ],
      }),
      'a.json: data.receivers[1][0] must be a finite number, got "20"',
    ],
    [
      'a row that is not an array',
      twoD({ positions: [[0, 1], 7, [3, 4]] }),
      'a.json: data.positions[1] must be [x, depth]: an array of 2 numbers, got 7',
    ],
    [
      'sources without receivers',
      twoD({ sources: SOURCES }),
      'a.json: data.receivers must be an array of 3 rows [x, depth] (given with data.sources: each path has both ends), got nothing',
    ],
    [
      'receivers without sources',
      twoD({ receivers: RECEIVERS }),
      'a.json: data.sources must be an array of 3 rows [x, depth] (given with data.receivers: each path has both ends), got nothing',
    ],
    [
      'too few receivers',
      twoD({ sources: SOURCES, receivers: RECEIVERS.slice(1) }),
      'a.json: data.receivers must be an array of 3 rows [x, depth] (one per datum in data.values), got an array of length 2',
    ],
    [
      'positions and paths together',
      twoD({
        positions: [
          [0, 1],
          [1, 2],
          [3, 4],
        ],
        sources: SOURCES,
        receivers: RECEIVERS,
      }),
      'a.json: data must be an object with either positions (point data) or sources and receivers (path data), not both, got "both"',
    ],
    [
      'paths on a 1-D grid',
      oneD({ sources: [[0], [1], [2]], receivers: [[1], [2], [3]] }),
      'a.json: data.sources must be absent on a 1-D grid (paths need a 2-D or 3-D grid; give data.positions [[x], …] for point data), got an array of length 3',
    ],
    ['positions not an array', twoD({ positions: 'stations.csv' }), 'a.json: data.positions must be an array of rows, got "stations.csv"'],
  ])('refuses %s, in one line naming the field and row', (_what, text, message) => {
    expectFileError(() => parseProblemFile('a.json', text), message);
  });
});

describe('the geometry CSV of the pieces form', () => {
  const grid2 = { shape: [2, 2], spacing: [10, 10], origin: [5, 5], unit: 'm' };
  const grid1 = { shape: [4], spacing: [1] };

  it('reads x, x,y (columns in any order, any case) and sx,sy,rx,ry', () => {
    expect(rowsOf(parseGeometryCsv('g.csv', 'x\n0.5\n1.5\n-3\n', grid1, 3).geometry)).toEqual({ positions: [[0.5], [1.5], [-3]] });
    expect(rowsOf(parseGeometryCsv('g.csv', 'Y,X\n-1,5\n-1,15\n-1,25.5\n', grid2, 3).geometry)).toEqual({
      positions: [
        [5, -1],
        [15, -1],
        [25.5, -1],
      ],
    });
    const csv = 'sx,sy,rx,ry\n' + SOURCES.map((s, k) => [...s, ...RECEIVERS[k]].join(',')).join('\n');
    const r = parseGeometryCsv('g.csv', csv, grid2, 3);
    expect(r.warnings).toEqual([]);
    expect(rowsOf(r.geometry)).toEqual({ sources: SOURCES, receivers: RECEIVERS });
  });

  it('warns about a path that misses the grid, in the form’s words', () => {
    const r = parseGeometryCsv('g.csv', 'sx,sy,rx,ry\n0,2,20,3\n-5,-5,30,-1\n0,18,20,19\n', grid2, 3);
    expect(r.warnings.map((w) => w.message)).toEqual([
      'g.csv: 1 of 3 paths (sx,sy → rx,ry, row 1) miss the grid entirely (it spans x 0 to 20 m, y 0 to 20 m); check the origin x0, y0 (the first cell centre) and the order of nx and ny',
    ]);
  });

  it.each([
    [
      'no header',
      '1,2\n3,4\n5,6\n',
      grid2,
      'g.csv: must start with a header line naming the columns: x,y (positions) or sx,sy,rx,ry (sources and receivers of paths)',
    ],
    [
      'a wrong header',
      'x,z\n1,2\n3,4\n5,6\n',
      grid2,
      'g.csv: header (line 1) must name the columns x,y (positions) or sx,sy,rx,ry (sources and receivers of paths), got "x,z"',
    ],
    [
      'paths on a 1-D grid',
      'sx,sy,rx,ry\n0,0,1,1\n0,0,1,1\n0,0,1,1\n',
      grid1,
      'g.csv: header (line 1) must name the columns x (positions on a 1-D grid) (paths need a 2-D grid), got "sx,sy,rx,ry"',
    ],
    ['too few rows', 'x,y\n1,2\n3,4\n', grid2, 'g.csv: must have 3 rows of coordinates (one per datum in d.csv), got 2'],
    ['a bad number', 'x,y\n1,2\n3,abc\n5,6\n', grid2, 'g.csv: line 3, column 2 must be a finite number, got "abc"'],
  ])('refuses %s', (_what, text, grid, message) => {
    expectFileError(() => parseGeometryCsv('g.csv', text, grid, 3, 'd.csv'), message);
  });

  it('is read with the pieces, with the data unit, and the problem writes to a file that reads back the same', () => {
    const enc = (s: string) => new TextEncoder().encode(s);
    const warnings: FileWarning[] = [];
    const problem = assembleProblem(
      {
        grid: { shape: [2, 2], spacing: [10, 10], origin: [5, 5] },
        operator: { name: 'G.csv', bytes: enc('1,0,0,1\n0,1,1,0\n1,1,1,1\n') },
        data: { name: 'd.csv', bytes: enc('value,sigma\n1.5,0.1\n2.5,0.2\n3.5,0.3\n') },
        geometry: { name: 'rays.csv', bytes: enc('sx,sy,rx,ry\n0,2,20,3\n0,12,20,15\n0,18,20,19.5\n') },
        dataUnit: ' ms ',
      },
      warnings,
    );
    expect(problem.data.unit).toBe('ms');
    expect(rowsOf(problem.data.geometry)).toEqual({ sources: SOURCES, receivers: RECEIVERS });
    const again = parseProblemFile('p.json', writeProblemFile(problem).json).problem;
    expect(rowsOf(again.data.geometry)).toEqual(rowsOf(problem.data.geometry));
    expect(again.data.unit).toBe('ms');
  });

  it('refuses a geometry file that is not CSV', () => {
    const enc = (s: string) => new TextEncoder().encode(s);
    expectFileError(
      () =>
        assembleProblem({
          grid: { shape: [2], spacing: [1] },
          operator: { name: 'G.csv', bytes: enc('1.0,0\n0,1.0\n') },
          data: { name: 'd.csv', bytes: enc('value,sigma\n1.5,0.1\n2.5,0.2\n') },
          geometry: { name: 'g.npy', bytes: enc('x') },
        }),
      'g.npy: cannot be read as the data geometry: the name must end in .csv',
    );
  });
});

describe('the built-in demos carry their geometry', () => {
  it('the gravity stations 50 m apart 1 m above the section, the crosshole ray ends in the holes, the borehole sensors', () => {
    const built = Object.fromEntries(DEMOS.map((d) => [d.id, d.build().problem]));
    const grav = built['potential-field'].data.geometry!;
    expect(grav.kind).toBe('points');
    const pos = toRows((grav as { positions: import('../../../src/core/linalg/matrix.ts').Matrix }).positions);
    expect(pos.length).toBe(40);
    expect(pos[1][0] - pos[0][0]).toBe(50);
    expect(pos.every((p) => p[1] === -1)).toBe(true);
    const cross = built['crosshole-tomography'].data.geometry!;
    expect(cross.kind).toBe('paths');
    if (cross.kind === 'paths') {
      expect(cross.sources.rows).toBe(256);
      expect(toRows(cross.sources).every((s) => s[0] === 0)).toBe(true);
      expect(toRows(cross.receivers).every((s) => s[0] === 16)).toBe(true);
    }
    const bore = built['borehole-log'].data.geometry!;
    expect(bore.kind === 'points' && bore.positions.cols === 1 && bore.positions.rows === 50).toBe(true);
    // Every demo writes a problem file that reads back with its geometry and no warning.
    for (const p of Object.values(built)) {
      const r = parseProblemFile('demo.json', writeProblemFile(p).json);
      expect(r.warnings).toEqual([]);
      expect(rowsOf(r.problem.data.geometry)).toEqual(rowsOf(p.data.geometry));
    }
  });
});

describe('the geometry reaches the views', () => {
  it('problemView carries the problem’s geometry (null without one)', async () => {
    const { problemView } = await import('../../../src/worker/engine.ts');
    const extra = { demoId: null, description: '', startPrior: null, truthPrior: null };
    const withGeo = gridProblem(parseProblemFile('p.json', twoD({ sources: SOURCES, receivers: RECEIVERS })).problem, 'this test');
    expect(rowsOf(problemView(withGeo, 1, extra).geometry ?? undefined)).toEqual({ sources: SOURCES, receivers: RECEIVERS });
    expect(problemView(gridProblem(parseProblemFile('p.json', twoD({})).problem, 'this test'), 1, extra).geometry).toBeNull();
  });
});
