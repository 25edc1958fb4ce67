/**
 * Numeric CSV: a matrix of finite numbers, one row per line, with an optional header line of
 * column names.
 *
 * Reading: the delimiter is a comma unless the first row has none and has tabs or semicolons
 * (then that character). Fields may be double-quoted (RFC 4180 quoting within one line, "" for a
 * quote). Blank lines and lines starting with '#' are skipped. Numbers use a dot for the decimal
 * point; NaN, Infinity, hexadecimal and empty cells are errors. With `header: 'auto'` (default) the
 * first row is a header when any of its cells is not a number or is quoted. Errors name the 1-based line of the
 * file and the 1-based column: `G.csv: line 4, column 2 must be a finite number, got "abc"`.
 *
 * Writing: comma-separated, numbers in JavaScript's shortest round-trip form, "\n" line ends.
 */
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { FileFormatError } from './errors.ts';
import { decodeText } from './json.ts';
import { formatValue } from '../errors.ts';

export interface CsvOptions {
  /** Whether the first row holds column names; 'auto' decides from its content. */
  readonly header?: 'auto' | boolean;
}

export interface CsvTable {
  readonly header: readonly string[] | null;
  readonly matrix: Matrix;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** A decimal number cell (after trimming), or null. Finite results only. */
export function parseNumberCell(cell: string): number | null {
  const s = cell.trim();
  if (!NUMBER.test(s)) return null;
  const v = Number(s);
  return Number.isFinite(v) ? v : null;
}

/** Split one line into cells, honouring double quotes. Returns null for an unterminated quote. */
function splitLine(line: string, delimiter: string): { cells: string[]; quoted: boolean } | null {
  const cells: string[] = [];
  let quoted = false;
  let k = 0;
  const n = line.length;
  for (;;) {
    while (k < n && (line[k] === ' ' || (line[k] === '\t' && delimiter !== '\t'))) k++;
    if (line[k] === '"') {
      let s = '';
      k++;
      for (;;) {
        if (k >= n) return null;
        if (line[k] === '"') {
          if (line[k + 1] === '"') {
            s += '"';
            k += 2;
            continue;
          }
          k++;
          break;
        }
        s += line[k]!;
        k++;
      }
      // Only spaces may follow the closing quote before the delimiter.
      while (k < n && line[k] !== delimiter) {
        if (line[k] !== ' ' && line[k] !== '\t') return null;
        k++;
      }
      cells.push(s);
      quoted = true;
    } else {
      const end = line.indexOf(delimiter, k);
      cells.push(line.slice(k, end < 0 ? n : end));
      k = end < 0 ? n : end;
    }
    if (k >= n) return { cells, quoted };
    k++; // the delimiter
    if (k >= n) {
      cells.push('');
      return { cells, quoted };
    }
  }
}

/** Parse a numeric CSV file (text or UTF-8 bytes). */
export function parseCsv(file: string, input: string | Uint8Array, options: CsvOptions = {}): CsvTable {
  const text = decodeText(file, input);
  const lines = text.split('\n');
  const content: { line: number; text: string }[] = [];
  for (let k = 0; k < lines.length; k++) {
    let t = lines[k]!;
    if (t.endsWith('\r')) t = t.slice(0, -1);
    const trimmed = t.trim();
    if (trimmed === '' || trimmed.startsWith('#')) continue;
    content.push({ line: k + 1, text: t });
  }
  if (content.length === 0) throw new FileFormatError(file, 'contains no rows of numbers');
  const first = content[0]!.text;
  const delimiter = first.includes(',') ? ',' : first.includes('\t') ? '\t' : first.includes(';') ? ';' : ',';

  const split = (row: { line: number; text: string }) => {
    const r = splitLine(row.text, delimiter);
    if (!r) throw new FileFormatError(file, `line ${row.line} has an unterminated or misplaced double quote`, { line: row.line });
    return r;
  };

  let start = 0;
  let header: string[] | null = null;
  const firstSplit = split(content[0]!);
  const firstCells = firstSplit.cells;
  const wantHeader = options.header ?? 'auto';
  // A quoted first row is a header too, so that numeric column names written quoted read back.
  if (wantHeader === true || (wantHeader === 'auto' && (firstSplit.quoted || firstCells.some((c) => parseNumberCell(c) === null)))) {
    header = firstCells.map((c) => c.trim());
    start = 1;
  }
  if (start >= content.length) throw new FileFormatError(file, 'has a header line but no rows of numbers');
  const cols = header ? header.length : firstCells.length;
  const widthLine = content[0]!.line;
  const out = matrix(content.length - start, cols);
  for (let r = start; r < content.length; r++) {
    const row = content[r]!;
    const cells = r === 0 ? firstCells : split(row).cells;
    if (cells.length !== cols) {
      throw new FileFormatError(
        file,
        `line ${row.line} has ${cells.length} column${cells.length === 1 ? '' : 's'}, expected ${cols} (as in line ${widthLine})`,
        { line: row.line },
      );
    }
    const o = (r - start) * cols;
    for (let c = 0; c < cols; c++) {
      const v = parseNumberCell(cells[c]!);
      if (v === null) {
        throw new FileFormatError(
          file,
          `line ${row.line}, column ${c + 1} must be a finite number, got ${formatValue(cells[c]!.trim())}`,
          { line: row.line, column: c + 1 },
        );
      }
      out.data[o + c] = v;
    }
  }
  return { header, matrix: out };
}

/**
 * Named columns of a CSV table: header names as keys, or "1", "2", … without a header.
 * Duplicate names in the header are an error.
 */
export function csvColumns(file: string, table: CsvTable): Map<string, Float64Array> {
  const { rows, cols, data } = table.matrix;
  const names = table.header ?? Array.from({ length: cols }, (_, c) => String(c + 1));
  const out = new Map<string, Float64Array>();
  names.forEach((name, c) => {
    if (out.has(name)) throw new FileFormatError(file, `column name ${JSON.stringify(name)} appears twice in the header`, { line: 1, column: c + 1 });
    const col = new Float64Array(rows);
    for (let r = 0; r < rows; r++) col[r] = data[r * cols + c]!;
    out.set(name, col);
  });
  return out;
}

function quoteCell(name: string): string {
  return /[",\n\r]/.test(name) || name.trim() !== name || NUMBER.test(name.trim()) ? `"${name.replace(/"/g, '""')}"` : name;
}

/** CSV text of a matrix (one row per line), with an optional header. Non-finite values are refused. */
export function writeCsv(m: Matrix, header?: readonly string[]): string {
  const { rows, cols, data } = m;
  if (header && header.length !== cols) throw new RangeError(`writeCsv: header has ${header.length} names for ${cols} columns`);
  const parts: string[] = [];
  if (header) parts.push(header.map(quoteCell).join(',') + '\n');
  for (let i = 0; i < rows; i++) {
    const cells = new Array<string>(cols);
    for (let j = 0; j < cols; j++) {
      const v = data[i * cols + j]!;
      if (!Number.isFinite(v)) throw new RangeError(`writeCsv: value at row ${i}, column ${j} is ${v}`);
      cells[j] = String(v);
    }
    parts.push(cells.join(',') + '\n');
  }
  return parts.join('');
}
