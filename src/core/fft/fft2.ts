/**
 * 1-D and 2-D discrete Fourier transforms over interleaved complex Float64Array buffers, built on
 * fft.js (radix-4, power-of-two sizes).
 *
 * Layout: a px × py complex array stores element (kx, ky) at re = buf[2(kx + px·ky)],
 * im = buf[2(kx + px·ky) + 1] (x fastest, like the grid's flat index i = ix + nx·iy).
 *
 * Conventions (the same as numpy.fft.fft2, checked in test/reference/fft.test.ts):
 *   forward  X(k) = Σ_j x(j) e^(−2πi (kx jx / px + ky jy / py))           (unnormalised)
 *   inverse  x(j) = 1/(px py) Σ_k X(k) e^(+2πi (kx jx / px + ky jy / py))
 * A size of 1 along an axis is the identity along it (fft.js itself needs sizes ≥ 2).
 *
 * Pruning (both exact, they only skip work on known zeros or unwanted outputs):
 *   `inputRows = r`  rows ky ≥ r of the input are zero: the x-pass runs on the first r rows only;
 *   `outputRows = r` only rows ky < r of the output are wanted: the y-pass runs first over all
 *                    columns, then the x-pass on the first r rows only (rows ≥ r are left stale).
 */
import FFT from 'fft.js';

/** Smallest power of two ≥ n (n ≥ 1). */
export function nextPowerOfTwo(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 1 && (n & (n - 1)) === 0;
}

const plans = new Map<number, FFT>();

function plan(n: number): FFT {
  let p = plans.get(n);
  if (p === undefined) {
    p = new FFT(n);
    plans.set(n, p);
  }
  return p;
}

/**
 * The forward 1-D transform of `n` complex values (n a power of two ≥ 1): `dst` ← F `src`, both
 * interleaved of length ≥ 2n and distinct. Reuses one fft.js plan per size.
 */
export function forwardTransform1(n: number, src: Float64Array, dst: Float64Array): void {
  if (n === 1) {
    dst[0] = src[0]!;
    dst[1] = src[1]!;
    return;
  }
  plan(n).transform(dst, src);
}

/** In-place 1-D transform of `n` complex values starting at complex offset 0 of `buf`. */
export function fft1(buf: Float64Array, inverse = false): void {
  const n = buf.length / 2;
  if (!isPowerOfTwo(n)) throw new RangeError(`fft1: length ${n} is not a power of two`);
  if (n === 1) return;
  const scratch = new Float64Array(2 * n);
  if (inverse) plan(n).inverseTransform(scratch, buf);
  else plan(n).transform(scratch, buf);
  buf.set(scratch);
}

export interface Fft2Options {
  readonly inverse?: boolean;
  /** Rows ky ≥ inputRows of the input are zero (default py). */
  readonly inputRows?: number;
  /** Only rows ky < outputRows of the output are needed (default py). */
  readonly outputRows?: number;
}

/** Columns gathered per sweep of the y-pass (keeps the strided reads cache-friendly). */
const COLUMN_BLOCK = 16;

/**
 * Reusable workspace for px × py transforms (scratch rows and column blocks). One per thread;
 * not shared between concurrent calls.
 */
export class Fft2 {
  readonly px: number;
  readonly py: number;
  private readonly rowScratch: Float64Array;
  private readonly colIn: Float64Array[];
  private readonly colOut: Float64Array[];

  constructor(px: number, py: number) {
    if (!isPowerOfTwo(px) || !isPowerOfTwo(py)) {
      throw new RangeError(`Fft2: sizes ${px} × ${py} must be powers of two`);
    }
    this.px = px;
    this.py = py;
    this.rowScratch = new Float64Array(2 * px);
    this.colIn = Array.from({ length: COLUMN_BLOCK }, () => new Float64Array(2 * py));
    this.colOut = Array.from({ length: COLUMN_BLOCK }, () => new Float64Array(2 * py));
  }

