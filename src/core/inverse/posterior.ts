/** STUB — replaced by the inverse/ owner. Signatures are the contract. */
import type { Matrix } from '../linalg/matrix.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';
import type { PosteriorSummary } from './types.ts';

/** Factorised posterior for one (problem, prior): holds Cm Gᵀ, the Cholesky factor of K, α = K⁻¹ r. */
export interface PosteriorState {
  readonly problem: Problem;
  readonly prior: PriorSpec;
}

export function preparePosterior(_problem: Problem, _prior: PriorSpec): PosteriorState {
  throw new Error('preparePosterior: not implemented yet');
}

export function posteriorSummary(_state: PosteriorState, _options?: { fullCovariance?: boolean }): PosteriorSummary {
  throw new Error('posteriorSummary: not implemented yet');
}

/** Row `cell` of the resolution matrix R = Cm Gᵀ K⁻¹ G (the averaging kernel of that cell), length N. */
export function resolutionRow(_state: PosteriorState, _cell: number): Float64Array {
  throw new Error('resolutionRow: not implemented yet');
}

/** `count` exact posterior realisations, one per row (count × N). */
export function posteriorRealisations(_state: PosteriorState, _count: number, _seed: number): Matrix {
  throw new Error('posteriorRealisations: not implemented yet');
}
