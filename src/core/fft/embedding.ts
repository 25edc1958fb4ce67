/**
 * Circulant embedding of a stationary covariance on a regular 1-D or 2-D grid.
 *
 * On an nx × ny grid with spacing (dx, dy) the kernel part of the prior, c(Δix, Δiy) =
 * Σ_t variance_t ρ_t(h_t(Δix·dx, Δiy·dy)) (../kernels/spec.ts), makes a block-Toeplitz matrix with
 * Toeplitz blocks (BTTB). It is the leading nx × ny block of a block-circulant matrix with
 * circulant blocks (BCCB) of size px × py whose first column is the periodic base
 *
 *   c̃(jx, jy) = c(δ(jx, px)·dx, δ(jy, py)·dy),   δ(j, p) = j for j < p/2, j − p for j > p/2,
 *
 * averaged over ±p/2 at the Nyquist index j = p/2 so that c̃(−j) = c̃(j) holds exactly even for a
 * rotated kernel (which is symmetric under Δ → −Δ but not under Δx → −Δx alone). A BCCB matrix is
 * diagonalised by the 2-D DFT: C̃ = F⁻¹ diag(λ) F with λ = F c̃ (Davis 1979, Circulant Matrices,
 * Thm 3.2.2 for the 1-D case, memory; Dietrich & Newsam 1997 §2 for the 2-D embedding). Since
 * c̃ is real and even, λ is real.
 *
 * Products: any p ≥ 2n − 1 per axis holds every lag |Δi| ≤ n − 1 at its own place without
 * wrapping onto another, so Cm·x restricted to the grid is exact (up to round-off).
 * Realisations: need λ ≥ 0 (the embedding must be non-negative definite); Wood & Chan (1994) start
 * at the smallest power of two ≥ 2(n − 1) and double; see ../fft/realisations.ts.
 */
import { correlationFunction } from '../kernels/correlation.ts';
import type { Term } from '../kernels/spec.ts';
import type { Grid } from '../grid/grid.ts';
import { type OffsetFunction, scaledDistance } from '../prior/lag.ts';
import { fft3InPlace, fft3View } from './fft3.ts';
import { fftBatch, nextPowerOfTwo } from './transform.ts';

/** Σ_t variance_t ρ_t(h_t(ox, oy)) at a physical offset (ox, oy); oy ≡ 0 on a 1-D grid. */
export function stationaryCovariance(terms: readonly Term[]): (ox: number, oy: number) => number {
  const parts = terms.map((t) => {
    const rho = correlationFunction(t.kernel, t.nu);
    const v = t.variance;
    if (t.lengths !== undefined) {
      const [l1, l2] = t.lengths;
      const theta = ((t.angle ?? 0) * Math.PI) / 180;
      // Rotate the offset by −θ into the kernel's axes (u, v).
      const c = Math.cos(theta);
      const s = Math.sin(theta);
      return (ox: number, oy: number) => {
        const u = (c * ox + s * oy) / l1;
        const w = (-s * ox + c * oy) / l2;
        return v * rho(Math.sqrt(u * u + w * w));
      };
    }
    const l = t.length;
    return (ox: number, oy: number) => v * rho(Math.sqrt(ox * ox + oy * oy) / l);
  });
  if (parts.length === 1) return parts[0];
  return (ox, oy) => {
    let s = 0;
    for (const p of parts) s += p(ox, oy);
    return s;
  };
}

/**
 * Σ_t variance_t ρ_t(h_t(ox, oy, oz)) at a physical offset, h from ../prior/lag.ts scaledDistance (the
 * 3-D rotation convention R = Rz(a1)·Ry(a2)·Rx(a3); the 2-D and isotropic forms when oz ≡ 0).
 */
