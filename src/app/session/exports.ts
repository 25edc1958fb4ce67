/**
 * Export files built from the store's results, as pure functions returning names and bytes
 * (downloaded by ./download.ts). Formats are the core's writers (src/core/io):
 *   prior.json            the prior file (kind "priorscope.prior"), reads back to the same spec
 *   posterior.csv / .npy  one row per cell: x (, y), mean, std — .npy holds (N, 2) [mean, std]
 *   TITLE-prior-realisations-K.csv/.npy (and posterior)   K realisations, one row per draw, one column per
 *                         cell (K × N), as `priorscope sample` writes them (CSV without a header), with
 *                         TITLE-…-K.grid.json beside them recording the grid, the seed and the layout
 * Cells are in the grid's flat order (x fastest, index ix + nx·iy), as in the problem file. TITLE is
 * the problem's title as a file name (fileStem).
 */
import { writePriorFile } from '../../core/io/priorFile.ts';
import { writeCsv } from '../../core/io/csv.ts';
import { float64Bytes, npyHeader, writeNpy } from '../../core/io/npy.ts';
import { cellCoordinates, cellCount, type Geometry, gridDimension, type Grid, isCellList } from '../../core/grid/grid.ts';
import { matrix, type Matrix } from '../../core/linalg/matrix.ts';
import { formatJson } from '../../core/io/json.ts';
import { type VtiField, writeVti } from '../../core/io/vti.ts';
import { varianceReduction } from '../figures/sections.ts';
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

function coordinateColumns(grid: Geometry): { names: string[]; cols: Float64Array[] } {
  const { x, y, z } = cellCoordinates(grid);
  const dim = gridDimension(grid);
  return { names: ['x', 'y', 'z'].slice(0, dim), cols: [x, y, z].slice(0, dim) };
}

function columns(cols: readonly ArrayLike<number>[]): Matrix {
  const n = cols[0].length;
  const m = matrix(n, cols.length);
  for (let i = 0; i < n; i++) for (let j = 0; j < cols.length; j++) m.data[i * cols.length + j] = cols[j][i];
  return m;
}

export function posteriorCsv(grid: Geometry, s: PosteriorSummary): ExportFile {
  const c = coordinateColumns(grid);
  return text('posterior.csv', 'text/csv', writeCsv(columns([...c.cols, s.mean, s.std]), [...c.names, 'mean', 'std']));
}

export function posteriorNpy(s: PosteriorSummary): ExportFile {
  return { name: 'posterior.npy', mime: NPY, bytes: writeNpy([s.mean.length, 2], columns([s.mean, s.std]).data) };
}

/**
 * A file-name stem from a title: lower-case letters and digits joined by single dashes, at most
 * `max` characters ("Gravity profile over a buried basin" → "gravity-profile-over-a-buried-basin");
 * accents are dropped, anything else separates words; `fallback` when nothing is left.
 */
export function fileStem(title: string, fallback = 'problem', max = 60): string {
  const plain = title
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase();
  const stem = plain
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, max)
    .replace(/-+$/, '');
  return stem === '' ? fallback : stem;
}

/** The base name of a realisation export: TITLE-prior-realisations-K. */
export function drawsName(title: string, which: 'prior' | 'posterior', count: number): string {
  return `${fileStem(title)}-${which}-realisations-${count}`;
}

/**
 * A large export as a list of byte parts, written one after the other (../session/download.ts makes
 * one Blob of them): no single string or buffer holds the whole file, so N realisations of a large
 * grid need about the memory of the draws plus one part.
 */
export interface ExportParts {
  readonly name: string;
  readonly mime: string;
  readonly parts: readonly Uint8Array[];
}

/** Values per part of a parted export (4 Mi values: about 32 MiB of .npy, 80 MiB of CSV text). */
export const PART_VALUES = 1 << 22;

/** Row blocks [from, to) of a rows × cols matrix with at most `perPart` values each (at least one row). */
function rowBlocks(rows: number, cols: number, perPart: number): [number, number][] {
  const step = Math.max(1, Math.floor(perPart / Math.max(1, cols)));
  const out: [number, number][] = [];
  for (let a = 0; a < rows; a += step) out.push([a, Math.min(rows, a + step)]);
  return out;
}

const rowsOf = (m: Matrix, a: number, b: number): Matrix => ({ rows: b - a, cols: m.cols, data: m.data.subarray(a * m.cols, b * m.cols) });

/** K draws × N cells as CSV, K lines of N numbers, no header (as `priorscope sample --format csv`), in parts of whole lines. */
export function drawsCsv(draws: Matrix, base: string, perPart = PART_VALUES): ExportParts {
  const enc = new TextEncoder();
  const parts = rowBlocks(draws.rows, draws.cols, perPart).map(([a, b]) => enc.encode(writeCsv(rowsOf(draws, a, b))));
  return { name: `${base}.csv`, mime: 'text/csv', parts };
}

/** K draws × N cells as a float64 .npy (as `priorscope sample --format npy`): the header, then the rows in parts. */
export function drawsNpy(draws: Matrix, base: string, perPart = PART_VALUES): ExportParts {
  const body = rowBlocks(draws.rows, draws.cols, perPart).map(([a, b]) => float64Bytes(rowsOf(draws, a, b).data));
  return { name: `${base}.npy`, mime: NPY, parts: [npyHeader([draws.rows, draws.cols]), ...body] };
}

