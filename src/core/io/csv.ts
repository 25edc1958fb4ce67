/**
 * Numeric CSV: a matrix of finite numbers, one row per line, with an optional header line of
 * column names.
 *
 * Reading: lines end in LF, CRLF or a bare CR. The delimiter is a comma unless the first row has
 * none and has tabs or semicolons (then that character); a first row with both semicolons and
 * commas outside quotes is semicolon-delimited (the usual layout of files written with decimal commas). Fields may
 * be double-quoted (RFC 4180 quoting within one line, "" for a quote); a quoted number is a number.
 * Blank lines and lines starting with '#' are skipped. Numbers use a dot for the decimal point;
 * NaN, Infinity, overflowing (1e400), hexadecimal, decimal-comma and empty cells are errors.
 *
 * Header: with `header: 'auto'` (default) the first row is a header only when none of its cells
 * looks like a number (NaN, Infinity, 1e400, 0x10 and 1,25 count as numbers here, so that a bad
 * first row is reported as a bad cell instead of being swallowed as column names); the result
 * then carries `headerLine` so that callers can say the row was read as a header. Errors name the
 * 1-based line of the file and the 1-based column: `G.csv: line 4, column 2 must be a finite
 * number, got "abc"`. A cell written with a decimal comma gets a hint to write a dot.
 *
 * Writing: comma-separated, numbers in JavaScript's shortest round-trip form, "\n" line ends.
 * Header names that would read as numbers are refused (they could not be told apart from data).
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
  /** 1-based line of the header row when there is one. */
  readonly headerLine: number | null;
  /** 1-based line of the file for each matrix row. */
  readonly rowLines: readonly number[];
  /** The delimiter used (',', '\t' or ';'). */
  readonly delimiter: string;
  readonly matrix: Matrix;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
/** Cells that are meant as numbers but are not finite decimal numbers we accept. */
const NUMBER_LIKE = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$|^[+-]?(nan|inf|infinity)$|^[+-]?0[xX][0-9a-fA-F]+$|^[+-]?\d+,\d+$/i;
/** A number written with a decimal comma (1,25 or -0,5e3). */
const DECIMAL_COMMA = /^[+-]?\d*,\d+([eE][+-]?\d+)?$/;

/** A decimal number cell (after trimming), or null. Finite results only. */
export function parseNumberCell(cell: string): number | null {
  const s = cell.trim();
  if (!NUMBER.test(s)) return null;
  const v = Number(s);
  return Number.isFinite(v) ? v : null;
}

/** Whether a cell is written as a number, finite or not (for deciding whether a row is a header). */
export function looksNumeric(cell: string): boolean {
  return NUMBER_LIKE.test(cell.trim());
}

/** Split one line into cells, honouring double quotes. Returns null for an unterminated quote. */
function splitLine(line: string, delimiter: string): string[] | null {
  const cells: string[] = [];
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
        s += line[k];
        k++;
      }
      // Only spaces may follow the closing quote before the delimiter.
      while (k < n && line[k] !== delimiter) {
        if (line[k] !== ' ' && line[k] !== '\t') return null;
        k++;
      }
      cells.push(s);
    } else {
      const end = line.indexOf(delimiter, k);
      cells.push(line.slice(k, end < 0 ? n : end));
      k = end < 0 ? n : end;
    }
    if (k >= n) return cells;
    k++; // the delimiter
    if (k >= n) {
      cells.push('');
      return cells;
    }
  }
}

/** The content lines of a CSV text (LF, CRLF or bare CR line ends; blank and '#' lines skipped). */
export function csvContentLines(text: string): { line: number; text: string }[] {
  const lines = text.split(/\r\n|\r|\n/);
  const content: { line: number; text: string }[] = [];
  for (let k = 0; k < lines.length; k++) {
    const t = lines[k];
    const trimmed = t.trim();
    if (trimmed === '' || trimmed.startsWith('#')) continue;
    content.push({ line: k + 1, text: t });
  }
  return content;
}