export function stationaryCovariance3(terms: readonly Term[]): (ox: number, oy: number, oz: number) => number {
  const parts = terms.map((t) => {
    const rho = correlationFunction(t.kernel, t.nu);
    const h = scaledDistance(t);
    const v = t.variance;
    return (ox: number, oy: number, oz: number) => v * rho(h(ox, oy, oz));
  });
  if (parts.length === 1) return parts[0];
  return (ox, oy, oz) => {
    let s = 0;
    for (const p of parts) s += p(ox, oy, oz);
    return s;
  };
}

/**
 * True when every term is unchanged under Δx → −Δx alone (isotropic, or axes along x/y). Then the
 * Nyquist lag p/2 is unambiguous and the minimal embedding p = 2(n − 1) is exact.
 */
export function isAxisSymmetric(terms: readonly Term[]): boolean {
  return terms.every((t) => {
    if (t.lengths === undefined) return true;
    if (t.lengths.length === 3) return threeAxisSymmetric(t.lengths, t.angles);
    return (((t.angle ?? 0) % 90) + 90) % 90 === 0 || t.lengths[0] === t.lengths[1];
  });
}

/** A 3-D term is unchanged under a single axis flip when its lengths are equal or its angles are multiples of 90°. */
function threeAxisSymmetric(lengths: readonly number[], angles: readonly number[] | undefined): boolean {
  if (lengths[0] === lengths[1] && lengths[1] === lengths[2]) return true;
  return (angles ?? [0, 0, 0]).every((a) => ((a % 90) + 90) % 90 === 0);
}

/** Grid axes as [n, spacing] pairs, 1-D grids as ny = 1. */
export function gridAxes(grid: Grid): { nx: number; ny: number; dx: number; dy: number } {
  return {
    nx: grid.shape[0],
    ny: grid.shape[1] ?? 1,
    dx: grid.spacing[0],
    dy: grid.spacing[1] ?? 1,
  };
}

/** Smallest power of two ≥ 2n − 1 (products; 1 when n = 1). */
export function productPadding(n: number): number {
  return n === 1 ? 1 : nextPowerOfTwo(2 * n - 1);
}

/**
 * Smallest power of two ≥ 2(n − 1) (Wood & Chan 1994), or ≥ 2n − 1 when the Nyquist lag would be
 * ambiguous (a rotated kernel with 2(n − 1) a power of two). 1 when n = 1.
 */
export function minimalPadding(n: number, axisSymmetric: boolean): number {
  if (n === 1) return 1;
  return axisSymmetric ? nextPowerOfTwo(2 * (n - 1)) : nextPowerOfTwo(2 * n - 1);
}

export interface CirculantEmbedding {
  readonly nx: number;
  readonly ny: number;
  /** 1 on 1-D and 2-D grids. */
  readonly nz: number;
  /** Embedding sizes per axis (powers of two; pz = 1 on 1-D and 2-D grids). */
  readonly px: number;
  readonly py: number;
  readonly pz: number;
  /** Periodic base c̃ (px·py·pz values, x fastest). */
  readonly base: Float64Array;
  /** Eigenvalues λ = F c̃ of the embedding (real; px·py values, x fastest). */
  readonly eigenvalues: Float64Array;
  readonly minEigenvalue: number;
  readonly maxEigenvalue: number;
}

function lagOffsets(j: number, p: number): number[] {
  if (p === 1) return [0];
  if (2 * j < p) return [j];
  if (2 * j > p) return [j - p];
  return [j, -j];
}

/**
 * The periodic base c̃ on a px × py torus (see the module comment). Evaluated on half the torus
 * (jy ≤ py/2) and mirrored, c̃(−j) = c̃(j) (indices mod p), which holds exactly because the
 * kernel is even and the Nyquist lags are averaged.
 */