  /** In-place 2-D transform of a px × py complex buffer (length 2·px·py). */
  transform(buf: Float64Array, options: Fft2Options = {}): void {
    const { px, py } = this;
    if (buf.length !== 2 * px * py) {
      throw new RangeError(`Fft2: buffer has length ${buf.length}, expected 2·${px}·${py} = ${2 * px * py}`);
    }
    const inverse = options.inverse ?? false;
    const inputRows = Math.min(options.inputRows ?? py, py);
    const outputRows = Math.min(options.outputRows ?? py, py);
    if (inputRows < py || outputRows === py) {
      this.rows(buf, inputRows, inverse);
      this.columns(buf, inverse, inputRows, py);
    } else {
      this.columns(buf, inverse, py, outputRows);
      this.rows(buf, outputRows, inverse);
    }
  }

  /** The x-pass alone on rows 0 … count − 1 (fft.js on each contiguous row). */
  rows(buf: Float64Array, count: number, inverse: boolean): void {
    const px = this.px;
    if (px === 1) return;
    const f = plan(px);
    const s = this.rowScratch;
    const w = 2 * px;
    for (let r = 0; r < count; r++) {
      const row = buf.subarray(r * w, (r + 1) * w);
      if (inverse) f.inverseTransform(s, row);
      else f.transform(s, row);
      row.set(s);
    }
  }

  /**
   * Forward x-transform of one row: px complex values from `src` into `dst` (both of length ≥ 2·px,
   * distinct buffers; no copy back as in {@link rows}).
   */
  transformRow(src: Float64Array, dst: Float64Array): void {
    if (this.px === 1) {
      dst[0] = src[0]!;
      dst[1] = src[1]!;
      return;
    }
    plan(this.px).transform(dst, src);
  }

  /**
   * The y-pass: columns gathered COLUMN_BLOCK at a time, transformed with fft.js and scattered
   * back. Only rows < gatherRows are read (the rest are taken as zero) and only rows < scatterRows
   * are written. `buf` has rows of 2·px values; it may hold fewer than py rows when
   * gatherRows, scatterRows ≤ its row count.
   */
  private columns(buf: Float64Array, inverse: boolean, gatherRows = this.py, scatterRows = this.py): void {
    this.columnPass(buf, buf, gatherRows, scatterRows, (col, out) => {
      if (inverse) plan(this.py).inverseTransform(out, col);
      else plan(this.py).transform(out, col);
      return out;
    });
  }

  /**
   * Circulant filtering along y fused with both y-passes, with forward transforms only. Uses
   * F⁻¹ = (1/p) R F, R the index reversal (R v)(j) = v(−j mod p) (from the DFT definition; common
   * practice, no source): for each column kx, v ← F_y (λ'[kx, ·] ⊙ F_y col), and dest row t takes
   * v(−t mod py). `lambdaT` is λ' transposed (element (kx, ky) at kx·py + ky); fold the 1/(px·py)
   * of the inverse into it. Reads rows < gatherRows of `buf` (the rest taken as zero), writes
   * rows < scatterRows of `dest` (default `buf`). Followed by forward x-passes and reading column
   * (−ix mod px), this gives C̃ x = F⁻¹ (λ ⊙ F x) with no division pass and no full-size buffer.
   */
  columnFilter(
    buf: Float64Array,
    lambdaT: Float64Array,
    gatherRows: number,
    scatterRows: number,
    dest: Float64Array = buf,
    save: Float64Array | null = null,
  ): void {
    const py = this.py;
    if (py === 1) {
      // No y-axis: a pointwise product along x (the saved spectrum is the row itself).
      const px = this.px;
      if (save !== null) save.set(buf.subarray(0, 2 * px));
      for (let ix = 0; ix < px; ix++) {
        const l = lambdaT[ix]!;
        dest[2 * ix] = l * buf[2 * ix]!;
        dest[2 * ix + 1] = l * buf[2 * ix + 1]!;
      }
      return;
    }
    const f = plan(py);
    this.columnPass(
      buf,
      dest,
      gatherRows,
      scatterRows,
      (col, out, column) => {
        f.transform(out, col);
        // The column spectrum F_y col (column-major, 2·py values per column), for callers that
        // cache it and later run only the second half (columnFilterCached).
        if (save !== null) save.set(out, 2 * py * column);
        const o = column * py;
        for (let k = 0; k < py; k++) {
          const l = lambdaT[o + k]!;
          out[2 * k] *= l;
          out[2 * k + 1] *= l;
        }
        f.transform(col, out);
        return col;
      },
      true,
    );
  }

