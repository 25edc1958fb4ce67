/**
 * Cell lists (the user's own mesh): Cm from pairwise offsets of the centres, the mean forms and the dense
 * posterior, against test/reference/cells_reference.py (scipy.spatial.distance.cdist on rotated, scaled centres
 * with R = Rz·Ry·Rx written out; model-space posterior, Tarantola 2005 eq. 3.37–3.38) to 1e-8; and a cell list
 * whose centres are those of a regular grid against the grid route (lag table) to 1e-12.
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/core/errors.ts';
import { type CellList, cellCoordinates, cellCount, type Geometry, type Grid } from '../../src/core/grid/grid.ts';
import { computePosterior, computePosteriorSerial } from '../../src/core/inverse/compute.ts';
import { choosePosteriorPath } from '../../src/core/inverse/auto.ts';
import { readCellList } from '../../src/core/io/cellList.ts';
import { parseProblemFile } from '../../src/core/io/problemFile.ts';
import { KERNEL_NAMES } from '../../src/core/kernels/spec.ts';
import { matrix } from '../../src/core/linalg/matrix.ts';
import { covarianceRow, MAX_CELL_LIST } from '../../src/core/prior/cells.ts';
import { covarianceApply, covarianceMatrix, meanVector, priorVariance } from '../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { runPython } from './python.ts';

function maxDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  expect(a.length).toBe(b.length);
  let d = 0;
  let s = 0;
  for (let i = 0; i < a.length; i++) {
    d = Math.max(d, Math.abs(a[i] - b[i]));
    s = Math.max(s, Math.abs(b[i]));
  }
  return d / s;
}

/** A made-up smooth operator: M weighted averages over Gaussian blobs around fixed points of the cloud. */
function operatorFor(p: number[][], m: number): { G: Float64Array; d: number[]; sigma: number[] } {
  const n = p.length;
  const G = new Float64Array(m * n);
  for (let k = 0; k < m; k++) {
    const c = p[(7 * k) % n];
    for (let i = 0; i < n; i++) {
      const r2 = p[i].reduce((a, x, j) => a + (x - c[j]) ** 2, 0);
      G[k * n + i] = Math.exp(-r2 / 6) * (1 + 0.1 * Math.sin(k + i));
    }
  }
  const d = Array.from({ length: m }, (_, k) => Math.sin(0.7 * k) + 0.3 * Math.cos(1.3 * k));
  const sigma = Array.from({ length: m }, (_, k) => 0.05 + 0.01 * (k % 3));
  return { G, d, sigma };
}

/** The posterior through the one entry (computePosteriorSerial), which must send a cell list to the dense route. */
function densePosterior(cells: CellList, prior: PriorSpec, G: Float64Array, d: number[], sigma: number[]) {
  const n = cellCount(cells);
  const problem: Problem<Geometry> = {
    grid: cells,
    operator: { kind: 'dense', matrix: { rows: d.length, cols: n, data: G } },
    data: { values: Float64Array.from(d), sigma: Float64Array.from(sigma) },
  };
  const r = computePosteriorSerial(problem, prior);
  expect(r.decision.path).toBe('dense');
  expect(r.decision.reason).toMatch(/cell list/);
  return r.summary;
}

/** Deterministic irregular cloud (a scrambled lattice with jitter): n points in dim dimensions. */
function cloud(n: number, dim: number, scale: number[]): number[][] {
  return Array.from({ length: n }, (_, i) =>
    Array.from({ length: dim }, (_, k) => scale[k] * (((i * (k + 3) * 0.618034) % 1) + 0.2 * Math.sin(1.7 * i + k))),
  );
}

function cellsOf(p: number[][]): CellList {
  return readCellList({ centres: p });
}