export function circulantBase(grid: Grid, terms: readonly Term[] | OffsetFunction, px: number, py: number): Float64Array {
  const { dx, dy } = gridAxes(grid);
  const cov = typeof terms === 'function' ? (ox: number, oy: number) => terms(ox, oy, 0) : stationaryCovariance(terms);
  const base = new Float64Array(px * py);
  const xs = Array.from({ length: px }, (_, j) => lagOffsets(j, px));
  const half = Math.floor(py / 2);
  for (let jy = 0; jy <= half; jy++) {
    const oys = lagOffsets(jy, py);
    const my = jy === 0 ? 0 : py - jy;
    for (let jx = 0; jx < px; jx++) {
      const oxs = xs[jx];
      let s = 0;
      if (oxs.length === 1 && oys.length === 1) s = cov(oxs[0] * dx, oys[0] * dy);
      else {
        for (const ox of oxs) for (const oy of oys) s += cov(ox * dx, oy * dy);
        s /= oxs.length * oys.length;
      }
      base[jx + px * jy] = s;
      base[(jx === 0 ? 0 : px - jx) + px * my] = s;
    }
  }
  return base;
}

/**
 * The periodic base c̃ on a px × py × pz torus of a 3-D grid: the 2-D rule of {@link circulantBase} per
 * axis (lags δ(j, p), averaged over ±p/2 at each Nyquist index). Evaluated for jz ≤ pz/2 and mirrored,
 * c̃(−j) = c̃(j) (indices mod p).
 */
export function circulantBase3(grid: Grid, terms: readonly Term[] | OffsetFunction, px: number, py: number, pz: number): Float64Array {
  if (typeof terms !== 'function' && signSymmetric(terms)) return mirroredBase3(grid, stationaryCovariance3(terms), px, py, pz);
  const [dx, dy, dz] = grid.spacing;
  const cov = typeof terms === 'function' ? terms : stationaryCovariance3(terms);
  const base = new Float64Array(px * py * pz);
  const xs = Array.from({ length: px }, (_, j) => lagOffsets(j, px));
  const ys = Array.from({ length: py }, (_, j) => lagOffsets(j, py));
  const half = Math.floor(pz / 2);
  for (let jz = 0; jz <= half; jz++) {
    const ozs = lagOffsets(jz, pz);
    const mz = jz === 0 ? 0 : pz - jz;
    for (let jy = 0; jy < py; jy++) {
      const oys = ys[jy];
      const my = jy === 0 ? 0 : py - jy;
      for (let jx = 0; jx < px; jx++) {
        const oxs = xs[jx];
        const s = lagValue(cov, oxs, oys, ozs, dx, dy, dz);
        base[jx + px * (jy + py * jz)] = s;
        base[(jx === 0 ? 0 : px - jx) + px * (my + py * mz)] = s;
      }
    }
  }
  return base;
}

/** The base at one lag: the covariance at its offset, or the mean over ±p/2 at a Nyquist lag ({@link lagOffsets}). */
function lagValue(
  cov: OffsetFunction,
  oxs: readonly number[],
  oys: readonly number[],
  ozs: readonly number[],
  dx: number,
  dy: number,
  dz: number,
): number {
  if (oxs.length === 1 && oys.length === 1 && ozs.length === 1) return cov(oxs[0] * dx, oys[0] * dy, ozs[0] * dz);
  let s = 0;
  for (const ox of oxs) for (const oy of oys) for (const oz of ozs) s += cov(ox * dx, oy * dy, oz * dz);
  return s / (oxs.length * oys.length * ozs.length);
}

/**
 * True when every term's scaled distance is exactly (bit for bit) unchanged by flipping the sign of any one offset
 * component: isotropic terms, and anisotropic ones with every angle exactly 0 (no rotation: only squares of the
 * components enter). A rotation by a multiple of 90° is symmetric in exact arithmetic but not in floating point
 * (cos 90° ≈ 6e-17), so it is not taken here.
 */
function signSymmetric(terms: readonly Term[]): boolean {
  return terms.every(
    (t) => t.lengths === undefined || (t.lengths.length === 3 ? (t.angles ?? [0, 0, 0]).every((a) => a === 0) : (t.angle ?? 0) === 0),
  );
}

