/**
 * Which FFT implementation runs (see ./engine.ts): the realm's engine is the WebAssembly SIMD one
 * when this realm has WebAssembly with 128-bit SIMD and compiles it, else the JavaScript one. Both
 * give the same bits, so the choice affects speed only. Plus sizes and a checked 1-D batch
 * transform on JS arrays (numpy.fft.fft / ifft conventions).
 */
import { wasmFftKernel } from '../wasm/fft.ts';
import { simdSupported } from '../wasm/runtime.ts';
import { FftEngine } from './engine.ts';
import { javascriptFftKernel } from './stockham.ts';

/** Smallest power of two ≥ n (n ≥ 1). */
export function nextPowerOfTwo(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 1 && (n & (n - 1)) === 0;
}

let wasmEngine: FftEngine | null | undefined; // undefined: not tried yet; null: unavailable
let jsEngine: FftEngine | undefined;

/** The WebAssembly SIMD engine of this realm, or null when it is unavailable (or switched off for a test). */
export function wasmFftEngine(): FftEngine | null {
  if (!simdSupported()) return null;
  if (wasmEngine === undefined) {
    const k = wasmFftKernel();
    wasmEngine = k === null ? null : new FftEngine(k);
  }
  return wasmEngine;
}

/** The JavaScript engine of this realm. */
export function javascriptFftEngine(): FftEngine {
  jsEngine ??= new FftEngine(javascriptFftKernel());
  return jsEngine;
}

/** The realm's engine: WebAssembly SIMD when available, else JavaScript. */
export function fftEngine(): FftEngine {
  return wasmFftEngine() ?? javascriptFftEngine();
}

/**
 * `count` transforms of n complex values (interleaved re, im) from `src` (transform b at complex
 * offset b·n) into a new array, forward (numpy.fft.fft) or inverse (numpy.fft.ifft, scaled 1/n).
 */
export function fftBatch(src: Float64Array, n: number, count: number, inverse = false, engine: FftEngine = fftEngine()): Float64Array {
  if (!isPowerOfTwo(n)) throw new RangeError(`fftBatch: n must be a power of two ≥ 1, got ${n}`);
  if (!Number.isInteger(count) || count < 0) throw new RangeError(`fftBatch: count must be an integer ≥ 0, got ${count}`);
  if (src.length !== 2 * n * count) throw new RangeError(`fftBatch: src must have 2·n·count = ${2 * n * count} values, got ${src.length}`);
  if (n > 1) engine.twiddles(n, inverse);
  const bytes = 16 * n * count;
  const a = engine.workBase();
  const b = a + bytes;
  const t = b + bytes;
  const v = engine.reserve(t + 16 * n);
  v.set(src, a / 8);
  engine.run(a, b, t, n, 1, count, 16 * n, inverse);
  const out = v.slice(b / 8, b / 8 + 2 * n * count);
  if (inverse) for (let i = 0; i < out.length; i++) out[i] = out[i] / n;
  return out;
}
