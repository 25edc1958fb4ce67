/**
 * The WebAssembly SIMD complex FFT (./wat/fft.wat) as a per-realm engine: its memory, twiddle
 * tables kept resident per (size, direction), one resident real array (e.g. eigenvalues), and a
 * heap for per-call work regions. Plus {@link wasmFftBatch}, a checked convenience on JS arrays
 * (numpy.fft.fft / ifft conventions: forward unnormalised, inverse scaled by 1/n).
 *
 * Memory: [twiddle tables | resident array | work regions]. A new twiddle table moves the heap
 * base; callers therefore ask for their tables (twiddles) before laying out work regions
 * (reserve), and the resident array is re-copied when the heap base moved.
 * Absent WebAssembly SIMD (or compilation refused), {@link fftEngine} returns null and callers keep
 * their JavaScript transforms.
 */
import { FFT_EXPORT, SCALE_EXPORT, stageCount, twiddleTable } from './fftModule.ts';
import { FFT_WASM } from './modules.ts';
import { ensureBytes, MEMORY_IMPORT, simdSupported } from './runtime.ts';

type FftFn = (src: number, dst: number, tmp: number, tw: number, n: number, s: number, count: number, bstride: number, flags: number) => void;
type ScaleFn = (dst: number, src: number, lam: number, count: number) => void;

function align16(bytes: number): number {
  return (bytes + 15) & ~15;
}

export class FftEngine {
  readonly memory: WebAssembly.Memory;
  private readonly fftFn: FftFn;
  private readonly scaleFn: ScaleFn;
  private readonly tables = new Map<number, number>();
  private heap = 0;
  private residentKey: Float64Array | null = null;
  private residentHeap = -1;
  private view: Float64Array;

  constructor(memory: WebAssembly.Memory, fftFn: FftFn, scaleFn: ScaleFn) {
    this.memory = memory;
    this.fftFn = fftFn;
    this.scaleFn = scaleFn;
    this.view = new Float64Array(memory.buffer);
  }

  /** A Float64Array over the whole memory (renewed after growth; call again after reserve). */
  f64(): Float64Array {
    if (this.view.buffer !== this.memory.buffer) this.view = new Float64Array(this.memory.buffer);
    return this.view;
  }

  /** Byte address of the twiddle table of an n-point transform (n ≥ 2 a power of two). */
  twiddles(n: number, inverse: boolean): number {
    const key = 2 * n + (inverse ? 1 : 0);
    const at = this.tables.get(key);
    if (at !== undefined) return at;
    const t = twiddleTable(n, inverse);
    const addr = this.heap;
    ensureBytes(this.memory, addr + 8 * t.length);
    this.f64().set(t, addr / 8);
    this.heap = align16(addr + 8 * t.length);
    this.tables.set(key, addr);
    return addr;
  }

  /**
   * Keeps `data` resident at the heap base (copied when a different array, by identity, was
   * resident or the heap base moved; the caller must not mutate it meanwhile) and returns the byte
   * address just past it, where work regions may start.
   */
  resident(data: Float64Array): { at: number; end: number } {
    const at = this.heap;
    const end = align16(at + 8 * data.length);
    if (this.residentKey !== data || this.residentHeap !== at) {
      ensureBytes(this.memory, end);
      this.f64().set(data, at / 8);
      this.residentKey = data;
      this.residentHeap = at;
    }
    return { at, end };
  }

  /** Base address of work regions when nothing is resident (forgets the resident array). */
  workBase(): number {
    this.residentKey = null;
    return this.heap;
  }

  /** Grows the memory to hold `end` bytes; returns the (possibly renewed) view. */
  reserve(end: number): Float64Array {
    ensureBytes(this.memory, end);
    return this.f64();
  }