  /**
   * The second half of {@link columnFilter} from saved column spectra S (column-major, as written
   * by its `save` argument): v ← F_y (λ'[kx, ·] ⊙ S[kx, ·]); dest row t takes v(−t mod py).
   */
  columnFilterCached(spectra: Float64Array, lambdaT: Float64Array, scatterRows: number, dest: Float64Array): void {
    const { px, py } = this;
    if (py === 1) {
      this.columnFilter(spectra, lambdaT, 1, 1, dest);
      return;
    }
    const f = plan(py);
    const w = 2 * px;
    for (let c0 = 0; c0 < px; c0 += COLUMN_BLOCK) {
      const nb = Math.min(COLUMN_BLOCK, px - c0);
      for (let b = 0; b < nb; b++) {
        const out = this.colOut[b]!;
        const o = (c0 + b) * py;
        const so = 2 * o;
        for (let k = 0; k < py; k++) {
          const l = lambdaT[o + k]!;
          out[2 * k] = l * spectra[so + 2 * k]!;
          out[2 * k + 1] = l * spectra[so + 2 * k + 1]!;
        }
        f.transform(this.colIn[b]!, out);
      }
      for (let r = 0; r < scatterRows; r++) {
        const o = r * w + 2 * c0;
        const src = r > 0 ? 2 * (py - r) : 0;
        for (let b = 0; b < nb; b++) {
          const col = this.colIn[b]!;
          dest[o + 2 * b] = col[src]!;
          dest[o + 2 * b + 1] = col[src + 1]!;
        }
      }
    }
  }

  // ---- y-pass across whole rows ----------------------------------------------------------------
  //
  // The y-transform of every column at once: each radix-2 butterfly combines two rows of px
  // complex values with one twiddle, so inner loops are contiguous and no column is gathered.
  // Forward transform by decimation in frequency (natural order in, bit-reversed order out), the
  // pointwise product in bit-reversed order, then a forward transform by decimation in time
  // (bit-reversed in, natural out): no permutation pass is needed (Cooley–Tukey radix-2 in both
  // forms; common practice, no source). The first DIF stage skips the known-zero rows ≥ py/2 and
  // the last DIT stage computes only the rows that are scattered.

  private twR: Float64Array | null = null;
  private twI: Float64Array | null = null;
  private yWork: Float64Array | null = null;
  private permCache = new WeakMap<Float64Array, Float64Array>();

  private rowTwiddles(): void {
    if (this.twR !== null) return;
    const py = this.py;
    const h = py >> 1;
    this.twR = new Float64Array(h);
    this.twI = new Float64Array(h);
    for (let k = 0; k < h; k++) {
      const a = (-2 * Math.PI * k) / py;
      this.twR[k] = Math.cos(a);
      this.twI[k] = Math.sin(a);
    }
  }

  /** λ' in the spectrum's row order, row-major: out[2·(p·px + kx)] = out[… + 1] = λ'[kx, order(p)]. */
  private permutedLambda(lambdaT: Float64Array): Float64Array {
    let q = this.permCache.get(lambdaT);
    if (q !== undefined) return q;
    const { px, py } = this;
    q = new Float64Array(2 * px * py);
    const order = this.spectrumOrder();
    for (let p = 0; p < py; p++) {
      const r = order[p]!;
      for (let kx = 0; kx < px; kx++) {
        const l = lambdaT[kx * py + r]!;
        q[2 * (p * px + kx)] = l;
        q[2 * (p * px + kx) + 1] = l;
      }
    }
    this.permCache.set(lambdaT, q);
    return q;
  }


  private orderCache: Int32Array | null = null;

  /**
   * The row order of spectra saved by {@link rowFilter}: row p holds frequency ky = order[p]
   * (other implementations of the same product, e.g. the WebAssembly route of CirculantProduct,
   * save and read spectra in this order so that saved spectra stay interchangeable).
   */
  spectrumRowOrder(): Int32Array {
    if (this.orderCache === null) this.orderCache = this.py === 1 ? Int32Array.of(0) : this.spectrumOrder();
    return this.orderCache;
  }

