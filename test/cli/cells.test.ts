/**
 * Problem files on a cell list (the user's own mesh, `"cells"` instead of `"grid"`) through the command line:
 * `posterior`, `check` and `sample` against test/reference/cells_reference.py (scipy cdist on rotated, scaled
 * centres; model-space posterior, Tarantola 2005 eq. 3.37–3.38), the centres inline and in a sibling .npy
 * (written here by numpy itself), the file round trip, and the refusals that name what runs on cell lists.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseProblemFile, writeProblemFile } from '../../src/core/io/problemFile.ts';
import { cholesky } from '../../src/core/linalg/cholesky.ts';
import { runPython } from '../reference/python.ts';
import { runCommand, tempDir, writeFiles } from './run.ts';

/** An invented survey: 48 irregular cells of a made-up 2-D mesh, 9 borehole samples averaging nearby cells. */
const centres: number[][] = Array.from({ length: 48 }, (_, i) => [
  Number((12 * ((i * 0.618034) % 1) + 0.3 * Math.sin(2.1 * i)).toFixed(6)),
  Number((-8 * ((i * 0.414214) % 1) + 0.2 * Math.cos(1.3 * i)).toFixed(6)),
]);
const N = centres.length;
const M = 9;
const G = Array.from({ length: M }, (_, k) =>
  centres.map((p) => {
    const c = centres[(5 * k) % N];
    return Number((Math.exp(-((p[0] - c[0]) ** 2 + (p[1] - c[1]) ** 2) / 4) * (1 + 0.1 * Math.sin(k))).toFixed(8));
  }),
);
const d = Array.from({ length: M }, (_, k) => Number((Math.sin(0.7 * k) + 0.2).toFixed(6)));
const sigma = Array.from({ length: M }, (_, k) => 0.05 + 0.01 * (k % 3));
const PRIOR = {
  kind: 'priorscope.prior',
  version: 1,
  mean: { trend: { intercept: 0.1, slope: [0.02, -0.01] } },
  terms: [{ kernel: 'matern', nu: 1.5, variance: 1.3, lengths: [5, 2], angle: 30 }],
  nugget: 0.02,
};
const problem = (cells: unknown, extra: Record<string, unknown> = {}) => ({
  kind: 'priorscope.problem',
  version: 1,
  title: 'invented mesh, borehole samples',
  cells,
  operator: { dense: G },
  data: { values: d, sigma, positions: centres.filter((_, i) => i % 5 === 0).slice(0, M), ...extra },
});

let dir: string;
let ref: { Cm: number[]; m0: number[]; mean: number[]; std: number[]; eig: [number, number] };
beforeAll(() => {
  dir = tempDir();
  writeFiles(dir, {
    'inline.json': problem({ centres, unit: 'm', axes: ['east', 'depth'] }),
    'npy.json': problem({ centres: 'centres.npy' }),
    'both.json': { ...problem({ centres }), grid: { shape: [N], spacing: [1] } },
    'bad.json': problem({ centres: centres.map((r, i) => (i === 7 ? [r[0]] : r)) }),
    'q.json': PRIOR,
  });
  // The sibling .npy written by numpy itself (shape (N, 2), little-endian float64).
  execFileSync('/usr/bin/python3', [
    '-c',
    `import json, sys, numpy as np; np.save(sys.argv[1], np.asarray(json.loads(sys.argv[2]), dtype='<f8'))`,
    join(dir, 'centres.npy'),
    JSON.stringify(centres),
  ]);
  [ref] = runPython<(typeof ref)[]>('cells_reference.py', [{ centres, prior: PRIOR, G: G.flat(), d, sigma }]);
});

const relDiff = (a: readonly number[], b: readonly number[]) => {
  expect(a.length).toBe(b.length);
  const s = Math.max(...b.map(Math.abs));
  return Math.max(...a.map((v, i) => Math.abs(v - b[i]))) / s;
};

/** `priorscope sample … --format csv` through the dense route: the draws as rows of numbers. */
async function sampleRows(file: string, count: number, seed: number, posterior = false): Promise<number[][]> {
  const args = ['sample', '--problem', file, '--prior', 'q.json', '--count', String(count), '--seed', String(seed), '--format', 'csv'];
  const r = await runCommand(posterior ? [...args, '--posterior'] : args, dir);
  expect(r.code).toBe(0);
  expect(r.err).toMatch(/route dense/);
  const rows = r.out
    .trim()
    .split('\n')
    .map((l) => l.split(',').map(Number));
  expect(rows.length).toBe(count);
  return rows;
}

