/**
 * Path choice (src/core/inverse/auto.ts): the rule, the refusal of a forced FFT path it cannot
 * take, and that computePosteriorSerial's two paths agree to 1e-10 relative on the demos (both are the
 * data-space form of Tarantola 2005 §3.2; the dense path is itself checked against scipy in
 * test/reference/posterior.test.ts, and the CLI's paths against scipy in test/cli/path.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { choosePosteriorPath, FFT_MIN_CELLS } from '../../../src/core/inverse/auto.ts';
import { computePosteriorSerial } from '../../../src/core/inverse/compute.ts';
import { InputError } from '../../../src/core/errors.ts';
import { matrix } from '../../../src/core/linalg/matrix.ts';
import { DEMOS } from '../../../src/core/problems/demos.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';

const prior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 2 }], nugget: 1e-3 };
function lineProblem(n: number, shape: number[] = [n]): Problem {
  const G = matrix(1, n);
  G.data[0] = 1;
  return {
    grid: { shape, spacing: shape.map(() => 1) },
    operator: { kind: 'dense', matrix: G },
    data: { values: new Float64Array([1]), sigma: new Float64Array([0.1]) },
  };
}

describe('choosePosteriorPath', () => {
  it('auto: dense below FFT_MIN_CELLS, fft from it on', () => {
    expect(choosePosteriorPath(lineProblem(FFT_MIN_CELLS - 1), prior).path).toBe('dense');
    expect(choosePosteriorPath(lineProblem(FFT_MIN_CELLS), prior).path).toBe('fft');
    expect(choosePosteriorPath(lineProblem(FFT_MIN_CELLS), prior, 'dense').path).toBe('dense');
    expect(choosePosteriorPath(lineProblem(4), prior, 'fft').path).toBe('fft');
  });
  it('a small 3-axis grid: auto stays dense by size, fft may be asked for; a 4-axis grid is a clear error naming the field', () => {
    const p = lineProblem(8, [2, 2, 2]);
    const d = choosePosteriorPath(p, prior);
    expect(d.path).toBe('dense');
    expect(d.reason).toContain('below');
    expect(choosePosteriorPath(p, prior, 'fft', '--path').path).toBe('fft');
    const p4 = lineProblem(16, [2, 2, 2, 2]);
    expect(() => choosePosteriorPath(p4, prior, 'fft', '--path')).toThrow(InputError);
    expect(() => choosePosteriorPath(p4, prior, 'fft', '--path')).toThrow(
      /^--path must be "dense" or "auto" for this problem .*grid has 4 axes.*, got "fft"$/,
    );
  });
});

describe('computePosterior on the demos', () => {
  it.each(DEMOS.map((d) => [d.id, d] as const))('%s: auto runs the FFT path and equals the dense path to 1e-10', (_, demo) => {
    const { problem, startPrior } = demo.build();
    const auto = computePosteriorSerial(problem, startPrior);
    const dense = computePosteriorSerial(problem, startPrior, 'dense');
    expect(auto.summary.path).toBe('fft');
    expect(dense.summary.path).toBe('dense');
    for (const k of ['mean', 'std'] as const) {
      const a = auto.summary[k];
      const b = dense.summary[k];
      const scale = Math.max(...Array.from(b, Math.abs));
      let d = 0;
      for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
      expect(d, k).toBeLessThanOrEqual(1e-10 * scale);
    }
    expect(Math.abs(auto.summary.logEvidence - dense.summary.logEvidence)).toBeLessThanOrEqual(1e-10 * Math.abs(dense.summary.logEvidence));
  });
});