  /**
   * Which frequency ky each row of the DIF output holds (a digit reversal for the radix-2/4
   * stages), found by transforming the impulse at y = 1: row p then holds e^(−2πi ky/py).
   */
  private spectrumOrder(): Int32Array {
    const py = this.py;
    const one = new Fft2(1, py);
    one.rowTwiddles();
    const y = new Float64Array(2 * py);
    y[2] = 1;
    // First DIF stage by hand (same butterflies as rowFilter), then the middle stages.
    const h = py >> 1;
    const t = new Float64Array(2 * py);
    for (let j = 0; j < h; j++) {
      const ar = y[2 * j]!, ai = y[2 * j + 1]!, br = y[2 * (j + h)]!, bi = y[2 * (j + h) + 1]!;
      t[2 * j] = ar + br;
      t[2 * j + 1] = ai + bi;
      const dr = ar - br, di = ai - bi;
      t[2 * (j + h)] = dr * one.twR![j]! - di * one.twI![j]!;
      t[2 * (j + h) + 1] = dr * one.twI![j]! + di * one.twR![j]!;
    }
    one.difMiddle(t);
    const order = new Int32Array(py);
    for (let p = 0; p < py; p++) {
      const k = Math.round((Math.atan2(-t[2 * p + 1]!, t[2 * p]!) * py) / (2 * Math.PI));
      order[p] = ((k % py) + py) % py;
    }
    return order;
  }

  /** DIF stages after the first radix-2 one: a radix-2 stage at length py/2 when needed, then radix-4. */
  private difMiddle(y: Float64Array): void {
    const { px, py } = this;
    const twR = this.twR!;
    const twI = this.twI!;
    const w = 2 * px;
    let len = py >> 1;
    let lg = 0;
    while (1 << lg < len) lg++;
    if (lg % 2 === 1) {
      const half = len >> 1;
      const tstep = py / len;
      for (let g = 0; g < py; g += len) {
        for (let j = 0; j < half; j++) {
          const o1 = (g + j) * w;
          const o2 = o1 + half * w;
          const cr = twR[j * tstep]!;
          const ci = twI[j * tstep]!;
          for (let c = 0; c < w; c += 2) {
            const ar = y[o1 + c]!, ai = y[o1 + c + 1]!, br = y[o2 + c]!, bi = y[o2 + c + 1]!;
            y[o1 + c] = ar + br;
            y[o1 + c + 1] = ai + bi;
            const dr = ar - br, di = ai - bi;
            y[o2 + c] = dr * cr - di * ci;
            y[o2 + c + 1] = dr * ci + di * cr;
          }
        }
      }
      len = half;
    }
    for (; len >= 4; len >>= 2) {
      const q = len >> 2;
      const tstep = py / len; // W_len^j = W_py^(j·tstep)
      for (let g = 0; g < py; g += len) {
        for (let j = 0; j < q; j++) {
          const oa = (g + j) * w;
          const ob = oa + q * w;
          const oc = ob + q * w;
          const od = oc + q * w;
          const w1r = twR[j * tstep]!, w1i = twI[j * tstep]!;
          // W^(2j), W^(3j) from the table (indices < py/2 since 3j·tstep < 3py/4 … reduce by symmetry)
          const [w2r, w2i] = twiddle(twR, twI, 2 * j * tstep, py);
          const [w3r, w3i] = twiddle(twR, twI, 3 * j * tstep, py);
          for (let c = 0; c < w; c += 2) {
            const ar = y[oa + c]!, ai = y[oa + c + 1]!;
            const br = y[ob + c]!, bi = y[ob + c + 1]!;
            const cr = y[oc + c]!, ci = y[oc + c + 1]!;
            const dr = y[od + c]!, di = y[od + c + 1]!;
            const t0r = ar + cr, t0i = ai + ci;
            const t1r = ar - cr, t1i = ai - ci;
            const t2r = br + dr, t2i = bi + di;
            // t3 = −i (b − d)
            const t3r = bi - di, t3i = dr - br;
            y[oa + c] = t0r + t2r;
            y[oa + c + 1] = t0i + t2i;
            const u1r = t1r + t3r, u1i = t1i + t3i;
            y[ob + c] = u1r * w1r - u1i * w1i;
            y[ob + c + 1] = u1r * w1i + u1i * w1r;
            const u2r = t0r - t2r, u2i = t0i - t2i;
            y[oc + c] = u2r * w2r - u2i * w2i;
            y[oc + c + 1] = u2r * w2i + u2i * w2r;
            const u3r = t1r - t3r, u3i = t1i - t3i;
            y[od + c] = u3r * w3r - u3i * w3i;
            y[od + c + 1] = u3r * w3i + u3i * w3r;
          }
        }
      }
    }
  }

