/**
 * Result types of the linear-Gaussian posterior (data-space form; see ./posterior.ts).
 * PUBLIC API used by the worker, the CLI and the UI.
 */
import type { Matrix } from '../linalg/matrix.ts';
import type { DataFitReference } from './fitReference.ts';

export interface PosteriorSummary {
  /** Posterior mean m̃ = m0 + Cm Gᵀ K⁻¹ (d − G m0), K = G Cm Gᵀ + Cd. */
  readonly mean: Float64Array;
  /** Pointwise posterior standard deviation √diag(Cm − Cm Gᵀ K⁻¹ G Cm). */
  readonly std: Float64Array;
  /** Pointwise prior standard deviation √diag(Cm). */
  readonly priorStd: Float64Array;
  /** 1 − σ_post² / σ_prior² per cell. */
  readonly varianceReduction: Float64Array;
  /** G m̃. */
  readonly predicted: Float64Array;
  /** Normalised residuals: (d − G m̃)/σ for diagonal Cd, Ld⁻¹ (d − G m̃) for a full Cd = Ld Ldᵀ. */
  readonly residuals: Float64Array;
  /** Σ residuals². */
  readonly chi2: number;
  /**
   * The distribution of chi2 under the model (a weighted sum of χ²₁ with weights eig(L⁻¹ Cd L⁻ᵀ),
   * mean M − tr R; ./fitReference.ts): its expected value, central 95% interval and P(χ² ≥ chi2).
   * Null for M = 0; optional so that other paths may omit it.
   */
  readonly fitReference?: DataFitReference | null;
  /** log N(d; G m0, K), natural log, including −(M/2) log 2π. */
  readonly logEvidence: number;
  /** tr R, R = Cm Gᵀ K⁻¹ G (effective number of parameters resolved). */
  readonly resolutionTrace: number;
  /** (Optional so that other paths may omit it.) rᵀ K⁻¹ r with r = d − G m0: twice the Bayesian cost at m̃ (data misfit plus model penalty),
   *  χ²-distributed with M degrees of freedom when the prior and Cd are right. */
  readonly dataMisfit?: number;
  /** Central 95% interval of dataMisfit / M under the model: [q_χ²_M(0.025), q_χ²_M(0.975)] / M. */
  readonly reducedMisfitInterval95?: readonly [number, number];
  readonly dataCount: number;
  readonly parameterCount: number;
  readonly path: 'dense' | 'fft';
  /** Full posterior covariance, only when requested (small N). */
  readonly covariance?: Matrix;
}
