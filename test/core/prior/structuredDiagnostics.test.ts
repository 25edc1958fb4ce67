/**
 * FFT-route diagnostics: the bracket's ends against the closed-form symbol of the exponential
 * kernel, agreement with the dense route (./diagnostics.ts: Cholesky and exact eigenvalues) where
 * both run, the jitter rule, and the automatic route choice.
 */
import { describe, expect, it } from 'vitest';
import { diagnosePrior, JITTER_DECADES, NEAR_SINGULAR_CONDITION } from '../../../src/core/prior/diagnostics.ts';
import {
  chooseDiagnosticsPath,
  diagnosePriorAuto,
  diagnoseStructured,
  spectrumBracket,
  STRUCTURED_DIAGNOSTICS_MIN_CELLS,
} from '../../../src/core/prior/structuredDiagnostics.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { seededVector } from '../fft/cases.ts';

const zero = { constant: 0 } as const;
const codes = (d: { warnings: readonly { code: string }[] }) => d.warnings.map((w) => w.code).sort();

describe('spectrumBracket: exponential kernel against its lattice symbol', () => {
  // On a unit lattice, ρ(h) = r^|h| with r = e^(−Δ/ℓ) has the symbol f(ω) = Σ r^|h| e^(−iωh) =
  // (1 − r²)/(1 − 2r cos ω + r²) (geometric series, derived), with min f = (1 − r)/(1 + r) at ω = π
  // and max f = (1 + r)/(1 − r) at ω = 0. The circulant eigenvalues sample f at ω = 2πk/p up to the
  // tail beyond p/2 (r^(p/2) ≈ e^(−51) here), and k = 0 and k = p/2 hit both extremes exactly.
  for (const [variance, length, spacing] of [
    [1, 5, 1],
    [2.5, 3, 0.5],
  ] as const) {
    it(`variance ${variance}, length ${length}, spacing ${spacing}`, () => {
      const grid: Grid = { shape: [200], spacing: [spacing] };
      const prior: PriorSpec = { mean: zero, terms: [{ kernel: 'exponential', variance, length }] };
      const b = spectrumBracket(grid, prior);
      const r = Math.exp(-spacing / length);
      const lo = (variance * (1 - r)) / (1 + r);
      const hi = (variance * (1 + r)) / (1 - r);
      expect(b.margin).toBeGreaterThan(0);
      expect(b.margin).toBeLessThan(1e-10 * hi);
      expect(Math.abs(b.kernelLower + b.margin - lo)).toBeLessThan(1e-12 * hi);
      expect(Math.abs(b.kernelUpper - b.margin - hi)).toBeLessThan(1e-12 * hi);
      expect(b.lower).toBe(b.kernelLower);
      expect(b.tried).toEqual([[512, 1]]); // proven at the first size: no doubling
    });
  }

  it('nugget shifts both ends; a constant std profile s scales them by s²', () => {
    const grid: Grid = { shape: [40, 30], spacing: [1, 1] };
    const base: PriorSpec = { mean: zero, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 3 }] };
    const b0 = spectrumBracket(grid, base);
    const bn = spectrumBracket(grid, { ...base, nugget: 0.3 });
    expect(bn.lower).toBeCloseTo(b0.lower + 0.3, 14);
    expect(bn.upper).toBeCloseTo(b0.upper + 0.3, 12);
    const bs = spectrumBracket(grid, { ...base, stdProfile: new Array(1200).fill(2) });
    expect(bs.lower).toBeCloseTo(4 * b0.lower, 12);
    expect(bs.upper).toBeCloseTo(4 * b0.upper, 12);
  });
});

const agreeCases: { name: string; grid: Grid; prior: PriorSpec }[] = [
  {
    name: '1-D exponential',
    grid: { shape: [300], spacing: [1] },
    prior: { mean: zero, terms: [{ kernel: 'exponential', variance: 2, length: 6 }] },
  },
  {
    name: '2-D rotated matern + nugget',
    grid: { shape: [24, 20], spacing: [1, 1.5] },
    prior: { mean: zero, nugget: 0.01, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, lengths: [6, 2], angle: 30 }] },
  },
  {
    name: '2-D spherical + profile',
    grid: { shape: [20, 20], spacing: [1, 1] },
    prior: {
      mean: zero,
      stdProfile: Array.from(seededVector(400, 4), (v) => 1 + 0.5 * v),
      terms: [{ kernel: 'spherical', variance: 1, length: 8 }],
    },
  },
  {
    name: '2-D sum exponential + gaussian + nugget',
    grid: { shape: [22, 18], spacing: [1, 1] },
    prior: {
      mean: zero,
      nugget: 0.05,
      terms: [
        { kernel: 'exponential', variance: 0.5, length: 2 },
        { kernel: 'gaussian', variance: 1, lengths: [5, 2], angle: 100 },
      ],
    },
  },
  {
    name: '1-D gaussian, length 10 cells, no nugget (singular)',
    grid: { shape: [200], spacing: [1] },
    prior: { mean: zero, terms: [{ kernel: 'gaussian', variance: 1, length: 10 }] },
  },
];

