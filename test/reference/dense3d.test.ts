/**
 * 3-D grids on the dense route: Cm, m0, posterior mean and standard deviation from
 * computePosteriorSerial against test/reference/dense3d_reference.py — numpy/scipy with the rotation
 * R = Rz(a1)·Ry(a2)·Rx(a3) built from explicit matrices and the model-space posterior
 * (Tarantola 2005 eq. 3.37–3.38) by Cholesky solves. Agreement to 1e-8 relative to each quantity's
 * largest magnitude. Every rotated case has all three angles non-zero.
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/core/errors.ts';
import { cellCount, type Grid } from '../../src/core/grid/grid.ts';
import { computePosteriorSerial } from '../../src/core/inverse/compute.ts';
import { parsePriorFile } from '../../src/core/io/priorFile.ts';
import { parseProblemFile } from '../../src/core/io/problemFile.ts';
import { gridProblem } from '../../src/core/problems/spec.ts';
import { KERNEL_NAMES } from '../../src/core/kernels/spec.ts';
import { matrix } from '../../src/core/linalg/matrix.ts';
import { covarianceApply, covarianceMatrix, meanVector } from '../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { runPython } from './python.ts';
import { diagnoseStructured } from '../../src/core/prior/structuredDiagnostics.ts';

interface Ref {
  Cm: number[];
  m0: number[];
  mean?: number[];
  std?: number[];
}
interface Case {
  grid: Grid;
  prior: PriorSpec;
  G?: number[];
  d?: number[];
  sigma?: number[];
}

const grid: Grid = { shape: [8, 6, 5], spacing: [1, 1.5, 0.8], origin: [10, -3, 2] };
const n = cellCount(grid);

function maxDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  let s = 0;
  for (let i = 0; i < a.length; i++) {
    d = Math.max(d, Math.abs(a[i] - b[i]));
    s = Math.max(s, Math.abs(b[i]));
  }
  expect(a.length).toBe(b.length);
  return d / s;
}

/** A made-up smooth forward operator: M = 14 weighted averages over Gaussian blobs in the volume. */
function problemFor(g: Grid): { problem: Problem; G: number[]; d: number[]; sigma: number[] } {
  const m = 14;
  const N = cellCount(g);
  const G = matrix(m, N);
  const [nx, ny] = g.shape;
  for (let k = 0; k < m; k++) {
    for (let i = 0; i < N; i++) {
      const ix = i % nx;
      const iy = Math.floor(i / nx) % ny;
      const iz = Math.floor(i / (nx * ny));
      const r2 = (ix - ((3 * k) % nx)) ** 2 + (iy - ((2 * k) % ny)) ** 2 + (iz - (k % 5)) ** 2;
      G.data[k * N + i] = Math.exp(-r2 / 4) * (1 + 0.1 * Math.sin(k + i));
    }
  }
  const d = Array.from({ length: m }, (_, k) => Math.sin(0.7 * k) + 0.3 * Math.cos(1.3 * k));
  const sigma = Array.from({ length: m }, (_, k) => 0.05 + 0.01 * (k % 3));
  const problem: Problem = {
    grid: g,
    operator: { kind: 'dense', matrix: G },
    data: { values: Float64Array.from(d), sigma: Float64Array.from(sigma) },
  };
  return { problem, G: Array.from(G.data), d, sigma };
}

const rotated = [30, -20, 50] as const;
const priors: { name: string; prior: PriorSpec }[] = [
  ...KERNEL_NAMES.map((kernel) => ({
    name: `${kernel}, lengths [4, 2.5, 1.5], angles [30, −20, 50], nugget`,
    prior: {
      mean: { constant: 1.5 },
      terms: [{ kernel, variance: 2, lengths: [4, 2.5, 1.5] as const, angles: rotated, ...(kernel === 'matern' && { nu: 2.5 }) }],
      nugget: 0.05,
    } satisfies PriorSpec,
  })),
  {
    name: 'sum: isotropic matern ν = 1.5 + rotated spherical, std profile, 3-D trend, nugget',
    prior: {
      mean: { trend: { intercept: 0.5, slope: [0.1, -0.2, 0.3] } },
      terms: [
        { kernel: 'matern', variance: 1, length: 3, nu: 1.5 },
        { kernel: 'spherical', variance: 0.5, lengths: [6, 3, 2], angles: [-75, 40, 15] },
      ],
      nugget: 0.02,
      stdProfile: Array.from({ length: n }, (_, i) => 1 + 0.3 * Math.sin(0.1 * i)),
    },
  },
];

