/**
 * Mean model m0 on the grid (./spec.ts):
 *   constant  m0_i = c
 *   values    m0_i = values[i]
 *   trend     m0_i = intercept + slope[0]·x_i (+ slope[1]·y_i in 2-D, + slope[2]·z_i in 3-D), absolute cell coordinates
 *             (origin included, see ../grid/grid.ts).
 */
import { cellCoordinates, cellCount, type Geometry } from '../grid/grid.ts';
import type { MeanKind, MeanSpec, PriorSpec } from './spec.ts';
import { validatePrior } from './validate.ts';

/** Mean model m0 (length N). Validates the prior first (InputError). */
export function meanVector(grid: Geometry, prior: PriorSpec): Float64Array {
  validatePrior(prior, grid);
  return evaluateMean(grid, prior.mean);
}

/** Which of the three mean forms a (validated) MeanSpec is. */
export function meanKind(mean: MeanSpec): MeanKind {
  if ('constant' in mean) return 'constant';
  if ('values' in mean) return 'values';
  return 'trend';
}

/** m0 for a validated mean spec. */
export function evaluateMean(grid: Geometry, mean: MeanSpec): Float64Array {
  const n = cellCount(grid);
  if ('constant' in mean) return new Float64Array(n).fill(mean.constant);
  if ('values' in mean) return Float64Array.from(mean.values);
  const { intercept, slope } = mean.trend;
  const { x, y, z } = cellCoordinates(grid);
  const a = slope[0];
  const b = slope[1] ?? 0;
  const out = new Float64Array(n);
  if (slope.length === 3) {
    const c = slope[2];
    for (let i = 0; i < n; i++) out[i] = intercept + a * x[i] + b * y[i] + c * z[i];
  } else for (let i = 0; i < n; i++) out[i] = intercept + a * x[i] + b * y[i];
  return out;
}