/**
 * {@link circulantBase3} for a covariance that is even in each offset component separately: the lags with
 * jx ≤ px/2, jy ≤ py/2, jz ≤ pz/2 are evaluated (an eighth of the base) and written to their up to eight mirror
 * images (p − j on each axis). Bit-identical to the general loop: the same lag, or its exact mirror, in the same
 * expression (the averages over ±p/2 at a Nyquist lag included).
 */
function mirroredBase3(grid: Grid, cov: OffsetFunction, px: number, py: number, pz: number): Float64Array {
  const [dx, dy, dz] = grid.spacing;
  const base = new Float64Array(px * py * pz);
  const hx = Math.floor(px / 2);
  const hy = Math.floor(py / 2);
  const hz = Math.floor(pz / 2);
  const xs = Array.from({ length: hx + 1 }, (_, j) => lagOffsets(j, px));
  const ys = Array.from({ length: hy + 1 }, (_, j) => lagOffsets(j, py));
  for (let jz = 0; jz <= hz; jz++) {
    const ozs = lagOffsets(jz, pz);
    const kz = [jz, jz === 0 ? 0 : pz - jz];
    for (let jy = 0; jy <= hy; jy++) {
      const oys = ys[jy];
      const ky = [jy, jy === 0 ? 0 : py - jy];
      // One row (jy, jz) evaluated and mirrored within itself, then copied whole to its mirror rows.
      const row = px * (jy + py * jz);
      for (let jx = 0; jx <= hx; jx++) {
        const s = lagValue(cov, xs[jx], oys, ozs, dx, dy, dz);
        base[jx + row] = s;
        base[(jx === 0 ? 0 : px - jx) + row] = s;
      }
      for (const z of kz)
        for (const y of ky) {
          const to = px * (y + py * z);
          if (to !== row) base.copyWithin(to, row, row + px);
        }
    }
  }
  return base;
}

/**
 * λ = F c̃ (numpy.fft.fftn's convention) of a real even px × py × pz base, at half the work of a complex
 * transform of that size: the real array is read as complex of half the length along x,
 * z(m) = c̃(2m) + i c̃(2m + 1), transformed as (px/2) × py × pz, and split (the classical real-input FFT,
 * e.g. Press et al., Numerical Recipes §12.3, memory; here per (ky, kz), with −k negated on every axis):
 *   E(k) = (Z(k) + conj Z(−k))/2,  O(k) = (Z(k) − conj Z(−k))/(2i),  λ(kx) = Re[E(kx) + e^{−2πi kx/px} O(kx)]
 * for kx < px/2, and λ(kx) = λ(−k) (λ is even) for the rest. px = 1 falls back to the complex transform.
 * Checked against the full complex transform in test/core/fft/covariance3.test.ts.
 */
export function evenRealSpectrum3(base: Float64Array, px: number, py: number, pz: number): Float64Array {
  const n = px * py * pz;
  const lam = new Float64Array(n);
  if (px < 2) {
    const z = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) z[2 * i] = base[i];
    fft3InPlace(z, px, py, pz);
    for (let i = 0; i < n; i++) lam[i] = z[2 * i];
    return lam;
  }
  const hx = px / 2;
  // The base's memory order (x fastest, real) is exactly z's interleaved order at half the length in x; its
  // transform is read in the engine's memory (no copy of the base, none back).
  const z = fft3View(base, hx, py, pz);
  // The twiddles e^{−2πi kx/px} once per kx (the same Math.cos / Math.sin calls as per element, so the same bits).
  const cosT = new Float64Array(hx);
  const sinT = new Float64Array(hx);
  for (let kx = 0; kx < hx; kx++) {
    const t = (-2 * Math.PI * kx) / px;
    cosT[kx] = Math.cos(t);
    sinT[kx] = Math.sin(t);
  }
  for (let kz = 0; kz < pz; kz++) {
    const mz = kz === 0 ? 0 : pz - kz;
    for (let ky = 0; ky < py; ky++) {
      const my = ky === 0 ? 0 : py - ky;
      const row = hx * (ky + py * kz);
      const mrow = hx * (my + py * mz);
      const out = px * (ky + py * kz);
      // λ is even, λ(kx, ky, kz) = λ(−kx, −ky, −kz): each value also fills its mirror px − kx of row (my, mz).
      const mout = px * (my + py * mz);
      for (let kx = 0; kx < hx; kx++) {
        const mx = kx === 0 ? 0 : hx - kx;
        const a = 2 * (row + kx);
        const b = 2 * (mrow + mx);
        const zr = z[a];
        const zi = z[a + 1];
        const wr = z[b];
        const wi = -z[b + 1]; // conj Z(−k)
        const er = 0.5 * (zr + wr);
        const or = 0.5 * (zi - wi); // O = (Z − conj Z(−k))/(2i): real part
        const oi = -0.5 * (zr - wr); // imaginary part
        const v = er + cosT[kx] * or - sinT[kx] * oi;
        lam[kx + out] = v;
        if (kx > 0) lam[px - kx + mout] = v;
      }
      // kx = px/2: E and O at kx ≡ 0 of the half grid with the twiddle e^{−iπ} = −1.
      const a = 2 * row;
      const b = 2 * mrow;
      lam[hx + out] = 0.5 * (z[a] + z[b]) - 0.5 * (z[a + 1] + z[b + 1]);
    }
  }
  return lam;
}

