/**
 * Starting values that several slices of the workbench store need (the problem, prior, results and
 * session slices): a module that imports no slice, so the slices need not import each other's values.
 */
import type { Term } from '../core/kernels/spec.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import { geometryScale } from '../core/problems/geometry.ts';
import type { ProblemView } from '../worker/protocol.ts';

/** Realisations drawn per request (prior and posterior). */
export const DRAW_COUNT = 6;

/** The generic prior, used only when a problem brings none and the starting-prior rule failed: one exponential term, a tenth of the extent. */
export function defaultPrior(problem: ProblemView): PriorSpec {
  return { mean: { constant: 0 }, terms: [defaultTerm(problem)], nugget: 0 };
}

export function defaultTerm(problem: ProblemView): Term {
  const length = roundTo2(geometryScale(problem.grid).extent / 10);
  return { kernel: 'exponential', variance: 1, length };
}

/**
 * The term "+ Add term" adds: an exponential of a tenth of the grid extent (as {@link defaultTerm})
 * whose variance is on the scale of the prior being edited: the mean of the existing terms'
 * variances, or with no terms the problem's starting variance (1 only when neither exists), so a new
 * term never arrives with variance 1 beside terms of 0.001. Rounded to 2 significant digits.
 */
export function addedTerm(terms: readonly Term[], problem: ProblemView): Term {
  const base = defaultTerm(problem);
  const start = problem.startPrior?.terms[0]?.variance;
  const variance = terms.length > 0 ? terms.reduce((a, t) => a + t.variance, 0) / terms.length : (start ?? base.variance);
  return { ...base, variance: Number(variance.toPrecision(2)) };
}

function roundTo2(x: number): number {
  const p = 10 ** Math.floor(Math.log10(x));
  return (Math.round((x / p) * 10) / 10) * p;
}