describe('priorscope on a cell-list problem file', () => {
  it('posterior: the dense route, mean and std equal scipy to 1e-8, inline centres and a numpy-written .npy alike', async () => {
    for (const file of ['inline.json', 'npy.json']) {
      const r = await runCommand(['posterior', '--problem', file, '--prior', 'q.json'], dir);
      expect(r.err).toBe('');
      expect(r.code).toBe(0);
      const out = JSON.parse(r.out) as { mean: number[]; std: number[]; path: string };
      expect(out.path).toBe('dense');
      expect(relDiff(out.mean, ref.mean)).toBeLessThan(1e-8);
      expect(relDiff(out.std, ref.std)).toBeLessThan(1e-8);
    }
  });

  it('check: proven positive definite by Cholesky, its extreme eigenvalues equal numpy eigvalsh’s of scipy-built Cm', async () => {
    const r = await runCommand(['check', '--problem', 'inline.json', '--prior', 'q.json'], dir);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.out) as { verdict: string; minEigenvalue: number; maxEigenvalue: number };
    expect(out.verdict).toBe('positive-definite');
    const [lo, hi] = ref.eig;
    expect(Math.abs(out.minEigenvalue - lo) / hi).toBeLessThan(1e-8);
    expect(Math.abs(out.maxEigenvalue - hi) / hi).toBeLessThan(1e-8);
  });

  it('sample: 3000 prior draws whitened by the Cholesky factor of scipy’s Cm give a χ² sum inside its 5σ band', async () => {
    const count = 3000;
    const rows = await sampleRows('npy.json', count, 11);
    const f = cholesky({ rows: N, cols: N, data: Float64Array.from(ref.Cm) });
    if (!f.ok) throw new Error('reference Cm did not factor');
    const L = f.factor.data;
    let ss = 0;
    const z = new Float64Array(N);
    for (const row of rows) {
      // Forward substitution L z = x − m0: z ~ N(0, I) when the draws have covariance Cm.
      for (let i = 0; i < N; i++) {
        let s = row[i] - ref.m0[i];
        for (let j = 0; j < i; j++) s -= L[i * N + j] * z[j];
        z[i] = s / L[i * N + i];
        ss += z[i] * z[i];
      }
    }
    const dof = count * N;
    expect(Math.abs(ss - dof)).toBeLessThan(5 * Math.sqrt(2 * dof));
  });

  it('sample --posterior: the mean of 2000 draws is scipy’s posterior mean within 5 standard errors (std/√K) in every cell', async () => {
    const count = 2000;
    const rows = await sampleRows('inline.json', count, 5, true);
    let worst = 0;
    for (let i = 0; i < N; i++) {
      const mean = rows.reduce((a, row) => a + row[i], 0) / count;
      worst = Math.max(worst, Math.abs(mean - ref.mean[i]) / (ref.std[i] / Math.sqrt(count)));
    }
    expect(worst).toBeLessThan(5);
    expect(worst).toBeGreaterThan(0.1);
  });

  it('a written cell-list problem reads back equal (centres, unit, axes, data positions)', () => {
    const text = readFileSync(join(dir, 'inline.json'), 'utf8');
    const a = parseProblemFile('inline.json', text).problem;
    const b = parseProblemFile('again.json', writeProblemFile(a).json).problem;
    expect(b).toEqual(a);
    expect(a.grid).toMatchObject({ kind: 'cells', dim: 2, unit: 'm', axes: ['east', 'depth'] });
  });

  it('refusals name the field, the row or the command, and what to do instead', async () => {
    const one = async (args: string[]) => {
      const r = await runCommand(args, dir);
      expect(r.code).toBe(2);
      return r.err;
    };
    expect(await one(['posterior', '--problem', 'both.json', '--prior', 'q.json'])).toMatch(
      /both\.json: cells must be absent when grid is given/,
    );
    expect(await one(['posterior', '--problem', 'bad.json', '--prior', 'q.json'])).toMatch(
      /bad\.json: cells\.centres\[7\] must be a row of 2 coordinates/,
    );
    expect(await one(['posterior', '--problem', 'inline.json', '--prior', 'q.json', '--vti', 'x.vti'])).toMatch(
      /--vti writes VTK image data, which needs a regular grid; this problem gives a cell list/,
    );
    expect(await one(['posterior', '--problem', 'inline.json', '--prior', 'q.json', '--path', 'fft'])).toMatch(/cell list/);
    expect(await one(['fit', '--problem', 'inline.json', '--prior', 'q.json', '--free', 'variance'])).toMatch(
      /a regular "grid" for priorscope fit.*priorscope posterior, check and sample/,
    );
  });
});
