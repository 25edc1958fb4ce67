/**
 * The hyperparameter-averaged posterior: the posterior mean and bands averaged over the cells of
 * an evidence map (lengths ℓ_i × variances σ²_j of one term), each cell weighted by its evidence
 * times a stated hyper-prior,
 *
 *   w_ij ∝ Z_ij · P_ij,   Z_ij = p(d | ℓ_i, σ²_j),   P_ij = prior mass of the cell,
 *
 * so that a stakeholder sees how much the conclusion depends on the length and variance chosen.
 * The mixture Σ w_k N(m_k, C_k) has mean m̄ = Σ w_k m_k and pointwise variance
 *
 *   v̄ = Σ w_k s_k²  +  Σ w_k (m_k − m̄)²     (mean of the variances + variance of the means;
 *                                             law of total variance, any probability text).
 *
 * Hyper-priors on the map's log-spaced axes (src/core/tuning/evidenceMap.ts logSpaced):
 * - 'log-uniform' (default): density ∝ 1/(ℓ σ²); each cell of a log-spaced map spans the same
 *   interval of log ℓ and log σ², so every cell has the same prior mass (P_ij = const);
 * - 'uniform': density constant in (ℓ, σ²); a cell's width on a log-spaced axis is ∝ its value,
 *   so P_ij ∝ ℓ_i σ²_j.
 * This is a quadrature of the hyperparameter integral on the map's grid (midpoint rule in
 * log ℓ, log σ²), adequate when the map covers the evidence's mass; the result says how much weight
 * sits on the map's edge. Cells whose normalised weight is below `minWeight` are skipped (their
 * total weight is reported) to spare the posterior solves.
 */
import { InputError } from '../errors.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import { computePosteriorSerial } from '../inverse/compute.ts';
import { setTermLength, type EvidenceMap, type LengthAxis } from './evidenceMap.ts';

export type HyperPrior = 'log-uniform' | 'uniform';
export const HYPER_PRIORS: readonly HyperPrior[] = ['log-uniform', 'uniform'];

/** In words, for the report and the UI. */
export function hyperPriorWords(h: HyperPrior): string {
  return h === 'log-uniform'
    ? 'log-uniform in length and variance over the map (density ∝ 1/(ℓ σ²): equal mass per cell)'
    : 'uniform in length and variance over the map (cell mass ∝ ℓ σ²)';
}

/** Normalised weights of the map's cells (row-major as the map), 0 where the evidence is not finite. */
export function averagingWeights(
  map: Pick<EvidenceMap, 'lengths' | 'variances' | 'logEvidence'>,
  hyper: HyperPrior = 'log-uniform',
): Float64Array {
  if (!HYPER_PRIORS.includes(hyper)) throw new InputError('hyperPrior', '"log-uniform" or "uniform"', hyper);
  const nv = map.variances.length;
  const n = map.logEvidence.length;
  const logw = new Float64Array(n);
  let top = -Infinity;
  for (let k = 0; k < n; k++) {
    const z = map.logEvidence[k];
    const i = Math.floor(k / nv);
    const j = k % nv;
    logw[k] = Number.isFinite(z) ? z + (hyper === 'uniform' ? Math.log(map.lengths[i]) + Math.log(map.variances[j]) : 0) : -Infinity;
    if (logw[k] > top) top = logw[k];
  }
  const w = new Float64Array(n);
  if (!Number.isFinite(top)) return w;
  let sum = 0;
  for (let k = 0; k < n; k++) sum += w[k] = Math.exp(logw[k] - top);
  for (let k = 0; k < n; k++) w[k] /= sum;
  return w;
}

/** What the average needs of an evidence map. */
export type AveragingMap = Pick<EvidenceMap, 'term' | 'lengths' | 'variances' | 'logEvidence'>;

export interface AveragedPosterior {
  readonly mean: Float64Array;
  readonly std: Float64Array;
  readonly hyperPrior: HyperPrior;
  readonly weights: Float64Array;
  /** Cells whose posterior entered the average. */
  readonly cellsUsed: number;
  /** Total normalised weight of the skipped cells (below `minWeight`). */
  readonly skippedWeight: number;
  /** Weight on the map's outer rows and columns: large values say the map does not cover the evidence's mass. */
  readonly edgeWeight: number;
  /** 1 / Σ w²: how many cells effectively carry the average. */
  readonly effectiveCells: number;
  /** The weighted mean of the length and variance (on the map's axes). */
  readonly meanLength: number;
  readonly meanVariance: number;
}

export interface AveragedOptions {
  readonly hyperPrior?: HyperPrior;
  /** Which length the map's length axis set (as in the map). */
  readonly axis?: LengthAxis;
  /** Cells of smaller normalised weight are skipped (default 1e-6). */
  readonly minWeight?: number;
}

/** The prior of map cell (length, variance) for term `term`. */
export function priorOfCell(prior: PriorSpec, term: number, length: number, variance: number, axis: LengthAxis = 'both'): PriorSpec {
  return { ...prior, terms: prior.terms.map((t, k) => (k === term ? { ...setTermLength(t, length, axis), variance } : t)) };
}

/**
 * The averaged posterior over an evidence map of `prior` (its term `map.term`). Each used cell's
 * posterior is computed with {@link computePosteriorSerial} (the route the workbench would take).
 */
export function averagedPosterior(problem: Problem, prior: PriorSpec, map: AveragingMap, options: AveragedOptions = {}): AveragedPosterior {
  const hyper = options.hyperPrior ?? 'log-uniform';
  const minWeight = options.minWeight ?? 1e-6;
  const w = averagingWeights(map, hyper);
  const nl = map.lengths.length;
  const nv = map.variances.length;
  let used = 0;
  let usedWeight = 0;
  let edge = 0;
  let sumSq = 0;
  let meanLength = 0;
  let meanVariance = 0;
  const cells: { k: number; mean: Float64Array; std: Float64Array }[] = [];
  for (let k = 0; k < w.length; k++) {
    const wk = w[k];
    const i = Math.floor(k / nv);
    const j = k % nv;
    if ((i === 0 || i === nl - 1 || j === 0 || j === nv - 1) && (nl > 1 || nv > 1)) edge += wk;
    sumSq += wk * wk;
    meanLength += wk * map.lengths[i];
    meanVariance += wk * map.variances[j];
    if (!(wk >= minWeight)) continue;
    const s = computePosteriorSerial(problem, priorOfCell(prior, map.term, map.lengths[i], map.variances[j], options.axis)).summary;
    cells.push({ k, mean: s.mean, std: s.std });
    used++;
    usedWeight += wk;
  }
  if (used === 0) throw new InputError('evidence map', 'at least one cell with a finite log evidence', 'none');
  const n = cells[0].mean.length;
  const mean = new Float64Array(n);
  for (const c of cells) {
    const a = w[c.k] / usedWeight;
    for (let q = 0; q < n; q++) mean[q] += a * c.mean[q];
  }
  const variance = new Float64Array(n);
  for (const c of cells) {
    const a = w[c.k] / usedWeight;
    for (let q = 0; q < n; q++) {
      const dm = c.mean[q] - mean[q];
      variance[q] += a * (c.std[q] * c.std[q] + dm * dm);
    }
  }
  return {
    mean,
    std: variance.map(Math.sqrt),
    hyperPrior: hyper,
    weights: w,
    cellsUsed: used,
    skippedWeight: Math.max(0, 1 - usedWeight),
    edgeWeight: edge,
    effectiveCells: sumSq > 0 ? 1 / sumSq : 0,
    meanLength,
    meanVariance,
  };
}
