/**
 * The prior-selection part of the worker protocol: request and result types of the
 * tuning requests, kept here and spliced into ./protocol.ts's unions. Each kind is its own
 * latest-wins channel (the channel has the kind's name).
 *
 * Cancellation: a `cancel` message or a newer request of the same channel aborts a tuning request
 * that is already running, not only a waiting one (see ./tuningSignals.ts and ./tuning.ts).
 */
import type { Matrix } from '../core/linalg/matrix.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import type {
  CalibrationResult,
  EvidenceMap,
  EvidenceProfile,
  LogAxis,
  PriorCriteria,
  ProfileParameter,
  TypeIIResult,
} from '../core/tuning/index.ts';
import type { RequestBase } from './requestBase.ts';
import type { AveragedPosterior, AveragingMap, HyperPrior } from '../core/tuning/averaged.ts';

export const TUNING_KINDS = [
  'evidenceMap',
  'evidenceProfile',
  'typeII',
  'criteria',
  'calibration',
  'candidates',
  'crossCalibration',
  'averaged',
] as const;
export type TuningKind = (typeof TUNING_KINDS)[number];

export function isTuningKind(kind: string): kind is TuningKind {
  return (TUNING_KINDS as readonly string[]).includes(kind);
}

interface ForPrior {
  readonly problemVersion: number;
  readonly prior: PriorSpec;
}
interface ForCandidates {
  readonly problemVersion: number;
  readonly priors: readonly PriorSpec[];
}
interface Simulation {
  readonly replicates: number;
  readonly draws: number;
  readonly seed: number;
}

export type TuningRequest =
  | (RequestBase &
      ForPrior & { readonly kind: 'evidenceMap'; readonly term: number; readonly lengths: LogAxis; readonly variances: LogAxis })
  | (RequestBase & ForPrior & { readonly kind: 'evidenceProfile'; readonly which: ProfileParameter; readonly values: readonly number[] })
  | (RequestBase & ForPrior & { readonly kind: 'typeII'; readonly fixed: readonly string[] })
  | (RequestBase & ForPrior & { readonly kind: 'criteria' })
  | (RequestBase & ForPrior & Simulation & { readonly kind: 'calibration' })
  | (RequestBase & ForCandidates & { readonly kind: 'candidates'; readonly draws: number; readonly seed: number })
  | (RequestBase & ForCandidates & Simulation & { readonly kind: 'crossCalibration' })
  | (RequestBase & ForPrior & { readonly kind: 'averaged'; readonly map: AveragingMap; readonly hyperPrior: HyperPrior });

/** Scores and pictures of one pinned candidate (or why it could not be scored). */
export type CandidateScores =
  | {
      readonly ok: true;
      readonly logEvidence: number;
      /** Leave-one-out predictive log score Σ log p(d_i | d_−i). */
      readonly looLogScore: number;
      /** χ² of the posterior mean divided by its expected value under the model, M − tr R (src/core/inverse/fitReference.ts). */
      readonly chi2OverExpected: number;
      /** The central 95% interval of χ² under this candidate, divided by the same expected value (fitReference.ts). */
      readonly chi2Interval95OverExpected: readonly [number, number];
      /** P(χ² ≥ observed) under this candidate. */
      readonly chi2UpperTail: number;
      /** Prior predictive check: q/M and the two-sided p-value. */
      readonly predictiveReduced: number;
      readonly predictiveP: number;
      /** Condition number of Cm (src/core/prior/diagnostics.ts; a lower estimate on large grids). */
      readonly conditionNumber: number;
      readonly mean: Float64Array;
      readonly std: Float64Array;
      /** Posterior realisations, draws × N. */
      readonly draws: Matrix;
    }
  | { readonly ok: false; readonly error: string };

/** Coverage cross-table: truth from candidate i (row), inverted with candidate j (column). */
export interface CrossCalibration {
  readonly size: number;
  readonly coverage68: Float64Array;
  readonly coverage95: Float64Array;
  readonly replicates: number;
  readonly cancelled: boolean;
}

export interface TuningResultMap {
  evidenceMap: EvidenceMap;
  evidenceProfile: EvidenceProfile;
  typeII: TypeIIResult;
  criteria: PriorCriteria;
  calibration: CalibrationResult;
  candidates: readonly CandidateScores[];
  crossCalibration: CrossCalibration;
  averaged: AveragedPosterior;
}