describe('dense 3-D route against numpy/scipy (explicit Rz·Ry·Rx, model-space posterior)', () => {
  const { problem, G, d, sigma } = problemFor(grid);
  const cases: Case[] = priors.map((p) => ({ grid, prior: p.prior, G, d, sigma }));
  const refs = runPython<Ref[]>('dense3d_reference.py', cases);

  priors.forEach((p, k) => {
    it(`${p.name}: Cm, m0, posterior mean and std to 1e-8`, () => {
      const ref = refs[k];
      const Cm = covarianceMatrix(grid, p.prior);
      expect(maxDiff(Cm.data, ref.Cm)).toBeLessThan(1e-12);
      expect(maxDiff(meanVector(grid, p.prior), ref.m0)).toBeLessThan(1e-12);
      // The matrix-free product runs over the same 3-D lag table.
      const x = Float64Array.from({ length: n }, (_, i) => Math.cos(0.37 * i));
      const y = covarianceApply(grid, p.prior)(x);
      const yRef = Array.from({ length: n }, (_, i) => ref.Cm.slice(i * n, (i + 1) * n).reduce((a, c, j) => a + c * x[j], 0));
      expect(maxDiff(y, yRef)).toBeLessThan(1e-12);
      const r = computePosteriorSerial(problem, p.prior, 'dense');
      expect(r.decision.path).toBe('dense');
      expect(maxDiff(r.summary.mean, ref.mean ?? [])).toBeLessThan(1e-8);
      // The FFT route on the same 3-D problem against the same scipy reference.
      const f = computePosteriorSerial(problem, p.prior, 'fft');
      expect(f.decision.path).toBe('fft');
      expect(maxDiff(f.summary.mean, ref.mean ?? [])).toBeLessThan(1e-8);
      expect(maxDiff(f.summary.std, ref.std ?? [])).toBeLessThan(1e-8);
      expect(maxDiff(r.summary.std, ref.std ?? [])).toBeLessThan(1e-8);
    });
  });
});

describe('3-D conventions', () => {
  it('a2 = a3 = 0 on a one-layer grid is the 2-D convention (angle a1, lengths [l1, l2])', () => {
    for (const kernel of KERNEL_NAMES) {
      const nu = kernel === 'matern' ? { nu: 1.5 } : {};
      const c3 = covarianceMatrix(
        { shape: [7, 5, 1], spacing: [1, 2, 3] },
        { mean: { constant: 0 }, terms: [{ kernel, variance: 1.3, lengths: [5, 2, 0.7], angles: [35, 0, 0], ...nu }] },
      );
      const c2 = covarianceMatrix(
        { shape: [7, 5], spacing: [1, 2] },
        { mean: { constant: 0 }, terms: [{ kernel, variance: 1.3, lengths: [5, 2], angle: 35, ...nu }] },
      );
      expect(maxDiff(c3.data, c2.data)).toBeLessThan(1e-14);
    }
  });

  it('the first principal axis is Rz(a1)·Ry(a2)·Rx(a3) e1: a step of l1 along it has h = 1 (exponential ρ = e⁻¹)', () => {
    // a1 = 90°, a2 = 0, a3 = 90°: axis 1 → +y. A step of 2 cells of dy = 1 along +y, l1 = 2: ρ = e⁻¹.
    const g: Grid = { shape: [1, 3, 1], spacing: [1, 1, 1] };
    const c = covarianceMatrix(g, {
      mean: { constant: 0 },
      terms: [{ kernel: 'exponential', variance: 1, lengths: [2, 100, 100], angles: [90, 0, 90] }],
    });
    expect(c.data[2]).toBeCloseTo(Math.exp(-1), 12);
    // a2 = −90° tips axis 1 from +x up to +z (Ry(b) e1 = (cos b, 0, −sin b)).
    const gz: Grid = { shape: [1, 1, 3], spacing: [1, 1, 1] };
    const cz = covarianceMatrix(gz, {
      mean: { constant: 0 },
      terms: [{ kernel: 'exponential', variance: 1, lengths: [2, 100, 100], angles: [0, -90, 0] }],
    });
    expect(cz.data[2]).toBeCloseTo(Math.exp(-1), 12);
  });

  it('refuses a 3-D grid too large for the dense route before allocating when the dense route is asked for, naming the limit', () => {
    const big: Grid = { shape: [30, 30, 20], spacing: [1, 1, 1] };
    const prior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 3 }] };
    const problem: Problem = {
      grid: big,
      operator: { kind: 'dense', matrix: matrix(1, 18_000) },
      data: { values: new Float64Array(1), sigma: new Float64Array([1]) },
    };
    expect(() => computePosteriorSerial(problem, prior, 'dense')).toThrow(InputError);
    expect(() => computePosteriorSerial(problem, prior, 'dense')).toThrow(/16384/);
  });

  it('refuses two lengths or a wrong angles array on a 3-D grid, naming the field', () => {
    const bad = (t: object) => () => covarianceMatrix(grid, { mean: { constant: 0 }, terms: [t as PriorSpec['terms'][number]] });
    expect(bad({ kernel: 'gaussian', variance: 1, lengths: [1, 2] })).toThrow(/terms\[0\]\.lengths/);
    expect(bad({ kernel: 'gaussian', variance: 1, lengths: [1, 2, 3], angles: [1, 2] })).toThrow(/terms\[0\]\.angles/);
  });

  it('reads a 3-D problem file and a 3-D prior file (lengths [l1, l2, l3], angles) and runs them on the dense route', () => {
    const problemText = JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      grid: { shape: [4, 3, 2], spacing: [1, 1, 2], origin: [0, 0, 1], axes: ['x', 'y', 'depth'] },
      operator: { dense: [Array.from({ length: 24 }, (_, i) => (i % 5) / 4), Array.from({ length: 24 }, (_, i) => (i % 3) / 2)] },
      data: { values: [1, 2], sigma: [0.1, 0.1] },
    });
    const problem = gridProblem(parseProblemFile('p3.json', problemText).problem, 'this test');
    expect(problem.grid.shape).toEqual([4, 3, 2]);
    const priorText = JSON.stringify({
      kind: 'priorscope.prior',
      version: 1,
      mean: { trend: { intercept: 0, slope: [0, 0, 0.5] } },
      terms: [{ kernel: 'gaussian', variance: 1, lengths: [3, 2, 1], angles: [10, 20, 30] }],
      nugget: 0.01,
    });
    const { prior } = parsePriorFile('q3.json', priorText, { grid: problem.grid });
    expect(prior.terms[0]).toEqual({ kernel: 'gaussian', variance: 1, lengths: [3, 2, 1], angles: [10, 20, 30] });
    const r = computePosteriorSerial(problem, prior);
    expect(r.decision.path).toBe('dense');
    expect(r.summary.mean.length).toBe(24);
    // The z slope reaches the mean: cells of the second layer (z = 3) sit 1 above the first (z = 1) in m0.
    const m0 = meanVector(problem.grid, prior);
    expect(m0[12] - m0[0]).toBeCloseTo(1, 14);
    // Two lengths on a 3-D grid are refused naming the term.
    const two = priorText.replace('[3,2,1]', '[3,2]').replace(',"angles":[10,20,30]', '');
    expect(() => parsePriorFile('q3.json', two, { grid: problem.grid })).toThrow(
      /terms\[0\]\.lengths has 2 lengths; this 3-D grid needs 3/,
    );
  });
});

