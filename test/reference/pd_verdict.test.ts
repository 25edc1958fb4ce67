/**
 * The three-outcome positive-definiteness verdict (src/core/prior/diagnostics.ts,
 * structuredDiagnostics.ts) on priors that the FFT bracket alone cannot prove, against exact
 * eigenvalues from numpy.linalg.eigvalsh (Debian python3-numpy, LAPACK) of covariances built
 * independently (test/reference/structured_diagnostics_reference.py). Before the verdict had three
 * outcomes, both reproduction cases below were reported as "not positive definite" (a bracket
 * with a negative lower end was read as a proof of failure) although numpy finds λmin > 0.
 */
import { describe, expect, it } from 'vitest';
import { diagnoseCovariance, diagnosePrior } from '../../src/core/prior/diagnostics.ts';
import { covarianceMatrix } from '../../src/core/prior/covariance.ts';
import { DENSE_DECISION_LIMIT, diagnosePriorAuto, diagnoseStructured } from '../../src/core/prior/structuredDiagnostics.ts';
import type { Grid } from '../../src/core/grid/grid.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import { runPython } from './python.ts';

type Ref = { min: number; max: number; n: number; cond: number | null };
const zero = { constant: 0 } as const;

/** Correlation lengths longer than the domain: the embedding's bound is negative, Cm is positive definite. */
const LONG_LENGTH_CASES: { name: string; grid: Grid; prior: PriorSpec }[] = [
  {
    name: '30 × 20, rotated exponential, lengths [99.92, 26.02], nugget 1e-6',
    grid: { shape: [30, 20], spacing: [1, 1] },
    prior: { mean: zero, terms: [{ kernel: 'exponential', variance: 1.0157e-3, lengths: [99.92, 26.02], angle: 14.67 }], nugget: 1e-6 },
  },
  {
    name: '24 × 24, isotropic exponential of length 200',
    grid: { shape: [24, 24], spacing: [1, 1] },
    prior: { mean: zero, terms: [{ kernel: 'exponential', variance: 1, length: 200 }] },
  },
];

describe('priors whose correlation length exceeds the domain', () => {
  const ref = runPython<{ cases: Ref[] }>('structured_diagnostics_reference.py', {
    cases: LONG_LENGTH_CASES.map(({ grid, prior }) => ({ grid, prior })),
  }).cases;

  it.each(LONG_LENGTH_CASES.map((c, k) => [c.name, k] as const))('%s: proven positive definite, as numpy finds', (_n, k) => {
    const { grid, prior } = LONG_LENGTH_CASES[k];
    const r = ref[k];
    expect(r.min).toBeGreaterThan(0); // the outside reference: numpy's smallest eigenvalue
    const d = diagnosePriorAuto(grid, prior);
    expect(d.eigenvalueMethod).toBe('fft-bounds');
    expect(d.eigenvalueBounds!.lower).toBeLessThanOrEqual(0); // the bracket alone cannot decide …
    expect(d.verdict).toBe('positive-definite'); // … the dense Cholesky does
    expect(d.positiveDefinite).toBe(true);
    expect(d.decidedBy).toBe('cholesky');
    expect(d.basis).toMatch(/Cholesky factorisation of the dense Cm/);
    expect(d.warnings.map((w) => w.code)).not.toContain('not-positive-definite');
    // The Lanczos estimate is a Rayleigh quotient: at or above numpy's λmin, within 5 % here.
    expect(d.minEigenvalue).toBeGreaterThanOrEqual(r.min * (1 - 1e-9));
    expect(d.minEigenvalue).toBeLessThan(r.min * 1.05);
  });

  it('above the dense limit and unproven by any embedding: not decided (never "not positive definite"), with a next step', () => {
    const { grid, prior } = LONG_LENGTH_CASES[1];
    const d = diagnoseStructured(grid, prior, { denseLimit: 0 });
    expect(d.verdict).toBe('not-decided');
    expect(d.positiveDefinite).toBeNull();
    expect(d.decidedBy).toBe('none');
    expect(d.failedPivot).toBeNull();
    expect(d.warnings.map((w) => w.code)).toContain('not-decided');
    expect(d.warnings.map((w) => w.code)).not.toContain('not-positive-definite');
    expect(d.nextStep).toMatch(/nugget of .*at most 0 cells/);
    // The suggested nugget is sufficient: with it, the bracket proves positive definiteness.
    const fixed = diagnoseStructured(grid, { ...prior, nugget: d.suggestedJitter! }, { denseLimit: 0 });
    expect(fixed.verdict).toBe('positive-definite');
    expect(fixed.decidedBy).toBe('fft-bracket');
  });

  it(`the dense limit (${DENSE_DECISION_LIMIT} cells) decides a numerically singular Gaussian prior as not positive definite`, () => {
    const grid: Grid = { shape: [40, 30], spacing: [1, 1] };
    const prior: PriorSpec = { mean: zero, terms: [{ kernel: 'gaussian', variance: 1, length: 6 }] };
    const d = diagnosePriorAuto(grid, prior);
    expect(d.verdict).toBe('not-positive-definite');
    expect(d.positiveDefinite).toBe(false);
    expect(d.failedPivot).not.toBeNull();
  });
});

describe('tiny variances: the verdict and the numbers agree', () => {
  // Eigenvalues of c·A are c·eig(A) (exact): a variance of 1e-300 must give 1e-300 times the
  // unit-variance spectrum, not a negative λmin beside a successful factorisation.
  const grid: Grid = { shape: [10, 10], spacing: [1, 1] };
  const unit: PriorSpec = { mean: zero, terms: [{ kernel: 'exponential', variance: 1, length: 3 }] };
  const tiny: PriorSpec = { mean: zero, terms: [{ kernel: 'exponential', variance: 1e-300, length: 3 }] };
  const [ref] = runPython<{ cases: Ref[] }>('structured_diagnostics_reference.py', { cases: [{ grid, prior: unit }] }).cases;
  it("a matrix at 1e-300 (check --covariance): eigenvalues 1e-300 times numpy's, proven positive definite", () => {
    const c = covarianceMatrix(grid, unit);
    const scaled = { rows: c.rows, cols: c.cols, data: c.data.map((v) => v * 1e-300) };
    const d = diagnoseCovariance(scaled);
    expect(d.verdict).toBe('positive-definite');
    expect(d.minEigenvalue).toBeGreaterThan(0);
    expect(Math.abs(d.minEigenvalue / 1e-300 - ref!.min) / ref!.min).toBeLessThan(1e-9);
    expect(Math.abs(d.conditionNumber - ref!.cond!) / ref!.cond!).toBeLessThan(1e-9);
    expect(d.suggestedJitter).toBeNull();
  });
  it('a prior variance of 1e-300 is refused at its field before any computation', () => {
    expect(() => diagnosePrior(grid, tiny)).toThrow(/terms\[0\]\.variance/);
  });
});
