/**
 * Prior covariance and mean against an independent numpy/scipy construction
 * (test/reference/prior_reference.py: pairwise offsets, numpy rotation matrix, Matérn from
 * scipy.special.kv for every ν — Rasmussen & Williams 2006 eq. 4.14).
 */
import { describe, expect, it } from 'vitest';
import { covarianceApply, covarianceMatrix, meanVector, priorVariance } from '../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import type { Grid } from '../../src/core/grid/grid.ts';
import { runPython } from './python.ts';

interface Case {
  name: string;
  grid: Grid;
  prior: PriorSpec;
}

const g1: Grid = { shape: [23], spacing: [0.7], origin: [3] };
const g2: Grid = { shape: [7, 5], spacing: [1, 1.6], origin: [-2, 10] };
const ramp = (n: number, a: number, b: number) => Array.from({ length: n }, (_, i) => a + (b * i) / n);

const cases: Case[] = [
  { name: '1-D exponential', grid: g1, prior: { mean: { constant: 4 }, terms: [{ kernel: 'exponential', variance: 2, length: 3 }] } },
  { name: '1-D gaussian', grid: g1, prior: { mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 0.5, length: 1.2 }] } },
  { name: '1-D spherical', grid: g1, prior: { mean: { constant: 0 }, terms: [{ kernel: 'spherical', variance: 3, length: 5 }] } },
  ...[0.5, 1.5, 2.5].map(
    (nu): Case => ({
      name: `1-D matern ν=${nu}`,
      grid: g1,
      prior: { mean: { constant: 0 }, terms: [{ kernel: 'matern', variance: 1.5, length: 2, nu }] },
    }),
  ),
  { name: '1-D matern default ν', grid: g1, prior: { mean: { constant: 0 }, terms: [{ kernel: 'matern', variance: 1, length: 2 }] } },
  {
    name: '1-D sum + nugget + stdProfile + trend',
    grid: g1,
    prior: {
      mean: { trend: { intercept: 1.5, slope: [-0.25] } },
      terms: [
        { kernel: 'exponential', variance: 1, length: 4 },
        { kernel: 'gaussian', variance: 0.3, length: 0.9 },
      ],
      nugget: 0.05,
      stdProfile: ramp(23, 0.5, 2),
    },
  },
  {
    name: '2-D isotropic exponential',
    grid: g2,
    prior: { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 2.5 }] },
  },
  {
    name: '2-D anisotropic gaussian 30°',
    grid: g2,
    prior: { mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 2, lengths: [4, 1.5], angle: 30 }] },
  },
  {
    name: '2-D anisotropic spherical −70°',
    grid: g2,
    prior: { mean: { constant: 0 }, terms: [{ kernel: 'spherical', variance: 1, lengths: [6, 2], angle: -70 }] },
  },
  {
    name: '2-D anisotropic matern ν=2.5 135°',
    grid: g2,
    prior: { mean: { constant: 0 }, terms: [{ kernel: 'matern', variance: 1, lengths: [3, 1], angle: 135, nu: 2.5 }] },
  },
  {
    name: '2-D sum + nugget + stdProfile + 2-D trend',
    grid: g2,
    prior: {
      mean: { trend: { intercept: -1, slope: [0.5, 0.125] } },
      terms: [
        { kernel: 'matern', variance: 1, lengths: [5, 2], angle: 15, nu: 1.5 },
        { kernel: 'spherical', variance: 0.4, length: 3 },
        { kernel: 'exponential', variance: 0.2, lengths: [1, 4], angle: 200 },
      ],
      nugget: 0.01,
      stdProfile: ramp(35, 0.8, 1.5),
    },
  },
  {
    name: '2-D values mean',
    grid: g2,
    prior: { mean: { values: ramp(35, -3, 7) }, terms: [{ kernel: 'gaussian', variance: 1, length: 1 }] },
  },
  ...[0.3, 1.25, 3.7].map(
    (nu): Case => ({
      name: `2-D matern general ν=${nu}`,
      grid: g2,
      prior: { mean: { constant: 0 }, terms: [{ kernel: 'matern', variance: 1, lengths: [3, 2], angle: 40, nu }] },
    }),
  ),
];

describe('prior covariance vs numpy/scipy construction', () => {
  const x = (n: number) => Array.from({ length: n }, (_, i) => Math.sin(1 + 0.37 * i));
  const ref = runPython<{ cases: { covariance: number[][]; mean: number[]; product: number[] }[] }>('prior_reference.py', {
    cases: cases.map((c) => ({ ...c, x: x(c.grid.shape.reduce((a, b) => a * b, 1)) })),
  }).cases;

  it.each(cases.map((c, k) => [c.name, k] as const))('%s: Cm, m0, Cm x, diag', (_name, k) => {
    const { grid, prior } = cases[k];
    const want = ref[k];
    const c = covarianceMatrix(grid, prior);
    const n = c.rows;
    const scale = Math.max(...want.covariance.map((r, i) => r[i]));
    let worst = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const b = want.covariance[i][j];
        // 1e-12 relative to the entry, with a floor of 1e-14 of the matrix scale for entries near 0.
        worst = Math.max(worst, Math.abs(c.data[i * n + j] - b) / (Math.abs(b) + 1e-2 * scale));
      }
    }
    expect(worst).toBeLessThan(1e-12);
    const m = meanVector(grid, prior);
    want.mean.forEach((v, i) => expect(m[i]).toBeCloseTo(v, 12));
    const v = priorVariance(grid, prior);
    want.covariance.forEach((r, i) => expect(Math.abs(v[i] - r[i])).toBeLessThan(1e-12 * scale));
    const lagProduct = covarianceApply(grid, prior)(x(n));
    const denseProduct = covarianceApply(grid, prior, c)(x(n));
    want.product.forEach((p, i) => {
      expect(Math.abs(lagProduct[i] - p)).toBeLessThan(1e-11 * scale * n);
      expect(Math.abs(denseProduct[i] - p)).toBeLessThan(1e-11 * scale * n);
    });
  });
});