  /**
   * DFTs of length n (power of two ≥ 1) of `count` batch items, each s interleaved sequences at byte
   * address src + b·bstride (element p of sequence q at 16(q + s p)) into dst + b·bstride. src is
   * not written; src ≠ dst; tmp holds 16·n·s bytes. `halfZero`: elements p ≥ n/2 are zero (they
   * are not read when n ≥ 4; for n = 2 they must be zero in memory). Unnormalised in both
   * directions. `halfOut`: only outputs p < n/2 are wanted (the others are left stale). The
   * twiddle table must exist already ({@link twiddles}) when work regions are live.
   */
  run(src: number, dst: number, tmp: number, n: number, s: number, count: number, bstride: number, inverse: boolean, halfZero = false, halfOut = false): void {
    if (count <= 0) return;
    if (n === 1) {
      const v = this.f64();
      for (let b = 0; b < count; b++) v.copyWithin((dst + b * bstride) / 8, (src + b * bstride) / 8, (src + b * bstride) / 8 + 2 * s);
      return;
    }
    const tw = this.twiddles(n, inverse);
    const flags = (halfZero && n >= 4 ? 1 : 0) | (stageCount(n) % 2 === 1 ? 2 : 0) | (halfOut ? 4 : 0);
    this.fftFn(src, dst, tmp, tw, n, s, count, bstride, flags);
  }

  /** z[i] ← lam[i]·z[i], i < count (complex z at byte address z, doubles lam at byte address lam). */
  scale(z: number, lam: number, count: number): void {
    this.scaleFn(z, z, lam, count);
  }

  /** dst[i] ← lam[i]·src[i], i < count (complex dst, src equal or disjoint; doubles lam). */
  scaleInto(dst: number, src: number, lam: number, count: number): void {
    this.scaleFn(dst, src, lam, count);
  }
}

let engine: FftEngine | null | undefined;

/** The realm's FFT engine, or null when WebAssembly SIMD is missing or refused. */
export function fftEngine(): FftEngine | null {
  if (!simdSupported()) return null;
  if (engine === undefined) {
    try {
      const memory = new WebAssembly.Memory({ initial: 1 });
      const instance = new WebAssembly.Instance(new WebAssembly.Module(FFT_WASM), {
        [MEMORY_IMPORT.module]: { [MEMORY_IMPORT.name]: memory },
      });
      engine = new FftEngine(memory, instance.exports[FFT_EXPORT] as FftFn, instance.exports[SCALE_EXPORT] as ScaleFn);
    } catch {
      engine = null;
    }
  }
  return engine;
}

/** Whether {@link fftEngine} runs the WebAssembly kernel here. */
export function wasmFftAvailable(): boolean {
  return fftEngine() !== null;
}

/**
 * `count` transforms of n complex values (interleaved re, im) from `src` (transform b at complex
 * offset b·n) into a new array, forward (numpy.fft.fft) or inverse (numpy.fft.ifft, scaled 1/n),
 * with the WebAssembly kernel. Throws when it is unavailable (callers that need a fallback use
 * Fft2) or the input does not fit.
 */
export function wasmFftBatch(src: Float64Array, n: number, count: number, inverse = false): Float64Array {
  if (!Number.isInteger(n) || n < 1 || (n & (n - 1)) !== 0) throw new RangeError(`wasmFftBatch: n must be a power of two ≥ 1, got ${n}`);
  if (!Number.isInteger(count) || count < 0) throw new RangeError(`wasmFftBatch: count must be an integer ≥ 0, got ${count}`);
  if (src.length !== 2 * n * count) throw new RangeError(`wasmFftBatch: src must have 2·n·count = ${2 * n * count} values, got ${src.length}`);
  const e = fftEngine();
  if (e === null) throw new Error('wasmFftBatch: WebAssembly SIMD is not available');
  if (n > 1) e.twiddles(n, inverse);
  const bytes = 16 * n * count;
  const a = e.workBase();
  const b = a + bytes;
  const t = b + bytes;
  const v = e.reserve(t + 16 * n);
  v.set(src, a / 8);
  e.run(a, b, t, n, 1, count, 16 * n, inverse);
  const out = v.slice(b / 8, b / 8 + 2 * n * count);
  if (inverse) for (let i = 0; i < out.length; i++) out[i] = out[i]! / n;
  return out;
}
