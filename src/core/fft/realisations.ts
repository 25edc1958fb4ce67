/**
 * Prior realisations on regular grids by circulant embedding (Dietrich & Newsam 1997, SIAM J. Sci.
 * Comput. 18:1088; Wood & Chan 1994, J. Comput. Graph. Stat. 3:409).
 *
 * With the px × py embedding C̃ = F⁻¹ diag(λ) F of the kernel part (./embedding.ts; λ = F c̃,
 * P = px·py, F the unnormalised DFT) and z = ε₁ + i ε₂ of independent N(0, 1) entries,
 *
 *   y = F (√(λ / P) ⊙ z)   has   E[y y*] = 2 C̃,  E[y yᵀ] = 0,
 *
 * so Re y and Im y are two independent N(0, C̃) fields (Kroese & Botev 2015, Spatial Process
 * Generation, §2; derived: E[z z*] = 2I, E[z zᵀ] = 0, F diag(λ) F* = P C̃). Their leading
 * nx × ny blocks are N(0, C) on the grid. Then m = m0 + s ⊙ y + √nugget · ε.
 *
 * A single realisation (the last one of an odd count) uses P normals instead of 2P: see
 * {@link hermitianSpectrum}. So draw(2k) gives the same first 2k fields whatever k, and an odd
 * count's last field differs from the one an even count would give at that place.
 *
 * This needs λ ≥ 0. Padding (Wood & Chan 1994): start at the smallest power of two ≥ 2(n − 1) per
 * axis and double every axis with n > 1 until min λ ≥ −tol·max λ (tiny negatives are round-off and
 * set to 0) or the embedding would exceed `maxCells`. Past the bound: dense Cholesky when
 * N ≤ `denseLimit`, else the negative eigenvalues are clipped to 0 and the error is reported as
 * the relative trace of the clipped part, Σ_{λ<0} |λ| / Σ λ (Wood & Chan 1994 §3, memory).
 *
 * PUBLIC API: nonNegativeEmbedding, circulantSampler, circulantRealisations.
 */
import { InputError, NotPositiveDefiniteError } from '../errors.ts';
import { cellCount, gridDimension, type Grid } from '../grid/grid.ts';
import { cholesky } from '../linalg/cholesky.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { covarianceMatrix, meanVector, validatePrior } from '../prior/covariance.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Term } from '../kernels/spec.ts';
import { Random } from '../sampling/random.ts';
import { circulantEmbedding, gridAxes, isAxisSymmetric, minimalPadding, type CirculantEmbedding } from './embedding.ts';
import { Fft2 } from './fft2.ts';
import { fft3Block } from './fft3.ts';

export interface EmbeddingOptions {
  /** Relative tolerance: λ ≥ −tol·max λ counts as non-negative (default 1e-10). */
  readonly tolerance?: number;
  /** Largest embedding px·py tried (default 2²² cells, 64 MB of complex workspace). */
  readonly maxCells?: number;
}

export interface EmbeddingSearch {
  readonly embedding: CirculantEmbedding;
  /** Embedding sizes tried, in order (the last one is `embedding`). */
  readonly tried: readonly (readonly number[])[];
  /** True when min λ ≥ −tol·max λ at the final size. */
  readonly nonNegative: boolean;
  /** Σ_{λ<0} |λ| / Σ λ at the final size (0 when none are negative). */
  readonly clippedRelativeTrace: number;
}

function clippedTrace(lam: Float64Array): number {
  let neg = 0;
  let total = 0;
  for (const v of lam) {
    total += v;
    if (v < 0) neg -= v;
  }
  return total > 0 ? neg / total : Infinity;
}

/** Grows the padding until the embedding is non-negative definite or the bound is reached. */
export function nonNegativeEmbedding(grid: Grid, terms: readonly Term[], options: EmbeddingOptions = {}): EmbeddingSearch {
  const tol = options.tolerance ?? 1e-10;
  const maxCells = options.maxCells ?? 1 << 22;
  const { nx, ny } = gridAxes(grid);
  const nz = grid.shape[2] ?? 1;
  const three = grid.shape.length === 3;
  const sym = isAxisSymmetric(terms);
  let px = minimalPadding(nx, sym);
  let py = minimalPadding(ny, sym);
  let pz = minimalPadding(nz, sym);
  const tried: number[][] = [];
  for (;;) {
    tried.push(three ? [px, py, pz] : [px, py]);
    const e = circulantEmbedding(grid, terms, px, py, pz);
    const ok = e.minEigenvalue >= -tol * e.maxEigenvalue;
    const npx = nx > 1 ? 2 * px : px;
    const npy = ny > 1 ? 2 * py : py;
    const npz = nz > 1 ? 2 * pz : pz;
    if (ok || npx * npy * npz > maxCells || (npx === px && npy === py && npz === pz)) {
      return { embedding: e, tried, nonNegative: ok, clippedRelativeTrace: clippedTrace(e.eigenvalues) };
    }
    px = npx;
    py = npy;
    pz = npz;
  }
}

export interface SamplerOptions extends EmbeddingOptions {
  /** Largest N for the dense fallback when the embedding stays indefinite (default 2000). */
  readonly denseLimit?: number;
}