  /**
   * The first radix-4 DIT stage (length 4, no twiddles) fused with the product y = λ ⊙ spec, so
   * the spectrum is read once. Needs py ≥ 8; spec may be y itself (each group is read before it
   * is written).
   */
  private ditFirstRadix4(spec: Float64Array, lam: Float64Array, y: Float64Array): void {
    const { px, py } = this;
    const w = 2 * px;
    for (let g = 0; g < py; g += 4) {
      const oa = g * w;
      const ob = oa + w;
      const oc = ob + w;
      const od = oc + w;
      for (let c = 0; c < w; c += 2) {
        const ar = spec[oa + c]! * lam[oa + c]!, ai = spec[oa + c + 1]! * lam[oa + c + 1]!;
        const br = spec[ob + c]! * lam[ob + c]!, bi = spec[ob + c + 1]! * lam[ob + c + 1]!;
        const cr = spec[oc + c]! * lam[oc + c]!, ci = spec[oc + c + 1]! * lam[oc + c + 1]!;
        const dr = spec[od + c]! * lam[od + c]!, di = spec[od + c + 1]! * lam[od + c + 1]!;
        const t0r = ar + cr, t0i = ai + ci;
        const t1r = ar - cr, t1i = ai - ci;
        const t2r = br + dr, t2i = bi + di;
        const t3r = bi - di, t3i = dr - br;
        y[oa + c] = t0r + t2r;
        y[oa + c + 1] = t0i + t2i;
        y[oc + c] = t0r - t2r;
        y[oc + c + 1] = t0i - t2i;
        y[ob + c] = t1r + t3r;
        y[ob + c + 1] = t1i + t3i;
        y[od + c] = t1r - t3r;
        y[od + c + 1] = t1i - t3i;
      }
    }
  }

  /** The mirror of {@link difMiddle}: radix-4 DIT stages upwards, then a radix-2 one at py/2 when needed. */
  private ditMiddle(y: Float64Array, firstDone = false): void {
    const { px, py } = this;
    const twR = this.twR!;
    const twI = this.twI!;
    const w = 2 * px;
    const h = py >> 1;
    let lg = 0;
    while (1 << lg < h) lg++;
    let len = firstDone ? 16 : 4;
    for (; len <= h && (lg % 2 === 0 || len <= h >> 1); len <<= 2) {
      const q = len >> 2;
      const tstep = py / len;
      for (let g = 0; g < py; g += len) {
        for (let j = 0; j < q; j++) {
          const oa = (g + j) * w;
          const ob = oa + q * w;
          const oc = ob + q * w;
          const od = oc + q * w;
          const w1r = twR[j * tstep]!, w1i = twI[j * tstep]!;
          const [w2r, w2i] = twiddle(twR, twI, 2 * j * tstep, py);
          const [w3r, w3i] = twiddle(twR, twI, 3 * j * tstep, py);
          for (let c = 0; c < w; c += 2) {
            const ar = y[oa + c]!, ai = y[oa + c + 1]!;
            const b0r = y[ob + c]!, b0i = y[ob + c + 1]!;
            const c0r = y[oc + c]!, c0i = y[oc + c + 1]!;
            const d0r = y[od + c]!, d0i = y[od + c + 1]!;
            const br = b0r * w1r - b0i * w1i, bi = b0r * w1i + b0i * w1r;
            const cr = c0r * w2r - c0i * w2i, ci = c0r * w2i + c0i * w2r;
            const dr = d0r * w3r - d0i * w3i, di = d0r * w3i + d0i * w3r;
            const t0r = ar + cr, t0i = ai + ci;
            const t1r = ar - cr, t1i = ai - ci;
            const t2r = br + dr, t2i = bi + di;
            const t3r = bi - di, t3i = dr - br;
            y[oa + c] = t0r + t2r;
            y[oa + c + 1] = t0i + t2i;
            y[ob + c] = t1r + t3r;
            y[ob + c + 1] = t1i + t3i;
            y[oc + c] = t0r - t2r;
            y[oc + c + 1] = t0i - t2i;
            y[od + c] = t1r - t3r;
            y[od + c + 1] = t1i - t3i;
          }
        }
      }
    }
    if (lg % 2 === 1) {
      // radix-2 DIT at length h
      const half = h >> 1;
      const tstep = py / h;
      for (let g = 0; g < py; g += h) {
        for (let j = 0; j < half; j++) {
          const o1 = (g + j) * w;
          const o2 = o1 + half * w;
          const cr = twR[j * tstep]!;
          const ci = twI[j * tstep]!;
          for (let c = 0; c < w; c += 2) {
            const br0 = y[o2 + c]!, bi0 = y[o2 + c + 1]!;
            const br = br0 * cr - bi0 * ci, bi = br0 * ci + bi0 * cr;
            const ar = y[o1 + c]!, ai = y[o1 + c + 1]!;
            y[o1 + c] = ar + br;
            y[o1 + c + 1] = ai + bi;
            y[o2 + c] = ar - br;
            y[o2 + c + 1] = ai - bi;
          }
        }
      }
    }
  }

