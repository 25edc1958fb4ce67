/**
 * Both implementations of the FFT engine (src/core/fft/engine.ts) — the WebAssembly SIMD kernel
 * (src/core/wasm/wat/fft.wat) and its JavaScript twin (src/core/fft/stockham.ts) — against the DFT
 * definition X(k) = Σ_j x(j) e^(∓2πi jk/n) summed directly (O(n²), no fast algorithm), and against
 * each other bit for bit; the twiddle table against its formula; the engine's layouts (strided
 * columns, batches, the zero-half and half-output flags). numpy.fft is the outside check in
 * test/reference/fft.test.ts.
 */
import { describe, expect, it } from 'vitest';
import type { FftEngine } from '../../../src/core/fft/engine.ts';
import { fftBatch, fftEngine, javascriptFftEngine, wasmFftEngine } from '../../../src/core/fft/transform.ts';
import { stageCount, twiddleTable, twiddleTableLength } from '../../../src/core/fft/twiddles.ts';
import { forceWasmOffForTesting } from '../../../src/core/wasm/runtime.ts';
import { relErr, seededVector } from './cases.ts';

/** Direct DFT of one interleaved sequence (x[j] at stride `stride` complex values from `offset`). */
function directDft(x: Float64Array, n: number, inverse: boolean, offset = 0, stride = 1): Float64Array {
  const out = new Float64Array(2 * n);
  const sign = inverse ? 1 : -1;
  for (let k = 0; k < n; k++) {
    let re = 0;
    let im = 0;
    for (let j = 0; j < n; j++) {
      const a = (sign * 2 * Math.PI * ((j * k) % n)) / n;
      const c = Math.cos(a);
      const s = Math.sin(a);
      const xr = x[2 * (offset + j * stride)];
      const xi = x[2 * (offset + j * stride) + 1];
      re += xr * c - xi * s;
      im += xr * s + xi * c;
    }
    out[2 * k] = inverse ? re / n : re;
    out[2 * k + 1] = inverse ? im / n : im;
  }
  return out;
}

/**
 * Error allowance for ‖ŷ − y‖₂ / ‖y‖₂ against the direct sum: Higham 2002, Accuracy and Stability
 * of Numerical Algorithms, Thm 24.2 (memory): ≤ log2(n) η / (1 − log2(n) η), η = μ + γ₄(√2 + μ),
 * μ the twiddle error (we take 4u: one rounding in the argument and in cos/sin, a judgement), read
 * for radix-4 stages as two radix-2 stages each (conservative); plus the direct sum's own error,
 * ≲ n u per element (recursive summation, Higham Thm 3.1's γ_n, memory).
 */
function allowance(n: number): number {
  const u = 2 ** -53;
  const g4 = (4 * u) / (1 - 4 * u);
  const mu = 4 * u;
  const eta = mu + g4 * (Math.SQRT2 + mu);
  const lg = Math.max(1, Math.log2(n));
  return (lg * eta) / (1 - lg * eta) + 2 * n * u;
}

it('WebAssembly SIMD is available here (otherwise the tests below would see JavaScript twice)', () => {
  expect(wasmFftEngine()?.implementation).toBe('webassembly');
  expect(fftEngine().implementation).toBe('webassembly');
  forceWasmOffForTesting(true);
  try {
    expect(fftEngine().implementation).toBe('javascript');
  } finally {
    forceWasmOffForTesting(false);
  }
});

const ENGINES: [string, () => FftEngine][] = [
  ['webassembly', () => wasmFftEngine()!],
  ['javascript', javascriptFftEngine],
];

