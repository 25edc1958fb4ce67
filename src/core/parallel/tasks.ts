/**
 * The messages of the products share of a block pool (./blocks.ts BlockPool.runProducts, run by
 * ./products.ts on each thread): plain, structured-clone-safe data. A module of types only, which
 * imports nothing from this folder, so the pool and the products code need not import each other.
 */
import type { Grid } from '../grid/grid.ts';
import type { Operator } from '../linalg/operator.ts';
import type { PriorSpec } from '../prior/spec.ts';

/** One share of the Bᵀ rows, plain data (structured-clone safe). */
export interface ProductsTask {
  readonly kind: 'products';
  /** Identifies the problem (G, grid) across calls, so a thread can keep its spectra and G. */
  readonly token: number;
  readonly grid: Grid;
  /** The prior's covariance shape (../inverse/structured.ts covarianceShape): the rows come out unscaled. */
  readonly prior: PriorSpec;
  /** G; null when the receiving thread already holds it under `token`. */
  readonly operator: Operator | null;
  /** Data rows of this share, pair p = (rows[2p], rows[2p+1]), in pairOrder. */
  readonly rows: Int32Array;
  /** Bytes this share may keep as cached spectra. */
  readonly cacheBytes: number;
  /** M × N Bᵀ to write rows in place (row rows[i] at rows[i]·N); null: return the rows. */
  readonly out: SharedArrayBuffer | null;
  /** Rows by direct sums over the shape's lag table (../inverse/lagProducts.ts) instead of circulant embedding. */
  readonly lag: boolean;
  /**
   * M × M K = G Bᵀᵀ of the shape, whose lower-triangle entries in this share's columns (its rows of Bᵀ) the thread
   * fills once its rows are done (../linalg/operator.ts sparseGramLowerInto); only with `out` and a sparse G, else null.
   */
  readonly gram: SharedArrayBuffer | null;
}

export interface ProductsResult {
  /** rows.length × N rows of Bᵀ in the task's row order, when the task had no `out`. */
  readonly rows: Float64Array | null;
  readonly spectraCached: boolean;
  /** Milliseconds in this thread (spectra, products without spectra, incl. profile and nugget). */
  readonly spectra: number;
  readonly products: number;
}
