/**
 * Diagnostics against numpy.linalg.eigvalsh (LAPACK) on independently built covariances
 * (test/reference/prior_diagnostics_reference.py), and the dense-sampling condition estimate
 * (src/core/prior/spectral.ts, Poisson summation + Grenander–Szegő) against the actual condition
 * number computed by numpy.
 */
import { describe, expect, it } from 'vitest';
import { diagnosePrior } from '../../src/core/prior/diagnostics.ts';
import { logLatticeCondition } from '../../src/core/prior/spectral.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import type { Grid } from '../../src/core/grid/grid.ts';
import { runPython } from './python.ts';

type Ref = { min: number; max: number; n: number };
const p = (terms: PriorSpec['terms'], nugget?: number): PriorSpec => ({
  mean: { constant: 0 },
  terms,
  ...(nugget === undefined ? {} : { nugget }),
});

const eigCases: { name: string; grid: Grid; prior: PriorSpec }[] = [
  {
    name: '1-D exponential + nugget',
    grid: { shape: [150], spacing: [0.5] },
    prior: p([{ kernel: 'exponential', variance: 2, length: 3 }], 0.1),
  },
  { name: '1-D matern 2.5', grid: { shape: [120], spacing: [1] }, prior: p([{ kernel: 'matern', variance: 1, length: 2, nu: 2.5 }]) },
  {
    name: '2-D rotated spherical + gaussian',
    grid: { shape: [12, 10], spacing: [1, 2] },
    prior: p(
      [
        { kernel: 'spherical', variance: 1, lengths: [8, 3], angle: 25 },
        { kernel: 'gaussian', variance: 0.5, length: 1 },
      ],
      0.01,
    ),
  },
];

// Condition-estimate cases: long grids so the finite section is close to the infinite lattice.
const condCases: { name: string; grid: Grid; prior: PriorSpec; factor: number }[] = [
  {
    name: '1-D gaussian, length 1.5 cells',
    grid: { shape: [400], spacing: [1] },
    prior: p([{ kernel: 'gaussian', variance: 1, length: 1.5 }]),
    factor: 1.05,
  },
  {
    name: '1-D gaussian, length 2 cells, spacing 0.5',
    grid: { shape: [400], spacing: [0.5] },
    prior: p([{ kernel: 'gaussian', variance: 1, length: 1 }]),
    factor: 1.05,
  },
  {
    name: '1-D matern 2.5, length 3 cells',
    grid: { shape: [500], spacing: [1] },
    prior: p([{ kernel: 'matern', variance: 1, length: 3, nu: 2.5 }]),
    factor: 1.2,
  },
  {
    name: '2-D rotated gaussian',
    grid: { shape: [36, 36], spacing: [1, 1] },
    prior: p([{ kernel: 'gaussian', variance: 1, lengths: [1.2, 0.8], angle: 30 }]),
    factor: 1.5,
  },
];

describe('diagnostics vs numpy eigvalsh', () => {
  const ref = runPython<{ cases: Ref[] }>('prior_diagnostics_reference.py', { cases: [...eigCases, ...condCases] }).cases;

  it.each(eigCases.map((c, k) => [c.name, k] as const))('%s: extreme eigenvalues and condition number', (_n, k) => {
    const d = diagnosePrior(eigCases[k].grid, eigCases[k].prior);
    const r = ref[k];
    expect(d.eigenvalueMethod).toBe('exact');
    // Backward-stable eigenvalues: |error| ≲ c·N·ε·λmax (Golub & Van Loan §8.3, memory); 1e-12·λmax is generous.
    expect(Math.abs(d.maxEigenvalue - r.max)).toBeLessThan(1e-12 * r.max);
    expect(Math.abs(d.minEigenvalue - r.min)).toBeLessThan(1e-12 * r.max);
    expect(d.conditionNumber / (r.max / r.min)).toBeCloseTo(1, 6);
    expect(d.positiveDefinite).toBe(true);
  });

  it('above the exact limit (N = 1600): Lanczos Ritz values are inner bounds close to numpy', () => {
    const grid: Grid = { shape: [1600], spacing: [1] };
    const prior = p([{ kernel: 'exponential', variance: 2, length: 10 }], 0.01);
    const [r] = runPython<{ cases: Ref[] }>('prior_diagnostics_reference.py', { cases: [{ grid, prior }] }).cases;
    const d = diagnosePrior(grid, prior);
    expect(d.eigenvalueMethod).toBe('lanczos');
    // Ritz values lie inside the spectrum (Cauchy interlacing); λmax converges fast, λmin slowly.
    expect(d.maxEigenvalue).toBeLessThanOrEqual(r!.max * (1 + 1e-12));
    expect(d.maxEigenvalue / r!.max).toBeGreaterThan(1 - 1e-9);
    expect(d.minEigenvalue).toBeGreaterThanOrEqual(r!.min * (1 - 1e-12));
    expect(d.minEigenvalue / r!.min).toBeLessThan(1.05);
  });

  it.each(condCases.map((c, k) => [c.name, k] as const))('%s: lattice condition estimate ≈ numpy cond', (_n, k) => {
    const { grid, prior, factor } = condCases[k];
    const r = ref[eigCases.length + k];
    const actual = r.max / r.min;
    const estimate = Math.exp(logLatticeCondition(prior.terms[0], grid)!);
    // Grenander–Szegő: a finite section's spectrum lies inside [min f, max f], so the estimate is an
    // upper bound (up to the ω-grid resolution of the minimum search), approached as N grows.
    expect(actual).toBeLessThan(estimate * 1.001);
    expect(estimate / actual).toBeLessThan(factor);
  });
});
