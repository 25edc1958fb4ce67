/** Small grids and a shown posterior for the figure-builder tests. */
import type { ShownPosterior } from '../../../src/app/posteriorView.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';

/** 3 cells along x, spacing 2 m, origin 10: centres 10, 12, 14. */
export const grid1: Grid = { shape: [3], spacing: [2], origin: [10], unit: 'm' };
/** 3 × 2 cells named x and depth, spacing 2 × 5 m, origin (1, 2.5). */
export const grid2: Grid = { shape: [3, 2], spacing: [2, 5], origin: [1, 2.5], unit: 'm', axes: ['x', 'depth'] };

/** A mean-only (partial) shown posterior on three cells, or a complete one with bands when `std` is given. */
export function shown(mean: number[], std: number[] | null = null): ShownPosterior {
  const n = mean.length;
  const m = Float64Array.from(mean);
  const summary = std
    ? ({
        mean: m,
        std: Float64Array.from(std),
        varianceReduction: Float64Array.from(std, (s) => 1 - s * s),
      } as unknown as ShownPosterior['summary'])
    : null;
  return {
    mean: m,
    priorMean: new Float64Array(n),
    priorStd: new Float64Array(n).fill(1),
    predicted: new Float64Array(0),
    residuals: new Float64Array(0),
    chi2: 0,
    dataCount: 0,
    fitReference: null,
    summary,
  };
}
