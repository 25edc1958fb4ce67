/**
 * Starting values that several slices of the workbench store need (the problem, prior, results and
 * session slices): a module that imports no slice, so the slices need not import each other's values.
 */
import type { Term } from '../core/kernels/spec.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import { geometryScale, gridBounds } from '../core/problems/geometry.ts';
import { type Geometry, isCellList } from '../core/grid/grid.ts';
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

const middles = new WeakMap<Geometry, number>();

/**
 * The cell a one-screen view (a volume, a cell list) shows before the user chooses one: the middle of the grid
 * (a 1-D or 2-D grid keeps cell 0, as its screens always did), or the centre nearest the middle of a cell list's box.
 */
export function startCell(g: Geometry): number {
  const known = middles.get(g);
  if (known !== undefined) return known;
  let cell = 0;
  if (isCellList(g)) {
    const b = gridBounds(g);
    const mid = [b.x, b.y, b.z ?? ([0, 0] as const)].map(([lo, hi]) => (lo + hi) / 2);
    let best = Number.POSITIVE_INFINITY;
    for (let i = 0; i < g.x.length; i++) {
      const d = (g.x[i] - mid[0]) ** 2 + (g.y[i] - mid[1]) ** 2 + (g.z[i] - mid[2]) ** 2;
      if (d < best) {
        best = d;
        cell = i;
      }
    }
  } else if (g.shape.length === 3) {
    const [nx, ny, nz] = g.shape;
    cell = Math.floor(nx / 2) + nx * (Math.floor(ny / 2) + ny * Math.floor(nz / 2));
  }
  middles.set(g, cell);
  return cell;
}
