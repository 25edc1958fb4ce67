/** STUB — replaced by the prior/covariance owner. Signatures are the contract. */
import type { Grid } from '../grid/grid.ts';
import type { Matrix } from '../linalg/matrix.ts';
import type { PriorSpec } from './spec.ts';

/** Dense prior covariance Cm (N × N) on the grid. */
export function covarianceMatrix(_grid: Grid, _prior: PriorSpec): Matrix {
  throw new Error('covarianceMatrix: not implemented yet');
}

/** Mean model m0 (length N). */
export function meanVector(_grid: Grid, _prior: PriorSpec): Float64Array {
  throw new Error('meanVector: not implemented yet');
}

/** Throws InputError (field path + value) unless the prior is valid for this grid. */
export function validatePrior(_prior: PriorSpec, _grid: Grid): void {
  throw new Error('validatePrior: not implemented yet');
}
