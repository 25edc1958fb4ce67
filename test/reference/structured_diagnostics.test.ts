/**
 * The FFT-route diagnostics (src/core/prior/structuredDiagnostics.ts) against exact eigenvalues
 * from numpy.linalg.eigvalsh (Debian python3-numpy, LAPACK) of independently built covariances
 * (test/reference/structured_diagnostics_reference.py): the certified bracket must contain the
 * whole spectrum and the Lanczos estimates must lie inside both, for every kernel, anisotropy and
 * rotation, sums, nugget and std profile on 1-D and 2-D grids.
 */
import { describe, expect, it } from 'vitest';
import { diagnoseStructured } from '../../src/core/prior/structuredDiagnostics.ts';
import type { Grid } from '../../src/core/grid/grid.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import { COVARIANCE_CASES, seededVector } from '../core/fft/cases.ts';
import { runPython } from './python.ts';

type Ref = { min: number; max: number; n: number; cond: number | null };
const zero = { constant: 0 } as const;
const profile = (n: number, seed: number) => Array.from(seededVector(n, seed), (v) => 1 + 0.6 * v);

const extra: { name: string; grid: Grid; prior: PriorSpec }[] = [
  {
    name: '1-D exponential, 200 cells',
    grid: { shape: [200], spacing: [1] },
    prior: { mean: zero, terms: [{ kernel: 'exponential', variance: 2, length: 5 }] },
  },
  {
    name: '1-D spherical + nugget, 180 cells',
    grid: { shape: [180], spacing: [0.5] },
    prior: { mean: zero, nugget: 0.01, terms: [{ kernel: 'spherical', variance: 1, length: 20 }] },
  },
  {
    name: '2-D matern 0.8 (Bessel form) + profile + nugget',
    grid: { shape: [15, 12], spacing: [1, 1.3] },
    prior: {
      mean: zero,
      nugget: 0.02,
      stdProfile: profile(180, 5),
      terms: [{ kernel: 'matern', nu: 0.8, variance: 1, lengths: [4, 2], angle: 35 }],
    },
  },
  {
    name: '2-D spherical with a strong std profile',
    grid: { shape: [16, 16], spacing: [1, 1] },
    prior: { mean: zero, stdProfile: profile(256, 3), terms: [{ kernel: 'spherical', variance: 1, lengths: [7, 3], angle: 60 }] },
  },
  {
    name: '2-D gaussian, long length, no nugget (near-singular)',
    grid: { shape: [16, 16], spacing: [1, 1] },
    prior: { mean: zero, terms: [{ kernel: 'gaussian', variance: 1, length: 4 }] },
  },
];
const CASES = [...COVARIANCE_CASES.map((c) => ({ name: c.name, grid: c.grid, prior: c.prior })), ...extra];

describe('FFT-route diagnostics vs numpy eigvalsh', () => {
  const ref = runPython<{ cases: Ref[] }>('structured_diagnostics_reference.py', {
    cases: CASES.map(({ grid, prior }) => ({ grid, prior })),
  }).cases;

  it.each(CASES.map((c, k) => [c.name, k] as const))('%s: bracket contains the spectrum, Ritz values inside', (_name, k) => {
    const { grid, prior } = CASES[k];
    const r = ref[k];
    const d = diagnoseStructured(grid, prior);
    expect(d.eigenvalueMethod).toBe('fft-bounds');
    // A failed pivot exactly when the dense Cholesky decided "not positive definite".
    expect(d.failedPivot !== null).toBe(d.decidedBy === 'cholesky' && d.verdict === 'not-positive-definite');
    const b = d.eigenvalueBounds!;
    // numpy's eigenvalues carry an error of about N·ε·λmax (backward stable; Golub & Van Loan §8.3,
    // memory): 1e-12·λmax of slack for that, far below any real violation.
    const slack = 1e-12 * r.max;
    expect(b.lower).toBeLessThanOrEqual(r.min + slack);
    expect(b.upper).toBeGreaterThanOrEqual(r.max - slack);
    // Ritz values are Rayleigh quotients: inside the exact spectrum (and so inside the bracket).
    expect(d.minEigenvalue).toBeGreaterThanOrEqual(r.min - slack);
    expect(d.maxEigenvalue).toBeLessThanOrEqual(r.max + slack);
    // λmax converges fast in Lanczos (well separated at the top of the spectrum).
    expect(Math.abs(d.maxEigenvalue / r.max - 1)).toBeLessThan(1e-6);
    // Proven positive definite only when it is.
    if (d.positiveDefinite) expect(r.min).toBeGreaterThan(0);
    // … and proven not positive definite only when numpy's λmin is zero within round-off or below
    // (Cholesky in floating point fails from about N·ε·λmax; 1e-10·λmax bounds that here).
    if (d.verdict === 'not-positive-definite') expect(r.min).toBeLessThan(1e-10 * r.max);
    // The certified condition bound is an upper bound on numpy's condition number.
    if (d.positiveDefinite && r.cond !== null) expect(d.conditionUpperBound!).toBeGreaterThanOrEqual(r.cond * (1 - 1e-9));
  });

  it('the bracket proves positive definiteness on the well-conditioned cases (not vacuous)', () => {
    // Every case whose exact λmin is above 1e-6·λmax is proven by the bracket.
    const proven = CASES.map((c, k) => [c, ref[k]] as const).filter(([, r]) => r.min > 1e-6 * r.max);
    expect(proven.length).toBeGreaterThan(10);
    for (const [c] of proven) expect(diagnoseStructured(c.grid, c.prior).positiveDefinite, c.name).toBe(true);
  });
});
