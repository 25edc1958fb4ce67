/**
 * One number per grid cell from a file, for the prior's explicit mean (`mean.values`) or its
 * standard-deviation profile (`stdProfile`) set in the workbench instead of a prior file:
 *
 *   .csv / .txt   one column of N numbers (a header line such as `mean` is allowed), read as in ./csv.ts
 *   .npy          shape (N,), (N, 1), on a 2-D grid (ny, nx) (row iy holds cells ix = 0 … nx − 1), on a 3-D grid
 *                 (nz, ny, nx) (a[iz, iy, ix]); C or Fortran memory order (the header's fortran_order says which)
 *
 * N is the grid's cell count; cells in the grid's flat order (x fastest, index ix + nx·iy), as
 * every per-cell array of the problem and prior files. Values obey the scale rule of
 * src/core/prior/validate.ts (|mean| ≤ 1e50; std from 1e-50 to 1e50). Errors name the file and the
 * line (CSV) or the flat index (.npy).
 */
import { cellCount, type Geometry, isCellList } from '../grid/grid.ts';
import { formatValue } from '../errors.ts';
import { SCALE_LIMIT, SCALE_MIN } from '../prior/validate.ts';
import { FileFormatError } from './errors.ts';
import { parseCsv } from './csv.ts';
import { parseNpy } from './npy.ts';

export type CellValuesKind = 'mean' | 'std';

/** Read N per-cell values; `kind` 'std' requires every value > 0. */
export function parseCellValues(file: string, bytes: Uint8Array, grid: Geometry, kind: CellValuesKind): Float64Array {
  const n = cellCount(grid);
  // A cell list takes (N,) or (N, 1) only: values in the order of cells.centres.
  const [nx, ny, nz] = isCellList(grid) ? [n, undefined, undefined] : grid.shape;
  const lower = file.toLowerCase();
  let values: Float64Array;
  let where: (k: number) => string;
  if (lower.endsWith('.npy')) {
    const a = parseNpy(file, bytes);
    const s = a.shape;
    const ok =
      (s.length === 1 && s[0] === n) ||
      (s.length === 2 && s[0] === n && s[1] === 1) ||
      (s.length === 2 && ny !== undefined && nz === undefined && s[0] === ny && s[1] === nx) ||
      (s.length === 3 && nz !== undefined && s[0] === nz && s[1] === ny && s[2] === nx);
    if (!ok) {
      const grid2 =
        nz !== undefined ? ` or (${nz}, ${ny}, ${nx}) (a[iz, iy, ix])` : ny !== undefined ? ` or (${ny}, ${nx}) (rows along y)` : '';
      throw new FileFormatError(
        file,
        `must hold shape (${n},)${grid2}: one value per grid cell, got shape (${s.join(', ')}${s.length === 1 ? ',' : ''})`,
        { field: 'shape' },
      );
    }
    values = a.data;
    where = (k) => `value ${k} (cell ${k}, zero-based, x fastest)`;
  } else if (lower.endsWith('.csv') || lower.endsWith('.txt')) {
    const t = parseCsv(file, bytes, { header: 'auto' });
    if (t.matrix.cols !== 1) {
      throw new FileFormatError(file, `must have 1 column (one value per grid cell), got ${t.matrix.cols}`, { line: t.rowLines[0] });
    }
    if (t.matrix.rows !== n) {
      throw new FileFormatError(
        file,
        isCellList(grid)
          ? `must have ${n} rows of values (one per cell, in the order of cells.centres), got ${t.matrix.rows}`
          : `must have ${n} rows of values (one per grid cell, ${grid.shape.join(' × ')}, x fastest), got ${t.matrix.rows}`,
      );
    }
    values = t.matrix.data;
    where = (k) => `line ${t.rowLines[k]}`;
  } else {
    throw new FileFormatError(file, 'cannot be read as per-cell values: the name must end in .csv, .txt or .npy');
  }
  for (let k = 0; k < n; k++) {
    const v = values[k];
    if (kind === 'std' ? !(v >= SCALE_MIN && v <= SCALE_LIMIT) : !(Math.abs(v) <= SCALE_LIMIT)) {
      const expected = kind === 'std' ? `a standard deviation from ${SCALE_MIN} to ${SCALE_LIMIT}` : `of magnitude ≤ ${SCALE_LIMIT}`;
      throw new FileFormatError(file, `${where(k)} must be ${expected}, got ${formatValue(v)}`);
    }
  }
  return Float64Array.from(values);
}
