/**
 * Prior realisations m = m0 + L z with Cm = L Lᵀ (Cholesky) and z ~ N(0, I): then
 * E[m] = m0 and Cov[m] = L E[z zᵀ] Lᵀ = Cm (e.g. Rasmussen & Williams 2006, Appendix A.2).
 *
 * Stream layout (part of the "same seed, same numbers" contract): realisation r uses normal
 * variates r·N … r·N + N − 1 of the generator seeded with `seed` (./random.ts), in cell order.
 *
 * Route: up to {@link DENSE_REALISATION_LIMIT} cells the dense Cholesky route above (so seeded
 * outputs of the demos and tests stay as they were); above it, when the prior is stationary on
 * the grid, circulant embedding (../fft/realisations.ts: Dietrich & Newsam 1997; Wood & Chan
 * 1994), which needs no N × N matrix and has its own stream layout. {@link priorRealisationsWithRoute}
 * says which route ran, with the embedding's padding and any clipping.
 */
import { InputError, NotPositiveDefiniteError } from '../errors.ts';
import { type Geometry, type Grid, isCellList } from '../grid/grid.ts';
import { cholesky } from '../linalg/cholesky.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { covarianceMatrix, meanVector } from '../prior/covariance.ts';
import { diagnoseCovariance } from '../prior/diagnostics.ts';
import type { PriorSpec } from '../prior/spec.ts';
import { Random, validateSeed } from './random.ts';
import { cellCount } from '../grid/grid.ts';
import { nonStationaryReason } from '../fft/covariance.ts';
import { circulantSampler, type CirculantSampler } from '../fft/realisations.ts';

/**
 * Largest N drawn by dense Cholesky when the prior is stationary on the grid (1024 = 32², the
 * largest built-in demo: its seeded draws stay as they were). Measured here (six draws, Matérn
 * ν = 1.5, with the WebAssembly Cholesky): 32² 154 ms, 48² 479 ms, 64² 2.4 s on the dense route
 * against well under 100 ms by circulant embedding, so larger grids take the embedding.
 */
export const DENSE_REALISATION_LIMIT = 1024;

export interface RealisationRoute {
  /** 'dense': Cholesky of Cm; 'fft': circulant embedding. */
  readonly route: 'dense' | 'fft';
  /** Embedding sizes per axis on the FFT route; the grid shape on the dense route. */
  readonly padding: readonly number[];
  /** FFT route only: negative embedding eigenvalues were set to 0 (an approximation). */
  readonly clipped: boolean;
  /** FFT route: Σ_{λ<0} |λ| / Σ λ of the embedding (0 when exact); 0 on the dense route. */
  readonly clippedRelativeTrace: number;
}

/** `count` prior realisations with the route that drew them (see the module comment). */
export function priorRealisationsWithRoute(
  grid: Geometry,
  prior: PriorSpec,
  count: number,
  seed: number,
): { realisations: Matrix } & RealisationRoute {
  if (!Number.isInteger(count) || count < 0) throw new InputError('count', 'a non-negative integer', count);
  validateSeed(seed);
  if (!isCellList(grid) && cellCount(grid) > DENSE_REALISATION_LIMIT && nonStationaryReason(grid, prior) === null) {
    const r = cachedSampler(grid, prior);
    return {
      realisations: r.draw(count, seed),
      route: r.path,
      padding: r.padding,
      clipped: r.clipped,
      clippedRelativeTrace: r.clippedRelativeTrace,
    };
  }
  return {
    realisations: denseRealisations(grid, prior, count, seed),
    route: 'dense',
    padding: isCellList(grid) ? [cellCount(grid)] : grid.shape,
    clipped: false,
    clippedRelativeTrace: 0,
  };
}

/**
 * The circulant sampler of the latest (grid, prior), kept so that a redraw with a new seed skips
 * the embedding (its kernel evaluation, transform and padding search: about half the time of one
 * 512² realisation). A sampler depends on the grid and prior only, so the draws are unchanged.
 */
let lastSampler: { key: string; sampler: CirculantSampler } | null = null;
function cachedSampler(grid: Grid, prior: PriorSpec): CirculantSampler {
  const key = JSON.stringify([grid, prior]);
  if (lastSampler?.key !== key) lastSampler = { key, sampler: circulantSampler(grid, prior) };
  return lastSampler.sampler;
}

/**
 * `count` prior realisations, one per row (count × N); same seed, same numbers everywhere. Dense
 * m0 + L z up to {@link DENSE_REALISATION_LIMIT} cells, circulant embedding above.
 */
export function priorRealisations(grid: Geometry, prior: PriorSpec, count: number, seed: number): Matrix {
  return priorRealisationsWithRoute(grid, prior, count, seed).realisations;
}

function denseRealisations(grid: Geometry, prior: PriorSpec, count: number, seed: number): Matrix {
  const m0 = meanVector(grid, prior);
  const c = covarianceMatrix(grid, prior);
  const r = cholesky(c);
  if (!r.ok) {
    const d = diagnoseCovariance(c, { grid, prior });
    const hint =
      d.suggestedJitter !== null
        ? `add a nugget of about ${d.suggestedJitter.toPrecision(2)} (${d.suggestedJitterRelative!.toExponential(0)} of the mean variance) to the prior`
        : 'check the covariance terms; no diagonal jitter up to 10% of the mean variance makes it factor';
    throw new NotPositiveDefiniteError('prior covariance Cm', r.pivot, hint);
  }
  return realisationsFromFactor(r.factor, m0, count, new Random(seed));
}

/** Rows m0 + L z_r for r = 0 … count − 1, z_r the next N normal variates of `rng`. */
export function realisationsFromFactor(L: Matrix, m0: ArrayLike<number>, count: number, rng: Random): Matrix {
  const n = L.rows;
  const out = matrix(count, n);
  const z = new Float64Array(n);
  const l = L.data;
  for (let r = 0; r < count; r++) {
    rng.fillNormal(z);
    const o = r * n;
    for (let i = 0; i < n; i++) {
      const oi = i * n;
      let s = 0;
      for (let k = 0; k <= i; k++) s += l[oi + k] * z[k];
      out.data[o + i] = m0[i] + s;
    }
  }
  return out;
}
