/**
 * The core's scipy cross-check repeated through the binary: write problem + prior files, run
 * `priorscope posterior`, and compare with test/reference/cli_reference.py, which reads the same files
 * and computes the model-space posterior (Tarantola 2005 §3.2) with numpy/scipy and the evidence with
 * scipy.stats.multivariate_normal.logpdf. Agreement to 1e-8 relative (to the largest |value| of
 * each vector). `tune` is checked the same way against logpdf on every cell of its grid.
 */
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { writeNpyMatrix } from '../../src/core/io/npy.ts';
import { matrix } from '../../src/core/linalg/matrix.ts';
import { runPython } from './python.ts';
import { runCli, tempDir, writeFiles } from '../cli/run.ts';
import { rng } from '../core/io/random.ts';

interface Result {
  mean: number[];
  std: number[];
  predicted: number[];
  residuals: number[];
  chi2: number;
  logEvidence: number;
  conditionCm?: number;
}

function expectClose(ours: number[], ref: number[], what: string, rel = 1e-8): void {
  expect(ours.length, what).toBe(ref.length);
  const scale = Math.max(...ref.map(Math.abs));
  const worst = Math.max(...ours.map((v, k) => Math.abs(v - ref[k])));
  expect(worst, `${what}: max |Δ| ${worst} vs scale ${scale}`).toBeLessThanOrEqual(rel * scale);
}

function compare(dir: string): { ours: Result; ref: Result } {
  const r = runCli(['posterior', '--problem', 'p.json', '--prior', 'q.json'], dir);
  expect(r.code, r.err).toBe(0);
  const ours = JSON.parse(r.out) as Result;
  const ref = runPython<Result>('cli_reference.py', { problem: join(dir, 'p.json'), prior: join(dir, 'q.json') });
  expectClose(ours.mean, ref.mean, 'mean');
  expectClose(ours.std, ref.std, 'std');
  expectClose(ours.predicted, ref.predicted, 'predicted');
  expectClose(ours.residuals, ref.residuals, 'residuals');
  expect(Math.abs(ours.chi2 - ref.chi2)).toBeLessThanOrEqual(1e-8 * ref.chi2);
  expect(Math.abs(ours.logEvidence - ref.logEvidence)).toBeLessThanOrEqual(1e-8 * Math.abs(ref.logEvidence));
  return { ours, ref };
}

