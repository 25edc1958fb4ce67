/**
 * The JavaScript implementation of the FFT kernel (./engine.ts FftKernel): a line-by-line twin of
 * src/core/wasm/wat/fft.wat — Stockham autosort, radix-4 stages then one radix-2 stage, the same
 * twiddle table (./twiddles.ts), the same flags — doing every floating-point operation of the
 * WebAssembly kernel in the same order on the same operands (its f64x2 lanes become a re and an
 * im variable; an IEEE multiply then an add, never fused), so both give the same bits
 * (test/core/fft/stockham.test.ts). The algorithm and the arguments are described in the .wat file's
 * header; addresses are in bytes there and here, converted to Float64Array indices (÷ 8) on entry.
 *
 * Complex product v·w of the table's (wr, wr), (−wi, wi) pair: re = vr·wr + vi·(−wi),
 * im = vi·wr + vr·wi. J·v = swap(v) ⊙ (J0, J1): re = vi·J0, im = vr·J1.
 */
import type { FftKernel } from './engine.ts';

const PAGE = 65536;

/** fft(src, dst, tmp, tw, n, s, count, bstride, flags) of src/core/wasm/wat/fft.wat on a Float64Array memory. */
export function stockhamFft(
  f: Float64Array,
  src: number,
  dst: number,
  tmp: number,
  tw: number,
  n: number,
  s: number,
  count: number,
  bstride: number,
  flags: number,
): void {
  const t0 = tw / 8;
  const J0 = f[t0];
  const J1 = f[t0 + 1];
  const prune = (flags & 4) !== 0;
  const tmpE = tmp / 8;
  for (let b = 0; b < count; b++) {
    const dstB = (dst + b * bstride) / 8;
    let x = (src + b * bstride) / 8;
    let y = (flags & 2) !== 0 ? dstB : tmpE;
    let len = n;
    let str = 2 * s; // doubles between x[q + s p] and x[q + s (p + 1)]
    let twp = t0 + 2;
    let halfZero = (flags & 1) !== 0;
    while (len >= 4) {
      const quarter = len >> 2;
      const qE = str * quarter; // doubles between a and b
      let ia = x;
      let oa = y;
      if (len === 4 && !halfZero) {
        // The last radix-4 stage (L = 4, p = 0): every twiddle is 1.
        for (let k = 0; k < str; k += 2) {
          const a = ia + k;
          const ar = f[a],
            ai = f[a + 1];
          const br = f[a + qE],
            bi = f[a + qE + 1];
          const cr = f[a + 2 * qE],
            ci = f[a + 2 * qE + 1];
          const dr = f[a + 3 * qE],
            di = f[a + 3 * qE + 1];
          const apcR = ar + cr,
            apcI = ai + ci;
          const amcR = ar - cr,
            amcI = ai - ci;
          const bpdR = br + dr,
            bpdI = bi + di;
          const bmdR = br - dr,
            bmdI = bi - di;
          const jbR = bmdI * J0,
            jbI = bmdR * J1;
          const o = oa + k;
          f[o] = apcR + bpdR;
          f[o + 1] = apcI + bpdI;
          f[o + str] = amcR - jbR;
          f[o + str + 1] = amcI - jbI;
          if (!prune) {
            f[o + 2 * str] = apcR - bpdR;
            f[o + 2 * str + 1] = apcI - bpdI;
            f[o + 3 * str] = amcR + jbR;
            f[o + 3 * str + 1] = amcI + jbI;
          }
        }
      } else {
        for (let p = 0; p < quarter; p++) {
          const w1r = f[twp],
            w1r2 = f[twp + 1],
            w1a = f[twp + 2],
            w1b = f[twp + 3];
          const w2r = f[twp + 4],
            w2r2 = f[twp + 5],
            w2a = f[twp + 6],
            w2b = f[twp + 7];
          const w3r = f[twp + 8],
            w3r2 = f[twp + 9],
            w3a = f[twp + 10],
            w3b = f[twp + 11];
          if (halfZero) {
            // Inputs c = d = 0: y0 = a + b, y1 = W(a − J b), y2 = W²(a − b), y3 = W³(a + J b).
            for (let k = 0; k < str; k += 2) {
              const a = ia + k;
              const ar = f[a],
                ai = f[a + 1];
              const br = f[a + qE],
                bi = f[a + qE + 1];
              const jbR = bi * J0,
                jbI = br * J1;
              const o = oa + k;
              f[o] = ar + br;
              f[o + 1] = ai + bi;
              rotateStore(f, o + str, ar - jbR, ai - jbI, w1r, w1r2, w1a, w1b);
              rotateStore(f, o + 2 * str, ar - br, ai - bi, w2r, w2r2, w2a, w2b);
              rotateStore(f, o + 3 * str, ar + jbR, ai + jbI, w3r, w3r2, w3a, w3b);
            }
          } else {
            for (let k = 0; k < str; k += 2) {
              const a = ia + k;
              const ar = f[a],
                ai = f[a + 1];
              const br = f[a + qE],
                bi = f[a + qE + 1];
              const cr = f[a + 2 * qE],
                ci = f[a + 2 * qE + 1];
              const dr = f[a + 3 * qE],
                di = f[a + 3 * qE + 1];
              const apcR = ar + cr,
                apcI = ai + ci;
              const amcR = ar - cr,
                amcI = ai - ci;
              const bpdR = br + dr,
                bpdI = bi + di;
              const bmdR = br - dr,
                bmdI = bi - di;
              const jbR = bmdI * J0,
                jbI = bmdR * J1;
              const o = oa + k;
              f[o] = apcR + bpdR;
              f[o + 1] = apcI + bpdI;
              rotateStore(f, o + str, amcR - jbR, amcI - jbI, w1r, w1r2, w1a, w1b);
              rotateStore(f, o + 2 * str, apcR - bpdR, apcI - bpdI, w2r, w2r2, w2a, w2b);
              rotateStore(f, o + 3 * str, amcR + jbR, amcI + jbI, w3r, w3r2, w3a, w3b);
            }
          }
          twp += 12;
          ia += str;
          oa += 4 * str;
        }
      }
      // Next stage: L/4, stride 4s; it reads y and writes the other of dst / tmp.
      len >>= 2;
      str *= 4;
      halfZero = false;
      x = y;
      y = y === dstB ? tmpE : dstB;
    }
    if (len === 2) {
      // Radix-2 stage of length 2 (no twiddles): y[q] = a + b, y[q + s] = a − b.
      for (let k = 0; k < str; k += 2) {
        const a = x + k;
        const ar = f[a],
          ai = f[a + 1];
        const br = f[a + str],
          bi = f[a + str + 1];
        const o = y + k;
        f[o] = ar + br;
        f[o + 1] = ai + bi;
        if (!prune) {
          f[o + str] = ar - br;
          f[o + str + 1] = ai - bi;
        }
      }
    }
  }
}