describe.each(ENGINES)('FFT engine: %s', (_, engine) => {
  const batch = (x: Float64Array, n: number, count: number, inverse = false) => fftBatch(x, n, count, inverse, engine());

  const sizes = [1, 2, 4, 8, 16, 32, 64, 128, 256, 512];
  for (const n of sizes) {
    for (const inverse of [false, true]) {
      it(`n = ${n} ${inverse ? 'inverse' : 'forward'}, batch of 3: within the Higham bound of the direct DFT`, () => {
        const count = 3;
        const x = seededVector(2 * n * count, n + (inverse ? 7 : 0));
        const keep = x.slice();
        const y = batch(x, n, count, inverse);
        expect(Array.from(x)).toEqual(Array.from(keep)); // the input is not touched
        for (let b = 0; b < count; b++) {
          const want = directDft(x, n, inverse, b * n);
          const got = y.subarray(2 * n * b, 2 * n * (b + 1));
          expect(relErr(got, want)).toBeLessThan(allowance(n));
        }
      });
    }
  }

  it('a batch gives each item the bits of its transform alone (items are independent)', () => {
    const n = 64;
    const x = seededVector(2 * n * 5, 3);
    const all = batch(x, n, 5);
    const third = batch(x.slice(2 * n * 2, 2 * n * 3), n, 1);
    expect(Array.from(all.subarray(2 * n * 2, 2 * n * 3))).toEqual(Array.from(third));
  });

  it('inverse(forward(x)) = x to 1e-15 relative (n = 2048)', () => {
    const x = seededVector(2 * 2048, 4);
    expect(relErr(batch(batch(x, 2048, 1), 2048, 1, true), x)).toBeLessThan(1e-15);
  });

  it('strided sequences (s = 6 interleaved, as the y-pass uses them) and the zero-half flag', () => {
    const e = engine();
    for (const n of [2, 4, 8, 32, 64]) {
      const s = 6;
      const x = seededVector(2 * n * s, 20 + n);
      e.twiddles(n, false);
      const src = e.workBase();
      const dst = src + 16 * n * s;
      const tmp = dst + 16 * n * s;
      let v = e.reserve(tmp + 16 * n * s);
      v.set(x, src / 8);
      e.run(src, dst, tmp, n, s, 1, 0, false);
      v = e.reserve(0);
      for (let q = 0; q < s; q++) {
        const got = new Float64Array(2 * n);
        for (let k = 0; k < n; k++) {
          got[2 * k] = v[dst / 8 + 2 * (q + s * k)];
          got[2 * k + 1] = v[dst / 8 + 2 * (q + s * k) + 1];
        }
        expect(relErr(got, directDft(x, n, false, q, s))).toBeLessThan(allowance(n));
      }
      if (n >= 4) {
        // Half flag: the upper half holds garbage that must not be read; the result is that of zeros.
        const z = x.slice();
        z.fill(0, 2 * s * (n / 2));
        const junk = x.slice();
        junk.fill(1e300, 2 * s * (n / 2));
        v.set(junk, src / 8);
        e.run(src, dst, tmp, n, s, 1, 0, false, true);
        v = e.reserve(0);
        for (let q = 0; q < s; q++) {
          const got = new Float64Array(2 * n);
          for (let k = 0; k < n; k++) {
            got[2 * k] = v[dst / 8 + 2 * (q + s * k)];
            got[2 * k + 1] = v[dst / 8 + 2 * (q + s * k) + 1];
          }
          expect(relErr(got, directDft(z, n, false, q, s))).toBeLessThan(allowance(n));
        }
      }
    }
  });

  it('halfOut: outputs k < n/2 equal the full transform bit for bit (n = 2 … 256, s = 1 and 3)', () => {
    const e = engine();
    for (const n of [2, 4, 8, 16, 64, 128, 256]) {
      for (const s of [1, 3]) {
        const x = seededVector(2 * n * s, 60 + n + s);
        e.twiddles(n, true);
        const src = e.workBase();
        const full = src + 16 * n * s;
        const half = full + 16 * n * s;
        const tmp = half + 16 * n * s;
        const v0 = e.reserve(tmp + 16 * n * s);
        v0.set(x, src / 8);
        v0.fill(7, half / 8, tmp / 8); // stale values stay where outputs are not wanted
        e.run(src, full, tmp, n, s, 1, 0, true);
        e.run(src, half, tmp, n, s, 1, 0, true, false, true);
        const v = e.reserve(0);
        const wanted = s * n; // doubles: the s·n/2 complex outputs k < n/2 of all sequences
        expect(Array.from(v.subarray(half / 8, half / 8 + wanted))).toEqual(Array.from(v.subarray(full / 8, full / 8 + wanted)));
        // and they are the transform (inverse direction, unnormalised: n × numpy's ifft)
        const want = directDft(x, n, true, 0, s).map((t) => t * n);
        const got = new Float64Array(2 * n);
        for (let k = 0; k < n; k++) {
          got[2 * k] = v[full / 8 + 2 * s * k];
          got[2 * k + 1] = v[full / 8 + 2 * s * k + 1];
        }
        expect(relErr(got, want)).toBeLessThan(allowance(n));
      }
    }
  });

  it('scaleComplex multiplies each complex value by its real factor, exactly as JS does, in place or into another region', () => {
    const e = engine();
    const m = 37;
    const z = seededVector(2 * m, 30);
    const lam = seededVector(m, 31);
    const zAt = e.workBase();
    const lAt = zAt + 16 * m;
    const v = e.reserve(lAt + 8 * m);
    v.set(z, zAt / 8);
    v.set(lam, lAt / 8);
    e.scale(zAt, lAt, m);
    const back = e.reserve(0).slice(zAt / 8, zAt / 8 + 2 * m);
    e.reserve(0).set(z, zAt / 8);
    const dAt = lAt + 8 * m;
    e.reserve(dAt + 16 * m);
    e.scaleInto(dAt, zAt, lAt, m);
    expect(Array.from(e.reserve(0).subarray(dAt / 8, dAt / 8 + 2 * m))).toEqual(Array.from(back));
    expect(Array.from(e.reserve(0).subarray(zAt / 8, zAt / 8 + 2 * m))).toEqual(Array.from(z));
    e.reserve(0).set(back, zAt / 8);
    const want = z.map((t, i) => t * lam[i >> 1]);
    expect(Array.from(e.reserve(0).subarray(zAt / 8, zAt / 8 + 2 * m))).toEqual(Array.from(want));
  });

  it('refuses sizes that are not powers of two and inputs of the wrong length, naming them', () => {
    expect(() => batch(new Float64Array(12), 6, 1)).toThrow(/n must be a power of two ≥ 1, got 6/);
    expect(() => batch(new Float64Array(10), 4, 1)).toThrow(/src must have 2·n·count = 8 values, got 10/);
  });
});