  /** Length of a spectrum saved by {@link rowFilter} (2·px·py values, internal order). */
  get rowSpectrumLength(): number {
    return 2 * this.px * this.py;
  }

  /**
   * Same result as {@link columnFilter} (dest rows t < scatterRows take v(−t mod py) of
   * v = F_y(λ' ⊙ F_y col) per column), computed across whole rows. With `save`, the spectrum
   * F_y col is kept there in this method's own (bit-reversed row) order, for {@link rowFilterCached}.
   * Needs py ≥ 2 or falls back to columnFilter.
   */
  rowFilter(
    buf: Float64Array,
    lambdaT: Float64Array,
    gatherRows: number,
    scatterRows: number,
    dest: Float64Array,
    save: Float64Array | null = null,
  ): void {
    const { px, py } = this;
    if (py === 1) {
      this.columnFilter(buf, lambdaT, gatherRows, scatterRows, dest, save);
      return;
    }
    this.rowTwiddles();
    const twR = this.twR!;
    const twI = this.twI!;
    const w = 2 * px;
    if (this.yWork === null) this.yWork = new Float64Array(w * py);
    // The spectrum is built in `save` itself when given (no copy), else in the workspace.
    const y = save ?? this.yWork;
    if (y.length < w * py) throw new RangeError(`Fft2.rowFilter: save has length ${y.length}, expected ${w * py}`);
    const h = py >> 1;
    // First DIF stage (rows j and j + h) straight from buf; rows ≥ gatherRows are zero.
    for (let j = 0; j < h; j++) {
      const o1 = j * w;
      const o2 = (j + h) * w;
      const hasA = j < gatherRows;
      const hasB = j + h < gatherRows;
      const cr = twR[j]!;
      const ci = twI[j]!;
      if (!hasA && !hasB) {
        y.fill(0, o1, o1 + w);
        y.fill(0, o2, o2 + w);
      } else if (!hasB) {
        for (let c = 0; c < w; c += 2) {
          const ar = buf[o1 + c]!;
          const ai = buf[o1 + c + 1]!;
          y[o1 + c] = ar;
          y[o1 + c + 1] = ai;
          y[o2 + c] = ar * cr - ai * ci;
          y[o2 + c + 1] = ar * ci + ai * cr;
        }
      } else {
        for (let c = 0; c < w; c += 2) {
          const ar = buf[o1 + c]!;
          const ai = buf[o1 + c + 1]!;
          const br = buf[o2 + c]!;
          const bi = buf[o2 + c + 1]!;
          y[o1 + c] = ar + br;
          y[o1 + c + 1] = ai + bi;
          const dr = ar - br;
          const di = ai - bi;
          y[o2 + c] = dr * cr - di * ci;
          y[o2 + c + 1] = dr * ci + di * cr;
        }
      }
    }
    this.difMiddle(y);
    this.multiplyAndFinish(y, this.permutedLambda(lambdaT), scatterRows, dest);
  }