function badCell(file: string, line: number, column: number, cell: string): FileFormatError {
  const t = cell.trim();
  const hint = DECIMAL_COMMA.test(t) ? ' (a decimal comma? write numbers with a dot, e.g. ' + t.replace(',', '.') + ')' : '';
  return new FileFormatError(file, `line ${line}, column ${column} must be a finite number, got ${formatValue(t)}${hint}`, {
    line,
    column,
  });
}

/** Parse a numeric CSV file (text or UTF-8 bytes). */
export function parseCsv(file: string, input: string | Uint8Array, options: CsvOptions = {}): CsvTable {
  const text = decodeText(file, input);
  const content = csvContentLines(text);
  if (content.length === 0) throw new FileFormatError(file, 'contains no rows of numbers');
  const first = content[0].text.replace(/"([^"]|"")*"/g, ''); // delimiters inside quotes do not count
  const delimiter =
    first.includes(';') && first.includes(',')
      ? ';'
      : first.includes(',')
        ? ','
        : first.includes('\t')
          ? '\t'
          : first.includes(';')
            ? ';'
            : ',';

  const split = (row: { line: number; text: string }) => {
    const r = splitLine(row.text, delimiter);
    if (!r) throw new FileFormatError(file, `line ${row.line} has an unterminated or misplaced double quote`, { line: row.line });
    return r;
  };

  let start = 0;
  let header: string[] | null = null;
  const firstCells = split(content[0]);
  const wantHeader = options.header ?? 'auto';
  if (wantHeader === true || (wantHeader === 'auto' && !firstCells.some(looksNumeric))) {
    header = firstCells.map((c) => c.trim());
    start = 1;
  }
  if (start >= content.length)
    throw new FileFormatError(file, `has a header line (line ${content[0].line}) but no rows of numbers`, { line: content[0].line });
  const cols = header ? header.length : firstCells.length;
  const widthLine = content[0].line;
  const out = matrix(content.length - start, cols);
  const rowLines = new Array<number>(content.length - start);
  for (let r = start; r < content.length; r++) {
    const row = content[r];
    const cells = r === 0 ? firstCells : split(row);
    if (cells.length !== cols) {
      const hint =
        delimiter === ',' && cells.length > cols && /\d,\d/.test(row.text)
          ? '; if the file uses decimal commas, write numbers with a dot or separate columns by semicolons'
          : '';
      throw new FileFormatError(
        file,
        `line ${row.line} has ${cells.length} column${cells.length === 1 ? '' : 's'}, expected ${cols} (as in line ${widthLine})${hint}`,
        { line: row.line },
      );
    }
    const o = (r - start) * cols;
    for (let c = 0; c < cols; c++) {
      const v = parseNumberCell(cells[c]);
      if (v === null) throw badCell(file, row.line, c + 1, cells[c]);
      out.data[o + c] = v;
    }
    rowLines[r - start] = row.line;
  }
  return { header, headerLine: header ? content[0].line : null, rowLines, delimiter, matrix: out };
}

/** The one-line note that a first row was read as column names (for a file's warnings). */
export function headerNote(file: string, table: CsvTable): string | null {
  if (!table.header) return null;
  return `${file}: line ${table.headerLine} read as a header (column names ${formatValue(table.header.join(','))}), not as numbers`;
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
    if (out.has(name))
      throw new FileFormatError(file, `column name ${JSON.stringify(name)} appears twice in the header`, { line: 1, column: c + 1 });
    const col = new Float64Array(rows);
    for (let r = 0; r < rows; r++) col[r] = data[r * cols + c];
    out.set(name, col);
  });
  return out;
}

function quoteCell(name: string): string {
  if (looksNumeric(name) || name.trim() === '')
    throw new RangeError(`writeCsv: header name ${JSON.stringify(name)} would read as a number or an empty cell`);
  return /[",;\t\n\r]/.test(name) || name.trim() !== name ? `"${name.replace(/"/g, '""')}"` : name;
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
      const v = data[i * cols + j];
      if (!Number.isFinite(v)) throw new RangeError(`writeCsv: value at row ${i}, column ${j} is ${v}`);
      cells[j] = String(v);
    }
    parts.push(cells.join(',') + '\n');
  }
  return parts.join('');
}
