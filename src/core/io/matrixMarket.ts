/**
 * Matrix Market exchange format, real matrices (Boisvert, Pozo & Remington 1996, "The Matrix
 * Market Exchange Formats: Initial Design", NIST report NISTIR 5935):
 *
 *   %%MatrixMarket matrix coordinate real general     ← banner (keywords case-insensitive)
 *   % comment lines                                    ← any number
 *   M N L                                              ← size line (coordinate)
 *   i j a_ij                                           ← L entries, 1-based indices
 *
 *   %%MatrixMarket matrix array real general
 *   M N                                                ← size line (array)
 *   a_11 … a_M1 a_12 …                                 ← M·N values in column-major order
 *
 * Supported: formats `coordinate` and `array`; fields `real` and `integer` (read as real);
 * symmetry `general` and `symmetric` (only the lower triangle stored; mirrored on reading).
 * `complex`, `pattern`, `skew-symmetric` and `hermitian` are refused with a message. Duplicate
 * coordinate entries are summed (the report leaves this open; summing matches the problem file's
 * sparse operator). Blank lines are skipped. Rows and columns are limited to 10⁷ each.
 *
 * The reader returns the core's Operator union: coordinate → sparse, array → dense.
 */
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { matchOperator, type Operator } from '../linalg/operator.ts';
import { sparseFromCoordinates, type SparseMatrix } from '../linalg/sparse.ts';
import { formatValue } from '../errors.ts';
import { FileFormatError } from './errors.ts';
import { decodeText } from './json.ts';
import { parseNumberCell } from './csv.ts';

/** Largest row or column count accepted from a size line. */
export const MAX_MATRIX_MARKET_DIMENSION = 10_000_000;

const NUMBER_TOKEN = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** Parse a Matrix Market file (text or ASCII bytes) into a dense or sparse operator. */
export function parseMatrixMarket(file: string, input: string | Uint8Array): Operator {
  const text = decodeText(file, input);
  const lines = text.split('\n');
  const banner = (lines[0] ?? '').replace(/\r$/, '').trim();
  const words = banner.split(/\s+/);
  if (words[0]?.toLowerCase() !== '%%matrixmarket') {
    throw new FileFormatError(
      file,
      `line 1 must be a banner "%%MatrixMarket matrix coordinate|array real general", got ${formatValue(banner)}`,
      { line: 1 },
    );
  }
  const [, object, format, field, symmetry] = words.map((w) => w.toLowerCase());
  if (words.length !== 5) {
    throw new FileFormatError(file, `line 1 must have 5 words "%%MatrixMarket matrix <format> <field> <symmetry>", got ${words.length}`, {
      line: 1,
    });
  }
  if (object !== 'matrix') throw new FileFormatError(file, `line 1: object must be "matrix", got ${formatValue(words[1])}`, { line: 1 });
  if (format !== 'coordinate' && format !== 'array') {
    throw new FileFormatError(file, `line 1: format must be "coordinate" or "array", got ${formatValue(words[2])}`, { line: 1 });
  }
  if (field !== 'real' && field !== 'integer') {
    throw new FileFormatError(
      file,
      `line 1: field must be "real" or "integer" (complex and pattern matrices are not supported), got ${formatValue(words[3])}`,
      { line: 1 },
    );
  }
  if (symmetry !== 'general' && symmetry !== 'symmetric') {
    throw new FileFormatError(file, `line 1: symmetry must be "general" or "symmetric", got ${formatValue(words[4])}`, { line: 1 });
  }
  const symmetric = symmetry === 'symmetric';

  // Content lines after the banner: comments and blank lines skipped.
  let k = 1;
  const next = (): { line: number; tokens: string[] } | null => {
    while (k < lines.length) {
      const t = lines[k].trim();
      k++;
      if (t === '' || t.startsWith('%')) continue;
      return { line: k, tokens: t.split(/\s+/) };
    }
    return null;
  };
  const integerToken = (tok: string | undefined, line: number, column: number, what: string, min: number, max: number): number => {
    const v = tok !== undefined && /^[+]?\d+$/.test(tok) ? Number(tok) : NaN;
    if (!(v >= min && v <= max)) {
      throw new FileFormatError(
        file,
        `line ${line}, entry ${column}: ${what} must be an integer from ${min} to ${max}, got ${formatValue(tok)}`,
        { line, column },
      );
    }
    return v;
  };
  const valueToken = (tok: string | undefined, line: number, column: number): number => {
    const v = tok !== undefined && NUMBER_TOKEN.test(tok) ? parseNumberCell(tok) : null;
    if (v === null || (field === 'integer' && !Number.isInteger(v))) {
      throw new FileFormatError(
        file,
        `line ${line}, entry ${column}: value must be a finite ${field === 'integer' ? 'integer' : 'number'}, got ${formatValue(tok)}`,
        { line, column },
      );
    }
    return v;
  };

  const size = next();
  if (!size) throw new FileFormatError(file, 'has no size line after the banner');
  const want = format === 'coordinate' ? 3 : 2;
  if (size.tokens.length !== want) {
    throw new FileFormatError(
      file,
      `line ${size.line}: size line must be ${format === 'coordinate' ? '"rows columns entries"' : '"rows columns"'}, got ${formatValue(size.tokens.join(' '))}`,
      { line: size.line },
    );
  }
  const rows = integerToken(size.tokens[0], size.line, 1, 'rows', 1, MAX_MATRIX_MARKET_DIMENSION);
  const cols = integerToken(size.tokens[1], size.line, 2, 'columns', 1, MAX_MATRIX_MARKET_DIMENSION);
  if (symmetric && rows !== cols) {
    throw new FileFormatError(file, `line ${size.line}: a symmetric matrix must be square, got ${rows} × ${cols}`, { line: size.line });
  }

  if (format === 'coordinate') {
    const count = integerToken(size.tokens[2], size.line, 3, 'entries', 0, Number.MAX_SAFE_INTEGER);
    const ri: number[] = [];
    const ci: number[] = [];
    const v: number[] = [];
    for (let e = 0; e < count; e++) {
      const row = next();
      if (!row) throw new FileFormatError(file, `ends after ${e} of the ${count} entries announced on line ${size.line}`);
      if (row.tokens.length !== 3) {
        throw new FileFormatError(file, `line ${row.line} must be "row column value", got ${formatValue(row.tokens.join(' '))}`, {
          line: row.line,
        });
      }
      const i = integerToken(row.tokens[0], row.line, 1, 'row', 1, rows) - 1;
      const j = integerToken(row.tokens[1], row.line, 2, 'column', 1, cols) - 1;
      const a = valueToken(row.tokens[2], row.line, 3);
      if (symmetric && j > i) {
        throw new FileFormatError(
          file,
          `line ${row.line}: a symmetric file stores the lower triangle only, got row ${i + 1} < column ${j + 1}`,
          { line: row.line },
        );
      }
      ri.push(i);
      ci.push(j);
      v.push(a);
      if (symmetric && i !== j) {
        ri.push(j);
        ci.push(i);
        v.push(a);
      }
    }
    const extra = next();
    if (extra)
      throw new FileFormatError(file, `line ${extra.line}: more entries than the ${count} announced on line ${size.line}`, {
        line: extra.line,
      });
    return { kind: 'sparse', matrix: sparseFromCoordinates(rows, cols, ri, ci, v) };
  }

  // Array: values in column-major order, one or more per line (the report puts one per line).
  const expected = symmetric ? (rows * (rows + 1)) / 2 : rows * cols;
  const values: number[] = [];
  for (let row = next(); row; row = next()) {
    for (let t = 0; t < row.tokens.length; t++) {
      if (values.length >= expected) {
        throw new FileFormatError(
          file,
          `line ${row.line}: more values than the ${expected} of a ${rows} × ${cols} ${symmetric ? 'symmetric ' : ''}array`,
          { line: row.line },
        );
      }
      values.push(valueToken(row.tokens[t], row.line, t + 1));
    }
  }
  if (values.length !== expected) {
    throw new FileFormatError(
      file,
      `has ${values.length} values, expected ${expected} for a ${rows} × ${cols} ${symmetric ? 'symmetric ' : ''}array`,
    );
  }
  const out = matrix(rows, cols);
  let p = 0;
  for (let j = 0; j < cols; j++) {
    for (let i = symmetric ? j : 0; i < rows; i++) {
      const a = values[p++];
      out.data[i * cols + j] = a;
      if (symmetric) out.data[j * cols + i] = a;
    }
  }
  return { kind: 'dense', matrix: out };
}

