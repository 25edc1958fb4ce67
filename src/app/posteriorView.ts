/**
 * What the posterior and data-fit screens draw, from the store's complete result and the partial
 * (mean-first) one: the newest mean always, the bands only when they belong to that mean. Pure
 * functions, so the screens stay thin and the rules are tested without a DOM.
 */
import { assertNever } from '../core/errors.ts';
import type { DataFitReference } from '../core/inverse/fitReference.ts';
import type { PosteriorSummary } from '../core/inverse/types.ts';
import type { PosteriorPartial, PosteriorResult } from '../worker/protocol.ts';

export interface ShownPosterior {
  readonly mean: Float64Array;
  readonly priorMean: Float64Array;
  readonly priorStd: Float64Array;
  readonly predicted: Float64Array;
  readonly residuals: Float64Array;
  readonly chi2: number;
  readonly dataCount: number;
  /** χ²'s distribution under the model (src/core/inverse/fitReference.ts); null until the complete result arrives. */
  readonly fitReference: DataFitReference | null;
  /** The complete summary with the bands, or null while they are computed (or after they failed). */
  readonly summary: PosteriorSummary | null;
}

/**
 * The partial wins over the complete result: the store clears it when a full result arrives, so
 * while it is set it is newer than `posterior` (whose bands belong to an older prior).
 */
export function shownPosterior(posterior: PosteriorResult | null, partial: PosteriorPartial | null): ShownPosterior | null {
  if (partial) {
    const { mean, priorMean, priorStd, predicted, residuals, chi2, dataCount } = partial;
    return { mean, priorMean, priorStd, predicted, residuals, chi2, dataCount, fitReference: null, summary: null };
  }
  if (!posterior) return null;
  const s = posterior.summary;
  return {
    mean: s.mean,
    priorMean: posterior.priorMean,
    priorStd: s.priorStd,
    predicted: s.predicted,
    residuals: s.residuals,
    chi2: s.chi2,
    dataCount: s.dataCount,
    fitReference: s.fitReference ?? null,
    summary: s,
  };
}

/** State of the uncertainty bands of the drawn mean. */
export type BandsState = 'shown' | 'computing' | 'failed' | 'none';

export function bandsState(
  posterior: PosteriorResult | null,
  partial: PosteriorPartial | null,
  busy: boolean,
  error: string | null,
): BandsState {
  if (partial) return error !== null && !busy ? 'failed' : 'computing';
  return posterior ? 'shown' : 'none';
}

/** Status text of the bands (our wording), or null when nothing needs saying. */
export function bandsText(state: BandsState): string | null {
  switch (state) {
    case 'computing':
      return 'Uncertainty bands: computing…';
    case 'failed':
      return 'Uncertainty bands: not available for this prior (see the message above); the posterior mean is shown.';
    case 'shown':
    case 'none':
      return null;
    default:
      return assertNever(state, 'bands state');
  }
}

/** What the reference rests on, for tooltips and the report. */
export const FIT_REFERENCE_BASIS =
  'Reference: under the model, χ² of the posterior mean is a weighted sum of χ²₁ terms with weights the eigenvalues of L⁻¹ Cd L⁻ᵀ (K = G Cm Gᵀ + Cd = L Lᵀ), ' +
  'mean M − tr R (M minus the resolved parameters), not χ²_M: the posterior mean also fits part of the noise. Interval and tail probability by Imhof (1961) numerical inversion.';

export { fitVerdict, formatTail, type FitVerdict } from '../core/report/words.ts';
