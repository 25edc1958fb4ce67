/**
 * The worker's mean-first partial posterior (src/worker/engine.ts structuredPartial, FFT path)
 * against the model-space posterior of test/reference/posterior_reference.py (Debian's
 * python3-numpy / python3-scipy: cho_factor / cho_solve; Tarantola 2005, Inverse Problem Theory,
 * §3.2): mean, predicted data, normalised residuals, χ², prior std √diag Cm.
 * Tolerance 1e-9 relative: the two forms (data space here, model space there) agree to round-off
 * for these well-conditioned cases (κ(Cm) = 143 for this exponential kernel, numpy.linalg.cond).
 */
import { describe, expect, it } from 'vitest';
import { Engine } from '../../src/worker/engine.ts';
import type { PosteriorPartial } from '../../src/worker/protocol.ts';
import { PRIOR, profileProblem } from '../worker/problems.ts';
import { runPython } from './python.ts';

interface Ref {
  mean: number[];
  predicted: number[];
  residuals: number[];
  chi2: number;
  Cm: number[];
}

function relErr(a: ArrayLike<number>, b: ArrayLike<number>): number {
  expect(a.length).toBe(b.length);
  let d = 0;
  let s = 0;
  for (let i = 0; i < b.length; i++) {
    d = Math.max(d, Math.abs(a[i] - b[i]));
    s = Math.max(s, Math.abs(b[i]));
  }
  return d / (s || 1);
}

describe('partial posterior vs scipy (posterior_reference.py)', () => {
  const cases = (['diagonal', 'full'] as const).map((errors) => ({ errors, problem: profileProblem(160, errors) }));
  const ref = runPython<{ results: Ref[] }>('posterior_reference.py', {
    cases: cases.map(({ problem }) => {
      const g = problem.operator.matrix as { rows: number; cols: number; data: Float64Array };
      const d = problem.data;
      return {
        grid: problem.grid,
        prior: PRIOR,
        G: { rows: g.rows, cols: g.cols, dense: Array.from(g.data) },
        d: Array.from(d.values),
        ...(d.sigma ? { sigma: Array.from(d.sigma) } : { Cd: Array.from(d.covariance!.data) }),
      };
    }),
  }).results;

  cases.forEach(({ errors, problem }, k) => {
    it(`${errors} Cd: mean, G m̃, residuals, χ², √diag Cm within 1e-9`, async () => {
      const engine = new Engine({ partialMinFlops: 0 });
      await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem });
      let partial: PosteriorPartial | null = null;
      await engine.handle({ id: 2, kind: 'posterior', problemVersion: 1, prior: PRIOR }, undefined, (p) => (partial = p));
      const p = partial as PosteriorPartial | null;
      expect(p).not.toBeNull();
      const r = ref[k];
      const n = p!.mean.length;
      expect(relErr(p!.mean, r.mean)).toBeLessThan(1e-9);
      expect(relErr(p!.predicted, r.predicted)).toBeLessThan(1e-9);
      expect(relErr(p!.residuals, r.residuals)).toBeLessThan(1e-9);
      expect(Math.abs(p!.chi2 - r.chi2)).toBeLessThan(1e-9 * r.chi2);
      expect(
        relErr(
          p!.priorStd,
          Array.from({ length: n }, (_, i) => Math.sqrt(r.Cm[i * n + i])),
        ),
      ).toBeLessThan(1e-12);
    });
  });
});