describe('positive-definiteness verdict on 3-D grids (FFT bracket, Lanczos, Cholesky) against numpy.linalg.eigvalsh', () => {
  const g: Grid = { shape: [8, 6, 5], spacing: [1, 0.8, 1.5] };
  const cases: { name: string; prior: PriorSpec }[] = [
    {
      name: 'rotated exponential with a nugget',
      prior: {
        mean: { constant: 0 },
        nugget: 0.05,
        terms: [{ kernel: 'exponential', variance: 1, lengths: [4, 2, 3], angles: [30, -20, 50] }],
      },
    },
    {
      name: 'isotropic exponential longer than the block (the bracket cannot prove it)',
      prior: { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 200 }] },
    },
  ];
  const refs = runPython<{ eig: [number, number] }[]>(
    'dense3d_reference.py',
    cases.map((c) => ({ grid: g, prior: c.prior, eig: true })),
  );

  it.each(cases.map((c, k) => [c.name, k] as const))('%s: the verdict and its eigenvalue bounds agree with numpy', (_n, k) => {
    const [lo, hi] = refs[k]!.eig;
    expect(lo).toBeGreaterThan(0); // numpy: positive definite
    const d = diagnoseStructured(g, cases[k]!.prior);
    expect(d.eigenvalueMethod).toBe('fft-bounds');
    expect(d.verdict).toBe('positive-definite');
    // The certified bracket holds numpy's extreme eigenvalues (relative slack for round-off).
    expect(d.eigenvalueBounds!.lower).toBeLessThanOrEqual(lo * (1 + 1e-9));
    expect(d.eigenvalueBounds!.upper).toBeGreaterThanOrEqual(hi * (1 - 1e-9));
    // Ritz values are Rayleigh quotients: inside [λmin, λmax].
    expect(d.minEigenvalue).toBeGreaterThanOrEqual(lo * (1 - 1e-9));
    expect(d.maxEigenvalue).toBeLessThanOrEqual(hi * (1 + 1e-9));
    // One embedding size per grid axis (the status badge prints them).
    expect(d.embeddingPadding).toHaveLength(3);
    if (k === 0) expect(d.decidedBy).toBe('fft-bracket');
    else {
      expect(d.decidedBy).toBe('cholesky');
      // Without the dense Cholesky nothing proves it: not decided, never "not positive definite".
      expect(diagnoseStructured(g, cases[k]!.prior, { denseLimit: 0 }).verdict).toBe('not-decided');
    }
  });
});