describe('twiddle table', () => {
  it('holds J = ±i and W_L^(jp) = e^(∓2πi jp/L) for every radix-4 stage, to 16u', () => {
    for (const inverse of [false, true]) {
      const n = 128;
      const t = twiddleTable(n, inverse);
      expect(t.length).toBe(twiddleTableLength(n));
      const sign = inverse ? 1 : -1;
      expect([t[0], t[1]]).toEqual([sign, -sign]);
      let o = 2;
      for (let len = n; len >= 4; len >>= 2) {
        for (let p = 0; p < len / 4; p++) {
          for (let j = 1; j <= 3; j++) {
            // e^(iθ) with θ = ∓2π jp/len (formed here from jp/len, the table from jp·(n/len)/n); the
            // arguments (|θ| < 3π/2, ulp 8.9e-16) may round apart by an ulp or two: 16u allowed.
            const theta = (sign * 2 * Math.PI * ((j * p) % len)) / len;
            const [wr, wi] = [Math.cos(theta), Math.sin(theta)];
            expect(Math.abs(t[o] - wr)).toBeLessThanOrEqual(16 * 2 ** -53);
            expect(t[o + 1]).toBe(t[o]);
            expect(Math.abs(t[o + 3] - wi)).toBeLessThanOrEqual(16 * 2 ** -53);
            expect(t[o + 2]).toBe(-t[o + 3]);
            o += 4;
          }
        }
      }
      expect(o).toBe(t.length);
    }
    expect([1, 2, 4, 8, 16, 1024, 2048].map(stageCount)).toEqual([0, 1, 1, 2, 2, 5, 6]);
  });
});