describe('diagnoseStructured agrees with the dense route', () => {
  it.each(agreeCases.map((c, k) => [c.name, k] as const))('%s', (_n, k) => {
    const { grid, prior } = agreeCases[k];
    const s = diagnoseStructured(grid, prior);
    const d = diagnosePrior(grid, prior);
    expect(d.eigenvalueMethod).toBe('exact');
    expect(s.positiveDefinite).toBe(d.positiveDefinite);
    expect(codes(s)).toEqual(codes(d));
    // A failed pivot only when the dense Cholesky decided (the bracket could not), the same row.
    expect(s.failedPivot).toBe(s.decidedBy === 'cholesky' ? d.failedPivot : null);
    // Exact eigenvalues inside the bracket, estimates inside the exact range (Ritz values).
    const b = s.eigenvalueBounds!;
    const slack = 1e-12 * d.maxEigenvalue;
    expect(b.lower).toBeLessThanOrEqual(d.minEigenvalue + slack);
    expect(b.upper).toBeGreaterThanOrEqual(d.maxEigenvalue - slack);
    expect(s.minEigenvalue).toBeGreaterThanOrEqual(d.minEigenvalue - slack);
    expect(s.maxEigenvalue).toBeLessThanOrEqual(d.maxEigenvalue + slack);
    if (s.positiveDefinite) expect(s.conditionUpperBound!).toBeGreaterThanOrEqual(d.conditionNumber * (1 - 1e-9));
  });

  it('a prior no route can decide (dense limit 0): "not decided", never "not positive definite"; its jitter makes the dense route clean', () => {
    const grid: Grid = { shape: [200], spacing: [1] };
    const prior: PriorSpec = { mean: zero, terms: [{ kernel: 'gaussian', variance: 1, length: 10 }] };
    const s = diagnoseStructured(grid, prior, { denseLimit: 0 });
    expect(s.verdict).toBe('not-decided');
    expect(s.positiveDefinite).toBeNull();
    expect(s.eigenvalueBounds!.lower).toBeLessThanOrEqual(0);
    const w = s.warnings.find((x) => x.code === 'not-decided')!;
    expect(w.message).toMatch(/not decided.*λmin ≥ .*Lanczos estimates λmin/);
    // With the dense Cholesky allowed (200 cells), the same prior is decided: it does not factor.
    expect(diagnoseStructured(grid, prior).verdict).toBe('not-positive-definite');
    expect(s.suggestedJitter).not.toBeNull();
    // The jitter rule on the certified bracket (decades of the mean variance, κ ≤ 1e10).
    const { lower, upper } = s.eigenvalueBounds!;
    const ok = (r: number) => lower + r > 0 && (upper + r) / (lower + r) <= NEAR_SINGULAR_CONDITION;
    const first = JITTER_DECADES.find(ok)!;
    expect(s.suggestedJitterRelative).toBe(first);
    expect(ok(first / 10)).toBe(false);
    // Outside check by the dense route (Cholesky + exact eigenvalues): the suggestion suffices.
    const fixed = diagnosePrior(grid, { ...prior, nugget: s.suggestedJitter! });
    expect(fixed.positiveDefinite).toBe(true);
    expect(fixed.conditionNumber).toBeLessThanOrEqual(NEAR_SINGULAR_CONDITION);
    // … and the FFT route then proves it.
    const again = diagnoseStructured(grid, { ...prior, nugget: s.suggestedJitter! });
    expect(again.positiveDefinite).toBe(true);
    expect(again.suggestedJitter).toBeNull();
  });

  it('a kernel that underflows to 3·I: bracket tight at 3, κ = 1', () => {
    const grid: Grid = { shape: [64], spacing: [1] };
    const d = diagnoseStructured(grid, { mean: zero, terms: [{ kernel: 'gaussian', variance: 3, length: 0.05 }] });
    // ρ(1/0.05) = e^(−200) underflows: Cm = 3 I exactly, so λmin = λmax = 3 and κ = 1.
    expect(d.positiveDefinite).toBe(true);
    expect(d.eigenvalueBounds!.lower).toBeLessThanOrEqual(3);
    expect(d.eigenvalueBounds!.lower).toBeGreaterThan(3 * (1 - 1e-12));
    expect(d.eigenvalueBounds!.upper).toBeGreaterThanOrEqual(3);
    expect(d.conditionNumber).toBeCloseTo(1, 12);
  });
});

describe('diagnosePriorAuto', () => {
  const prior: PriorSpec = { mean: zero, terms: [{ kernel: 'exponential', variance: 1, length: 4 }] };
  it(`dense below ${STRUCTURED_DIAGNOSTICS_MIN_CELLS} cells, FFT bounds from there`, () => {
    const small: Grid = { shape: [STRUCTURED_DIAGNOSTICS_MIN_CELLS - 1], spacing: [1] };
    const large: Grid = { shape: [STRUCTURED_DIAGNOSTICS_MIN_CELLS], spacing: [1] };
    expect(chooseDiagnosticsPath(small, prior).path).toBe('dense');
    expect(chooseDiagnosticsPath(large, prior).path).toBe('fft');
    expect(diagnosePriorAuto({ shape: [50], spacing: [1] }, prior).eigenvalueMethod).toBe('exact');
    const d = diagnosePriorAuto({ shape: [64, 64], spacing: [1, 1] }, prior);
    expect(d.eigenvalueMethod).toBe('fft-bounds');
    expect(d.positiveDefinite).toBe(true);
    expect(d.embeddingPadding).toEqual([128, 128]);
  });

  it('bad input names the field', () => {
    expect(() =>
      diagnoseStructured({ shape: [10], spacing: [1] }, { mean: zero, terms: [{ kernel: 'exponential', variance: -1, length: 2 }] }),
    ).toThrow(/terms\[0\]\.variance/);
    expect(() =>
      diagnoseStructured(
        { shape: [10], spacing: [1] },
        { mean: zero, stdProfile: [1, 2], terms: [{ kernel: 'exponential', variance: 1, length: 2 }] },
      ),
    ).toThrow(/stdProfile/);
  });
});
