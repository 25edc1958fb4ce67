/**
 * Data-space posterior (src/core/inverse/posterior.ts) against the model-space form computed with
 * numpy/scipy in test/reference/posterior_reference.py (Tarantola 2005 §3.2; covariance rebuilt
 * there from the spec with scipy.special.kv; evidence by scipy.stats.multivariate_normal.logpdf).
 * Agreement to 1e-8 relative (to each quantity's largest magnitude). The priors all carry a nugget
 * so that Cm⁻¹ in the model-space form is well conditioned.
 */
import { describe, expect, it } from 'vitest';
import { cellCoordinates, cellCount, type Grid } from '../../src/core/grid/grid.ts';
import { posteriorCovariance, posteriorSummary, preparePosterior, resolutionRow } from '../../src/core/inverse/posterior.ts';
import { matrix, type Matrix } from '../../src/core/linalg/matrix.ts';
import { applyOperator, type Operator } from '../../src/core/linalg/operator.ts';
import { denseToSparse, sparseFromCoordinates } from '../../src/core/linalg/sparse.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import { gravity } from '../../src/core/problems/hansen.ts';
import { gravityOperator } from '../../src/core/problems/potential.ts';
import { rayOperator } from '../../src/core/problems/rays.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { runPython } from './python.ts';

interface RefResult {
  Cm: number[];
  m0: number[];
  mean: number[];
  std: number[];
  cov: number[];
  R: number[];
  predicted: number[];
  residuals: number[];
  chi2: number;
  misfit: number;
  logEvidence: number;
  traceR: number;
}

interface Case {
  name: string;
  problem: Problem;
  prior: PriorSpec;
}

function serialiseOperator(g: Operator): object {
  if (g.kind === 'dense') return { rows: g.matrix.rows, cols: g.matrix.cols, dense: Array.from(g.matrix.data) };
  const { rows, cols, rowPtr, colIdx, values } = g.matrix;
  const i: number[] = [];
  for (let r = 0; r < rows; r++) for (let p = rowPtr[r]; p < rowPtr[r + 1]; p++) i.push(r);
  return { rows, cols, i, j: Array.from(colIdx), v: Array.from(values) };
}

/** Deterministic "observed" data: G applied to a smooth made-up model plus a fixed wiggle. */
function makeData(grid: Grid, G: Operator, scale: number): Float64Array {
  const { x, y } = cellCoordinates(grid);
  const model = x.map((xi, k) => scale * (Math.sin(0.37 * xi + 0.2) + 0.5 * Math.cos(0.23 * y[k] - 0.4 * xi)));
  const d = applyOperator(G, model);
  return d.map((v, k) => v + 0.05 * scale * Math.sin(1.7 * k + 0.3));
}

/** Smoothly correlated full Cd: σ² (ρ^|k−l|) plus 10% white (an AR(1)-type error model). */
function correlatedCd(m: number, sigma: number, rho: number): Matrix {
  const C = matrix(m, m);
  for (let k = 0; k < m; k++)
    for (let l = 0; l < m; l++) C.data[k * m + l] = sigma * sigma * (0.9 * rho ** Math.abs(k - l) + (k === l ? 0.1 : 0));
  return C;
}

function windowOperator(grid: Grid, centres: number[], width: number, sparse: boolean): Operator {
  const { x } = cellCoordinates(grid);
  const n = x.length;
  const G = matrix(centres.length, n);
  centres.forEach((c, k) => {
    for (let j = 0; j < n; j++) {
      const u = (x[j] - c) / width;
      if (Math.abs(u) <= 2.5) G.data[k * n + j] = Math.exp(-0.5 * u * u);
    }
  });
  return sparse ? { kind: 'sparse', matrix: denseToSparse(G) } : { kind: 'dense', matrix: G };
}

function problemOf(grid: Grid, G: Operator, scale: number, noise: { sigma: number } | { Cd: Matrix }): Problem {
  const m = G.matrix.rows;
  const values = makeData(grid, G, scale);
  const data = 'sigma' in noise ? { values, sigma: new Float64Array(m).fill(noise.sigma) } : { values, covariance: noise.Cd };
  return { grid, operator: G, data };
}

