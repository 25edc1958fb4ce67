/**
 * Tikhonov regularisation as a special case of the posterior mean (Cd = σ²I, Cm = τ²I, m0 = 0):
 * m̃ = (GᵀG + (σ²/τ²) I)⁻¹ Gᵀ d (Bardsley 2018 §4.1, memory), on Hansen's (1994) shaw and gravity
 * problems (σ/τ kept moderate so the normal equations in the reference stay well conditioned);
 * reference solutions by numpy.linalg.solve and scipy.linalg.lstsq
 * (test/reference/posterior_tikhonov.py).
 */
import { describe, expect, it } from 'vitest';
import { posteriorSummary, preparePosteriorFromCovariance } from '../../src/core/inverse/posterior.ts';
import { identity } from '../../src/core/linalg/matrix.ts';
import { gravity, shaw } from '../../src/core/problems/hansen.ts';
import { runPython } from './python.ts';

describe.each([
  ['shaw', shaw(32), 1e-2, 1],
  ['gravity', gravity(40), 1e-2, 0.5],
] as const)('Tikhonov special case on Hansen %s', (_name, p, sigma, tau) => {
  const n = p.x.length;
  const d = p.b.map((v, k) => v + sigma * Math.sin(2.3 * k + 1));
  const ref = runPython<{ normal: number[]; stacked: number[] }>('posterior_tikhonov.py', {
    A: Array.from(p.A.data),
    n,
    d: Array.from(d),
    sigma,
    tau,
  });
  const Cm = identity(n);
  Cm.data.forEach((v, k) => (Cm.data[k] = v * tau * tau));
  const problem = {
    grid: { shape: [n], spacing: [1 / n] },
    operator: { kind: 'dense' as const, matrix: p.A },
    data: { values: d, sigma: new Float64Array(n).fill(sigma) },
  };
  const mean = posteriorSummary(preparePosteriorFromCovariance(problem, Cm, new Float64Array(n))).mean;
  it('posterior mean equals the regularised normal-equations solution to 1e-8', () => {
    const scale = Math.max(...ref.normal.map(Math.abs));
    mean.forEach((v, i) => expect(Math.abs(v - ref.normal[i])).toBeLessThanOrEqual(1e-8 * scale));
  });
  it('and the stacked least-squares solution', () => {
    const scale = Math.max(...ref.stacked.map(Math.abs));
    mean.forEach((v, i) => expect(Math.abs(v - ref.stacked[i])).toBeLessThanOrEqual(1e-8 * scale));
  });
});
