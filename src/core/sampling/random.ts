/**
 * Seeded random numbers that are bit-for-bit the same in Node and in every browser.
 *
 * Generator: MT19937, the 32-bit Mersenne Twister (Matsumoto & Nishimura 1998, "Mersenne twister:
 * a 623-dimensionally equidistributed uniform pseudo-random number generator", ACM TOMACS
 * 8(1):3–30), seeded with the authors' `init_genrand` recurrence
 *   mt[0] = seed,  mt[i] = 1812433253 · (mt[i−1] ⊕ (mt[i−1] ≫ 30)) + i   (mod 2³²).
 * Chosen over newer small-state generators because the same published generator with the same
 * seeding is in numpy's legacy `RandomState(seed)`, whose stream numpy keeps fixed (NEP 19), so the
 * whole chain — integers, doubles and normal variates — is checked against an implementation that
 * is not ours (test/reference/sampling_reference.py).
 *
 * Doubles: 53 random bits in [0, 1), (a·2²⁶ + b) / 2⁵³ with a = u₁ ≫ 5, b = u₂ ≫ 6 (the authors'
 * `genrand_res53`).
 *
 * Normal variates: Marsaglia's polar method (Marsaglia & Bray 1964, SIAM Review 6(3):260–264):
 * x₁, x₂ uniform on (−1, 1) until 0 < r² = x₁² + x₂² < 1, then x₁·f and x₂·f with
 * f = √(−2 ln r² / r²) are two independent N(0, 1) variates. The order (x₂·f returned first, x₁·f
 * kept for the next call) is the one numpy's legacy generator uses, so streams can be compared.
 *
 * Engine independence: integer steps use Math.imul and 32-bit shifts (exact); +, −, ·, / and
 * Math.sqrt are correctly rounded IEEE 754 operations (exactly specified by ECMA-262). Math.log is
 * only "implementation-approximated" by ECMA-262 and differs between engines in the last bit, so
 * {@link ieeeLog} ports fdlibm's e_log.c (Sun Microsystems 1993, freely distributable) using only
 * exact operations.
 */
import { InputError } from '../errors.ts';

const N = 624;
const M = 397;
const MATRIX_A = 0x9908b0df;
const UPPER = 0x80000000;
const LOWER = 0x7fffffff;

/** The published default seed of MT19937 (`init_genrand(5489)`). */
export const MT19937_DEFAULT_SEED = 5489;

/** Throws InputError unless `seed` is an integer in [0, 2³² − 1]. */
export function validateSeed(seed: number, field = 'seed'): void {
  if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) {
    throw new InputError(field, 'an integer between 0 and 4294967295', seed);
  }
}

/** MT19937 with 53-bit doubles and polar-method normal variates (see the module comment). */
export class Random {
  // Int32Array: the words stay small integers in V8 (a Uint32Array read ≥ 2³¹ is a heap number); every
  // step is a 32-bit bit operation, so the signed view gives the same bits.
  private readonly mt = new Int32Array(N);
  private mti = N;
  private hasSpare = false;
  private spare = 0;

  constructor(seed: number) {
    validateSeed(seed);
    const mt = this.mt;
    mt[0] = seed >>> 0;
    for (let i = 1; i < N; i++) {
      const p = mt[i - 1];
      mt[i] = (Math.imul(1812433253, p ^ (p >>> 30)) + i) >>> 0;
    }
  }

  /** Next 32-bit unsigned integer (`genrand_int32`). */
  nextUint32(): number {
    const mt = this.mt;
    if (this.mti >= N) {
      let kk = 0;
      let y: number;
      for (; kk < N - M; kk++) {
        y = (mt[kk] & UPPER) | (mt[kk + 1] & LOWER);
        // −(y & 1) & MATRIX_A is the reference code's (y & 1 ? MATRIX_A : 0) without a branch (the
        // low bit is random, so the branch mispredicts half the time).
        mt[kk] = mt[kk + M] ^ (y >>> 1) ^ (-(y & 1) & MATRIX_A);
      }
      for (; kk < N - 1; kk++) {
        y = (mt[kk] & UPPER) | (mt[kk + 1] & LOWER);
        mt[kk] = mt[kk + (M - N)] ^ (y >>> 1) ^ (-(y & 1) & MATRIX_A);
      }
      y = (mt[N - 1] & UPPER) | (mt[0] & LOWER);
      mt[N - 1] = mt[M - 1] ^ (y >>> 1) ^ (-(y & 1) & MATRIX_A);
      this.mti = 0;
    }
    return temper(mt[this.mti++]);
  }

