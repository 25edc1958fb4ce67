/**
 * The Lanczos reorthogonalisation in WebAssembly (src/core/wasm/reorth.ts, ./wat/reorth.wat) against its
 * JavaScript twin (reorthogonaliseTwice in src/core/linalg/eigen.ts): lanczosExtremes gives the same bits either
 * way, on sizes that take every path of the kernel (several chunks of 2048 columns and a short last one, an odd
 * column count, a basis size that is not a multiple of four); and the basis it builds is orthonormal (checked
 * here directly, and the Ritz values against numpy in test/reference/linalg_eigen.test.ts).
 */
import { afterEach, describe, expect, it } from 'vitest';
import { lanczosExtremes } from '../../../src/core/linalg/eigen.ts';
import { forceWasmOffForTesting, simdSupported } from '../../../src/core/wasm/runtime.ts';
import { wasmReorthWorkspace } from '../../../src/core/wasm/reorth.ts';
import { seededVector } from '../fft/cases.ts';

afterEach(() => forceWasmOffForTesting(false));

/** A symmetric operator: a seeded diagonal plus a rank-one term (cheap, with well-spread eigenvalues). */
function operator(n: number): (x: Float64Array) => Float64Array {
  const d = seededVector(n, n);
  const u = seededVector(n, n + 1);
  const out = new Float64Array(n);
  return (x) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += u[i]! * x[i]!;
    for (let i = 0; i < n; i++) out[i] = (2 + d[i]!) * x[i]! + 0.3 * s * u[i]!;
    return out;
  };
}

describe('Lanczos reorthogonalisation: WebAssembly and JavaScript give the same bits', () => {
  it.each([
    [5001, 11],
    [4096, 8],
    [7, 5],
    [2049, 6],
  ])('n = %i, %i steps', (n, steps) => {
    expect(simdSupported()).toBe(true);
    const wasm = lanczosExtremes(operator(n), n, { iterations: steps, seed: 3 });
    forceWasmOffForTesting(true);
    const js = lanczosExtremes(operator(n), n, { iterations: steps, seed: 3 });
    forceWasmOffForTesting(false);
    expect(Object.is(wasm.min, js.min) && Object.is(wasm.max, js.max)).toBe(true);
    expect(Object.is(wasm.minResidual, js.minResidual) && Object.is(wasm.maxResidual, js.maxResidual)).toBe(true);
    expect(wasm.iterations).toBe(js.iterations);
  });

  it('the workspace orthogonalises: after the two passes w is orthogonal to the basis to 1e-14', () => {
    const n = 5001;
    const k = 7;
    const ws = wasmReorthWorkspace(n, k + 1);
    expect(ws).not.toBeNull();
    try {
      // An orthonormal basis of k vectors (Gram–Schmidt in plain JavaScript), then a w with parts along all of them.
      for (let p = 0; p < k; p++) {
        const v = seededVector(n, 40 + p);
        for (let r = 0; r < p; r++) {
          let dot = 0;
          for (let i = 0; i < n; i++) dot += v[i]! * ws!.q[r * n + i]!;
          for (let i = 0; i < n; i++) v[i] = v[i]! - dot * ws!.q[r * n + i]!;
        }
        const norm = Math.hypot(...v);
        for (let i = 0; i < n; i++) ws!.q[p * n + i] = v[i]! / norm;
      }
      ws!.w.set(seededVector(n, 99));
      ws!.reorthogonaliseTwice(k);
      const wn = Math.hypot(...ws!.w);
      for (let p = 0; p < k; p++) {
        let dot = 0;
        for (let i = 0; i < n; i++) dot += ws!.w[i]! * ws!.q[p * n + i]!;
        expect(Math.abs(dot) / wn).toBeLessThan(1e-14);
      }
      // While it is held, a second workspace is refused (lanczosExtremes then runs in JavaScript).
      expect(wasmReorthWorkspace(10, 2)).toBeNull();
    } finally {
      ws?.release();
    }
    const again = wasmReorthWorkspace(10, 2);
    expect(again).not.toBeNull();
    again?.release();
  });
});
