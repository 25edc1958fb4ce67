/**
 * Simulation-based calibration of the whole workflow: draw truths from a candidate prior A,
 * simulate data with the problem's operator and errors, invert with a (possibly different) prior B,
 * and measure how often the truth falls inside the posterior bands, and where it ranks among
 * posterior draws.
 *
 * PUBLIC API: calibrate, calibrationTable, BAND_LEVELS.
 *
 * If A = B the posterior is exactly calibrated: each cell's truth lies in m̃_i ± z σ̃_i with
 * probability 2Φ(z) − 1, and its rank among L posterior draws is uniform on {0, …, L}
 * (Cook, Gelman & Rubin 2006, J. Comput. Graph. Stat. 15:675; Talts et al. 2018,
 * arXiv:1804.06788, "Validating Bayesian inference algorithms with simulation-based calibration").
 * Cells of one replicate are correlated, replicates are independent: per-cell counts over the
 * replicates are binomial, and the per-replicate averages are independent (both are returned so
 * that tests and users can judge the spread honestly).
 *
 * Posterior draws reuse the factorisation of B for every replicate by perturbing the prior and the
 * data (the identity derived in src/core/inverse/posterior.ts, posteriorRealisations):
 *   m* = m0 + L_m z,  ε ~ N(0, Cd),  m_s = m* + Cm Gᵀ K⁻¹ (d + ε − G m*).
 *
 * Routes (./projected.ts tuningRoute, per candidate): dense up to TUNING_DENSE_LIMIT cells or for a
 * non-stationary prior (Cm as an N × N matrix, its Cholesky factor L_m for the prior draws,
 * ../inverse/posterior.ts for Bᵀ = G Cm and K); above it, for a stationary prior, no N × N matrix:
 * Bᵀ and K by circulant products (../inverse/structured.ts prepareStructuredPosterior, std by
 * structuredPosteriorStd) and prior draws by circulant embedding (../fft/realisations.ts
 * circulantSampler; exact unless the embedding had to be clipped, reported as `approximateDraws`).
 *
 * Random stream (part of the "same seed, same numbers" contract): one MT19937 stream seeded with
 * `seed` (or, with `streamSeed`, one stream per replicate, read in the same order). Dense route, per replicate: N normals for the truth, M for the noise, then per draw N
 * for z and M for ε. FFT route, per replicate: one 32-bit integer (nextUint32) seeding the
 * sampler's truth draw, M normals for the noise, one 32-bit integer seeding the sampler's `draws`
 * prior draws, then per draw M normals for ε (the sampler has its own stream per seed). Every
 * cross-table row uses the same seed, so all inversion candidates see the same truths and data
 * (common random numbers) when they share a route.
 */
import { InputError, NotPositiveDefiniteError } from '../errors.ts';
import { cholesky, choleskySolve } from '../linalg/cholesky.ts';
import type { Matrix } from '../linalg/matrix.ts';
import { applyOperator } from '../linalg/operator.ts';
import { circulantSampler } from '../fft/realisations.ts';
import { posteriorSummary, preparePosteriorFromCovariance } from '../inverse/posterior.ts';
import { prepareStructuredPosterior, structuredPosteriorStd, structuredProblem, type StructuredProblem } from '../inverse/structured.ts';
import { covarianceMatrix, meanVector } from '../prior/covariance.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import { Random, validateSeed } from '../sampling/random.ts';
import {
  aborted,
  prepareDataSide,
  tuningRoute,
  type DataSide,
  type RouteOptions,
  type TuningControl,
  type TuningRoute,
} from './dataSpace.ts';

/** Nominal coverages and half-widths in posterior standard deviations: ±1σ (68.27%) and ±1.96σ (95%). */
export const BAND_LEVELS = {
  inner: { nominal: 0.6826894921370859, halfWidth: 1 },
  outer: { nominal: 0.95, halfWidth: 1.959963984540054 },
} as const;

export interface CalibrationOptions extends TuningControl, RouteOptions {
  /** Number of independent (truth, data) replicates, ≥ 1. */
  readonly replicates: number;
  /** Posterior draws per replicate for the rank histogram (default 19, giving 20 rank bins). */
  readonly draws?: number;
  /** Seed of the MT19937 stream, integer in [0, 2³² − 1]. */
  readonly seed: number;
  /** Also return every rank (replicates × N); off by default to keep results small. */
  readonly keepRanks?: boolean;
  /**
   * When given, replicate r (0-based within this call) draws from its own MT19937 stream seeded
   * with `streamSeed(r)` instead of one stream for the whole call, so that a replicate's numbers
   * do not depend on which others run with it (the command line's shards: {@link replicateSeed}).
   */
  readonly streamSeed?: (replicate: number) => number;
}

