/**
 * Colour scales and colour ranges that tell the truth (pure, no DOM; test/app/colourScales.test.ts).
 *
 * - Signed fields (realisations, the posterior mean, residuals) vary around a reference value (the
 *   prior mean, or 0 for residuals): a diverging scale, symmetric about that reference, so equal
 *   departures above and below read as equally strong and the reference is the neutral colour.
 * - Non-negative magnitudes (standard deviation, variance reduction) on a sequential scale from 0.
 * - Fields compared side by side (prior and posterior realisations, the posterior mean, pinned
 *   candidates) share one range, unless the user fixes the limits by hand.
 * Diverging for signed data, sequential for magnitudes: common practice in cartography (Brewer's
 * colour-scheme types), no source quoted here.
 */

export { DIVERGING, SEQUENTIAL } from '../core/report/colours.ts';

/** A colour range [low, high]. */
export type Range = readonly [number, number];

/**
 * The reference of a signed field: a single number when the prior mean is the same in every cell
 * (the field is drawn as it is, the scale centred on that value), else null (the field is drawn as
 * its departure from the prior mean, centred on 0; see {@link signedView}).
 */
export function constantValue(values: ArrayLike<number>): number | null {
  if (values.length === 0) return null;
  const v0 = values[0];
  const tol = 1e-12 * Math.max(1, Math.abs(v0));
  for (let i = 1; i < values.length; i++) if (Math.abs(values[i] - v0) > tol) return null;
  return v0;
}

/** A signed field as drawn: its values, the centre of its scale, and whether it is a departure from the prior mean. */
export interface SignedView {
  readonly values: Float64Array;
  readonly centre: number;
  readonly perturbation: boolean;
}

/**
 * A field against the prior mean: as it is with the scale centred on the constant mean, or as the
 * perturbation field − prior mean (centre 0) when the mean varies from cell to cell (a trend or
 * explicit values), since no single colour could stand for such a mean.
 */
export function signedView(field: ArrayLike<number>, priorMean: ArrayLike<number>): SignedView {
  if (field.length !== priorMean.length)
    throw new RangeError(`signedView: field has ${field.length} values, prior mean ${priorMean.length}`);
  const c = constantValue(priorMean);
  if (c !== null) return { values: Float64Array.from(field), centre: c, perturbation: false };
  const out = new Float64Array(field.length);
  for (let i = 0; i < out.length; i++) out[i] = field[i] - priorMean[i];
  return { values: out, centre: 0, perturbation: true };
}

/**
 * The symmetric range [c − a, c + a] with a the largest |value − c| over all the fields (non-finite
 * values skipped). A zero spread gives a = 1e-12·max(1, |c|) so the range is never empty.
 */
export function divergingRange(fields: readonly ArrayLike<number>[], centre: number): Range {
  let a = 0;
  for (const f of fields) {
    for (let i = 0; i < f.length; i++) {
      const d = Math.abs(f[i] - centre);
      if (Number.isFinite(d) && d > a) a = d;
    }
  }
  if (a === 0) a = 1e-12 * Math.max(1, Math.abs(centre));
  return [centre - a, centre + a];
}

/** [0, largest value] over the fields for a non-negative magnitude (never empty). */
export function sequentialRange(fields: readonly ArrayLike<number>[]): Range {
  let hi = 0;
  for (const f of fields) {
    for (let i = 0; i < f.length; i++) {
      const v = f[i];
      if (Number.isFinite(v) && v > hi) hi = v;
    }
  }
  return [0, hi > 0 ? hi : 1];
}

/** Limits fixed by hand: the half-width of the diverging range around its centre, or null for automatic. */
export interface ManualLimits {
  readonly half: number | null;
}

/** The range drawn: the automatic one, or centre ± the half-width fixed by hand. */
export function effectiveRange(auto: Range, centre: number, manual: ManualLimits): Range {
  if (manual.half === null || !(manual.half > 0) || !Number.isFinite(manual.half)) return auto;
  return [centre - manual.half, centre + manual.half];
}

/** Fraction of values outside a range (shown when limits fixed by hand clip the field). */
export function clippedFraction(fields: readonly ArrayLike<number>[], range: Range): number {
  let n = 0;
  let out = 0;
  for (const f of fields) {
    for (let i = 0; i < f.length; i++) {
      n++;
      if (f[i] < range[0] || f[i] > range[1]) out++;
    }
  }
  return n === 0 ? 0 : out / n;
}

/**
 * Plot height (px) that draws a map of physical extent width × height at true aspect ratio in a
 * figure `figureWidth` px wide with the given margins, clamped to [minH, maxH]. Axes with
 * `scaleanchor` then keep the ratio, and the figure has no empty band above or below the map.
 */
export function trueAspectHeight(
  extent: readonly [number, number],
  figureWidth: number,
  margins: { l: number; r: number; t: number; b: number },
  minH = 120,
  maxH = 520,
): number {
  const plotW = Math.max(40, figureWidth - margins.l - margins.r);
  const h = (plotW * extent[1]) / extent[0] + margins.t + margins.b;
  return Math.round(Math.min(maxH, Math.max(minH, h)));
}

/**
 * Shared ranges for pinned candidates' maps: one diverging range for their signed fields (posterior
 * means, realisations) centred on the prior mean when every candidate has the same constant mean
 * (else on the midpoint of all values), or that centre ± the half-width fixed by hand; one
 * sequential range [0, max] for their standard deviations.
 */
export function candidateRanges(
  items: readonly { prior: { mean: object }; signed: readonly ArrayLike<number>[]; std: ArrayLike<number> }[],
  manual: ManualLimits,
): { signed: Range; std: Range; centre: number } {
  const means = items.map((i) => ('constant' in i.prior.mean ? (i.prior.mean as { constant: number }).constant : null));
  const fields = items.flatMap((i) => i.signed);
  let centre: number;
  const first = means[0];
  if (means.length > 0 && first !== null && means.every((m) => m === first)) centre = first;
  else {
    let lo = Infinity;
    let hi = -Infinity;
    for (const f of fields) {
      for (let k = 0; k < f.length; k++) {
        const v = f[k];
        if (!Number.isFinite(v)) continue;
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
    }
    centre = Number.isFinite(lo) ? (lo + hi) / 2 : 0;
  }
  return { signed: effectiveRange(divergingRange(fields, centre), centre, manual), std: sequentialRange(items.map((i) => i.std)), centre };
}