/** f[o], f[o + 1] ← t·w for the table's pair (wr, wr2) = (wr, wr), (wa, wb) = (−wi, wi): the f64x2 product of the .wat. */
function rotateStore(f: Float64Array, o: number, tr: number, ti: number, wr: number, wr2: number, wa: number, wb: number): void {
  f[o] = tr * wr + ti * wa;
  f[o + 1] = ti * wr2 + tr * wb;
}

/** scaleComplex(dst, src, lam, count) of src/core/wasm/wat/fft.wat: dst[i] ← lam[i]·src[i]. */
export function stockhamScale(f: Float64Array, dst: number, src: number, lam: number, count: number): void {
  const d = dst / 8;
  const s = src / 8;
  const l = lam / 8;
  for (let i = 0; i < count; i++) {
    const v = f[l + i];
    f[d + 2 * i] = f[s + 2 * i] * v;
    f[d + 2 * i + 1] = f[s + 2 * i + 1] * v;
  }
}

/** The JavaScript kernel over its own memory (an ArrayBuffer grown by whole 64 KiB pages, like WebAssembly's). */
export function javascriptFftKernel(): FftKernel {
  let buffer = new ArrayBuffer(PAGE);
  let view = new Float64Array(buffer);
  return {
    implementation: 'javascript',
    buffer: () => buffer,
    ensure(bytes) {
      if (bytes <= buffer.byteLength) return;
      const next = new ArrayBuffer(Math.ceil(bytes / PAGE) * PAGE);
      new Float64Array(next).set(view);
      buffer = next;
      view = new Float64Array(buffer);
    },
    fft: (src, dst, tmp, tw, n, s, count, bstride, flags) => stockhamFft(view, src, dst, tmp, tw, n, s, count, bstride, flags),
    scaleComplex: (dst, src, lam, count) => stockhamScale(view, dst, src, lam, count),
  };
}