const g1: Grid = { shape: [60], spacing: [0.5], origin: [1] };
const g2: Grid = { shape: [12, 10], spacing: [1, 0.8], origin: [0.5, 0.4] };
const g3: Grid = { shape: [10, 6], spacing: [40, 20], origin: [20, 10] };
const centres1 = Array.from({ length: 18 }, (_, k) => 1.5 + 1.6 * k);
const rays2 = [];
for (let a = 0; a < 6; a++) for (let b = 0; b < 6; b++) rays2.push({ from: [0, 0.5 + 1.3 * a] as const, to: [12, 0.3 + 1.4 * b] as const });
for (let a = 0; a < 5; a++) rays2.push({ from: [0.4 + 2.5 * a, 0] as const, to: [11.6 - 2.2 * a, 8] as const });
const stations3: [number, number][] = Array.from({ length: 14 }, (_, k) => [10 + 29 * k, -2]);
const hansen = gravity(32);
const gH: Grid = { shape: [32], spacing: [1 / 32], origin: [1 / 64] };

const CASES: Case[] = [
  {
    name: '1-D exponential, dense G, diagonal Cd, constant mean',
    problem: problemOf(g1, windowOperator(g1, centres1, 1.2, false), 1, { sigma: 0.05 }),
    prior: { mean: { constant: 0.3 }, terms: [{ kernel: 'exponential', variance: 1.5, length: 4 }], nugget: 0.02 },
  },
  {
    name: '1-D gaussian + matern 1.5 sum, sparse G, trend mean, std profile',
    problem: problemOf(g1, windowOperator(g1, centres1, 0.8, true), 2, { sigma: 0.1 }),
    prior: {
      mean: { trend: { intercept: 1, slope: [0.05] } },
      terms: [
        { kernel: 'gaussian', variance: 1, length: 3 },
        { kernel: 'matern', nu: 1.5, variance: 0.5, length: 1.5 },
      ],
      nugget: 0.05,
      stdProfile: Array.from({ length: 60 }, (_, k) => 0.5 + k / 60),
    },
  },
  {
    name: '1-D matern 2.5 + spherical, dense G, full correlated Cd, values mean',
    problem: problemOf(g1, windowOperator(g1, centres1, 1.5, false), 1, { Cd: correlatedCd(18, 0.08, 0.6) }),
    prior: {
      mean: { values: Array.from({ length: 60 }, (_, k) => 0.1 * Math.cos(k / 7)) },
      terms: [
        { kernel: 'matern', nu: 2.5, variance: 0.8, length: 2.5 },
        { kernel: 'spherical', variance: 0.4, length: 9 },
      ],
      nugget: 0.03,
    },
  },
  {
    name: '2-D anisotropic matern 0.5 + exponential, sparse ray G, diagonal Cd',
    problem: problemOf(g2, rayOperator(g2, rays2), 0.5, { sigma: 0.2 }),
    prior: {
      mean: { constant: 0 },
      terms: [
        { kernel: 'matern', nu: 0.5, variance: 0.6, lengths: [5, 1.5], angle: 30 },
        { kernel: 'exponential', variance: 0.2, length: 2 },
      ],
      nugget: 0.02,
    },
  },
  {
    name: '2-D spherical + anisotropic gaussian, dense gravity G, full Cd, 2-D trend',
    problem: problemOf(g3, gravityOperator(g3, stations3), 100, { Cd: correlatedCd(14, 0.01, 0.4) }),
    prior: {
      mean: { trend: { intercept: 10, slope: [0.02, -0.05] } },
      terms: [
        { kernel: 'spherical', variance: 900, length: 150 },
        { kernel: 'gaussian', variance: 400, lengths: [120, 40], angle: -20 },
      ],
      nugget: 25,
    },
  },
  {
    name: 'Hansen gravity (n = 32) with a sparse copy of A and an exponential prior',
    problem: {
      grid: gH,
      operator: { kind: 'sparse', matrix: sparseFromCoordinates(32, 32, [], [], []) },
      data: { values: new Float64Array(0) },
    },
    prior: { mean: { constant: 0.2 }, terms: [{ kernel: 'exponential', variance: 0.5, length: 0.2 }], nugget: 0.01 },
  },
];
// Fill the Hansen case: A from gravity(32) (as sparse), data b plus a fixed perturbation.
{
  const A = hansen.A;
  const op: Operator = { kind: 'sparse', matrix: denseToSparse(A) };
  const values = hansen.b.map((v, k) => v + 0.01 * Math.sin(3.1 * k));
  CASES[5] = { ...CASES[5], problem: { grid: gH, operator: op, data: { values, sigma: new Float64Array(32).fill(0.01) } } };
}