  /** The second half of {@link rowFilter} from a spectrum kept by its `save`. */
  rowFilterCached(spectra: Float64Array, lambdaT: Float64Array, scatterRows: number, dest: Float64Array): void {
    const { px, py } = this;
    if (py === 1) {
      this.columnFilter(spectra, lambdaT, 1, 1, dest);
      return;
    }
    this.rowTwiddles();
    if (this.yWork === null) this.yWork = new Float64Array(2 * px * py);
    this.multiplyAndFinish(spectra, this.permutedLambda(lambdaT), scatterRows, dest);
  }

  /**
   * y ← λ ⊙ spec (digit-reversed rows; y is the workspace, spec is not modified unless it is the
   * workspace), DIT forward transform, dest row t ← row (−t mod py).
   */
  private multiplyAndFinish(spec: Float64Array, lam: Float64Array, scatterRows: number, dest: Float64Array): void {
    const { px, py } = this;
    const twR = this.twR!;
    const twI = this.twI!;
    const w = 2 * px;
    const total = w * py;
    const h = py >> 1;
    const y = this.yWork!;
    if (h >= 4) {
      this.ditFirstRadix4(spec, lam, y);
    } else {
      for (let i = 0; i < total; i++) y[i] = spec[i]! * lam[i]!;
    }
    this.ditMiddle(y, h >= 4);
    // Last DIT stage, only the rows wanted: dest row t takes output row k = (−t mod py);
    // k < h is y[k] + w^k y[k + h], k ≥ h is y[k − h] − w^(k−h) y[k].
    for (let t = 0; t < scatterRows; t++) {
      const k = t === 0 ? 0 : py - t;
      const j = k < h ? k : k - h;
      const sign = k < h ? 1 : -1;
      const o1 = j * w;
      const o2 = (j + h) * w;
      const od = t * w;
      const cr = sign * twR[j]!;
      const ci = sign * twI[j]!;
      for (let c = 0; c < w; c += 2) {
        const br0 = y[o2 + c]!;
        const bi0 = y[o2 + c + 1]!;
        dest[od + c] = y[o1 + c]! + (br0 * cr - bi0 * ci);
        dest[od + c + 1] = y[o1 + c + 1]! + (br0 * ci + bi0 * cr);
      }
    }
  }

  private columnPass(
    buf: Float64Array,
    dest: Float64Array,
    gatherRows: number,
    scatterRows: number,
    apply: (col: Float64Array, out: Float64Array, column: number) => Float64Array,
    reversedRows = false,
  ): void {
    const { px, py } = this;
    if (py === 1) return;
    const w = 2 * px;
    for (let c0 = 0; c0 < px; c0 += COLUMN_BLOCK) {
      const nb = Math.min(COLUMN_BLOCK, px - c0);
      for (let r = 0; r < gatherRows; r++) {
        const o = r * w + 2 * c0;
        for (let b = 0; b < nb; b++) {
          const col = this.colIn[b]!;
          col[2 * r] = buf[o + 2 * b]!;
          col[2 * r + 1] = buf[o + 2 * b + 1]!;
        }
      }
      for (let b = 0; b < nb; b++) {
        const col = this.colIn[b]!;
        if (gatherRows > 0 && gatherRows < py) col.fill(0, 2 * gatherRows);
        const res = apply(col, this.colOut[b]!, c0 + b);
        if (res !== col) this.colIn[b] = res;
        if (res !== col) this.colOut[b] = col;
      }
      for (let r = 0; r < scatterRows; r++) {
        const o = r * w + 2 * c0;
        const src = reversedRows && r > 0 ? 2 * (py - r) : 2 * r;
        for (let b = 0; b < nb; b++) {
          const col = this.colIn[b]!;
          dest[o + 2 * b] = col[src]!;
          dest[o + 2 * b + 1] = col[src + 1]!;
        }
      }
    }
  }
}

/** W_p^k = e^(−2πik/p) from the half table (k < p): W^(k) = −W^(k − p/2) for k ≥ p/2. */
function twiddle(twR: Float64Array, twI: Float64Array, k: number, p: number): [number, number] {
  const h = p >> 1;
  return k < h ? [twR[k]!, twI[k]!] : [-twR[k - h]!, -twI[k - h]!];
}

/** Convenience: a new transformed copy of a px × py complex buffer. */
export function fft2(buf: Float64Array, px: number, py: number, options: Fft2Options = {}): Float64Array {
  const out = buf.slice();
  new Fft2(px, py).transform(out, options);
  return out;
}
