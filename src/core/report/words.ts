/**
 * Plain-language words of the report (pure, no DOM; shared by the workbench and the command line):
 * the prior in sentences, the positive-definiteness verdict, the data-fit verdict against its
 * reference (src/core/inverse/fitReference.ts).
 */
import { kernelInfo, practicalRange } from '../kernels/correlation.ts';
import type { Term } from '../kernels/spec.ts';
import { termSmoothness } from '../kernels/table.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Diagnostics } from '../prior/diagnostics.ts';
import type { DataFitReference } from '../inverse/fitReference.ts';
import type { DiscrepancyResult, PriorCriteria } from '../tuning/criteria.ts';
import { hyperPriorWords, type AveragedPosterior } from '../tuning/averaged.ts';

/** Where the observed χ² lies against its reference, and what that says (our wording). */
export interface FitVerdict {
  readonly position: 'inside' | 'above' | 'below';
  readonly text: string;
}

/**
 * The data-fit verdict: χ² of the posterior mean against the central 95% interval of its own
 * distribution under the model (expected value M − tr R, not M; src/core/inverse/fitReference.ts).
 */
export function fitVerdict(chi2: number, ref: DataFitReference): FitVerdict {
  if (chi2 > ref.interval95[1]) {
    return {
      position: 'above',
      text: 'above: the data are fitted worse than these errors and this prior lead one to expect (errors understated, or a prior too stiff or of the wrong shape)',
    };
  }
  if (chi2 < ref.interval95[0]) {
    return {
      position: 'below',
      text: 'below: the data are fitted more closely than these errors and this prior lead one to expect (errors overstated, or a prior wider than the data support)',
    };
  }
  return { position: 'inside', text: 'inside: the misfit is what these errors and this prior lead one to expect' };
}

/**
 * A tail probability for display: 3 significant digits; below 1e-8 as "< 1e-8" and above 1 − 1e-8 as
 * "> 1 − 1e-8" (the quadrature's
 * absolute accuracy is about 1e-10, so smaller values carry no digits worth showing).
 */
export function formatTail(p: number): string {
  if (p < 1e-8) return '< 1e-8';
  if (p > 1 - 1e-8) return '> 1 − 1e-8';
  return p < 1e-3 ? p.toExponential(2) : String(Number(p.toPrecision(3)));
}

/** The data-fit reference rows: expected χ², its 95% interval, the tail probability, the verdict and what it rests on. */
export function fitReferenceRows(chi2: number, ref: DataFitReference | null): [string, string][] {
  if (!ref) return [['Reference for χ²', 'not available (no data)']];
  return [
    [
      'Reference for χ²',
      `expected ${g4(ref.expected)} (M − tr R, tr R = resolved parameters), 95% interval ${g4(ref.interval95[0])} – ${g4(ref.interval95[1])}, P(χ² ≥ observed) = ${formatTail(ref.upperTail)}; weighted sum of χ²₁, weights eig(L⁻¹ Cd L⁻ᵀ), not χ²_M; Imhof (1961)`,
    ],
    ['Fit', fitVerdict(chi2, ref).text],
  ];
}

/** Four significant digits for the report's tables and sentences (non-finite values as they are). */
export const g4 = (x: number): string => (Number.isFinite(x) ? Number(x.toPrecision(4)).toString() : String(x));

/** One sentence per term, with the practical range (distance where ρ = 0.05) of its kernel. */
export function termInWords(t: Term, lengthUnit: string, valueUnit: string): string {
  const nu = termSmoothness(t);
  const kernel = nu !== undefined ? `${kernelInfo(t.kernel).label} (ν = ${g4(nu)})` : t.kernel;
  const pr = practicalRange(t.kernel, nu);
  const sd = `${g4(Math.sqrt(t.variance))}${valueUnit ? ' ' + valueUnit : ''}`;
  const u = lengthUnit ? ` ${lengthUnit}` : '';
  if (t.lengths) {
    const [a, b] = t.lengths;
    return `${kernel} correlation, standard deviation ${sd}, lengths ${g4(a)}${u} and ${g4(b)}${u} at ${g4(t.angle ?? 0)}°; correlation falls to 0.05 at ${g4(pr * a)}${u} and ${g4(pr * b)}${u}.`;
  }
  const l = t.length;
  return `${kernel} correlation, standard deviation ${sd}, length ${g4(l)}${u}; correlation falls to 0.05 at ${g4(pr * l)}${u}.`;
}

export function priorInWords(prior: PriorSpec, lengthUnit: string, valueUnit: string): string[] {
  const m = prior.mean;
  const mean =
    'constant' in m
      ? `Mean: constant ${g4(m.constant)}${valueUnit ? ' ' + valueUnit : ''}.`
      : 'values' in m
        ? 'Mean: given cell by cell.'
        : `Mean: linear trend, intercept ${g4(m.trend.intercept)}, slope ${Array.from(m.trend.slope, g4).join(', ')}.`;
  const out = [mean, ...prior.terms.map((t, i) => `Term ${i + 1}: ${termInWords(t, lengthUnit, valueUnit)}`)];
  out.push(`Nugget (uncorrelated variance): ${g4(prior.nugget ?? 0)}.`);
  return out;
}