  /** Uniform double in [0, 1) with 53 random bits (`genrand_res53`). */
  nextDouble(): number {
    const a = this.nextUint32() >>> 5;
    const b = this.nextUint32() >>> 6;
    return (a * 67108864 + b) * (1 / 9007199254740992);
  }

  /** Standard normal variate (Marsaglia polar method, numpy-legacy order). */
  nextNormal(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    let x1: number;
    let x2: number;
    let r2: number;
    do {
      x1 = 2 * this.nextDouble() - 1;
      x2 = 2 * this.nextDouble() - 1;
      r2 = x1 * x1 + x2 * x2;
    } while (r2 >= 1 || r2 === 0);
    const f = Math.sqrt((-2 * ieeeLog(r2)) / r2);
    this.spare = f * x1;
    this.hasSpare = true;
    return f * x2;
  }

  /**
   * Fill `out` with standard normal variates: the same numbers, in the same order, as
   * `out.length` calls of {@link nextNormal}. The generator state is read into locals, and while
   * four words are left in the current block a polar attempt takes them without the per-word
   * block check (at a block's end it falls back to {@link nextUint32}); about 2× faster.
   */
  fillNormal(out: Float64Array): Float64Array {
    const n = out.length;
    let i = 0;
    if (n > 0 && this.hasSpare) {
      this.hasSpare = false;
      out[i++] = this.spare;
    }
    const mt = this.mt;
    while (i < n) {
      let x1: number;
      let x2: number;
      let r2: number;
      do {
        let a1: number, b1: number, a2: number, b2: number;
        const k = this.mti;
        if (k + 4 <= N) {
          a1 = temper(mt[k]) >>> 5;
          b1 = temper(mt[k + 1]) >>> 6;
          a2 = temper(mt[k + 2]) >>> 5;
          b2 = temper(mt[k + 3]) >>> 6;
          this.mti = k + 4;
        } else {
          a1 = this.nextUint32() >>> 5;
          b1 = this.nextUint32() >>> 6;
          a2 = this.nextUint32() >>> 5;
          b2 = this.nextUint32() >>> 6;
        }
        x1 = 2 * ((a1 * 67108864 + b1) * (1 / 9007199254740992)) - 1;
        x2 = 2 * ((a2 * 67108864 + b2) * (1 / 9007199254740992)) - 1;
        r2 = x1 * x1 + x2 * x2;
      } while (r2 >= 1 || r2 === 0);
      const f = Math.sqrt((-2 * ieeeLog(r2)) / r2);
      out[i++] = f * x2;
      if (i < n) out[i++] = f * x1;
      else {
        this.spare = f * x1;
        this.hasSpare = true;
      }
    }
    return out;
  }
}

/** MT19937 tempering of one state word (`genrand_int32`'s last four steps). */
function temper(y: number): number {
  y ^= y >>> 11;
  y ^= (y << 7) & 0x9d2c5680;
  y ^= (y << 15) & 0xefc60000;
  y ^= y >>> 18;
  return y >>> 0;
}

// ---------------------------------------------------------------------------------------------
// Natural logarithm, ported from fdlibm 5.3 e_log.c (__ieee754_log), error < 1 ulp. Method:
//   1. x = 2^k (1 + f) with √2/2 < 1 + f < √2;
//   2. log(1 + f) = f − s (f − R)  or  f − (hfsq − s (hfsq + R)), s = f / (2 + f),
//      R = Lg1 s² + … + Lg7 s¹⁴ (a Remez polynomial in s², |error| < 2^−58.45);
//   3. log x = k·ln2_hi + (log(1 + f) + k·ln2_lo), ln2_hi having trailing zero bits so k·ln2_hi
//      is exact.
// The constants are fdlibm's, given there with their hexadecimal bit patterns (checked in
// test/core/sampling/random.test.ts).