/** The parts of a parted export joined (for tests and small files). */
export function joinParts(file: ExportParts): Uint8Array {
  const out = new Uint8Array(file.parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of file.parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

/** What lies beside the realisations: the grid (problem-file fields), the seed and how to read the rows. */
export function drawsGridFile(
  grid: Geometry,
  draws: Matrix,
  which: 'prior' | 'posterior',
  seed: number,
  base: string,
  title: string,
): ExportFile {
  if (draws.cols !== cellCount(grid)) throw new RangeError(`drawsGridFile: ${draws.cols} values per draw for ${cellCount(grid)} cells`);
  const record = {
    kind: 'priorscope.realisations',
    version: 1,
    problem: title,
    which,
    count: draws.rows,
    seed,
    layout: `draws × cells: row k is realisation k; column i is ${cellWords(grid)}`,
    files: [`${base}.npy`, `${base}.csv`],
    ...(isCellList(grid) ? { cells: gridRecord(grid) } : { grid: gridRecord(grid) }),
  };
  return text(`${base}.grid.json`, 'application/json', formatJson(record));
}

/** What cell i is, in words, for the layout fields. */
function cellWords(grid: Geometry): string {
  return isCellList(grid)
    ? 'cell i, centred at row i of cells.centres'
    : 'cell i = ix + nx·(iy + ny·iz) (x fastest), centred at origin + (ix·dx, iy·dy, iz·dz)';
}

/** The grid as in a problem file, origin always written; a cell list as its centres. */
function gridRecord(grid: Geometry): Record<string, unknown> {
  if (isCellList(grid)) {
    const { x, y, z } = grid;
    const axis = [x, y, z].slice(0, grid.dim);
    return {
      centres: Array.from({ length: x.length }, (_, i) => axis.map((a) => a[i])),
      ...(grid.unit !== undefined ? { unit: grid.unit } : {}),
      ...(grid.axes !== undefined ? { axes: [...grid.axes] } : {}),
    };
  }
  return {
    shape: [...grid.shape],
    spacing: [...grid.spacing],
    origin: [...(grid.origin ?? grid.shape.map(() => 0))],
    ...(grid.unit !== undefined ? { unit: grid.unit } : {}),
    ...(grid.axes !== undefined ? { axes: [...grid.axes] } : {}),
  };
}

/** The grid beside an exported N × N matrix (Cm or its factor): rows and columns are cells in the grid's order. */
export function gridFile(grid: Geometry, file: string, title: string): ExportFile {
  const record = {
    kind: 'priorscope.grid',
    version: 1,
    problem: title,
    file,
    layout: `cells × cells: row and column i are ${cellWords(grid)}`,
    ...(isCellList(grid) ? { cells: gridRecord(grid) } : { grid: gridRecord(grid) }),
  };
  return text(`${file.replace(/\.npy$/, '')}.grid.json`, 'application/json', formatJson(record));
}

/** PNG plots are written at this multiple of their size on screen. */
export const PLOT_EXPORT_SCALE = 2;

/**
 * The file name (without extension) of an exported plot: the problem's and the plot's titles as
 * file-name stems ("gravity-profile-over-a-buried-basin--data-and-prediction-along-the-survey"),
 * numbered when a name repeats on one screen (`used` collects the names given so far).
 */
export function plotFileName(problemTitle: string, plotTitle: string, used: Set<string>): string {
  const plain = plotTitle.replace(/<[^>]*>/g, ' ');
  const base = `${fileStem(problemTitle)}--${fileStem(plain, 'plot', 80)}`;
  let name = base;
  for (let k = 2; used.has(name); k++) name = `${base}-${k}`;
  used.add(name);
  return name;
}

/** The dense Cm or its lower Cholesky factor L (L Lᵀ = Cm) as an N × N float64 .npy, named after the problem. */
export function covarianceNpy(m: Matrix, form: 'covariance' | 'cholesky', title: string): ExportFile {
  const name = `${fileStem(title)}-prior-${form === 'cholesky' ? 'cholesky-factor' : 'covariance'}-${m.rows}.npy`;
  return { name, mime: NPY, bytes: writeNpy([m.rows, m.cols], m.data) };
}

/**
 * A 3-D problem's fields as VTK XML image data (`.vti`, cell data; src/core/io/vti.ts), as `priorscope posterior
 * --vti` writes them: posterior mean, posterior std, prior std, variance reduction, then the first prior and posterior
 * realisation when they have been drawn.
 */
export function volumeVti(grid: Grid, title: string, s: PosteriorSummary, priorDraws: Matrix | null, postDraws: Matrix | null): ExportFile {
  const fields: VtiField[] = [
    { name: 'posterior mean', values: s.mean },
    { name: 'posterior std', values: s.std },
    { name: 'prior std', values: s.priorStd },
    {
      name: 'variance reduction',
      values: varianceReduction(s.std, s.priorStd),
    },
  ];
  if (priorDraws) fields.push({ name: 'prior realisation 1', values: priorDraws.data.subarray(0, priorDraws.cols) });
  if (postDraws) fields.push({ name: 'posterior realisation 1', values: postDraws.data.subarray(0, postDraws.cols) });
  return text(`${fileStem(title)}-volume.vti`, 'application/xml', writeVti(grid, fields));
}