/**
 * Base and eigenvalues of the px × py embedding of the kernel part of the prior (px × py × pz on a
 * 3-D grid).
 */
export function circulantEmbedding(
  grid: Grid,
  terms: readonly Term[] | OffsetFunction,
  px: number,
  py: number,
  pz = 1,
): CirculantEmbedding {
  const { nx, ny } = gridAxes(grid);
  const three = grid.shape.length === 3;
  const nz = three ? grid.shape[2] : 1;
  if (!three && pz !== 1) throw new RangeError(`circulantEmbedding: pz = ${pz} on a ${grid.shape.length}-D grid`);
  const base = three ? circulantBase3(grid, terms, px, py, pz) : circulantBase(grid, terms, px, py);
  const eigenvalues = three ? evenRealSpectrum3(base, px, py, pz) : evenRealSpectrum(base, px, py);
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < eigenvalues.length; i++) {
    const v = eigenvalues[i];
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return { nx, ny, nz, px, py, pz, base, eigenvalues, minEigenvalue: lo, maxEigenvalue: hi };
}

/**
 * λ = F c̃ (the unnormalised 2-D DFT, numpy.fft.fft2's convention) of a real px × py array with
 * c̃(−j) = c̃(j) (indices mod p, both axes at once), at about a quarter of the work of a complex
 * 2-D transform, using three facts (derived from the DFT's definition; the packing of two real
 * sequences into one complex transform is the classical one, e.g. Press et al., Numerical
 * Recipes, §12.3, memory):
 *   1. row jy of c̃ is real, so its x-spectrum R_jy obeys R_jy(−kx) = conj R_jy(kx): two rows are
 *      transformed at once as a + i b, then R_a(k) = (Z(k) + conj Z(−k))/2,
 *      R_b(k) = (Z(k) − conj Z(−k))/(2i); only kx = 0 … px/2 is kept;
 *   2. row py − jy is row jy reversed in x (c̃(jx, −jy) = c̃(−jx, jy)), so R_{py−jy} = conj R_jy:
 *      only rows jy = 0 … py/2 are transformed, and each column v(jy) = R_jy(kx) is Hermitian;
 *   3. the y-transform of a Hermitian column is real, so two columns are transformed at once as
 *      v₁ + i v₂ and read off as the real and imaginary parts; λ(kx, ky) for kx > px/2 is
 *      λ(px − kx, −ky) (λ is real and even like c̃).
 * Checked against numpy.fft.fft2 in test/reference/fft.test.ts (bccb_eigs).
 */
