/**
 * Which posterior path runs: the dense one (./posterior.ts: Cm as an N × N matrix) or the
 * structured FFT one (./structured.ts: Cm·v by circulant embedding). Both compute the same
 * data-space formulas (Tarantola 2005, Inverse Problem Theory, §3.2) and agree to round-off, so
 * the choice is a matter of speed and memory only.
 *
 * Rule (`auto`): FFT when the prior is stationary on the grid (../fft/covariance.ts
 * nonStationaryReason) and N ≥ {@link FFT_MIN_CELLS}; dense otherwise.
 * Measured on the project machine (2 cores, shared; CPU-time minima of 7 runs, mean + std + χ² +
 * evidence; Matérn ν = 1.5, length N/8; M ≈ N/8 data):
 *   - N ≤ 64 (1-D and 2-D): dense 0.06–0.25 ms, FFT 0.1–0.5 ms: dense is faster, both negligible;
 *   - N = 128 (1-D): dense 0.30–0.37 ms, FFT 0.21–0.32 ms: the crossing;
 *   - N = 256…576: FFT 1.0–1.9× faster; N = 512 with a dense G: dense 12.1 ms, FFT 4.6 ms;
 *   - the demos (load average 7–10, wall medians): borehole-log N = 200, M = 50: dense 26 ms, FFT
 *     9 ms (2 ms with cached spectra); potential-field N = 800, M = 40: 33 / 26 / 10 ms;
 *     crosshole-tomography N = 1024, M = 256: 443 / 317 / 234 ms; 1-D N = 1000, M = 100: 53 / 50 /
 *     29 ms; 64 × 64, M = 400: 3.1 s / 1.5 s / 1.3 s. Above that the dense route needs N² doubles
 *     (2 GB at 128²) and the FFT path is the only one that fits.
 * The FFT side wins more with a warm spectrum cache (a prior change on the same problem), so the
 * threshold sits at the measured cold crossing. See test/core/inverse/auto.test.ts.
 *
 * PUBLIC API: PathRequest, PATH_REQUESTS, FFT_MIN_CELLS, PathDecision, choosePosteriorPath. The
 * posterior itself, on the chosen route, comes from ./compute.ts computePosterior.
 */
import { lagProductsPreferred } from './lagProducts.ts';
import { assertNever, InputError } from '../errors.ts';
import { cellCount, type Geometry, isCellList } from '../grid/grid.ts';
import { nonStationaryReason } from '../fft/covariance.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from '../problems/spec.ts';

export type PathRequest = 'auto' | 'dense' | 'fft';
export const PATH_REQUESTS: readonly PathRequest[] = ['auto', 'dense', 'fft'];

/** Smallest N for which `auto` picks the FFT path (measured crossing; see the module comment). */
export const FFT_MIN_CELLS = 128;

/**
 * Largest N the dense route accepts: it holds Cm as N × N doubles (8 N² bytes, 2 GiB at 16 384
 * cells) plus a factor of the same size, beyond what a laptop or a browser tab holds, and past
 * 46 341 cells N² exceeds the largest typed array ("Invalid typed array length" before this limit).
 */
export const DENSE_MAX_CELLS = 16_384;

function denseTooLarge(n: number, field: string, requested: PathRequest, alternative: string): InputError {
  const gib = ((8 * n * n) / 2 ** 30).toFixed(n * n * 8 < 2 ** 31 ? 2 : 0);
  return new InputError(
    field,
    `${alternative} for ${n} cells: the dense route holds Cm as an N × N matrix (${gib} GiB here) and is limited to ${DENSE_MAX_CELLS} cells`,
    requested,
  );
}

/**
 * Largest data × cells product on any route: both hold Bᵀ = G Cm (or its rows) as M × N doubles,
 * 2 GiB at 2²⁸ (1,000 data on 10⁶ cells, 8 GB, used to grow without limit).
 */
export const MAX_DATA_CELLS = 2 ** 28;

export interface PathDecision {
  readonly path: 'dense' | 'fft';
  /** One sentence on why (for logs, the CLI's stderr and the UI). */
  readonly reason: string;
}

/** How the FFT route will form the rows of Bᵀ when they are not transforms (./lagProducts.ts), for the reason. */
function rowsNote(problem: Problem<Geometry>): string {
  if (isCellList(problem.grid) || !lagProductsPreferred(problem.operator, problem.grid)) return '';
  return '; rows of G Cm summed from the lag table (few non-zeros per row of G on a 3-D grid)';
}

/**
 * The path for (problem, prior) under `requested`. Throws InputError(field, …) when 'fft' is
 * requested for a prior the FFT path cannot represent (`field` names where the request came
 * from, e.g. '--path').
 */
export function choosePosteriorPath(
  problem: Problem<Geometry>,
  prior: PriorSpec,
  requested: PathRequest = 'auto',
  field = 'path',
): PathDecision {
  // A cell list has no regular offsets, so no circulant embedding: the dense route, with this reason.
  const why = isCellList(problem.grid)
    ? `a cell list (${cellCount(problem.grid)} centres) has no regular grid for the FFT`
    : nonStationaryReason(problem.grid, prior);
  const n = cellCount(problem.grid);
  const m = problem.data.values.length;
  if (m * n > MAX_DATA_CELLS) {
    throw new InputError(
      'data',
      `at most ${MAX_DATA_CELLS} data × cells (G Cm is held as M × N doubles, 2 GiB at the limit; here ${m} data × ${n} cells, ${((8 * m * n) / 2 ** 30).toFixed(1)} GiB; use fewer data or a coarser grid)`,
      m * n,
    );
  }
  switch (requested) {
    case 'dense':
      if (n > DENSE_MAX_CELLS) {
        throw denseTooLarge(
          n,
          field,
          requested,
          why === null
            ? '"fft" or "auto" (the FFT route holds no N × N matrix)'
            : `a problem of at most ${DENSE_MAX_CELLS} cells (the FFT route cannot run either: ${why})`,
        );
      }
      return { path: 'dense', reason: 'dense path requested' };
    case 'fft':
      if (why !== null)
        throw new InputError(
          field,
          `"dense" or "auto" for this problem (the FFT path needs a stationary prior on a regular 1-D, 2-D or 3-D grid: ${why})`,
          'fft',
        );
      return { path: 'fft', reason: `FFT path requested${rowsNote(problem)}` };
    case 'auto':
      if (why !== null) {
        if (n > DENSE_MAX_CELLS)
          throw denseTooLarge(n, field, requested, `a problem of at most ${DENSE_MAX_CELLS} cells (the FFT route cannot run: ${why})`);
        return { path: 'dense', reason: `dense: ${why}` };
      }
      if (n < FFT_MIN_CELLS) return { path: 'dense', reason: `dense: ${n} cells, below ${FFT_MIN_CELLS} the dense path is as fast` };
      return { path: 'fft', reason: `FFT: stationary prior on a regular grid of ${n} cells (≥ ${FFT_MIN_CELLS})${rowsNote(problem)}` };
    default:
      return assertNever(requested);
  }
}