export const VERDICT_TEXT: Record<Diagnostics['verdict'], string> = {
  'positive-definite': 'yes, proven',
  'not-positive-definite': 'no, proven',
  'not-decided': 'not decided',
};

export const DECIDED_BY_TEXT: Record<Diagnostics['decidedBy'], string> = {
  cholesky: 'Cholesky factorisation of the dense Cm',
  'fft-bracket': 'certified eigenvalue bound from the FFT embedding',
  'lanczos-ritz': 'a direction of negative variance (Lanczos)',
  none: 'no route could decide at this size',
};

/** The positive-definiteness rows: verdict with the route that decided it, extreme eigenvalue, condition number, jitter, warnings. */
export function pdRows(d: Diagnostics): [string, string][] {
  return [
    ['Positive definite', `${VERDICT_TEXT[d.verdict]} (${DECIDED_BY_TEXT[d.decidedBy]})${d.nextStep ? `; next step: ${d.nextStep}` : ''}`],
    ['What it rests on', d.basis],
    ['Smallest eigenvalue', g4(d.minEigenvalue)],
    ['Condition number', g4(d.conditionNumber)],
    ...(d.suggestedJitter !== null ? [['Suggested jitter', g4(d.suggestedJitter)] as [string, string]] : []),
    ...d.warnings.map((w, i) => [`Warning ${i + 1}`, w.message] as [string, string]),
  ];
}

/** The prior-selection criteria of one prior in rows (src/core/tuning/criteria.ts priorCriteria). */
export function criteriaRows(c: PriorCriteria): [string, string][] {
  const disc = (d: DiscrepancyResult) =>
    d.status === 'found'
      ? `variances × ${g4(d.scale)} would give χ² = ${g4(d.target)}`
      : d.status === 'mean-fits'
        ? 'the posterior mean fits below the target at any scale'
        : 'the target cannot be reached by scaling';
  return [
    ['log evidence', `${g4(c.logEvidence)} (natural log)`],
    ['leave-one-out log score', `${g4(c.leaveOneOut.logScore)} (Σᵢ log p(dᵢ | d₋ᵢ))`],
    ['discrepancy rule, χ² = M', disc(c.discrepancy)],
    ['discrepancy rule, χ² = M − tr R', disc(c.discrepancyExpected)],
    [
      'prior predictive check',
      `q/M = ${g4(c.priorPredictive.reduced)}, two-sided p = ${formatTail(c.priorPredictive.pTwoSided)}: ${c.priorPredictive.plausible ? 'the data are plausible under this prior' : 'the data are implausible under this prior'}`,
    ],
    ['when they disagree', c.explanation],
  ];
}

/** The averaged posterior's facts in rows (src/core/tuning/averaged.ts), against the chosen prior's posterior. */
export function averagedRows(
  a: AveragedPosterior,
  chosen: { readonly length: number; readonly variance: number; readonly mean: ArrayLike<number>; readonly std: ArrayLike<number> },
  lengthUnit: string,
  valueUnit: string,
): [string, string][] {
  let change = 0;
  let sMax = 0;
  for (let i = 0; i < a.mean.length; i++) {
    change = Math.max(change, Math.abs(a.mean[i] - chosen.mean[i]));
    sMax = Math.max(sMax, chosen.std[i]);
  }
  const lu = lengthUnit ? ` ${lengthUnit}` : '';
  const vu = valueUnit ? ` ${valueUnit}` : '';
  return [
    ['Hyper-prior', hyperPriorWords(a.hyperPrior)],
    [
      'Weights',
      `evidence × hyper-prior over the map's ${a.weights.length} cells; ${a.cellsUsed} cells above 1e-6 of the weight entered (skipped weight ${g4(a.skippedWeight)}); effective number of cells ${g4(a.effectiveCells)}`,
    ],
    [
      'Weighted length and variance',
      `${g4(a.meanLength)}${lu} and ${g4(a.meanVariance)} (the chosen prior: ${g4(chosen.length)}${lu} and ${g4(chosen.variance)})`,
    ],
    [
      "Weight on the map's edge",
      `${g4(a.edgeWeight)}${a.edgeWeight > 0.05 ? " — the map does not hold the evidence's mass; widen it" : ''}`,
    ],
    ['Averaged variance', "mean of the cells' variances + variance of their means (law of total variance)"],
    ['Largest change of the mean', `${g4(change)}${vu} (largest posterior std of the chosen prior ${g4(sMax)}${vu})`],
  ];
}
