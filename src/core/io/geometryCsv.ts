/**
 * The data geometry as a CSV file (the pieces form's "geometry" file), one row per datum in the
 * order of the data file, with a header line that says what the columns are:
 *
 *   x        point data on a 1-D grid (the position of each datum)
 *   x,y      point data on a 2-D grid
 *   sx,sy,rx,ry   path data on a 2-D grid (source and receiver of each path)
 *
 * Column names are compared case-insensitively and may come in any order; coordinates are in the
 * grid's unit. Numbers are read as in ./csv.ts (errors name the line and column). The geometry is
 * for plots only; the problem file's `data.positions` / `data.sources` / `data.receivers` carry
 * the same numbers (see ./problemFile.ts), and a path that misses the grid is warned about there too.
 */
import type { Grid } from '../grid/grid.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { pathsMissingGrid } from '../problems/geometry.ts';
import type { DataGeometry } from '../problems/spec.ts';
import { formatValue } from '../errors.ts';
import { FileFormatError, type FileWarning } from './errors.ts';
import { csvColumns, parseCsv } from './csv.ts';
import { pathsMissWarning } from './problemFile.ts';

/** How the pieces form names what the warning asks to check. */
const FORM_WORDS = { ends: 'sx,sy → rx,ry', origin: 'the origin x0, y0', shape: 'nx and ny' };

const LAYOUTS = {
  points1: ['x'],
  points2: ['x', 'y'],
  paths: ['sx', 'sy', 'rx', 'ry'],
} as const;

function columnsMatrix(cols: readonly Float64Array[]): Matrix {
  const m = cols[0].length;
  const out = matrix(m, cols.length);
  for (let i = 0; i < m; i++) for (let j = 0; j < cols.length; j++) out.data[i * cols.length + j] = cols[j][i];
  return out;
}

/**
 * Read a geometry CSV for `m` data on `grid`. `dataFile` names the data file in the count message.
 * Warnings: paths that miss the grid entirely.
 */
export function parseGeometryCsv(
  file: string,
  input: string | Uint8Array,
  grid: Grid,
  m: number,
  dataFile = 'the data file',
): { geometry: DataGeometry; warnings: FileWarning[] } {
  const dim = grid.shape.length;
  const expected = dim === 1 ? 'x (positions on a 1-D grid)' : 'x,y (positions) or sx,sy,rx,ry (sources and receivers of paths)';
  const table = parseCsv(file, input, { header: 'auto' });
  if (!table.header) {
    throw new FileFormatError(file, `must start with a header line naming the columns: ${expected}`, { line: table.rowLines[0] ?? 1 });
  }
  const line = table.headerLine!;
  const names = table.header.map((h) => h.toLowerCase());
  const columns = csvColumns(file, { ...table, header: names });
  const same = (want: readonly string[]) => want.length === names.length && want.every((w) => names.includes(w));
  const layout =
    dim === 1 ? (same(LAYOUTS.points1) ? 'points1' : null) : same(LAYOUTS.points2) ? 'points2' : same(LAYOUTS.paths) ? 'paths' : null;
  if (layout === null) {
    const pathsOn1D = dim === 1 && same(LAYOUTS.paths) ? ' (paths need a 2-D grid)' : '';
    throw new FileFormatError(
      file,
      `header (line ${line}) must name the columns ${expected}${pathsOn1D}, got ${formatValue(table.header.join(','))}`,
      { line },
    );
  }
  const rows = table.matrix.rows;
  if (rows !== m) {
    throw new FileFormatError(file, `must have ${m} rows of coordinates (one per datum in ${dataFile}), got ${rows}`, {
      line: table.rowLines[table.rowLines.length - 1],
    });
  }
  const pick = (want: readonly string[]) => columnsMatrix(want.map((w) => columns.get(w)!));
  if (layout !== 'paths') return { geometry: { kind: 'points', positions: pick(LAYOUTS[layout]) }, warnings: [] };
  const geometry: DataGeometry = { kind: 'paths', sources: pick(['sx', 'sy']), receivers: pick(['rx', 'ry']) };
  const missing = pathsMissingGrid(grid, geometry);
  const warnings: FileWarning[] =
    missing.length > 0 ? [{ file, message: `${file}: ${pathsMissWarning(grid, missing, m, FORM_WORDS)}` }] : [];
  return { geometry, warnings };
}