describe('priorscope posterior against numpy/scipy (through the binary)', () => {
  it('1-D: 40 cells, Matérn ν = 1.25 (Bessel path) + exponential, trend mean, sparse operator, diagonal Cd', () => {
    // Invented: 12 data, each averaging 4 neighbouring cells of a 40-cell line (spacing 0.5 m).
    const r = rng(101);
    const rows: number[] = [],
      cols: number[] = [],
      values: number[] = [];
    for (let i = 0; i < 12; i++)
      for (let c = 0; c < 4; c++) {
        rows.push(i);
        cols.push(3 * i + c);
        values.push(0.25);
      }
    const d = tempDir();
    writeFiles(d, {
      'p.json': {
        kind: 'priorscope.problem',
        version: 1,
        grid: { shape: [40], spacing: [0.5], origin: [1] },
        operator: { sparse: { rows, cols, values } },
        data: { values: Array.from({ length: 12 }, () => 2 + r()), sigma: Array.from({ length: 12 }, () => 0.05 + 0.1 * r()) },
      },
      'q.json': {
        kind: 'priorscope.prior',
        version: 1,
        mean: { trend: { intercept: 1.5, slope: [0.04] } },
        terms: [
          { kernel: 'matern', variance: 0.8, length: 2.5, nu: 1.25 },
          { kernel: 'exponential', variance: 0.1, length: 0.7 },
        ],
        nugget: 0.01,
      },
    });
    const { ref } = compare(d);
    expect(ref.conditionCm!).toBeLessThan(1e6);
  });

  it('2-D: 9 × 7 grid, anisotropic rotated exponential + Gaussian, stdProfile, full Cd, operator in a sibling .npy', () => {
    // Invented: 15 straight-line sums through the grid, stored as a dense .npy next to the problem.
    const r = rng(202);
    const nx = 9,
      ny = 7,
      n = nx * ny,
      m = 15;
    const G = matrix(m, n);
    for (let i = 0; i < m; i++) {
      const iy = i % ny;
      for (let ix = 0; ix < nx; ix++) G.data[i * n + ix + nx * ((iy + Math.floor((ix * i) / 7)) % ny)] += 0.3 + 0.1 * r();
    }
    // Data covariance: σ² on the diagonal with 0.3 correlation between consecutive data.
    const sigma = Array.from({ length: m }, () => 0.1 + 0.05 * r());
    const cov = Array.from({ length: m }, (_, i) =>
      Array.from({ length: m }, (_, j) => (i === j ? sigma[i] ** 2 : Math.abs(i - j) === 1 ? 0.3 * sigma[i] * sigma[j] : 0)),
    );
    const d = tempDir();
    writeFiles(d, {
      'G.npy': writeNpyMatrix(G),
      'p.json': {
        kind: 'priorscope.problem',
        version: 1,
        grid: { shape: [nx, ny], spacing: [2, 1.5], origin: [-3, 4], unit: 'm' },
        operator: { file: 'G.npy' },
        data: { values: Array.from({ length: m }, () => 3 * r() - 1), covariance: cov },
      },
      'q.json': {
        kind: 'priorscope.prior',
        version: 1,
        mean: { constant: 0.5 },
        terms: [
          { kernel: 'exponential', variance: 1.2, lengths: [8, 2.5], angle: 35 },
          { kernel: 'gaussian', variance: 0.3, length: 2 },
        ],
        nugget: 0.02,
        stdProfile: Array.from({ length: n }, (_, k) => 0.8 + 0.4 * ((k % nx) / nx)),
      },
    });
    const { ref } = compare(d);
    expect(ref.conditionCm!).toBeLessThan(1e6);
    tuneCompare(d, 0, '3:12:3', '0.3:3:4');
  });
});

/** `priorscope tune` against scipy.stats.multivariate_normal.logpdf cell by cell, 1e-8 relative. */
function tuneCompare(dir: string, term: number, lengths: string, variances: string): void {
  const r = runCli(
    ['tune', '--problem', 'p.json', '--prior', 'q.json', '--term', String(term), '--lengths', lengths, '--variances', variances],
    dir,
  );
  expect(r.code, r.err).toBe(0);
  const ours = JSON.parse(r.out) as {
    lengths: number[];
    variances: number[];
    logEvidence: number[][];
    best: { length: number; variance: number; logEvidence: number };
  };
  // Axes: lo·(hi/lo)^(k/(n−1)), the documented log spacing.
  const axis = (text: string) => {
    const [lo, hi, n] = text.split(':').map(Number) as [number, number, number];
    return Array.from({ length: n }, (_, k) => lo * (hi / lo) ** (k / (n - 1)));
  };
  expectClose(ours.lengths, axis(lengths), 'lengths', 1e-14);
  expectClose(ours.variances, axis(variances), 'variances', 1e-14);
  const ref = runPython<{ logEvidence: number[][] }>('cli_reference.py', {
    problem: join(dir, 'p.json'),
    prior: join(dir, 'q.json'),
    tune: { term, lengths: ours.lengths, variances: ours.variances },
  });
  ours.logEvidence.forEach((row, i) => expectClose(row, ref.logEvidence[i], `logEvidence row ${i}`));
  const flat = ref.logEvidence.flat();
  const k = flat.indexOf(Math.max(...flat));
  expect(ours.best.length).toBe(ours.lengths[Math.floor(k / ours.variances.length)]);
  expect(ours.best.variance).toBe(ours.variances[k % ours.variances.length]);
}