export interface CirculantSampler {
  /** 'fft': circulant embedding (exact when !clipped); 'dense': Cholesky of Cm. */
  readonly path: 'fft' | 'dense';
  /** Embedding sizes per grid axis ([px], [px, py] or [px, py, pz]); the grid shape on the dense path. */
  readonly padding: readonly number[];
  /** Embedding sizes tried while growing the padding (per grid axis: two numbers below 3-D, three in 3-D). */
  readonly tried: readonly (readonly number[])[];
  /** True when negative eigenvalues were set to 0 (an approximation; see clippedRelativeTrace). */
  readonly clipped: boolean;
  /** Σ_{λ<0} |λ| / Σ λ of the final embedding (0 on an exact embedding). */
  readonly clippedRelativeTrace: number;
  /** `count` realisations, one per row (count × N); same seed, same numbers. */
  draw(count: number, seed: number): Matrix;
}

/** A sampler for prior realisations on the grid (see the module comment for the path choice). */
export function circulantSampler(grid: Grid, prior: PriorSpec, options: SamplerOptions = {}): CirculantSampler {
  validatePrior(prior, grid);
  const n = cellCount(grid);
  const m0 = meanVector(grid, prior);
  const s = prior.stdProfile;
  const nugget = prior.nugget ?? 0;
  const search = nonNegativeEmbedding(grid, prior.terms, options);
  const denseLimit = options.denseLimit ?? 2000;
  if (!search.nonNegative && n <= denseLimit) {
    const f = cholesky(covarianceMatrix(grid, prior), { inPlace: true });
    if (!f.ok) throw new NotPositiveDefiniteError('prior covariance Cm', f.pivot, 'add a nugget to the prior');
    const L = f.factor;
    return {
      path: 'dense',
      padding: [...grid.shape],
      tried: search.tried,
      clipped: false,
      clippedRelativeTrace: search.clippedRelativeTrace,
      draw(count, seed) {
        checkCount(count);
        const rng = new Random(seed);
        const out = matrix(count, n);
        const z = new Float64Array(n);
        for (let r = 0; r < count; r++) {
          rng.fillNormal(z);
          const o = r * n;
          for (let i = 0; i < n; i++) {
            let v = m0[i];
            const oi = i * n;
            for (let k = 0; k <= i; k++) v += L.data[oi + k] * z[k];
            out.data[o + i] = v;
          }
        }
        return out;
      },
    };
  }
  const e = search.embedding;
  const { nx, ny, nz, px, py, pz } = e;
  if (grid.shape.length === 3) {
    // The 3-D transform of ./fft3.ts, only where the leading nx × ny × nz block needs it.
    return fftSampler(e, search, m0, s, nugget, [px, py, pz], () => (fill) => fft3Block(fill, px, py, pz, nx, ny, nz));
  }
  return fftSampler(e, search, m0, s, nugget, gridDimension(grid) === 1 ? [px] : [px, py], () => {
    const fft = new Fft2(px, py);
    const buf = new Float64Array(2 * px * py);
    return (fill) => {
      fill(buf);
      fft.transform(buf, { outputRows: ny });
      return buf;
    };
  });
}

/**
 * The FFT path (module comment) on the px × py × pz embedding (pz = 1 below 3-D): spectra of seeded normals, one
 * transform per two realisations (Re y and Im y of the leading nx × ny × nz block; the last of an odd count from a
 * Hermitian spectrum). `transformer()` gives, per draw call, the forward unnormalised transform of a spectrum written
 * by `fill` (into the 2-D transform's buffer, or straight into the engine's memory by ./fft3.ts fft3Block): the
 * array holding the result in the spectrum's layout.
 */
function fftSampler(
  e: CirculantEmbedding,
  search: EmbeddingSearch,
  m0: Float64Array,
  s: readonly number[] | undefined,
  nugget: number,
  padding: readonly number[],
  transformer: () => (fill: (spectrum: Float64Array) => void) => Float64Array,
): CirculantSampler {
  const { nx, ny, nz, px, py, pz } = e;
  const n = nx * ny * nz;
  const cells = px * py * pz;
  // √(λ⁺ / P), negatives (round-off or clipped) set to 0.
  const root = new Float64Array(cells);
  for (let k = 0; k < cells; k++) root[k] = Math.sqrt(Math.max(0, e.eigenvalues[k]) / cells);
  const nuggetSd = Math.sqrt(nugget);
  return {
    path: 'fft',
    padding,
    tried: search.tried,
    clipped: !search.nonNegative,
    clippedRelativeTrace: search.clippedRelativeTrace,
    draw(count, seed) {
      checkCount(count);
      const rng = new Random(seed);
      const out = matrix(count, n);
      const transform = transformer();
      const eps = nugget > 0 ? new Float64Array(n) : null;
      for (let r = 0; r < count; r += 2) {
        const single = r + 1 === count;
        const y = transform((spectrum) => spectrumOf(rng, root, single, px, py, pz, spectrum));
        for (let part = 0; part < (single ? 1 : 2); part++) {
          const o = (r + part) * n;
          for (let iz = 0; iz < nz; iz++) {
            for (let iy = 0; iy < ny; iy++) {
              const b = 2 * px * (iy + py * iz) + part;
              const g = o + nx * (iy + ny * iz);
              for (let ix = 0; ix < nx; ix++) out.data[g + ix] = y[b + 2 * ix];
            }
          }
          finishField(out.data, o, n, s, eps, nuggetSd, m0, rng);
        }
      }
      return out;
    },
  };
}

