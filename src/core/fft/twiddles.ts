/**
 * The twiddle tables of the Stockham FFT, shared by both implementations: the WebAssembly kernel
 * src/core/wasm/wat/fft.wat (its header gives the algorithm) and its JavaScript twin ./stockham.ts.
 */

/** Bytes per twiddle entry: (W^p, W^2p, W^3p) as (wr, wr), (−wi, wi) pairs of v128. */
export const TWIDDLE_ENTRY_BYTES = 96;

/** Number of stages of an n-point transform (radix-4 stages, then radix-2 when log2 n is odd). */
export function stageCount(n: number): number {
  const lg = Math.round(Math.log2(n));
  return (lg >> 1) + (lg & 1);
}

/** Length in doubles of the twiddle table for n: J, then every radix-4 stage's entries. */
export function twiddleTableLength(n: number): number {
  let entries = 0;
  for (let len = n; len >= 4; len >>= 2) entries += len >> 2;
  return 2 + (TWIDDLE_ENTRY_BYTES / 8) * entries;
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
