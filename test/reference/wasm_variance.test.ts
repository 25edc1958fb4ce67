/**
 * The WASM posterior-variance block against Debian's scipy (test/reference/wasm_variance_reference.py):
 * var_j = max(Cm_jj − Σ_k W_kj², 0) with W = scipy.linalg.solve_triangular(L, Bᵀ[:, c0:c1], lower=True).
 *
 * Tolerance: forward substitution is backward stable, (L + ΔL) ŵ = b with |ΔL| ≤ M u |L| (Higham,
 * Accuracy and Stability of Numerical Algorithms, 2nd ed., Thm 8.5, memory), so the relative error
 * of W is ≲ M u κ(L); here κ(L) = √κ(A) ≤ √(M/3 + 1) ≈ 12 at M = 400 (randomSpd's eigenvalues lie
 * in [1, M/3 + 1]), giving ≈ 400 · 1.1e-16 · 12 ≈ 5e-13 on Σ W² and on var relative to
 * pv + Σ W². Both sides round, so we allow 1e-11 of that scale (a 20× margin).
 */
import { describe, expect, it } from 'vitest';
import { cholesky } from '../../src/core/linalg/cholesky.ts';
import { wasmAvailable, wasmVarianceBlock } from '../../src/core/wasm/varianceBlock.ts';
import { randomMatrix, randomSpd, seededUniform, toJson } from '../core/linalg/helpers.ts';
import { runPython } from './python.ts';

type Ref = { results: { var: number[]; scale: number[] }[] };

const TOL = 1e-11;

describe('wasmVarianceBlock against scipy.linalg.solve_triangular', () => {
  it('M in {1, 5, 64, 137, 400}, odd block widths: |ours − scipy| ≤ 1e-11 (pv + ΣW²)', () => {
    expect(wasmAvailable()).toBe(true); // otherwise this would only test the JS fallback
    const sizes = [1, 5, 64, 137, 400];
    const n = 45;
    const inputs = sizes.map((m, i) => {
      const r = cholesky(randomSpd(m, 50 + i));
      if (!r.ok) throw new Error('test matrix not SPD');
      const u = seededUniform(60 + i);
      const pv = Float64Array.from({ length: n }, () => ((u() + 1) / 2) * m);
      return { L: r.factor, Bt: randomMatrix(m, n, 70 + i), pv, c0: 2 + i, c1: 2 + i + 37 - 2 * i };
    });
    const ref = runPython<Ref>('wasm_variance_reference.py', {
      cases: inputs.map(({ L, Bt, pv, c0, c1 }) => ({ l: toJson(L), bt: toJson(Bt), pv: Array.from(pv), c0, c1 })),
    }).results;
    let clamped = 0;
    inputs.forEach(({ L, Bt, pv, c0, c1 }, i) => {
      const ours = wasmVarianceBlock(L, Bt, pv, c0, c1);
      const { var: v, scale } = ref[i]!;
      expect(ours.length).toBe(v.length);
      for (let j = 0; j < v.length; j++) {
        expect(Math.abs(ours[j]! - v[j]!), `M = ${L.rows}, column ${c0 + j}`).toBeLessThanOrEqual(TOL * scale[j]!);
        if (v[j] === 0) clamped++;
      }
    });
    // The cases cover both sides of the clamp.
    expect(clamped).toBeGreaterThan(0);
    expect(clamped).toBeLessThan(ref.reduce((a, r) => a + r.var.length, 0) / 2);
  });
});
