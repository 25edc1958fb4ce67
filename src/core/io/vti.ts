/**
 * VTK XML image data (`.vti`, the open format of the VTK file-format specification, "VTK File Formats",
 * Kitware, XML ImageData section), for fields on a regular grid that general-purpose 3-D viewers read.
 *
 * Layout we write (our choice where the format leaves one):
 *   - one <Piece>, ASCII data arrays of Float64 (readable by any XML parser; the size is a few bytes per digit);
 *   - values as **cell data**: the image's points are the cell corners, so WholeExtent is "0 nx 0 ny 0 nz" and
 *     Origin is the first cell's corner, origin − spacing/2 (our grids give the first cell's centre);
 *   - cell order x fastest, then y, then z: exactly the flat order of every per-cell array of the project
 *     (index ix + nx·(iy + ny·iz)), so the values are written as they are;
 *   - 1-D and 2-D grids as images one cell thick (ny = 1 and/or nz = 1, spacing 1 on the missing axes).
 * Numbers are written as the shortest decimal that reads back to the same double.
 */
import { cellCount, type Grid } from '../grid/grid.ts';

/** One named cell field (length = the grid's cell count). */
export interface VtiField {
  readonly name: string;
  readonly values: ArrayLike<number>;
}

const xmlName = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&apos;' })[c] ?? c);

/** The .vti text of `fields` on `grid` (see the module comment). Throws RangeError for a field of the wrong length or a non-finite value. */
export function writeVti(grid: Grid, fields: readonly VtiField[]): string {
  const n = cellCount(grid);
  const shape = [grid.shape[0] ?? 1, grid.shape[1] ?? 1, grid.shape[2] ?? 1];
  const spacing = [grid.spacing[0] ?? 1, grid.spacing[1] ?? 1, grid.spacing[2] ?? 1];
  const origin = [0, 1, 2].map((k) => (grid.origin?.[k] ?? 0) - spacing[k]! / 2);
  const extent = `0 ${shape[0]} 0 ${shape[1]} 0 ${shape[2]}`;
  const parts: string[] = [
    '<?xml version="1.0"?>\n',
    '<VTKFile type="ImageData" version="1.0" byte_order="LittleEndian">\n',
    `  <ImageData WholeExtent="${extent}" Origin="${origin.map(num).join(' ')}" Spacing="${spacing.map(num).join(' ')}">\n`,
    `    <Piece Extent="${extent}">\n`,
    `      <CellData${fields.length > 0 ? ` Scalars="${xmlName(fields[0]!.name)}"` : ''}>\n`,
  ];
  for (const f of fields) {
    if (f.values.length !== n) throw new RangeError(`writeVti: field ${f.name} has ${f.values.length} values for ${n} cells`);
    parts.push(`        <DataArray type="Float64" Name="${xmlName(f.name)}" format="ascii">\n`);
    for (let a = 0; a < n; a += 8) {
      const row: string[] = [];
      for (let k = a; k < Math.min(n, a + 8); k++) {
        const v = f.values[k]!;
        if (!Number.isFinite(v)) throw new RangeError(`writeVti: field ${f.name}, cell ${k} is ${v}`);
        row.push(num(v));
      }
      parts.push(`          ${row.join(' ')}\n`);
    }
    parts.push('        </DataArray>\n');
  }
  parts.push('      </CellData>\n', '    </Piece>\n', '  </ImageData>\n', '</VTKFile>\n');
  return parts.join('');
}

/** The shortest text that reads back to the same double (JavaScript's number-to-string rule). */
function num(v: number): string {
  return String(v);
}