/** Normals drawn at a time for a Hermitian spectrum (1 Mi: 8 MB). */
const NORMAL_CHUNK = 1 << 20;

/**
 * One real field from P normals (used for the last realisation of an odd count): a spectrum
 * ẑ with ẑ(−k) = conj ẑ(k), E|ẑ(k)|² = λ_k / P and E[ẑ(k)²] = 0 for k ≠ −k (real, variance λ_k/P,
 * where k = −k mod (px, py, pz); pz = 1 on 1-D and 2-D grids), so y = F ẑ is real with covariance F diag(λ/P) F* = C̃ (derived, as in
 * the module comment). Pairs (k, −k) take their two normals at the smaller flat index.
 */
function hermitianSpectrum(rng: Random, root: Float64Array, px: number, py: number, pz: number, buf: Float64Array): void {
  const h = Math.SQRT1_2;
  // The normals in chunks, in order (successive fillNormal calls give the same sequence as one call), instead of
  // one array as large as the embedding. Exactly P normals are taken in all (the last chunk only what is left), so
  // the generator is where one fillNormal of P would leave it.
  let left = px * py * pz;
  const chunk = new Float64Array(Math.min(left, NORMAL_CHUNK));
  let z = chunk;
  let q = chunk.length; // empty: the first call fills it
  const next = (): number => {
    if (q === z.length) {
      z = left < chunk.length ? chunk.subarray(0, left) : chunk;
      rng.fillNormal(z);
      left -= z.length;
      q = 0;
    }
    return z[q++];
  };
  // Row by row (ky, kz): a row before its mirror row takes a pair per element; a row after it was written with its
  // mirror; a row that is its own mirror (ky, kz ∈ {0, p/2}) goes element by element. The normals are taken in the
  // same order as an element-by-element walk over k (pairs at the smaller flat index), so the draws are unchanged.
  for (let kz = 0; kz < pz; kz++) {
    const mz = kz === 0 ? 0 : pz - kz;
    for (let ky = 0; ky < py; ky++) {
      const my = ky === 0 ? 0 : py - ky;
      const row = px * (ky + py * kz);
      const mrow = px * (my + py * mz);
      if (row > mrow) continue;
      for (let kx = 0; kx < px; kx++) {
        const mx = kx === 0 ? 0 : px - kx;
        const k = row + kx;
        const mk = mrow + mx;
        if (mk === k) {
          buf[2 * k] = root[k] * next();
          buf[2 * k + 1] = 0;
        } else if (k < mk) {
          const r = root[k] * h;
          const a = r * next();
          const b = r * next();
          buf[2 * k] = a;
          buf[2 * k + 1] = b;
          buf[2 * mk] = a;
          buf[2 * mk + 1] = -b;
        }
      }
    }
  }
}

/** The spectrum of one complex draw (two fields), or with `single` of one real field ({@link hermitianSpectrum}). */
function spectrumOf(rng: Random, root: Float64Array, single: boolean, px: number, py: number, pz: number, buf: Float64Array): void {
  if (single) {
    hermitianSpectrum(rng, root, px, py, pz, buf);
    return;
  }
  rng.fillNormal(buf);
  for (let k = 0; k < root.length; k++) {
    const q = root[k];
    buf[2 * k] *= q;
    buf[2 * k + 1] *= q;
  }
}

/** Field at out[o … o + n): × the std profile, + √nugget · ε (next n normals), + the prior mean. */
function finishField(
  out: Float64Array,
  o: number,
  n: number,
  s: readonly number[] | undefined,
  eps: Float64Array | null,
  nuggetSd: number,
  m0: Float64Array,
  rng: Random,
): void {
  if (s !== undefined) for (let i = 0; i < n; i++) out[o + i] *= s[i];
  if (eps !== null) {
    rng.fillNormal(eps);
    for (let i = 0; i < n; i++) out[o + i] += nuggetSd * eps[i];
  }
  for (let i = 0; i < n; i++) out[o + i] += m0[i];
}

function checkCount(count: number): void {
  if (!Number.isInteger(count) || count < 0) throw new InputError('count', 'a whole number ≥ 0', count);
}

/** `count` prior realisations (count × N) with the sampler's report. */
export function circulantRealisations(
  grid: Grid,
  prior: PriorSpec,
  count: number,
  seed: number,
  options: SamplerOptions = {},
): { realisations: Matrix } & Omit<CirculantSampler, 'draw'> {
  const sampler = circulantSampler(grid, prior, options);
  const { path, padding, tried, clipped, clippedRelativeTrace } = sampler;
  return { realisations: sampler.draw(count, seed), path, padding, tried, clipped, clippedRelativeTrace };
}