const cases: { name: string; centres: number[][]; prior: PriorSpec }[] = [
  ...KERNEL_NAMES.map((kernel) => {
    const centres = cloud(70, 2, [10, 6]);
    return {
      name: `2-D, ${kernel}, lengths [4, 1.5] angle 35°, nugget, trend`,
      centres,
      prior: {
        mean: { trend: { intercept: 0.4, slope: [0.1, -0.3] } },
        terms: [{ kernel, variance: 1.7, lengths: [4, 1.5] as const, angle: 35, ...(kernel === 'matern' && { nu: 1.5 }) }],
        nugget: 0.03,
      } satisfies PriorSpec,
    };
  }),
  ...KERNEL_NAMES.map((kernel) => {
    const centres = cloud(90, 3, [8, 6, 4]);
    return {
      name: `3-D, ${kernel}, lengths [4, 2.5, 1.5] angles [30, −20, 50], std profile, values mean`,
      centres,
      prior: {
        mean: { values: centres.map((_, i) => Math.cos(0.3 * i)) },
        terms: [
          { kernel, variance: 2, lengths: [4, 2.5, 1.5] as const, angles: [30, -20, 50] as const, ...(kernel === 'matern' && { nu: 2.5 }) },
          { kernel: 'gaussian', variance: 0.5, length: 2 },
        ],
        nugget: 0.05,
        stdProfile: centres.map((_, i) => 1 + 0.3 * Math.sin(0.2 * i)),
      } satisfies PriorSpec,
    };
  }),
  {
    name: '1-D, exponential + matern ν = 0.5 sum, constant mean',
    centres: cloud(40, 1, [20]),
    prior: {
      mean: { constant: -1 },
      terms: [
        { kernel: 'exponential', variance: 1, length: 3 },
        { kernel: 'matern', variance: 0.4, length: 1, nu: 0.5 },
      ],
      nugget: 0.01,
    },
  },
];

describe('cell lists against scipy (cdist on rotated centres, model-space posterior)', () => {
  const ops = cases.map((c) => operatorFor(c.centres, 12));
  const refs = runPython<{ Cm: number[]; m0: number[]; mean: number[]; std: number[] }[]>(
    'cells_reference.py',
    cases.map((c, k) => ({ centres: c.centres, prior: c.prior, G: Array.from(ops[k].G), d: ops[k].d, sigma: ops[k].sigma })),
  );
  cases.forEach((c, k) => {
    it(`${c.name}: Cm, m0, posterior mean and std to 1e-8`, () => {
      const cells = cellsOf(c.centres);
      const Cm = covarianceMatrix(cells, c.prior);
      expect(maxDiff(Cm.data, refs[k].Cm)).toBeLessThan(1e-12);
      expect(maxDiff(meanVector(cells, c.prior), refs[k].m0)).toBeLessThan(1e-12);
      const n = c.centres.length;
      const diag = Float64Array.from({ length: n }, (_, i) => refs[k].Cm[i * n + i]);
      expect(maxDiff(priorVariance(cells, c.prior), diag)).toBeLessThan(1e-12);
      const x = Float64Array.from({ length: n }, (_, i) => Math.cos(0.37 * i));
      const yRef = Array.from({ length: n }, (_, i) => refs[k].Cm.slice(i * n, (i + 1) * n).reduce((a, v, j) => a + v * x[j], 0));
      expect(maxDiff(covarianceApply(cells, c.prior)(x), yRef)).toBeLessThan(1e-12);
      // One row without forming Cm (the screens' correlation with a chosen cell).
      for (const i of [0, 5, n - 1])
        expect(maxDiff(covarianceRow(cells, c.prior, i), refs[k].Cm.slice(i * n, (i + 1) * n))).toBeLessThan(1e-12);
      const s = densePosterior(cells, c.prior, ops[k].G, ops[k].d, ops[k].sigma);
      expect(maxDiff(s.mean, refs[k].mean)).toBeLessThan(1e-8);
      expect(maxDiff(s.std, refs[k].std)).toBeLessThan(1e-8);
    });
  });
});

