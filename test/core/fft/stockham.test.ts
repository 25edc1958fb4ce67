/**
 * The JavaScript FFT kernel (src/core/fft/stockham.ts) gives the WebAssembly kernel's bits
 * (src/core/wasm/wat/fft.wat): every size 1 … 4096, both directions, strided and batched
 * layouts, each flag, and scaleComplex. Accuracy against the DFT definition and numpy is tested in
 * engine.test.ts and test/reference/fft.test.ts; here only the equality of the two implementations.
 */
import { describe, expect, it } from 'vitest';
import type { FftEngine } from '../../../src/core/fft/engine.ts';
import { javascriptFftEngine, wasmFftEngine } from '../../../src/core/fft/transform.ts';
import { seededVector } from './cases.ts';

/** Runs one engine call on a copy of `x` laid out at the work base and returns the dst region. */
function runOn(
  e: FftEngine,
  x: Float64Array,
  n: number,
  s: number,
  count: number,
  inverse: boolean,
  halfZero: boolean,
  halfOut: boolean,
): Float64Array {
  if (n > 1) e.twiddles(n, inverse);
  const bytes = 16 * n * s * count;
  const src = e.workBase();
  const dst = src + bytes;
  const tmp = dst + bytes;
  const v = e.reserve(tmp + 16 * n * s);
  v.set(x, src / 8);
  v.fill(-3, dst / 8, tmp / 8); // stale outputs (halfOut) must agree too
  e.run(src, dst, tmp, n, s, count, 16 * n * s, inverse, halfZero, halfOut);
  return e.reserve(0).slice(dst / 8, tmp / 8);
}

describe('JavaScript FFT kernel = WebAssembly FFT kernel, bit for bit', () => {
  const wasm = wasmFftEngine();
  const js = javascriptFftEngine();

  it('WebAssembly SIMD is available here, so the comparison is real', () => {
    expect(wasm?.implementation).toBe('webassembly');
    expect(js.implementation).toBe('javascript');
  });

  for (let lg = 0; lg <= 12; lg++) {
    const n = 2 ** lg;
    it(`n = ${n}: forward and inverse, s = 1 and 3, batches of 2, every flag combination`, () => {
      for (const inverse of [false, true]) {
        for (const s of [1, 3]) {
          for (const halfZero of [false, true]) {
            for (const halfOut of [false, true]) {
              const count = 2;
              const x = seededVector(2 * n * s * count, 11 * lg + s + (inverse ? 5 : 0));
              // With halfZero the upper halves are zero (required for n = 2; not read for n ≥ 4).
              if (halfZero && n > 1) for (let b = 0; b < count; b++) x.fill(0, 2 * n * s * b + s * n, 2 * n * s * (b + 1));
              const w = runOn(wasm!, x, n, s, count, inverse, halfZero, halfOut);
              const j = runOn(js, x, n, s, count, inverse, halfZero, halfOut);
              expect(Array.from(j)).toEqual(Array.from(w));
            }
          }
        }
      }
    });
  }

  it('scaleComplex: the same products, in place and into another region', () => {
    const m = 41;
    const z = seededVector(2 * m, 2);
    const lam = seededVector(m, 3);
    const out = (e: FftEngine) => {
      const zAt = e.workBase();
      const lAt = zAt + 16 * m;
      const dAt = lAt + 8 * m;
      const v = e.reserve(dAt + 16 * m);
      v.set(z, zAt / 8);
      v.set(lam, lAt / 8);
      e.scaleInto(dAt, zAt, lAt, m);
      e.scale(zAt, lAt, m);
      return e.reserve(0).slice(zAt / 8, dAt / 8 + 2 * m);
    };
    expect(Array.from(out(js))).toEqual(Array.from(out(wasm!)));
  });
});