/**
 * Seed of replicate `index` of a calibration seeded with `seed` (our own contract, part of "same
 * seed, same numbers" for sharded runs): MurmurHash3's 32-bit finaliser (fmix32; Appleby, public
 * domain) of seed ⊕ (index + 1)·0x9E3779B9, so neighbouring replicates and seeds get unrelated
 * streams. Depends only on (seed, index).
 */
export function replicateSeed(seed: number, index: number): number {
  validateSeed(seed, 'seed');
  if (!Number.isInteger(index) || index < 0) throw new InputError('replicate', 'an integer ≥ 0', index);
  let h = (seed ^ Math.imul(index + 1, 0x9e3779b9)) >>> 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

export interface CalibrationResult {
  /** Fraction of (cell, replicate) pairs with the truth inside m̃ ± σ̃ (nominal BAND_LEVELS.inner.nominal). */
  readonly coverage68: number;
  /** Same for m̃ ± 1.96 σ̃ (nominal 0.95). */
  readonly coverage95: number;
  /** Per cell, fraction of replicates covered (binomial over replicates). */
  readonly cellCoverage68: Float64Array;
  readonly cellCoverage95: Float64Array;
  /** Per replicate, fraction of cells covered (independent across replicates). */
  readonly replicateCoverage68: Float64Array;
  readonly replicateCoverage95: Float64Array;
  /** Counts of the truth's rank among the draws (0 … draws), over all cells and replicates. */
  readonly rankHistogram: Float64Array;
  /** Ranks, replicate-major (replicates × N), when keepRanks was set. */
  readonly ranks?: Uint16Array;
  /** Replicates completed (fewer than asked when cancelled). */
  readonly replicates: number;
  readonly draws: number;
  readonly cancelled: boolean;
  /** Routes of the truth and the inversion candidates (see the module comment). */
  readonly route?: { readonly truth: TuningRoute; readonly inversion: TuningRoute };
  /** True when a circulant embedding had to be clipped, so prior draws were approximate. */
  readonly approximateDraws?: boolean;
}

/** Prior draws of one candidate, taking their randomness from the calibration stream. */
interface PriorDraws {
  /** One realisation (the truth of a replicate). */
  one(rng: Random): Float64Array;
  /** `count` realisations, read one at a time with next() (between which the caller draws ε). */
  batch(rng: Random, count: number): () => Float64Array;
}

/** The reusable factorisations of one candidate prior. */
interface Candidate {
  readonly route: TuningRoute;
  readonly m0: Float64Array;
  /** Bᵀ = G Cm (M × N). */
  readonly Bt: Matrix;
  /** Lower Cholesky factor of K = G Cm Gᵀ + Cd. */
  readonly L: Matrix;
  readonly std: Float64Array;
  readonly draws: PriorDraws;
  readonly approximate: boolean;
}

function prepareCandidate(
  problem: Problem,
  prior: PriorSpec,
  field: string,
  holder: StructuredProblem,
  asked: RouteOptions['route'],
): Candidate {
  const route = asked === undefined || asked === 'auto' ? tuningRoute(problem, prior) : asked;
  try {
    return route === 'fft' ? fftCandidate(holder, prior) : denseCandidate(problem, prior, field);
  } catch (e) {
    if (e instanceof InputError && !e.field.startsWith(`${field}.`)) throw new InputError(`${field}.${e.field}`, e.expected, e.value);
    throw e;
  }
}

function denseCandidate(problem: Problem, prior: PriorSpec, field: string): Candidate {
  const cm = covarianceMatrix(problem.grid, prior);
  const m0 = meanVector(problem.grid, prior);
  const f = cholesky(cm);
  if (!f.ok) throw new NotPositiveDefiniteError(`${field} prior covariance Cm`, f.pivot, 'calibration draws from it: add a small nugget');
  const posterior = preparePosteriorFromCovariance(problem, cm, m0);
  const L = f.factor;
  const n = cm.rows;
  const z = new Float64Array(n);
  const draws: PriorDraws = {
    one: (rng) => draw(L, m0, rng, z),
    batch: (rng) => () => draw(L, m0, rng, z),
  };
  return { route: 'dense', m0, Bt: posterior.Bt, L: posterior.L, std: posteriorSummary(posterior).std, draws, approximate: false };
}

function fftCandidate(holder: StructuredProblem, prior: PriorSpec): Candidate {
  const state = prepareStructuredPosterior(holder, prior);
  const sampler = circulantSampler(holder.problem.grid, prior);
  const n = state.Bt.cols;
  const draws: PriorDraws = {
    one: (rng) => sampler.draw(1, rng.nextUint32()).data,
    batch: (rng, count) => {
      const x = sampler.draw(count, rng.nextUint32()).data;
      let k = 0;
      return () => x.subarray(n * k, n * ++k);
    },
  };
  return { route: 'fft', m0: state.m0, Bt: state.Bt, L: state.L, std: structuredPosteriorStd(state), draws, approximate: sampler.clipped };
}

/** m0 + L z with z the next N normals of rng. */
function draw(L: Matrix, m0: Float64Array, rng: Random, z: Float64Array): Float64Array {
  rng.fillNormal(z);
  const n = L.rows;
  const l = L.data;
  const out = Float64Array.from(m0);
  for (let i = 0; i < n; i++) {
    const oi = i * n;
    let s = 0;
    for (let k = 0; k <= i; k++) s += l[oi + k] * z[k];
    out[i] += s;
  }
  return out;
}

/** Noise e ~ N(0, Cd): Ld times the next M normals. */
function noise(side: DataSide, rng: Random, u: Float64Array): Float64Array {
  rng.fillNormal(u);
  const m = side.dataCount;
  const l = side.cdFactor.data;
  const out = new Float64Array(m);
  if (side.diagonalCd) {
    for (let k = 0; k < m; k++) out[k] = l[k * m + k] * u[k];
    return out;
  }
  for (let k = 0; k < m; k++) {
    let s = 0;
    for (let q = 0; q <= k; q++) s += l[k * m + q] * u[q];
    out[k] = s;
  }
  return out;
}

/** base + Cm Gᵀ v = base + Btᵀ v. */
function addCross(post: Candidate, base: Float64Array, v: Float64Array): Float64Array {
  const { Bt } = post;
  const n = Bt.cols;
  const out = Float64Array.from(base);
  for (let k = 0; k < Bt.rows; k++) {
    const vk = v[k];
    const ok = k * n;
    for (let i = 0; i < n; i++) out[i] += Bt.data[ok + i] * vk;
  }
  return out;
}

function checkOptions(o: CalibrationOptions): number {
  if (!Number.isInteger(o.replicates) || o.replicates < 1 || o.replicates > 1e6)
    throw new InputError('replicates', 'an integer from 1 to 1000000', o.replicates);
  const draws = o.draws ?? 19;
  if (!Number.isInteger(draws) || draws < 1 || draws > 65534) throw new InputError('draws', 'an integer from 1 to 65534', o.draws);
  validateSeed(o.seed, 'seed');
  return draws;
}

function run(
  side: DataSide,
  truth: Candidate,
  inv: Candidate,
  options: CalibrationOptions,
  progress: (f: number) => void,
): CalibrationResult {
  const draws = checkOptions(options);
  const R = options.replicates;
  const n = side.cellCount;
  const m = side.dataCount;
  const G = side.problem.operator;
  const shared = options.streamSeed === undefined ? new Random(options.seed) : null;
  const u = new Float64Array(m);
  const hit68 = new Float64Array(n);
  const hit95 = new Float64Array(n);
  const rep68 = new Float64Array(R);
  const rep95 = new Float64Array(R);
  const hist = new Float64Array(draws + 1);
  const ranks = options.keepRanks ? new Uint16Array(R * n) : undefined;
  const rank = new Uint16Array(n);
  const post = inv;
  const { inner, outer } = BAND_LEVELS;
  let done = 0;
  let cancelled = false;
  for (let r = 0; r < R; r++) {
    if (aborted(options)) {
      cancelled = true;
      break;
    }
    const rng = shared ?? new Random(options.streamSeed!(r));
    // Copied: the dense route's draw is a fresh array, the FFT route's a view of the sampler's output.
    const mt = Float64Array.from(truth.draws.one(rng));
    const d = applyOperator(G, mt);
    const e = noise(side, rng, u);
    for (let k = 0; k < m; k++) d[k] += e[k];
    // Posterior mean with prior B: m̃ = m0 + Cm Gᵀ K⁻¹ (d − G m0).
    const gm0 = applyOperator(G, inv.m0);
    const res = d.map((v, k) => v - gm0[k]);
    const mean = addCross(post, inv.m0, choleskySolve(post.L, res));
    let c68 = 0;
    let c95 = 0;
    for (let i = 0; i < n; i++) {
      const dev = Math.abs(mt[i] - mean[i]);
      const s = inv.std[i];
      if (dev <= inner.halfWidth * s) {
        hit68[i]++;
        c68++;
      }
      if (dev <= outer.halfWidth * s) {
        hit95[i]++;
        c95++;
      }
    }
    rep68[r] = c68 / n;
    rep95[r] = c95 / n;
    rank.fill(0);
    const next = inv.draws.batch(rng, draws);
    for (let s = 0; s < draws; s++) {
      const mStar = next();
      const eps = noise(side, rng, u);
      const gs = applyOperator(G, mStar);
      const rs = new Float64Array(m);
      for (let k = 0; k < m; k++) rs[k] = d[k] + eps[k] - gs[k];
      const ms = addCross(post, mStar, choleskySolve(post.L, rs));
      for (let i = 0; i < n; i++) if (ms[i] < mt[i]) rank[i]++;
    }
    for (let i = 0; i < n; i++) hist[rank[i]]++;
    if (ranks) ranks.set(rank, r * n);
    done++;
    progress(done / R);
  }
  const total = done * n;
  return {
    coverage68: hit68.reduce((a, b) => a + b, 0) / total,
    coverage95: hit95.reduce((a, b) => a + b, 0) / total,
    cellCoverage68: hit68.map((v) => v / done),
    cellCoverage95: hit95.map((v) => v / done),
    replicateCoverage68: rep68.slice(0, done),
    replicateCoverage95: rep95.slice(0, done),
    rankHistogram: hist,
    ...(ranks ? { ranks: ranks.slice(0, done * n) } : {}),
    replicates: done,
    draws,
    cancelled,
    route: { truth: truth.route, inversion: inv.route },
    ...(truth.approximate || inv.approximate ? { approximateDraws: true } : {}),
  };
}

/**
 * Calibration of inverting with `inversionPrior` when the truth comes from `truthPrior` (the same
 * prior object for a self-consistency check). Cost per replicate: one truth draw (N²/2), one
 * K-solve, and per posterior draw one prior draw plus one K-solve and an N × M product.
 */
export function calibrate(
  problem: Problem,
  truthPrior: PriorSpec,
  inversionPrior: PriorSpec,
  options: CalibrationOptions,
): CalibrationResult {
  checkOptions(options);
  const holder = options.structured ?? structuredProblem(problem);
  const side = prepareDataSide(problem, { structured: holder });
  const a = prepareCandidate(problem, truthPrior, 'truthPrior', holder, options.route);
  const b = truthPrior === inversionPrior ? a : prepareCandidate(problem, inversionPrior, 'inversionPrior', holder, options.route);
  return run(side, a, b, options, (f) => options.onProgress?.(f));
}

export interface CalibrationTable {
  /** results[i][j]: truth from candidates[i], inverted with candidates[j]. */
  readonly results: readonly (readonly CalibrationResult[])[];
  /** coverage68 as a K × K row-major array (truth-major), for a heat table. */
  readonly coverage68: Float64Array;
  readonly coverage95: Float64Array;
  readonly cancelled: boolean;
}

/** The cross-table "truth from candidate A, inverted with candidate B" over all pairs (see the module comment). */
export function calibrationTable(problem: Problem, candidates: readonly PriorSpec[], options: CalibrationOptions): CalibrationTable {
  checkOptions(options);
  if (candidates.length < 1 || candidates.length > 8) throw new InputError('candidates', 'between 1 and 8 priors', candidates);
  const holder = options.structured ?? structuredProblem(problem);
  const side = prepareDataSide(problem, { structured: holder });
  const prepared = candidates.map((c, k) => prepareCandidate(problem, c, `candidates[${k}]`, holder, options.route));
  const K = candidates.length;
  const results: CalibrationResult[][] = [];
  const c68 = new Float64Array(K * K).fill(Number.NaN);
  const c95 = new Float64Array(K * K).fill(Number.NaN);
  let cancelled = false;
  for (let i = 0; i < K && !cancelled; i++) {
    const row: CalibrationResult[] = [];
    for (let j = 0; j < K; j++) {
      const cell = i * K + j;
      const res = run(side, prepared[i], prepared[j], options, (f) => options.onProgress?.((cell + f) / (K * K)));
      row.push(res);
      c68[cell] = res.coverage68;
      c95[cell] = res.coverage95;
      if (res.cancelled) {
        cancelled = true;
        break;
      }
    }
    results.push(row);
  }
  return { results, coverage68: c68, coverage95: c95, cancelled };
}