describe('a cell list with the centres of a regular grid equals the grid route', () => {
  const grids: Grid[] = [
    { shape: [9, 7], spacing: [1.5, 0.8], origin: [3, -2] },
    { shape: [6, 5, 4], spacing: [1, 1.5, 0.8], origin: [10, -3, 2] },
    { shape: [25], spacing: [0.5], origin: [1] },
  ];
  for (const grid of grids) {
    const dim = grid.shape.length;
    const n = cellCount(grid);
    const { x, y, z } = cellCoordinates(grid);
    const centres = Array.from({ length: n }, (_, i) => [x[i], y[i], z[i]].slice(0, dim));
    const term =
      dim === 3
        ? { kernel: 'matern' as const, nu: 1.5, variance: 1.2, lengths: [4, 2, 1.5] as const, angles: [25, 10, -40] as const }
        : dim === 2
          ? { kernel: 'spherical' as const, variance: 1.2, lengths: [5, 2] as const, angle: -30 }
          : { kernel: 'gaussian' as const, variance: 1.2, length: 2 };
    const prior: PriorSpec = {
      mean: { trend: { intercept: 1, slope: [0.2, -0.1, 0.05].slice(0, dim) } },
      terms: [term, { kernel: 'exponential', variance: 0.3, length: 1 }],
      nugget: 0.02,
      stdProfile: Array.from({ length: n }, (_, i) => 1 + 0.2 * Math.cos(0.3 * i)),
    };
    it(`${grid.shape.join(' × ')}: Cm, m0, posterior mean and std to 1e-12`, () => {
      const cells = cellsOf(centres);
      expect(maxDiff(covarianceMatrix(cells, prior).data, covarianceMatrix(grid, prior).data)).toBeLessThan(1e-12);
      expect(maxDiff(meanVector(cells, prior), meanVector(grid, prior))).toBeLessThan(1e-12);
      const full = covarianceMatrix(grid, prior);
      for (const i of [0, 7, n - 1])
        expect(maxDiff(covarianceRow(grid, prior, i), full.data.subarray(i * n, (i + 1) * n))).toBeLessThan(1e-12);
      const { G, d, sigma } = operatorFor(centres, 10);
      const onGrid = computePosteriorSerial(
        {
          grid,
          operator: { kind: 'dense', matrix: { ...matrix(d.length, n), data: G } },
          data: { values: Float64Array.from(d), sigma: Float64Array.from(sigma) },
        },
        prior,
      );
      const onCells = densePosterior(cells, prior, G, d, sigma);
      expect(maxDiff(onCells.mean, onGrid.summary.mean)).toBeLessThan(1e-12);
      expect(maxDiff(onCells.std, onGrid.summary.std)).toBeLessThan(1e-12);
    });
  }
});

