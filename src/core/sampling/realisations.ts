/** STUB — replaced by the sampling owner. Signatures are the contract. */
import type { Grid } from '../grid/grid.ts';
import type { Matrix } from '../linalg/matrix.ts';
import type { PriorSpec } from '../prior/spec.ts';

/** `count` prior realisations m0 + L z, one per row (count × N); same seed, same numbers everywhere. */
export function priorRealisations(_grid: Grid, _prior: PriorSpec, _count: number, _seed: number): Matrix {
  throw new Error('priorRealisations: not implemented yet');
}
