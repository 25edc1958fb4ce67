/**
 * The prior correlation of one cell with every cell, Cm[i][j] / √(Cm[i][i] Cm[j][j]), for the volume and cells
 * screens: one row of Cm without forming it (src/core/prior/cells.ts covarianceRow, O(N) kernel evaluations per term).
 */
import type { Geometry } from '../../core/grid/grid.ts';
import { covarianceRow } from '../../core/prior/cells.ts';
import { priorVariance } from '../../core/prior/covariance.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';

/** The correlation row of cell i; null when the prior is invalid (being edited into shape). */
export function correlationWith(g: Geometry, prior: PriorSpec, i: number): Float64Array | null {
  let v: Float64Array;
  try {
    v = priorVariance(g, prior);
  } catch {
    return null;
  }
  const row = covarianceRow(g, prior, i);
  return row.map((c, j) => c / Math.sqrt(v[i] * v[j]));
}
