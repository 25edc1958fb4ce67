/**
 * The WebAssembly module of the complex FFT kernel, generated with ./emitter.ts: batches of
 * power-of-two DFTs X(k) = Σ_j x(j) e^(∓2πi jk/n) on interleaved complex f64 data, one complex
 * number per v128 (f64x2 lanes re, im).
 *
 * Algorithm: Stockham autosort, radix-4 stages then one radix-2 stage when log2 n is odd (Van Loan,
 * Computational Frameworks for the Fast Fourier Transform, SIAM 1992, §1.7, memory; the loop
 * order of the radix-4 stage is the common one, no source). A stage of length L and stride s maps
 * the s interleaved sequences x[q + s·p] (q < s, p < L) of the previous stage to
 *   y[q + s(4p + 0)] =        (a + c) + (b + d)
 *   y[q + s(4p + 1)] = W^p  ((a − c) − J(b − d))
 *   y[q + s(4p + 2)] = W^2p ((a + c) − (b + d))
 *   y[q + s(4p + 3)] = W^3p ((a − c) + J(b − d))
 * with a, b, c, d = x[q + s(p + r L/4)], r = 0 … 3, W = e^(∓2πi/L), J = ±i (the forward sign,
 * upper); the next stage has length L/4 and stride 4s. The output is in natural order.
 *
 * Complex products in f64x2: v·w = v ⊙ (wr, wr) + swap(v) ⊙ (−wi, wi), swap by i8x16.shuffle
 * (WebAssembly Core Specification 2.0, §5.4.8 vector instructions: i8x16.shuffle 0xFD 13,
 * f64x2.add 0xFD 240, f64x2.sub 241, f64x2.mul 242, v128.load 0, v128.load64_splat 10,
 * v128.store 11). J·v = swap(v) ⊙ (∓1, ±1). IEEE multiply then add, no fused multiply-add.
 *
 * Exports (all arguments i32; byte addresses, 16-byte aligned):
 *   fft(src, dst, tmp, tw, n, s, count, bstride, flags)
 *       for b < count: the s sequences of length n at src + b·bstride (x[q + s p] at byte 16(q + s p))
 *       → their DFTs at dst + b·bstride (same layout). n ≥ 2, s ≥ 1, src ≠ dst; src is not written.
 *       tmp holds 16·n·s bytes (one batch item; the stages ping-pong between dst and tmp).
 *       flags bit 0: the inputs p ≥ n/2 are zero and not read (needs n ≥ 4);
 *       flags bit 1: the first stage writes dst (set when the number of stages is odd);
 *       flags bit 2: only outputs k < n/2 are wanted (the last stage writes no others; they are
 *       left stale). The last radix-4 stage (L = 4) has unit twiddles and skips the products.
 *       tw: the table of {@link twiddleTable} for n and the direction.
 *   scaleComplex(dst, src, lam, count)  dst[i] ← lam[i]·src[i] for i < count (complex dst, src — equal
 *       or disjoint —, real lam with 8-byte elements).
 */
import { encodeModule, FunctionBuilder, ValType } from './emitter.ts';
import { MEMORY_IMPORT } from './runtime.ts';

export const FFT_EXPORT = 'fft';
export const SCALE_EXPORT = 'scaleComplex';

/** Bytes per twiddle entry: (W^p, W^2p, W^3p) as (wr, wr), (−wi, wi) pairs of v128. */
const ENTRY = 96;

/** Number of stages of an n-point transform (radix-4 stages, then radix-2 when log2 n is odd). */
export function stageCount(n: number): number {
  const lg = Math.round(Math.log2(n));
  return (lg >> 1) + (lg & 1);
}

/** Length in doubles of the twiddle table for n: J, then every radix-4 stage's entries. */
export function twiddleTableLength(n: number): number {
  let entries = 0;
  for (let len = n; len >= 4; len >>= 2) entries += len >> 2;
  return 2 + (ENTRY / 8) * entries;
}

/**
 * Twiddle table of an n-point transform (forward: W = e^(−2πi/L), J = i; inverse conjugated):
 * J as (∓1, ±1), then for L = n, n/4, … ≥ 4 and p < L/4 the entry (W_L^p, W_L^2p, W_L^3p), each
 * as (wr, wr), (−wi, wi). W_L^(jp) = e^(∓2πi k/n) with k = jp·n/L (exact integers) and Math.cos /
 * Math.sin of the argument 2πk/n (one rounding in the argument, at most about 3u absolute).
 */
export function twiddleTable(n: number, inverse: boolean): Float64Array {
  const out = new Float64Array(twiddleTableLength(n));
  const sign = inverse ? 1 : -1;
  out[0] = sign; // J·v = swap(v) ⊙ (−1, 1) = i v forward; (1, −1) = −i v inverse
  out[1] = -sign;
  let o = 2;
  for (let len = n; len >= 4; len >>= 2) {
    const step = n / len;
    for (let p = 0; p < len >> 2; p++) {
      for (let j = 1; j <= 3; j++) {
        const a = (2 * Math.PI * (j * p * step)) / n;
        const wr = Math.cos(a);
        const wi = sign * Math.sin(a);
        out[o++] = wr;
        out[o++] = wr;
        out[o++] = -wi;
        out[o++] = wi;
      }
    }
  }
  return out;
}

