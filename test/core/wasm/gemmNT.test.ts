/**
 * wasmGemmNT against the JS kernel gemmNT (the same sums in the same order, so equal bit for bit):
 * shapes straddling the tile (4), the depth cut KC = 256 and the column chunk NC = 256, offsets and
 * leading dimensions, α ≠ 1, the lower-triangle mode with diagonal shifts, and the fallback. The
 * check against numpy's matmul is test/reference/wasm.test.ts.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { gemmNT } from '../../../src/core/linalg/kernels.ts';
import { wasmGemmAvailable, wasmGemmNT } from '../../../src/core/wasm/gemmNT.ts';
import { disableWasmForTesting } from '../../../src/core/wasm/varianceBlock.ts';
import { seededUniform } from '../linalg/helpers.ts';

const random = (len: number, seed: number) => Float64Array.from({ length: len }, seededUniform(seed));
const bitsEqual = (a: Float64Array, b: Float64Array) => a.length === b.length && a.every((v, i) => Object.is(v, b[i]));

afterEach(() => disableWasmForTesting(false));

/** Runs both kernels on the same m × n block (inside larger arrays: offsets 3, 5, 7; ld = size + 2). */
function both(m: number, n: number, k: number, lower = false, diag = 0, alpha = -1) {
  const lda = k + 2;
  const ldb = k + 3;
  const ldc = n + 2;
  const a = random(3 + m * lda, 1 + m);
  const b = random(5 + n * ldb, 2 + n);
  const c0 = random(7 + m * ldc, 3 + k);
  const js = c0.slice();
  const wasm = c0.slice();
  gemmNT(m, n, k, alpha, a, 3, lda, b, 5, ldb, js, 7, ldc, lower, diag);
  wasmGemmNT(m, n, k, alpha, a, 3, lda, b, 5, ldb, wasm, 7, ldc, lower, diag);
  return { js, wasm, c0 };
}

describe('wasmGemmNT', () => {
  it('runs the WebAssembly kernel in Node', () => expect(wasmGemmAvailable()).toBe(true));

  it.each([
    [1, 1, 1],
    [3, 5, 2],
    [4, 4, 4],
    [7, 9, 13],
    [17, 6, 255],
    [16, 16, 256],
    [5, 3, 257],
    [33, 301, 40],
    [64, 70, 600],
  ])('m = %d, n = %d, k = %d: bit-equal to gemmNT', (m, n, k) => {
    const { js, wasm, c0 } = both(m, n, k);
    expect(bitsEqual(wasm, js)).toBe(true);
    expect(bitsEqual(wasm, c0)).toBe(false); // it did something
  });

  it.each([
    [40, 40, 30, 0],
    [37, 37, 300, 0],
    [70, 64, 65, 6],
    [50, 20, 11, -9],
    [300, 280, 9, 0],
    [9, 30, 5, 12],
  ])('lower, m = %d, n = %d, k = %d, diag = %d: bit-equal, nothing above the diagonal touched', (m, n, k, diag) => {
    const { js, wasm, c0 } = both(m, n, k, true, diag, 0.5);
    expect(bitsEqual(wasm, js)).toBe(true);
    const ldc = n + 2;
    for (let i = 0; i < m; i++) for (let j = i + diag + 1; j < n; j++) if (j >= 0) expect(wasm[7 + i * ldc + j]).toBe(c0[7 + i * ldc + j]);
  });

  it('k = 0 or an empty block leaves C alone', () => {
    for (const [m, n, k] of [
      [3, 3, 0],
      [0, 3, 3],
      [3, 0, 3],
    ] as const) {
      const { wasm, c0 } = both(m, n, k);
      expect(bitsEqual(wasm, c0)).toBe(true);
    }
  });

  it('falls back to gemmNT without WebAssembly SIMD', () => {
    disableWasmForTesting(true);
    expect(wasmGemmAvailable()).toBe(false);
    const { js, wasm } = both(13, 11, 9, true, 1);
    expect(bitsEqual(wasm, js)).toBe(true);
  });
});