describe('readCellList: errors name the field and row', () => {
  const bad: [unknown, string][] = [
    [{ centres: [[0, 1], [2], [3, 4]] }, 'cells.centres[1]'],
    [
      {
        centres: [
          [0, 1],
          [2, 'a'],
        ],
      },
      'cells.centres[1][1]',
    ],
    [
      {
        centres: [
          [0, 1],
          [2, null],
        ],
      },
      'cells.centres[1][1]',
    ],
    [{ centres: [[0, 1, 2, 3]] }, 'cells.centres[0]'],
    [{ centres: [] }, 'cells.centres[0]'],
    [{ centres: 'mesh.npy' }, 'cells.centres'],
    [{ centres: [[0], [1]], volumes: [1] }, 'cells.volumes'],
    [{ centres: [[0], [1]], volumes: [1, -2] }, 'cells.volumes[1]'],
    [{ centres: [[0], [1]], volume: [1, 2] }, 'cells.volume'],
    [
      {
        centres: [
          [0, 0],
          [1, 1],
        ],
        axes: ['x'],
      },
      'cells.axes',
    ],
    [[[0, 1]], 'cells'],
  ];
  for (const [value, field] of bad) {
    it(`${JSON.stringify(value)} → ${field}`, () => {
      let err: unknown;
      try {
        readCellList(value);
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(InputError);
      expect((err as InputError).field).toBe(field);
    });
  }

  it('accepts an n × d matrix (a sibling .npy) and keeps the volumes', () => {
    const c = readCellList({ centres: 'mesh.npy', volumes: [1, 2, 3] }, { rows: 3, cols: 2, data: Float64Array.from([0, 1, 2, 3, 4, 5]) });
    expect(c.dim).toBe(2);
    expect(Array.from(c.y)).toEqual([1, 3, 5]);
    expect(Array.from(c.z)).toEqual([0, 0, 0]);
    expect(Array.from(c.volumes ?? [])).toEqual([1, 2, 3]);
  });

  it(`refuses more than ${MAX_CELL_LIST} centres with a message saying what to do`, () => {
    const centres = Array.from({ length: MAX_CELL_LIST + 1 }, (_, i) => [i]);
    expect(() => readCellList({ centres })).toThrow(/at most 8192 cell centres.*coarsen the mesh/);
  });

  it('validates the prior against the cell list (trend slope per axis, lengths per dimension)', () => {
    const cells = readCellList({
      centres: [
        [0, 0],
        [1, 2],
      ],
    });
    expect(() => meanVector(cells, { mean: { trend: { intercept: 0, slope: [1] } }, terms: [] })).toThrow(/mean.trend.slope/);
    expect(() =>
      covarianceMatrix(cells, {
        mean: { constant: 0 },
        terms: [{ kernel: 'gaussian', variance: 1, lengths: [1, 2, 3], angles: [0, 0, 0] }],
      }),
    ).toThrow(/terms\[0\]/);
  });
});

describe('problem files', () => {
  it('read a `cells` field into a cell list; a file with both grid and cells is refused naming cells', () => {
    const file = {
      kind: 'priorscope.problem',
      version: 1,
      cells: { centres: [[0], [1.5]], volumes: [1, 2] },
      operator: { dense: [[1, 1]] },
      data: { values: [1], sigma: [0.1] },
    };
    const g = parseProblemFile('p.json', JSON.stringify(file)).problem.grid;
    expect(g).toMatchObject({ kind: 'cells', dim: 1 });
    expect(cellCoordinates(g).x).toEqual(Float64Array.from([0, 1.5]));
    const both = JSON.stringify({ ...file, grid: { shape: [2], spacing: [1] } });
    expect(() => parseProblemFile('p.json', both)).toThrow(/p\.json: cells must be absent when grid is given/);
  });
});

describe('route decision on a cell list', () => {
  const n = 300;
  const cells = readCellList({ centres: Array.from({ length: n }, (_, i) => [i % 20, Math.floor(i / 20)]) });
  const problem: Problem<Geometry> = {
    grid: cells,
    operator: { kind: 'dense', matrix: { rows: 1, cols: n, data: new Float64Array(n).fill(1) } },
    data: { values: Float64Array.from([1]), sigma: Float64Array.from([0.1]) },
  };
  const prior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 3 }] };
  it('auto picks dense with a stated reason even above the FFT threshold; fft is refused naming the field', () => {
    expect(choosePosteriorPath(problem, prior, 'auto')).toEqual({
      path: 'dense',
      reason: expect.stringMatching(/dense: a cell list \(300 centres\)/),
    });
    expect(() => choosePosteriorPath(problem, prior, 'fft', '--path')).toThrow(/--path must be "dense" or "auto".*cell list/);
    expect(() => computePosteriorSerial(problem, prior, 'fft', '--path')).toThrow(InputError);
  });
  it('computePosterior (the async entry) runs it on the dense route', async () => {
    const r = await computePosterior(problem, prior);
    expect(r.decision.path).toBe('dense');
    expect(r.summary.mean.length).toBe(n);
  });
});