function fftFunction(): FunctionBuilder {
  const { i32, v128 } = ValType;
  const f = new FunctionBuilder([i32, i32, i32, i32, i32, i32, i32, i32, i32]);
  const [src, dst, tmp, tw, n, s, count, bstride, flags] = [0, 1, 2, 3, 4, 5, 6, 7, 8];
  const bi = f.local(i32);
  const srcB = f.local(i32);
  const dstB = f.local(i32);
  const x = f.local(i32);
  const y = f.local(i32);
  const len = f.local(i32);
  const str = f.local(i32); // 16·stride: bytes between x[q + s p] and x[q + s (p + 1)]
  const twp = f.local(i32);
  const h = f.local(i32);
  const prune = f.local(i32);
  const Q = f.local(i32);
  const qB = f.local(i32); // bytes between a and b: str·L/4
  const p = f.local(i32);
  const ia = f.local(i32);
  const oa = f.local(i32);
  const k = f.local(i32);
  const ad = f.local(i32);
  const od = f.local(i32);
  const J = f.local(v128);
  const w = [f.local(v128), f.local(v128), f.local(v128), f.local(v128), f.local(v128), f.local(v128)];
  const va = f.local(v128);
  const vb = f.local(v128);
  const vc = f.local(v128);
  const vd = f.local(v128);
  const apc = f.local(v128);
  const amc = f.local(v128);
  const bpd = f.local(v128);
  const jb = f.local(v128);
  const t = f.local(v128);

  /** Pushes t·w_j (j = 0, 1, 2 for W^p, W^2p, W^3p). */
  const cmulT = (j: number): void => {
    f.get(t).get(w[2 * j]!).f64x2Mul();
    f.swappedLanes(t).get(w[2 * j + 1]!).f64x2Mul();
    f.f64x2Add();
  };
  /** Stores y0 (already pushed as the value after the address) and y1…y3 = w_j t_j at od + r·str. */
  const storeOutputs = (y1: () => void, y2: () => void, y3: () => void): void => {
    const parts = [y1, y2, y3];
    parts.forEach((make, j) => {
      make();
      f.set(t);
      f.get(od).get(str).i32Add().tee(od);
      cmulT(j);
      f.v128Store(0);
    });
  };

  /**
   * The four inputs a, b, c, d of a radix-4 butterfly (at ia + k + r·qB) and its sums: a ± c,
   * b + d, and J(b − d) (J: the ±i rotation of the direction, a lane swap times the signs in J).
   */
  const butterflyInputs = (): void => {
    f.get(ia).get(k).i32Add().tee(ad).v128Load(0).set(va);
    f.get(ad).get(qB).i32Add().tee(ad).v128Load(0).set(vb);
    f.get(ad).get(qB).i32Add().tee(ad).v128Load(0).set(vc);
    f.get(ad).get(qB).i32Add().v128Load(0).set(vd);
    f.get(va).get(vc).f64x2Add().set(apc);
    f.get(va).get(vc).f64x2Sub().set(amc);
    f.get(vb).get(vd).f64x2Add().set(bpd);
    f.get(vb).get(vd).f64x2Sub().set(jb);
    f.swappedLanes(jb).get(J).f64x2Mul().set(jb);
  };

  f.get(src).set(srcB);
  f.get(dst).set(dstB);
  f.i32Const(0).set(bi);
  f.get(tw).v128Load(0).set(J);
  f.block((f) => {
    f.get(count).i32Eqz().brIf(0);
    f.loop((f) => {
      f.get(srcB).set(x);
      f.get(dstB).get(tmp).get(flags).i32Const(2).i32And().select().set(y);
      f.get(n).set(len);
      f.get(s).i32Const(4).i32Shl().set(str);
      f.get(tw).i32Const(16).i32Add().set(twp);
      f.get(flags).i32Const(1).i32And().set(h);
      f.get(flags).i32Const(4).i32And().set(prune);
      f.block((f) => {
        f.loop((f) => {
          f.get(len).i32Const(4).i32LtU().brIf(1);
          f.get(len).i32Const(2).i32ShrU().set(Q);
          f.get(str).get(Q).i32Mul().set(qB);
          f.i32Const(0).set(p);
          f.get(x).set(ia);
          f.get(y).set(oa);
          f.block((f) => {
            f.block((f) => {
              f.get(len).i32Const(4).i32Ne().get(h).i32Or().brIf(0);
              // The last radix-4 stage (L = 4, p = 0): every twiddle is 1. With the prune flag only
              // y0, y1 (outputs k < n/2) are written.
              f.i32Const(0).set(k);
              f.loop((f) => {
                butterflyInputs();
                f.get(oa).get(k).i32Add().tee(od).get(apc).get(bpd).f64x2Add().v128Store(0);
                f.get(od).get(str).i32Add().tee(od).get(amc).get(jb).f64x2Sub().v128Store(0);
                f.block((f) => {
                  f.get(prune).brIf(0);
                  f.get(od).get(str).i32Add().tee(od).get(apc).get(bpd).f64x2Sub().v128Store(0);
                  f.get(od).get(str).i32Add().get(amc).get(jb).f64x2Add().v128Store(0);
                });
                f.addTo(k, 16);
                f.get(k).get(str).i32Ne().brIf(0);
              });
              f.br(1);
            });
            f.loop((f) => {
              w.forEach((wl, j) => f.get(twp).v128Load(16 * j).set(wl));
              f.i32Const(0).set(k);
              f.block((f) => {
                f.block((f) => {
                  f.get(h).i32Eqz().brIf(0);
                  // Inputs c = d = 0: y0 = a + b, y1 = W(a − J b), y2 = W²(a − b), y3 = W³(a + J b).
                  f.loop((f) => {
                    f.get(ia).get(k).i32Add().tee(ad).v128Load(0).set(va);
                    f.get(ad).get(qB).i32Add().v128Load(0).set(vb);
                    f.swappedLanes(vb).get(J).f64x2Mul().set(jb);
                    f.get(oa).get(k).i32Add().tee(od).get(va).get(vb).f64x2Add().v128Store(0);
                    storeOutputs(
                      () => f.get(va).get(jb).f64x2Sub(),
                      () => f.get(va).get(vb).f64x2Sub(),
                      () => f.get(va).get(jb).f64x2Add(),
                    );
                    f.addTo(k, 16);
                    f.get(k).get(str).i32Ne().brIf(0);
                  });
                  f.br(1);
                });
                f.loop((f) => {
                  butterflyInputs();
                  f.get(oa).get(k).i32Add().tee(od).get(apc).get(bpd).f64x2Add().v128Store(0);
                  storeOutputs(
                    () => f.get(amc).get(jb).f64x2Sub(),
                    () => f.get(apc).get(bpd).f64x2Sub(),
                    () => f.get(amc).get(jb).f64x2Add(),
                  );
                  f.addTo(k, 16);
                  f.get(k).get(str).i32Ne().brIf(0);
                });
              });
              f.addTo(twp, ENTRY);
              f.get(ia).get(str).i32Add().set(ia);
              f.get(oa).get(str).i32Const(2).i32Shl().i32Add().set(oa);
              f.addTo(p, 1);
              f.get(p).get(Q).i32Ne().brIf(0);
            });
          });
          f.get(len).i32Const(2).i32ShrU().set(len);
          f.get(str).i32Const(2).i32Shl().set(str);
          f.i32Const(0).set(h);
          // Ping-pong: the next stage reads y and writes the other of dst / tmp.
          f.get(y).set(x);
          f.get(tmp).get(dstB).get(y).get(dstB).i32Eq().select().set(y);
          f.br(0);
        });
      });
      // Radix-2 stage of length 2 (no twiddles): y[q] = a + b, y[q + s] = a − b.
      f.block((f) => {
        f.get(len).i32Const(2).i32Ne().brIf(0);
        f.i32Const(0).set(k);
        f.loop((f) => {
          f.get(x).get(k).i32Add().tee(ad).v128Load(0).set(va);
          f.get(ad).get(str).i32Add().v128Load(0).set(vb);
          f.get(y).get(k).i32Add().tee(od).get(va).get(vb).f64x2Add().v128Store(0);
          f.block((f) => {
            f.get(prune).brIf(0);
            f.get(od).get(str).i32Add().get(va).get(vb).f64x2Sub().v128Store(0);
          });
          f.addTo(k, 16);
          f.get(k).get(str).i32Ne().brIf(0);
        });
      });
      f.get(srcB).get(bstride).i32Add().set(srcB);
      f.get(dstB).get(bstride).i32Add().set(dstB);
      f.addTo(bi, 1);
      f.get(bi).get(count).i32Ne().brIf(0);
    });
  });
  return f;
}

function scaleFunction(): FunctionBuilder {
  const { i32 } = ValType;
  const f = new FunctionBuilder([i32, i32, i32, i32]);
  const [dst, src, lam, count] = [0, 1, 2, 3];
  const end = f.local(i32);
  f.block((f) => {
    f.get(count).i32Eqz().brIf(0);
    f.get(dst).get(count).i32Const(4).i32Shl().i32Add().set(end);
    f.loop((f) => {
      f.get(dst).get(src).v128Load(0).get(lam).v128Load64Splat(0).f64x2Mul().v128Store(0);
      f.addTo(dst, 16);
      f.addTo(src, 16);
      f.addTo(lam, 8);
      f.get(dst).get(end).i32Ne().brIf(0);
    });
  });
  return f;
}

/** Bytes of the module: `fft` and `scaleComplex` (see the header), memory imported as env.memory. */
export function fftModuleBytes(): Uint8Array<ArrayBuffer> {
  return encodeModule({
    memory: { ...MEMORY_IMPORT, minPages: 1 },
    functions: [
      { name: FFT_EXPORT, fn: fftFunction() },
      { name: SCALE_EXPORT, fn: scaleFunction() },
    ],
  });
}
