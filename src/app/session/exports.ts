/**
 * Export files built from the store's results, as pure functions returning names and bytes
 * (downloaded by ./download.ts). Formats are the core's writers (src/core/io):
 *   prior.json            the prior file (kind "priorscope.prior"), reads back to the same spec
 *   posterior.csv / .npy  one row per cell: x (, y), mean, std — .npy holds (N, 2) [mean, std]
 *   prior-draws.csv/.npy, posterior-draws.csv/.npy   one row per cell, one column per draw (N, K)
 * Cells are in the grid's flat order (x fastest, index ix + nx·iy), as in the problem file.
 */
import { writePriorFile } from '../../core/io/priorFile.ts';
import { writeCsv } from '../../core/io/csv.ts';
import { writeNpy } from '../../core/io/npy.ts';
import { cellCoordinates, cellCount, gridDimension, type Grid } from '../../core/grid/grid.ts';
import { matrix, transpose, type Matrix } from '../../core/linalg/matrix.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import type { PosteriorSummary } from '../../core/inverse/types.ts';

export interface ExportFile {
  readonly name: string;
  readonly mime: string;
  readonly bytes: Uint8Array;
}

const text = (name: string, mime: string, s: string): ExportFile => ({ name, mime, bytes: new TextEncoder().encode(s) });
const NPY = 'application/octet-stream';

export function priorExport(prior: PriorSpec): ExportFile {
  return text('prior.json', 'application/json', writePriorFile(prior, 'prior.json'));
}

function coordinateColumns(grid: Grid): { names: string[]; cols: Float64Array[] } {
  const { x, y } = cellCoordinates(grid);
  return gridDimension(grid) === 2 ? { names: ['x', 'y'], cols: [x, y] } : { names: ['x'], cols: [x] };
}

function columns(cols: readonly ArrayLike<number>[]): Matrix {
  const n = cols[0].length;
  const m = matrix(n, cols.length);
  for (let i = 0; i < n; i++) for (let j = 0; j < cols.length; j++) m.data[i * cols.length + j] = cols[j][i];
  return m;
}

export function posteriorCsv(grid: Grid, s: PosteriorSummary): ExportFile {
  const c = coordinateColumns(grid);
  return text('posterior.csv', 'text/csv', writeCsv(columns([...c.cols, s.mean, s.std]), [...c.names, 'mean', 'std']));
}

export function posteriorNpy(s: PosteriorSummary): ExportFile {
  return { name: 'posterior.npy', mime: NPY, bytes: writeNpy([s.mean.length, 2], columns([s.mean, s.std]).data) };
}

/** Draws come as K × N (one row per draw); the files hold N × K (one row per cell). */
export function drawsCsv(grid: Grid, draws: Matrix, which: 'prior' | 'posterior'): ExportFile {
  if (draws.cols !== cellCount(grid)) throw new RangeError(`drawsCsv: ${draws.cols} values per draw for ${cellCount(grid)} cells`);
  const c = coordinateColumns(grid);
  const cols: ArrayLike<number>[] = [...c.cols];
  for (let k = 0; k < draws.rows; k++) cols.push(draws.data.subarray(k * draws.cols, (k + 1) * draws.cols));
  const names = [...c.names, ...Array.from({ length: draws.rows }, (_, k) => `draw${k + 1}`)];
  return text(`${which}-draws.csv`, 'text/csv', writeCsv(columns(cols), names));
}

export function drawsNpy(draws: Matrix, which: 'prior' | 'posterior'): ExportFile {
  const t = transpose(draws);
  return { name: `${which}-draws.npy`, mime: NPY, bytes: writeNpy([t.rows, t.cols], t.data) };
}
