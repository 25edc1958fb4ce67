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

/** Convenience: a new transformed copy of a px × py complex buffer. */
export function fft2(buf: Float64Array, px: number, py: number, options: Fft2Options = {}): Float64Array {
  const out = buf.slice();
  new Fft2(px, py).transform(out, options);
  return out;
}
