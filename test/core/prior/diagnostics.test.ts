import { describe, expect, it } from 'vitest';
import { diagnoseCovariance, diagnosePrior, priorWarnings, NEAR_SINGULAR_CONDITION } from '../../../src/core/prior/diagnostics.ts';
import { fromRows } from '../../../src/core/linalg/matrix.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';

const g100: Grid = { shape: [100], spacing: [1] };
const gauss10 = (nugget = 0): PriorSpec => ({ mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 1, length: 10 }], nugget });
const codes = (d: { warnings: readonly { code: string }[] }) => d.warnings.map((w) => w.code);

describe('diagnoseCovariance', () => {
  it('Gaussian kernel, length 10 × spacing on 100 cells: fails or is near-singular, and the suggested jitter fixes it', () => {
    const d = diagnosePrior(g100, gauss10());
    expect(!d.positiveDefinite || d.conditionNumber > NEAR_SINGULAR_CONDITION).toBe(true);
    expect(codes(d)).toContain('gaussian-long-length');
    expect(codes(d).some((c) => c === 'not-positive-definite' || c === 'near-singular')).toBe(true);
    expect(d.suggestedJitter).not.toBeNull();
    expect(d.suggestedJitterRelative).toBe(d.suggestedJitter); // mean variance is 1
    const fixed = diagnosePrior(g100, gauss10(d.suggestedJitter!));
    expect(fixed.positiveDefinite).toBe(true);
    expect(fixed.conditionNumber).toBeLessThanOrEqual(NEAR_SINGULAR_CONDITION);
    expect(fixed.suggestedJitter).toBeNull();
    expect(fixed.warnings).toEqual([]);
    // Smallest decade: one decade less does not satisfy both conditions.
    const less = diagnosePrior(g100, gauss10(d.suggestedJitter! / 10));
    expect(!less.positiveDefinite || less.conditionNumber > NEAR_SINGULAR_CONDITION).toBe(true);
  });

  it('a well-conditioned prior needs no jitter and has no warnings', () => {
    const d = diagnosePrior(g100, { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 2, length: 10 }] });
    expect(d.positiveDefinite).toBe(true);
    expect(d.failedPivot).toBeNull();
    expect(d.suggestedJitter).toBeNull();
    expect(d.suggestedJitterRelative).toBeNull();
    expect(d.warnings).toEqual([]);
  });

  it('indefinite 2 × 2 [[1, 2], [2, 1]]: pivot 1, eigenvalues −1 and 3, no jitter up to the variance helps', () => {
    // Eigenvalues of [[a, b], [b, a]] are a ± b (closed form).
    const d = diagnoseCovariance(
      fromRows([
        [1, 2],
        [2, 1],
      ]),
    );
    expect(d.positiveDefinite).toBe(false);
    expect(d.failedPivot).toBe(1);
    expect(d.minEigenvalue).toBeCloseTo(-1, 14);
    expect(d.maxEigenvalue).toBeCloseTo(3, 14);
    expect(d.conditionNumber).toBe(Infinity);
    expect(d.suggestedJitter).toBeNull();
    expect(codes(d)).toEqual(['not-positive-definite', 'no-jitter-found']);
  });

  it('[[1, 1−δ], [1−δ, 1]] with δ = 1e−12: factors but is near-singular; the suggested decade is 1e−9', () => {
    // Eigenvalues 2 − δ and δ; cond(C + jI) = (2 − δ + j)/(δ + j) ≤ 1e10 fails at j = 1e−10
    // (2/1.01e−10 ≈ 2.0e10), so the answer is the decade 1e−9: (2 + 1e−9)/(1e−9 + 1e−12) ≈ 2.0e9.
    const d = diagnoseCovariance(
      fromRows([
        [1, 1 - 1e-12],
        [1 - 1e-12, 1],
      ]),
    );
    expect(d.positiveDefinite).toBe(true);
    expect(codes(d)).toEqual(['near-singular']);
    expect(d.suggestedJitterRelative).toBe(1e-9);
  });
});

describe('priorWarnings', () => {
  it('nu on a non-Matérn kernel is reported as ignored', () => {
    expect(
      codes({
        warnings: priorWarnings(g100, { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 2, nu: 2 }] }),
      }),
    ).toEqual(['nu-ignored']);
  });
  it('smooth Matérn (ν = 10) with a long length and no nugget is flagged; a short one is not', () => {
    const m = (length: number, nugget = 0): PriorSpec => ({
      mean: { constant: 0 },
      terms: [{ kernel: 'matern', variance: 1, length, nu: 10 }],
      nugget,
    });
    expect(codes({ warnings: priorWarnings(g100, m(10)) })).toEqual(['smooth-matern-long-length']);
    expect(priorWarnings(g100, m(0.5))).toEqual([]);
    expect(priorWarnings(g100, m(10, 1e-3))).toEqual([]);
  });
  it('Gaussian threshold: length 2 cells passes, 3 cells is flagged (1e10 is crossed near 2.2 cells)', () => {
    const gs = (length: number): PriorSpec => ({ mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 1, length }] });
    expect(priorWarnings(g100, gs(2))).toEqual([]);
    expect(codes({ warnings: priorWarnings(g100, gs(3)) })).toEqual(['gaussian-long-length']);
    expect(
      codes({
        warnings: priorWarnings(
          { shape: [10, 10], spacing: [1, 1] },
          { mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 1, lengths: [4, 1], angle: 10 }] },
        ),
      }),
    ).toEqual(['gaussian-long-length']);
  });
  it('says a huge eigenvalue spread sensibly (no "10^3429") and names the term in words', () => {
    const w = priorWarnings(g100, { mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 1, length: 40 }] });
    expect(w).toHaveLength(1);
    expect(w[0].message).toMatch(/^Term 1: a Gaussian kernel/);
    expect(w[0].message).toContain('eigenvalues span more than 10^16 (past the 16 significant digits of double precision)');
    expect(w[0].message).not.toMatch(/10\^(1[7-9]|[2-9]\d|\d{3,})/);
  });
  it('spherical kernels on 1-D and 2-D grids raise no dimension warning (the rule only bites above 3-D)', () => {
    expect(
      priorWarnings(
        { shape: [5, 5], spacing: [1, 1] },
        { mean: { constant: 0 }, terms: [{ kernel: 'spherical', variance: 1, length: 3 }] },
      ),
    ).toEqual([]);
  });
});