const LN2_HI = 6.9314718036912381649e-1; // 3fe62e42 fee00000
const LN2_LO = 1.90821492927058770002e-10; // 3dea39ef 35793c76
const TWO54 = 1.8014398509481984e16; // 43500000 00000000
export const FDLIBM_LOG_CONSTANTS = {
  Lg1: 6.66666666666673513e-1, // 3FE55555 55555593
  Lg2: 3.999999999940941908e-1, // 3FD99999 9997FA04
  Lg3: 2.857142874366239149e-1, // 3FD24924 94229359
  Lg4: 2.222219843214978396e-1, // 3FCC71C5 1D8E78AF
  Lg5: 1.818357216161805012e-1, // 3FC74664 96CB03DE
  Lg6: 1.531383769920937332e-1, // 3FC39A09 D078C69F
  Lg7: 1.479819860511658591e-1, // 3FC2F112 DF3E5244
  ln2_hi: LN2_HI,
  ln2_lo: LN2_LO,
  two54: TWO54,
} as const;
const { Lg1, Lg2, Lg3, Lg4, Lg5, Lg6, Lg7 } = FDLIBM_LOG_CONSTANTS;

const f64 = new Float64Array(1);
const i32 = new Int32Array(f64.buffer);
// Word order of a double in memory (little-endian on every current platform, checked anyway).
const HI = (() => {
  f64[0] = 1;
  return i32[1] === 0x3ff00000 ? 1 : 0;
})();
const LO = 1 - HI;

/** POW2[e + POW2_BIAS] = 2^e for e = −1074 … 1023, built by exact halving and doubling. */
const POW2_BIAS = 1074;
const POW2 = (() => {
  const t = new Float64Array(POW2_BIAS + 1024);
  t[POW2_BIAS] = 1;
  for (let e = 1; e <= 1023; e++) t[POW2_BIAS + e] = 2 * t[POW2_BIAS + e - 1];
  for (let e = 1; e <= POW2_BIAS; e++) t[POW2_BIAS - e] = 0.5 * t[POW2_BIAS - e + 1];
  return t;
})();

/** Natural logarithm with the same bits on every engine (fdlibm e_log.c port). */
export function ieeeLog(x: number): number {
  f64[0] = x;
  let hx = i32[HI];
  const lx = i32[LO];
  let k = 0;
  let scaled = 0;
  if (hx < 0x00100000) {
    // x < 2^−1022
    if (((hx & 0x7fffffff) | lx) === 0) return -Infinity; // log(±0)
    if (hx < 0) return NaN; // log(negative)
    k -= 54;
    scaled = 54;
    x *= TWO54; // subnormal: scale up
    f64[0] = x;
    hx = i32[HI];
  }
  if (hx >= 0x7ff00000) return x + x; // Inf or NaN
  k += (hx >> 20) - 1023;
  hx &= 0x000fffff;
  const i = (hx + 0x95f64) & 0x100000;
  k += i >> 20;
  // Normalise x or x/2 into [√2/2, √2): fdlibm rewrites the exponent bits; multiplying by the
  // power of two 2^−k is the same exact operation (the result is a normal number) and avoids a
  // second store and load through the typed-array view.
  x *= POW2[POW2_BIAS - k - scaled];
  const f = x - 1.0;
  const dk = k;
  if ((0x000fffff & (2 + hx)) < 3) {
    // −2^−20 ≤ f < 2^−20
    if (f === 0) return k === 0 ? 0 : dk * LN2_HI + dk * LN2_LO;
    const R = f * f * (0.5 - 0.33333333333333333 * f);
    return k === 0 ? f - R : dk * LN2_HI - (R - dk * LN2_LO - f);
  }
  const s = f / (2.0 + f);
  const z = s * s;
  let ii = hx - 0x6147a;
  const w = z * z;
  const j = 0x6b851 - hx;
  const t1 = w * (Lg2 + w * (Lg4 + w * Lg6));
  const t2 = z * (Lg1 + w * (Lg3 + w * (Lg5 + w * Lg7)));
  ii |= j;
  const R = t2 + t1;
  if (ii > 0) {
    const hfsq = 0.5 * f * f;
    return k === 0 ? f - (hfsq - s * (hfsq + R)) : dk * LN2_HI - (hfsq - (s * (hfsq + R) + dk * LN2_LO) - f);
  }
  return k === 0 ? f - s * (f - R) : dk * LN2_HI - (s * (f - R) - dk * LN2_LO - f);
}