/** Shortest round-trip text of a finite number. */
function num(v: number): string {
  if (!Number.isFinite(v)) throw new RangeError(`Matrix Market: cannot write ${v}`);
  return String(v);
}

/** A dense matrix as `array real general` (column-major, one value per line). */
export function writeMatrixMarketArray(m: Matrix, comment?: string): string {
  const parts = ['%%MatrixMarket matrix array real general\n'];
  if (comment) for (const c of comment.split('\n')) parts.push(`% ${c}\n`);
  parts.push(`${m.rows} ${m.cols}\n`);
  for (let j = 0; j < m.cols; j++) for (let i = 0; i < m.rows; i++) parts.push(num(m.data[i * m.cols + j]) + '\n');
  return parts.join('');
}

/** A sparse matrix as `coordinate real general` (1-based, row by row). */
export function writeMatrixMarketCoordinate(s: SparseMatrix, comment?: string): string {
  const parts = ['%%MatrixMarket matrix coordinate real general\n'];
  if (comment) for (const c of comment.split('\n')) parts.push(`% ${c}\n`);
  parts.push(`${s.rows} ${s.cols} ${s.values.length}\n`);
  for (let i = 0; i < s.rows; i++) {
    for (let p = s.rowPtr[i]; p < s.rowPtr[i + 1]; p++) parts.push(`${i + 1} ${s.colIdx[p] + 1} ${num(s.values[p])}\n`);
  }
  return parts.join('');
}

/** An operator in the Matrix Market form matching its kind. */
export function writeMatrixMarket(g: Operator, comment?: string): string {
  return matchOperator(g, {
    dense: (a) => writeMatrixMarketArray(a, comment),
    sparse: (s) => writeMatrixMarketCoordinate(s, comment),
  });
}
