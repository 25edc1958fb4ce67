/**
 * Posterior realisations and resolution rows on the FFT path: from the factored state of
 * ./structured.ts (Bᵀ = G Cm and K = G Cm Gᵀ + Cd = L Lᵀ), with no N × N matrix.
 *
 * Realisations by the perturbation update (Tarantola 2005, Inverse Problem Theory, §3.2 data-space
 * form; also known as "sample-then-optimise" or conditioning by kriging, common practice):
 *
 *   x ~ N(m0, Cm) (circulant-embedding sampler, ../fft/realisations.ts),   e ~ N(0, Cd),
 *   draw = x + B K⁻¹ (d + e − G x),   B = Cm Gᵀ = (Bᵀ)ᵀ.
 *
 * Exact: the draw is linear in the Gaussian pair (x, e), with mean m0 + B K⁻¹ (d − G m0) = m̃ and
 * covariance Cm − B K⁻¹ Bᵀ (derived as in ./posterior.ts posteriorRealisations), provided x is an
 * exact N(m0, Cm) draw: `clipped` reports when the embedding was not non-negative definite and its
 * negative eigenvalues were set to 0 (then the draws are approximate; see clippedRelativeTrace).
 *
 * Streams: x from the sampler seeded with `seed`; e from a second MT19937 generator seeded with
 * (seed + 0x9e3779b9) mod 2³² (never equal to `seed`; streams of differently seeded MT19937
 * generators are treated as independent: common practice, no source), M normals per draw in
 * order, e = σ ⊙ z (diagonal Cd) or Ld z (full Cd = Ld Ldᵀ). Same seed, same numbers.
 *
 * Resolution: R = Cm Gᵀ K⁻¹ G = B K⁻¹ G, so row i is (K⁻¹ b_i)ᵀ G = Gᵀ (K⁻¹ b_i) with b_i =
 * column i of Bᵀ (as ./posterior.ts resolutionRow; Menke 2015 on resolution with a prior).
 *
 * PUBLIC API: structuredPosteriorDraws, structuredResolutionRow, noiseSeed.
 */
import { InputError } from '../errors.ts';
import { choleskySolve } from '../linalg/cholesky.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { applyOperator } from '../linalg/operator.ts';
import { circulantSampler } from '../fft/realisations.ts';
import { Random, validateSeed } from '../sampling/random.ts';
import type { StructuredPosteriorState } from './structured.ts';
import { resolutionRow } from './posterior.ts';

/** Seed of the data-noise stream for a given draw seed (see the module comment). */
export function noiseSeed(seed: number): number {
  return (seed + 0x9e3779b9) >>> 0;
}

export interface StructuredDraws {
  /** count × N, one realisation per row. */
  readonly realisations: Matrix;
  /** How the prior draws x were made: 'fft' circulant embedding, 'dense' Cholesky fallback of the sampler. */
  readonly priorRoute: 'fft' | 'dense';
  /** Embedding sizes of the prior sampler per grid axis. */
  readonly padding: readonly number[];
  /** True when negative embedding eigenvalues were set to 0: the draws are then approximate. */
  readonly clipped: boolean;
  readonly clippedRelativeTrace: number;
}

/**
 * `count` posterior realisations on the FFT path (see the module comment). Throws InputError for a
 * bad count or seed, NotPositiveDefiniteError when the prior sampler has to fall back to a dense
 * Cholesky that fails.
 */
export function structuredPosteriorDraws(state: StructuredPosteriorState, count: number, seed: number): StructuredDraws {
  if (!Number.isInteger(count) || count < 0) throw new InputError('count', 'a non-negative integer', count);
  validateSeed(seed);
  const { problem, prior, Bt, L, Ld } = state;
  const n = Bt.cols;
  const m = Bt.rows;
  const sampler = circulantSampler(problem.grid, prior);
  const x = sampler.draw(count, seed);
  const rng = new Random(noiseSeed(seed));
  const z = new Float64Array(m);
  const rs = new Float64Array(m);
  const sigma = problem.data.sigma;
  const d = problem.data.values;
  const bt = Bt.data;
  const out = matrix(count, n);
  for (let s = 0; s < count; s++) {
    const xs = x.data.subarray(s * n, (s + 1) * n);
    rng.fillNormal(z);
    const gx = applyOperator(problem.operator, xs);
    for (let k = 0; k < m; k++) {
      let e: number;
      if (Ld !== undefined) {
        e = 0;
        const ld = Ld.data;
        for (let l = 0; l <= k; l++) e += ld[k * m + l] * z[l];
      } else e = sigma![k] * z[k];
      rs[k] = d[k] + e - gx[k];
    }
    const v = choleskySolve(L, rs);
    const o = out.data.subarray(s * n, (s + 1) * n);
    o.set(xs);
    for (let k = 0; k < m; k++) {
      const vk = v[k];
      if (vk === 0) continue;
      const ok = k * n;
      for (let i = 0; i < n; i++) o[i] += bt[ok + i] * vk;
    }
  }
  return {
    realisations: out,
    priorRoute: sampler.path,
    padding: sampler.padding,
    clipped: sampler.clipped,
    clippedRelativeTrace: sampler.clippedRelativeTrace,
  };
}

/** Row `cell` of R = B K⁻¹ G (the averaging kernel of that cell), length N, from the FFT-path state. */
export function structuredResolutionRow(state: StructuredPosteriorState, cell: number): Float64Array {
  // The FFT state holds Bᵀ = G Cm and L as the dense one does: the same row formula.
  return resolutionRow(state, cell);
}