const payload = {
  cases: CASES.map(({ problem, prior }) => ({
    grid: problem.grid,
    prior,
    G: serialiseOperator(problem.operator),
    d: Array.from(problem.data.values),
    ...(problem.data.sigma ? { sigma: Array.from(problem.data.sigma) } : { Cd: Array.from(problem.data.covariance!.data) }),
  })),
};
const ref = runPython<{ results: RefResult[] }>('posterior_reference.py', payload).results;

function expectClose(ours: ArrayLike<number>, theirs: readonly number[], rel: number, what: string): void {
  expect(ours.length, what).toBe(theirs.length);
  let scale = 0;
  for (const v of theirs) scale = Math.max(scale, Math.abs(v));
  let worst = 0;
  for (let k = 0; k < theirs.length; k++) worst = Math.max(worst, Math.abs(ours[k] - theirs[k]));
  expect(worst, `${what}: max abs difference ${worst} vs scale ${scale}`).toBeLessThanOrEqual(rel * scale);
}

describe.each(CASES.map((c, k) => [c.name, k] as const))('posterior vs scipy model-space form: %s', (_name, k) => {
  const { problem, prior } = CASES[k];
  const want = ref[k];
  const state = preparePosterior(problem, prior);
  const s = posteriorSummary(state, { fullCovariance: true });
  const n = cellCount(problem.grid);
  it('prior covariance and mean agree (our construction vs numpy/scipy.special.kv)', () => {
    expectClose(state.Cm.data, want.Cm, 1e-12, 'Cm');
    expectClose(state.m0, want.m0, 1e-13, 'm0');
  });
  it('mean, std, full covariance agree to 1e-8', () => {
    expectClose(s.mean, want.mean, 1e-8, 'mean');
    expectClose(s.std, want.std, 1e-8, 'std');
    expectClose(s.covariance!.data, want.cov, 1e-8, 'covariance');
    expectClose(posteriorCovariance(state).data, want.cov, 1e-8, 'posteriorCovariance');
    expectClose(s.priorStd, want.Cm.filter((_, q) => q % (n + 1) === 0).map(Math.sqrt), 1e-12, 'priorStd');
  });
  it('predicted data, normalised residuals, χ² and misfit agree', () => {
    expectClose(s.predicted, want.predicted, 1e-8, 'predicted');
    expectClose(s.residuals, want.residuals, 1e-8, 'residuals');
    expect(Math.abs(s.chi2 - want.chi2)).toBeLessThanOrEqual(1e-8 * want.chi2);
    expect(Math.abs(s.dataMisfit! - want.misfit)).toBeLessThanOrEqual(1e-8 * want.misfit);
  });
  it('log evidence agrees with scipy.stats.multivariate_normal.logpdf', () => {
    expect(Math.abs(s.logEvidence - want.logEvidence)).toBeLessThanOrEqual(1e-8 * Math.abs(want.logEvidence) + 1e-9);
  });
  it('resolution rows and trace agree with R = C̃ Gᵀ Cd⁻¹ G', () => {
    for (const cell of [0, Math.floor(n / 3), n - 1]) {
      expectClose(resolutionRow(state, cell), want.R.slice(cell * n, (cell + 1) * n), 1e-8, `R row ${cell}`);
    }
    expect(Math.abs(s.resolutionTrace - want.traceR)).toBeLessThanOrEqual(1e-8 * want.traceR);
  });
});
