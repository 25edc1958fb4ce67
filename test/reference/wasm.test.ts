/**
 * The WebAssembly kernels against Debian's numpy / scipy (test/reference/wasm_reference.py).
 *
 * wasmVarianceBlock:
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
import { wasmGemmAvailable, wasmGemmNT } from '../../src/core/wasm/gemmNT.ts';
import { wasmAvailable, wasmVarianceBlock } from '../../src/core/wasm/varianceBlock.ts';
import { randomMatrix, randomSpd, seededUniform, toJson } from '../core/linalg/helpers.ts';
import { matrix } from '../../src/core/linalg/matrix.ts';
import { runPython } from './python.ts';

type VarianceRef = { results: { var: number[]; scale: number[] }[] };
type GemmRef = { results: { c: number[]; scale: number[] }[] };

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
    const ref = runPython<VarianceRef>('wasm_reference.py', {
      cases: inputs.map(({ L, Bt, pv, c0, c1 }) => ({ op: 'variance', l: toJson(L), bt: toJson(Bt), pv: Array.from(pv), c0, c1 })),
    }).results;
    let clamped = 0;
    inputs.forEach(({ L, Bt, pv, c0, c1 }, i) => {
      const ours = wasmVarianceBlock(L, Bt, pv, c0, c1);
      const { var: v, scale } = ref[i];
      expect(ours.length).toBe(v.length);
      for (let j = 0; j < v.length; j++) {
        expect(Math.abs(ours[j] - v[j]), `M = ${L.rows}, column ${c0 + j}`).toBeLessThanOrEqual(TOL * scale[j]);
        if (v[j] === 0) clamped++;
      }
    });
    // The cases cover both sides of the clamp.
    expect(clamped).toBeGreaterThan(0);
    expect(clamped).toBeLessThan(ref.reduce((a, r) => a + r.var.length, 0) / 2);
  });
});

/**
 * wasmGemmNT: C + α A Bᵀ against numpy's `c + alpha * (a @ b.T)`. A computed dot product of length k
 * has |error| ≤ γ_k |a|·|b|, γ_k = k u / (1 − k u) (Higham, 2nd ed., §3.1, memory); both sides
 * round, and numpy's BLAS sums in another order, so we allow 2 γ_k (|C| + |α| |A| |B|ᵀ) + u |C|.
 */
describe('wasmGemmNT against numpy matmul', () => {
  it.each([
    [5, 7, 3],
    [33, 17, 257],
    [64, 300, 600],
  ])('m = %d, n = %d, k = %d', (m, n, k) => {
    expect(wasmGemmAvailable()).toBe(true);
    const a = randomMatrix(m, k, m + 1);
    const b = randomMatrix(n, k, n + 2);
    const c = randomMatrix(m, n, k + 3);
    const alpha = -0.75;
    const [ref] = runPython<GemmRef>('wasm_reference.py', {
      cases: [{ op: 'gemm_nt', alpha, a: toJson(a), b: toJson(b), c: toJson(c) }],
    }).results;
    const ours = matrix(m, n, c.data.slice());
    wasmGemmNT(m, n, k, alpha, a.data, 0, k, b.data, 0, k, ours.data, 0, n);
    const u = 2 ** -53;
    const gamma = (k * u) / (1 - k * u);
    for (let i = 0; i < m * n; i++) {
      const tol = 2 * gamma * ref!.scale[i] + u * Math.abs(c.data[i]);
      expect(Math.abs(ours.data[i] - ref!.c[i]), `entry ${i}`).toBeLessThanOrEqual(tol);
    }
  });
});
