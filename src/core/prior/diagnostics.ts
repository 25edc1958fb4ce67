/** STUB — replaced by the prior/diagnostics owner. Signatures are the contract. */
import type { Grid } from '../grid/grid.ts';
import type { Matrix } from '../linalg/matrix.ts';
import type { PriorSpec } from './spec.ts';

export interface DiagnosticWarning {
  /** Stable machine code, e.g. "gaussian-long-length", "spherical-dimension", "near-singular". */
  readonly code: string;
  /** One plain-language sentence for the user. */
  readonly message: string;
}

export interface Diagnostics {
  readonly positiveDefinite: boolean;
  /** Zero-based row where the Cholesky factorisation failed, null when it factors. */
  readonly failedPivot: number | null;
  readonly minEigenvalue: number;
  readonly maxEigenvalue: number;
  /** λmax / λmin (Infinity when λmin ≤ 0). */
  readonly conditionNumber: number;
  readonly eigenvalueMethod: 'exact' | 'lanczos';
  /** Smallest diagonal jitter (variance units, to add to the nugget) that makes Cm factor and brings it
   *  below the near-singular threshold; null when none is needed. */
  readonly suggestedJitter: number | null;
  /** The same jitter relative to the mean prior variance (a decade from 1e-12 upwards). */
  readonly suggestedJitterRelative: number | null;
  readonly warnings: readonly DiagnosticWarning[];
}

export function diagnoseCovariance(_c: Matrix, _context?: { grid: Grid; prior: PriorSpec }): Diagnostics {
  throw new Error('diagnoseCovariance: not implemented yet');
}

export function diagnosePrior(_grid: Grid, _prior: PriorSpec): Diagnostics {
  throw new Error('diagnosePrior: not implemented yet');
}
