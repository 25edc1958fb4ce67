/**
 * 3-D discrete Fourier transforms over interleaved complex Float64Array buffers, on the realm's FFT
 * engine (./transform.ts; power-of-two sizes), as three batched passes of the 1-D engine: along x
 * (count py·pz contiguous rows), along y (px interleaved sequences per z-slab, stride px) and along z
 * (px·py interleaved sequences, stride px·py).
 *
 * Layout: element (kx, ky, kz) at re = buf[2(kx + px·(ky + py·kz))], im just after (x fastest, like
 * the grid's flat index i = ix + nx·(iy + ny·iz)).
 * Conventions (numpy.fft.fftn / ifftn, checked in test/core/fft/fft3.test.ts):
 *   forward  X(k) = Σ_j x(j) e^(−2πi (kx jx / px + ky jy / py + kz jz / pz))   (unnormalised)
 *   inverse  x(j) = 1/(px py pz) Σ_k X(k) e^(+2πi …)
 */
import type { FftEngine } from './engine.ts';
import { fftEngine, isPowerOfTwo } from './transform.ts';

/**
 * Checks the sizes, makes the twiddle tables, lays out the input, output and scratch regions (byte addresses a, b, t)
 * and puts the input in region a: copied from a buffer, or written there by a filler (which must write every element:
 * the region is not cleared).
 */
function loadInput(
  engine: FftEngine,
  input: Float64Array | ((region: Float64Array) => void),
  px: number,
  py: number,
  pz: number,
  inverse: boolean,
): { a: number; b: number; t: number; count: number } {
  if (!isPowerOfTwo(px) || !isPowerOfTwo(py) || !isPowerOfTwo(pz)) {
    throw new RangeError(`fft3: sizes ${px} × ${py} × ${pz} must be powers of two`);
  }
  const count = px * py * pz;
  if (typeof input !== 'function' && input.length !== 2 * count)
    throw new RangeError(`fft3: buffer has length ${input.length}, expected ${2 * count}`);
  for (const n of [px, py, pz]) if (n > 1) engine.twiddles(n, inverse);
  const full = 16 * count;
  const a = engine.workBase();
  const b = a + full;
  const t = b + full;
  const v = engine.reserve(t + full);
  if (typeof input === 'function') input(v.subarray(a / 8, a / 8 + 2 * count));
  else v.set(input, a / 8);
  return { a, b, t, count };
}

/**
 * The unnormalised 3-D transform of a px × py × pz complex buffer (length 2·px·py·pz), left in the engine's memory:
 * returns a view of the result in the buffer's layout, valid until the engine's next use; `buf` is not written.
 */
export function fft3View(
  buf: Float64Array,
  px: number,
  py: number,
  pz: number,
  inverse = false,
  engine: FftEngine = fftEngine(),
): Float64Array {
  const { a, b, t, count } = loadInput(engine, buf, px, py, pz, inverse);
  engine.run(a, b, t, px, 1, py * pz, 16 * px, inverse);
  engine.run(b, a, t, py, px, pz, 16 * px * py, inverse);
  engine.run(a, b, t, pz, px * py, 1, 0, inverse);
  return engine.f64().subarray(b / 8, b / 8 + 2 * count);
}

/** In-place 3-D transform of a px × py × pz complex buffer (length 2·px·py·pz). */
export function fft3InPlace(buf: Float64Array, px: number, py: number, pz: number, inverse = false, engine: FftEngine = fftEngine()): void {
  const out = fft3View(buf, px, py, pz, inverse, engine);
  if (inverse) {
    const s = 1 / (px * py * pz);
    for (let i = 0; i < out.length; i++) buf[i] = out[i] * s;
  } else {
    buf.set(out);
  }
}

/** A new transformed copy of a px × py × pz complex buffer. */
export function fft3(buf: Float64Array, px: number, py: number, pz: number, inverse = false): Float64Array {
  const out = buf.slice();
  fft3InPlace(out, px, py, pz, inverse);
  return out;
}

/**
 * The forward (unnormalised) transform of a px × py × pz complex buffer where only the leading nx × ny × nz block
 * of the output is wanted (a circulant-embedding realisation): along z first (every sequence), then along y in
 * the slabs z < nz only, then along x in the rows y < ny of those slabs, so the later passes do a half and a
 * quarter of the work when the embedding doubles the grid; an axis whose block is at most half its transform keeps
 * only the outputs below half (the engine's halfOut). Returns a view of the engine's memory in the buffer's layout,
 * exact in the block (the same sums as {@link fft3InPlace} in another order: equal to rounding), stale elsewhere,
 * and valid until the engine's next use. The input is a buffer (copied in) or a function that writes every element of
 * the engine's input region itself (no buffer of the embedding's size on the side).
 */
export function fft3Block(
  input: Float64Array | ((region: Float64Array) => void),
  px: number,
  py: number,
  pz: number,
  nx: number,
  ny: number,
  nz: number,
  engine: FftEngine = fftEngine(),
): Float64Array {
  if (nx < 1 || ny < 1 || nz < 1 || nx > px || ny > py || nz > pz) {
    throw new RangeError(`fft3Block: block ${nx} × ${ny} × ${nz} must lie inside ${px} × ${py} × ${pz}`);
  }
  const { a, b, t, count } = loadInput(engine, input, px, py, pz, false);
  const slab = 16 * px * py;
  engine.run(a, b, t, pz, px * py, 1, 0, false, false, 2 * nz <= pz);
  engine.run(b, a, t, py, px, nz, slab, false, false, 2 * ny <= py);
  for (let z = 0; z < nz; z++) engine.run(a + slab * z, b + slab * z, t, px, 1, ny, 16 * px, false, false, 2 * nx <= px);
  return engine.f64().subarray(b / 8, b / 8 + 2 * count);
}
