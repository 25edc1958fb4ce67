/**
 * 2-D discrete Fourier transforms over interleaved complex Float64Array buffers, on the realm's FFT
 * engine (./transform.ts: WebAssembly SIMD or its bit-identical JavaScript twin; power-of-two sizes).
 *
 * Layout: a px × py complex array stores element (kx, ky) at re = buf[2(kx + px·ky)],
 * im = buf[2(kx + px·ky) + 1] (x fastest, like the grid's flat index i = ix + nx·iy).
 *
 * Conventions (the same as numpy.fft.fft2, checked in test/reference/fft.test.ts):
 *   forward  X(k) = Σ_j x(j) e^(−2πi (kx jx / px + ky jy / py))           (unnormalised)
 *   inverse  x(j) = 1/(px py) Σ_k X(k) e^(+2πi (kx jx / px + ky jy / py))
 * A size of 1 along an axis is the identity along it.
 *
 * Pruning (both exact, they only skip work on known zeros or unwanted outputs):
 *   `inputRows = r`  rows ky ≥ r of the input are zero: the x-pass runs on the first r rows only;
 *   `outputRows = r` only rows ky < r of the output are wanted: the y-pass runs first over all
 *                    columns, then the x-pass on the first r rows only (rows ≥ r are left stale).
 */
import type { FftEngine } from './engine.ts';
import { fftEngine, isPowerOfTwo } from './transform.ts';

export interface Fft2Options {
  readonly inverse?: boolean;
  /** Rows ky ≥ inputRows of the input are zero (default py). */
  readonly inputRows?: number;
  /** Only rows ky < outputRows of the output are needed (default py). */
  readonly outputRows?: number;
}

/** px × py transforms on one engine (the realm's by default). Not for concurrent use. */
export class Fft2 {
  readonly px: number;
  readonly py: number;
  private readonly engine: FftEngine;

  constructor(px: number, py: number, engine: FftEngine = fftEngine()) {
    if (!isPowerOfTwo(px) || !isPowerOfTwo(py)) {
      throw new RangeError(`Fft2: sizes ${px} × ${py} must be powers of two`);
    }
    this.px = px;
    this.py = py;
    this.engine = engine;
  }

  /** In-place 2-D transform of a px × py complex buffer (length 2·px·py). */
  transform(buf: Float64Array, options: Fft2Options = {}): void {
    const { px, py, engine: e } = this;
    if (buf.length !== 2 * px * py) {
      throw new RangeError(`Fft2: buffer has length ${buf.length}, expected 2·${px}·${py} = ${2 * px * py}`);
    }
    const inverse = options.inverse ?? false;
    const inputRows = Math.max(0, Math.min(options.inputRows ?? py, py));
    const outputRows = Math.max(0, Math.min(options.outputRows ?? py, py));
    // Tables first: they may move the base of the work regions.
    if (px > 1) e.twiddles(px, inverse);
    if (py > 1) e.twiddles(py, inverse);
    const rowBytes = 16 * px;
    const full = rowBytes * py;
    const a = e.workBase();
    const b = a + full;
    const t = b + full;
    let v = e.reserve(t + full);
    const a0 = a / 8;
    const b0 = b / 8;
    let rows: number;
    if (inputRows < py || outputRows === py) {
      // x-pass on the rows that hold data (the others transform to zero), then the y-pass.
      v.set(buf.subarray(0, 2 * px * inputRows), a0);
      e.run(a, b, t, px, 1, inputRows, rowBytes, inverse);
      v = e.f64();
      const zeroEnd = py >= 4 && inputRows <= py >> 1 ? py >> 1 : py; // rows ≥ zeroEnd are not read
      v.fill(0, b0 + 2 * px * inputRows, b0 + 2 * px * Math.max(inputRows, zeroEnd));
      e.run(b, a, t, py, px, 1, 0, inverse, inputRows <= py >> 1);
      rows = py;
    } else {
      // y-pass (only rows < outputRows wanted), then the x-pass on those rows.
      v.set(buf, a0);
      e.run(a, b, t, py, px, 1, 0, inverse, false, outputRows <= py >> 1);
      e.run(b, a, t, px, 1, outputRows, rowBytes, inverse);
      rows = outputRows;
    }
    v = e.f64();
    const out = v.subarray(a0, a0 + 2 * px * rows);
    if (inverse) {
      const scale = 1 / (px * py);
      for (let i = 0; i < out.length; i++) buf[i] = out[i] * scale;
    } else {
      buf.set(out);
    }
  }
}

/** Convenience: a new transformed copy of a px × py complex buffer. */
export function fft2(buf: Float64Array, px: number, py: number, options: Fft2Options = {}): Float64Array {
  const out = buf.slice();
  new Fft2(px, py).transform(out, options);
  return out;
}
