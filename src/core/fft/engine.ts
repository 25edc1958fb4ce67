/**
 * The one complex FFT interface of the core: an engine over a linear memory that holds twiddle
 * tables, one resident real array (e.g. eigenvalues) and per-call work regions, addressed in bytes.
 * Two implementations of its kernel give the same bits (same operations in the same order):
 *   - WebAssembly SIMD: src/core/wasm/wat/fft.wat, compiled by src/core/wasm/fft.ts;
 *   - JavaScript: ./stockham.ts, used where WebAssembly SIMD is missing or refused.
 * ./transform.ts picks the realm's engine; ./fft2.ts (2-D transforms) and ./covariance.ts
 * (circulant products) run on it.
 *
 * Memory: [twiddle tables | resident array | work regions]. A new twiddle table moves the heap
 * base; callers therefore ask for their tables (twiddles) before laying out work regions
 * (reserve), and the resident array is re-copied when the heap base moved.
 */
import { stageCount, twiddleTable } from './twiddles.ts';

export type FftImplementation = 'webassembly' | 'javascript';

/**
 * What an implementation provides: a growable memory and the two routines on it (byte addresses,
 * 16-byte aligned; the contract is the header of src/core/wasm/wat/fft.wat).
 */
export interface FftKernel {
  readonly implementation: FftImplementation;
  /** The memory's current buffer (a new one after growth; old views are then stale). */
  buffer(): ArrayBuffer;
  /** Grows the memory to hold at least `bytes`, keeping its contents. */
  ensure(bytes: number): void;
  fft(src: number, dst: number, tmp: number, tw: number, n: number, s: number, count: number, bstride: number, flags: number): void;
  scaleComplex(dst: number, src: number, lam: number, count: number): void;
}

function align16(bytes: number): number {
  return (bytes + 15) & ~15;
}

export class FftEngine {
  readonly implementation: FftImplementation;
  private readonly kernel: FftKernel;
  private readonly tables = new Map<number, number>();
  private heap = 0;
  private residentKey: Float64Array | null = null;
  private residentHeap = -1;
  private view: Float64Array;

  constructor(kernel: FftKernel) {
    this.kernel = kernel;
    this.implementation = kernel.implementation;
    this.view = new Float64Array(kernel.buffer());
  }

  /** A Float64Array over the whole memory (renewed after growth; call again after reserve). */
  f64(): Float64Array {
    const b = this.kernel.buffer();
    if (this.view.buffer !== b) this.view = new Float64Array(b);
    return this.view;
  }

  /** Byte address of the twiddle table of an n-point transform (n ≥ 2 a power of two). */
  twiddles(n: number, inverse: boolean): number {
    const key = 2 * n + (inverse ? 1 : 0);
    const at = this.tables.get(key);
    if (at !== undefined) return at;
    const t = twiddleTable(n, inverse);
    const addr = this.heap;
    this.kernel.ensure(addr + 8 * t.length);
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
      this.kernel.ensure(end);
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
    this.kernel.ensure(end);
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
  run(
    src: number,
    dst: number,
    tmp: number,
    n: number,
    s: number,
    count: number,
    bstride: number,
    inverse: boolean,
    halfZero = false,
    halfOut = false,
  ): void {
    if (count <= 0) return;
    if (n === 1) {
      const v = this.f64();
      for (let b = 0; b < count; b++) v.copyWithin((dst + b * bstride) / 8, (src + b * bstride) / 8, (src + b * bstride) / 8 + 2 * s);
      return;
    }
    const tw = this.twiddles(n, inverse);
    const flags = (halfZero && n >= 4 ? 1 : 0) | (stageCount(n) % 2 === 1 ? 2 : 0) | (halfOut ? 4 : 0);
    this.kernel.fft(src, dst, tmp, tw, n, s, count, bstride, flags);
  }

  /** z[i] ← lam[i]·z[i], i < count (complex z at byte address z, doubles lam at byte address lam). */
  scale(z: number, lam: number, count: number): void {
    this.kernel.scaleComplex(z, z, lam, count);
  }

  /** dst[i] ← lam[i]·src[i], i < count (complex dst, src equal or disjoint; doubles lam). */
  scaleInto(dst: number, src: number, lam: number, count: number): void {
    this.kernel.scaleComplex(dst, src, lam, count);
  }
}