export function evenRealSpectrum(base: Float64Array, px: number, py: number): Float64Array {
  const hy = py === 1 ? 1 : py / 2 + 1; // rows jy = 0 … py/2
  const hx = px === 1 ? 1 : px / 2 + 1; // kx = 0 … px/2
  // Pass 1: rows a, a + 1 packed as a + i b, all pairs in one batch.
  const rowPairs = Math.ceil(hy / 2);
  const z = new Float64Array(2 * px * rowPairs);
  for (let p = 0; p < rowPairs; p++) {
    const a = 2 * p;
    const b = a + 1 < hy ? a + 1 : -1;
    const o = 2 * px * p;
    for (let j = 0; j < px; j++) {
      z[o + 2 * j] = base[a * px + j];
      z[o + 2 * j + 1] = b < 0 ? 0 : base[b * px + j];
    }
  }
  const zf = fftBatch(z, px, rowPairs);
  // cols[2(kx·hy + jy)]: R_jy(kx), complex.
  const cols = new Float64Array(2 * hx * hy);
  for (let p = 0; p < rowPairs; p++) {
    const a = 2 * p;
    const two = a + 1 < hy;
    const o = 2 * px * p;
    for (let k = 0; k < hx; k++) {
      const mk = k === 0 ? 0 : px - k;
      const zr = zf[o + 2 * k];
      const zi = zf[o + 2 * k + 1];
      const wr = zf[o + 2 * mk];
      const wi = -zf[o + 2 * mk + 1]; // conj Z(−k)
      const c = 2 * (k * hy + a);
      cols[c] = 0.5 * (zr + wr);
      cols[c + 1] = 0.5 * (zi + wi);
      if (two) {
        // (Z − conj Z(−k)) / (2i) = (im, −re) / 2
        cols[c + 2] = 0.5 * (zi - wi);
        cols[c + 3] = -0.5 * (zr - wr);
      }
    }
  }
  // Pass 2: Hermitian columns k1, k1 + 1 packed as v₁ + i v₂ (v(py − jy) = conj v(jy)), one batch.
  const colPairs = Math.ceil(hx / 2);
  const w = new Float64Array(2 * py * colPairs);
  for (let q = 0; q < colPairs; q++) {
    const k1 = 2 * q;
    const ow = 2 * py * q;
    for (let part = 0; part < (k1 + 1 < hx ? 2 : 1); part++) {
      const o = 2 * (k1 + part) * hy;
      for (let jy = 0; jy < hy; jy++) {
        const re = cols[o + 2 * jy];
        const im = cols[o + 2 * jy + 1];
        const m = py - jy;
        const mirror = jy > 0 && jy < m;
        if (part === 0) {
          w[ow + 2 * jy] = re;
          w[ow + 2 * jy + 1] = im;
          if (mirror) {
            w[ow + 2 * m] = re;
            w[ow + 2 * m + 1] = -im;
          }
        } else {
          // i·v adds (−im, re); i·conj v adds (im, re)
          w[ow + 2 * jy] -= im;
          w[ow + 2 * jy + 1] += re;
          if (mirror) {
            w[ow + 2 * m] += im;
            w[ow + 2 * m + 1] += re;
          }
        }
      }
    }
  }
  const wf = fftBatch(w, py, colPairs);
  const lam = new Float64Array(px * py);
  for (let q = 0; q < colPairs; q++) {
    const k1 = 2 * q;
    const k2 = k1 + 1 < hx ? k1 + 1 : -1;
    const ow = 2 * py * q;
    for (let ky = 0; ky < py; ky++) {
      lam[k1 + px * ky] = wf[ow + 2 * ky];
      if (k2 >= 0) lam[k2 + px * ky] = wf[ow + 2 * ky + 1];
    }
  }
  // kx > px/2 from λ(kx, ky) = λ(px − kx, −ky).
  for (let ky = 0; ky < py; ky++) {
    const my = ky === 0 ? 0 : py - ky;
    for (let kx = hx; kx < px; kx++) lam[kx + px * ky] = lam[px - kx + px * my];
  }
  return lam;
}
