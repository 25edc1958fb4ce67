import { describe, expect, it } from 'vitest';
import { covarianceApply, covarianceMatrix, meanVector, priorVariance } from '../../../src/core/prior/covariance.ts';
import { lagTable, meanRowSum } from '../../../src/core/prior/lag.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';

const g2: Grid = { shape: [9, 6], spacing: [0.5, 1.25] };
const aniso = (lengths: [number, number], angle: number): PriorSpec => ({
  mean: { constant: 0 },
  terms: [{ kernel: 'gaussian', variance: 1.3, lengths, angle }],
});

describe('covarianceMatrix structure', () => {
  it('is exactly symmetric (2-D, rotated anisotropy, std profile, nugget)', () => {
    const prior: PriorSpec = {
      mean: { constant: 0 },
      terms: [
        { kernel: 'matern', variance: 2, lengths: [3, 1], angle: 37, nu: 2.5 },
        { kernel: 'spherical', variance: 1, length: 4 },
      ],
      nugget: 1e-3,
      stdProfile: Array.from({ length: 54 }, (_, i) => 1 + 0.1 * Math.cos(i)),
    };
    const c = covarianceMatrix(g2, prior);
    let asym = 0;
    for (let i = 0; i < c.rows; i++) for (let j = 0; j < i; j++) asym += Number(c.data[i * c.rows + j] !== c.data[j * c.rows + i]);
    expect(asym).toBe(0);
  });

  it('rotation by 90° swaps the two lengths (geometry: axis 1 along +y)', () => {
    // Rotating the first axis onto +y means l1 acts along y: same as lengths [l2, l1] at angle 0.
    const a = covarianceMatrix(g2, aniso([4, 1.5], 90));
    const b = covarianceMatrix(g2, aniso([1.5, 4], 0));
    // cos(π/2) ≈ 6e-17 in floating point, so equality holds to round-off, not bit for bit.
    a.data.forEach((v, k) => expect(Math.abs(v - b.data[k])).toBeLessThan(1e-14));
    // …and differs from the unrotated one (the test could fail if angle were ignored).
    const c = covarianceMatrix(g2, aniso([4, 1.5], 0));
    expect(Math.max(...a.data.map((v, k) => Math.abs(v - c.data[k])))).toBeGreaterThan(0.1);
  });

  it('angle 180° is the identity rotation, equal lengths are isotropic', () => {
    const a = covarianceMatrix(g2, aniso([4, 1.5], 180));
    const b = covarianceMatrix(g2, aniso([4, 1.5], 0));
    a.data.forEach((v, k) => expect(Math.abs(v - b.data[k])).toBeLessThan(1e-14));
    const iso = covarianceMatrix(g2, { mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 1.3, length: 2 }] });
    const eq = covarianceMatrix(g2, aniso([2, 2], 63));
    iso.data.forEach((v, k) => expect(Math.abs(v - eq.data[k])).toBeLessThan(1e-14));
  });

  it('a pure nugget prior is nugget·I', () => {
    const c = covarianceMatrix({ shape: [4], spacing: [1] }, { mean: { constant: 0 }, terms: [], nugget: 0.25 });
    expect(Array.from(c.data)).toEqual([0.25, 0, 0, 0, 0, 0.25, 0, 0, 0, 0, 0.25, 0, 0, 0, 0, 0.25]);
  });

  it('evaluates the kernel once per distinct lag: (2nx−1)(2ny−1) table entries', () => {
    expect(lagTable(g2, aniso([1, 1], 0).terms).values.length).toBe(17 * 11);
    expect(lagTable({ shape: [100], spacing: [1] }, aniso([1, 1], 0).terms).values.length).toBe(199);
  });

  it('meanRowSum equals 1ᵀC1/N of the assembled matrix', () => {
    const p = aniso([3, 1], 20);
    const c = covarianceMatrix(g2, p);
    const total = c.data.reduce((a, b) => a + b, 0);
    expect(meanRowSum(lagTable(g2, p.terms))).toBeCloseTo(total / c.rows, 10);
  });

  it('priorVariance and the lag-table product agree with the dense matrix', () => {
    const p: PriorSpec = {
      mean: { constant: 0 },
      terms: [{ kernel: 'exponential', variance: 2, length: 1 }],
      nugget: 0.5,
      stdProfile: Array.from({ length: 54 }, (_, i) => 0.5 + i / 54),
    };
    const c = covarianceMatrix(g2, p);
    const v = priorVariance(g2, p);
    v.forEach((x, i) => expect(x).toBe(c.data[i * 54 + i]));
    const x = Float64Array.from({ length: 54 }, (_, i) => (i % 7) - 3);
    const y1 = covarianceApply(g2, p)(x);
    const y2 = covarianceApply(g2, p, c)(x);
    y1.forEach((y, i) => expect(y).toBeCloseTo(y2[i], 12));
  });

  it('trend mean uses absolute coordinates (origin included)', () => {
    // m0 = 2 + 0.5·x − y at cell (ix, iy) = (1, 2) with origin (10, 20), spacing (2, 3): x = 12, y = 26.
    const m = meanVector(
      { shape: [3, 4], spacing: [2, 3], origin: [10, 20] },
      { mean: { trend: { intercept: 2, slope: [0.5, -1] } }, terms: [{ kernel: 'exponential', variance: 1, length: 1 }] },
    );
    expect(m[1 + 3 * 2]).toBe(2 + 6 - 26);
  });
});
