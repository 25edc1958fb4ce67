/**
 * The WASM variance block against the JS kernel structuredVarianceBlock (same operations in the
 * same order, so equal bit for bit; the brief's bar is relative 1e-13), split-vs-whole bit
 * equality, the resident-factor cache, memory growth, clamping and the fallback path. The check
 * against scipy.linalg.solve_triangular is test/reference/wasm.test.ts.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { structuredVarianceBlock } from '../../../src/core/inverse/structured.ts';
import { cholesky } from '../../../src/core/linalg/cholesky.ts';
import type { Matrix } from '../../../src/core/linalg/matrix.ts';
import { disableWasmForTesting, wasmAvailable, wasmVarianceBlock } from '../../../src/core/wasm/varianceBlock.ts';
import { randomMatrix, randomSpd, relError, seededUniform } from '../linalg/helpers.ts';

function factor(m: number, seed: number): Matrix {
  const r = cholesky(randomSpd(m, seed));
  if (!r.ok) throw new Error('test matrix not SPD');
  return r.factor;
}

/** Prior variances spread over [0, M] so some cells clamp at 0 and others do not. */
function priorVariances(n: number, m: number, seed: number): Float64Array {
  const u = seededUniform(seed);
  return Float64Array.from({ length: n }, () => ((u() + 1) / 2) * m);
}

const bitsEqual = (a: Float64Array, b: Float64Array) => a.length === b.length && a.every((v, i) => Object.is(v, b[i]));

afterEach(() => disableWasmForTesting(false));

describe('wasmVarianceBlock', () => {
  it('SIMD WebAssembly is available in Node (else every test below only checks the fallback)', () => {
    expect(wasmAvailable()).toBe(true);
  });

  const cases: [number, number, number][] = [];
  for (const m of [1, 2, 3, 5, 17, 64, 400])
    for (const [c0, w] of [
      [0, 1],
      [3, 3],
      [1, 7],
      [5, 33],
    ] as const)
      cases.push([m, c0, w]);
  it.each(cases)('M = %d, columns [%d, +%d): equals the JS kernel bit for bit', (m, c0, w) => {
    const L = factor(m, 10 + m);
    const n = 41;
    const Bt = randomMatrix(m, n, 20 + m);
    const pv = priorVariances(n, m, 30 + m);
    const js = structuredVarianceBlock(L, Bt, pv, c0, c0 + w);
    const wasm = wasmVarianceBlock(L, Bt, pv, c0, c0 + w);
    expect(relError(wasm, js)).toBeLessThanOrEqual(1e-13);
    expect(bitsEqual(wasm, js)).toBe(true);
  });

  it('the test data exercise the clamp: some cells are 0, at least a quarter positive', () => {
    const m = 64;
    const n = 200;
    const v = wasmVarianceBlock(factor(m, 1), randomMatrix(m, n, 2), priorVariances(n, m, 3), 0, n);
    const zeros = v.filter((x) => x === 0).length;
    expect(zeros).toBeGreaterThan(0);
    expect(n - zeros).toBeGreaterThan(n / 4);
    expect(v.every((x) => x >= 0)).toBe(true);
  });

  it('split runs equal one run bit for bit (uneven block widths, M = 133)', () => {
    const m = 133;
    const n = 301;
    const L = factor(m, 4);
    const Bt = randomMatrix(m, n, 5);
    const pv = priorVariances(n, m, 6);
    const whole = wasmVarianceBlock(L, Bt, pv, 0, n);
    const split = new Float64Array(n);
    const u = seededUniform(7);
    for (let c0 = 0; c0 < n; ) {
      const c1 = Math.min(n, c0 + 1 + Math.floor((u() + 1) * 20));
      wasmVarianceBlock(L, Bt, pv, c0, c1, split.subarray(c0, c1));
      c0 = c1;
    }
    expect(bitsEqual(split, whole)).toBe(true);
  });

  it('a new factor (another L.data, same size) is packed again; a larger M grows the memory', () => {
    const n = 50;
    const pv = priorVariances(n, 300, 8);
    for (const [m, seed] of [
      [40, 1],
      [40, 2],
      [300, 3],
      [12, 4],
      [300, 3],
    ] as const) {
      const L = factor(m, seed);
      const Bt = randomMatrix(m, n, seed + 100);
      expect(bitsEqual(wasmVarianceBlock(L, Bt, pv, 2, 47), structuredVarianceBlock(L, Bt, pv, 2, 47))).toBe(true);
    }
  });

  it('a factor changed in place (same L.data, new values) is packed again', () => {
    const m = 21;
    const n = 30;
    const pv = priorVariances(n, m, 9);
    const Bt = randomMatrix(m, n, 10);
    const L = factor(m, 11);
    wasmVarianceBlock(L, Bt, pv, 0, n);
    L.data.set(factor(m, 12).data); // a re-factorisation into the same storage
    expect(bitsEqual(wasmVarianceBlock(L, Bt, pv, 0, n), structuredVarianceBlock(L, Bt, pv, 0, n))).toBe(true);
  });

  it('an empty block returns the given (empty) output', () => {
    const L = factor(5, 1);
    expect(wasmVarianceBlock(L, randomMatrix(5, 9, 1), new Float64Array(9), 4, 4).length).toBe(0);
  });

  it('falls back to the JS kernel when WebAssembly SIMD is unavailable', () => {
    disableWasmForTesting(true);
    expect(wasmAvailable()).toBe(false);
    const m = 9;
    const L = factor(m, 2);
    const Bt = randomMatrix(m, 20, 3);
    const pv = priorVariances(20, m, 4);
    expect(bitsEqual(wasmVarianceBlock(L, Bt, pv, 1, 18), structuredVarianceBlock(L, Bt, pv, 1, 18))).toBe(true);
    disableWasmForTesting(false);
    expect(wasmAvailable()).toBe(true);
  });

  it('falls back when the engine has no WebAssembly object at all', () => {
    const saved = globalThis.WebAssembly;
    disableWasmForTesting(false);
    try {
      // @ts-expect-error — simulate an engine without WebAssembly
      delete globalThis.WebAssembly;
      expect(wasmAvailable()).toBe(false);
    } finally {
      globalThis.WebAssembly = saved;
      disableWasmForTesting(false);
    }
    expect(wasmAvailable()).toBe(true);
  });
});
