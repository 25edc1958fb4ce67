/**
 * A problem from separate pieces instead of one problem file: the operator G as a file (CSV,
 * Matrix Market or .npy), the data as a file (CSV with value and sigma columns, or .npy), an
 * optional full data covariance (CSV, Matrix Market array or .npy) and the grid typed in by hand.
 *
 * Data CSV: the header is optional (decided as in ./csv.ts). With a header, the value column is
 * the one named `value` (or `values`, `data`, `d`) and the standard deviation column the one named
 * `sigma` (or `std`, `stdev`, `error`), names compared case-insensitively; other columns are
 * ignored. Without a header, one column holds the values, two columns hold value and sigma; a
 * comma-separated file of two whole-number columns with no decimal point anywhere (`1,25`) is
 * refused with a hint, since it may be one column written with decimal commas.
 * Data .npy: shape (M,) values only, or (M, 2) value and sigma columns.
 * Sigma must be > 0. A data file without sigma needs a covariance file, and a data file with sigma
 * must not come with one (exactly one description of the errors, as in the problem file).
 * The covariance must be M × M, symmetric to 1e-12 of its largest |entry| and pass the Cholesky
 * test of positive definiteness (Higham 2002, "Accuracy and Stability of Numerical Algorithms",
 * Thm 10.7; the same rule as ./problemFile.ts).
 *
 * Geometry (optional): a CSV of positions or path ends, one row per datum (./geometryCsv.ts).
 *
 * Errors are FileFormatErrors naming the file and the line / column (CSV, 1-based lines of the
 * file as in ./csv.ts), row / column (matrix entries, zero-based as in the problem file) or field.
 */
import { cellCount, type Grid } from '../grid/grid.ts';
import { covarianceDefect } from './covarianceCheck.ts';
import type { Matrix } from '../linalg/matrix.ts';
import { operatorAsDense, type Operator } from '../linalg/operator.ts';
import type { DataSpec, Problem } from '../problems/spec.ts';
import { assertNever, formatValue } from '../errors.ts';
import { checkFileSize, FileFormatError, type FileWarning } from './errors.ts';
import { csvContentLines, headerNote, parseCsv } from './csv.ts';
import { decodeText } from './json.ts';
import { parseMatrixMarket } from './matrixMarket.ts';
import { npyToMatrix, parseNpy } from './npy.ts';
import { checkProblemScales, MAX_CELLS } from './problemFile.ts';
import { parseGeometryCsv } from './geometryCsv.ts';

/** One file as picked by the user: its name and its bytes. */
export interface NamedBytes {
  readonly name: string;
  readonly bytes: Uint8Array;
}

export interface DataFileResult {
  readonly values: Float64Array;
  /** Null when the file has no sigma column. */
  readonly sigma: Float64Array | null;
  /** Remarks about the file (a first row read as a header). */
  readonly warnings: readonly FileWarning[];
}

const VALUE_NAMES = ['value', 'values', 'data', 'd'];
const SIGMA_NAMES = ['sigma', 'std', 'stdev', 'error'];

type Format = 'csv' | 'mtx' | 'npy';

function formatOf(name: string, allowed: readonly Format[], what: string): Format {
  const lower = name.toLowerCase();
  const f: Format | null =
    lower.endsWith('.csv') || lower.endsWith('.txt') ? 'csv' : lower.endsWith('.mtx') ? 'mtx' : lower.endsWith('.npy') ? 'npy' : null;
  if (f === null || !allowed.includes(f)) {
    const names = allowed.map((a) => (a === 'mtx' ? '.mtx (Matrix Market)' : `.${a}`)).join(', ');
    throw new FileFormatError(name, `cannot be read as ${what}: the name must end in ${names}`);
  }
  return f;
}

/** A two-integer-column row such as `1,25`: with no decimal point anywhere, possibly a decimal comma. */
const INTEGER_PAIR = /^\s*"?\s*[+-]?\d+\s*"?\s*,\s*"?\s*\d+\s*"?\s*$/;

/** A data CSV (see the module comment). */
export function parseDataCsv(file: string, input: string | Uint8Array): DataFileResult {
  const text = decodeText(file, input);
  const table = parseCsv(file, text, { header: 'auto' });
  const { rows, cols, data } = table.matrix;
  const lines = table.rowLines;
  const warnings: FileWarning[] = [];
  const note = headerNote(file, table);
  if (note) warnings.push({ file, message: note });
  let vc: number;
  let sc: number | null;
  if (table.header) {
    const headerLine = table.headerLine!;
    const lower = table.header.map((h) => h.toLowerCase());
    const find = (names: string[]) => {
      const hits = lower.flatMap((h, c) => (names.includes(h) ? [c] : []));
      if (hits.length > 1) {
        throw new FileFormatError(file, `line ${headerLine} names ${hits.length} columns ${names.join('/')}, expected one`, {
          line: headerLine,
        });
      }
      return hits[0] ?? null;
    };
    const v = find(VALUE_NAMES);
    if (v === null) {
      throw new FileFormatError(
        file,
        `header (line ${headerLine}) must name a value column (${VALUE_NAMES.join(', ')}), got ${formatValue(table.header.join(','))}`,
        { line: headerLine },
      );
    }
    vc = v;
    sc = find(SIGMA_NAMES);
  } else {
    if (cols > 2) {
      throw new FileFormatError(file, `without a header must have 1 column (value) or 2 columns (value, sigma), got ${cols} columns`, {
        line: lines[0],
      });
    }
    if (cols === 2 && table.delimiter === ',') {
      // "1,25" with no decimal point anywhere: value 1, sigma 25, or 1.25 with a decimal comma?
      // Refused rather than guessed (a header line value,sigma or one decimal point settles it).
      const content = csvContentLines(text);
      if (content.every((row) => INTEGER_PAIR.test(row.text))) {
        const row = content[0];
        throw new FileFormatError(
          file,
          `line ${row.line} ${formatValue(row.text.trim())} could be value, sigma or one number with a decimal comma; ` +
            'write decimals with a dot (1.25), or add the header line value,sigma if these are whole-number values and sigmas',
          { line: row.line },
        );
      }
    }
    vc = 0;
    sc = cols === 2 ? 1 : null;
  }
  const values = new Float64Array(rows);
  const sigma = sc === null ? null : new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    values[i] = data[i * cols + vc];
    if (sigma && sc !== null) {
      const s = data[i * cols + sc];
      if (!(s > 0)) {
        const line = lines[i];
        throw new FileFormatError(file, `line ${line}, column ${sc + 1} (sigma) must be > 0, got ${formatValue(s)}`, {
          line,
          column: sc + 1,
        });
      }
      sigma[i] = s;
    }
  }
  return { values, sigma, warnings };
}

/** A data .npy: (M,) values or (M, 2) value and sigma columns. */
export function parseDataNpy(file: string, bytes: Uint8Array): DataFileResult {
  const a = parseNpy(file, bytes);
  if (a.shape.length === 1) {
    if (a.shape[0] === 0) throw new FileFormatError(file, 'must hold at least one datum, got shape (0,)', { field: 'shape' });
    return { values: a.data.slice(), sigma: null, warnings: [] };
  }
  if (a.shape.length === 2 && a.shape[1] === 2 && a.shape[0] > 0) {
    const m = a.shape[0];
    const values = new Float64Array(m);
    const sigma = new Float64Array(m);
    for (let i = 0; i < m; i++) {
      values[i] = a.data[2 * i];
      const s = a.data[2 * i + 1];
      if (!(s > 0))
        throw new FileFormatError(file, `row ${i}, column 1 (sigma) must be > 0, got ${formatValue(s)}`, { field: `[${i}, 1]` });
      sigma[i] = s;
    }
    return { values, sigma, warnings: [] };
  }
  throw new FileFormatError(
    file,
    `must hold shape (M,) (values) or (M, 2) (value, sigma), got shape (${a.shape.join(', ')}${a.shape.length === 1 ? ',' : ''})`,
    { field: 'shape' },
  );
}

/** A data file by its extension (.csv / .txt or .npy). */
export function parseDataFile(f: NamedBytes): DataFileResult {
  const format = formatOf(f.name, ['csv', 'npy'], 'data');
  return format === 'npy' ? parseDataNpy(f.name, f.bytes) : parseDataCsv(f.name, f.bytes);
}

/**
 * The operator G from a .csv, .mtx or .npy file (no shape check here; see {@link assembleProblem}).
 * A CSV first row read as column names is reported in `warnings`.
 */
export function parseOperatorFile(f: NamedBytes, warnings?: FileWarning[]): Operator {
  const format = formatOf(f.name, ['csv', 'mtx', 'npy'], 'the operator G');
  checkFileSize(f.name, f.bytes.byteLength);
  switch (format) {
    case 'csv': {
      const table = parseCsv(f.name, f.bytes, { header: 'auto' });
      const note = headerNote(f.name, table);
      if (note && warnings) warnings.push({ file: f.name, message: note });
      return { kind: 'dense', matrix: table.matrix };
    }
    case 'mtx':
      return parseMatrixMarket(f.name, f.bytes);
    case 'npy':
      return { kind: 'dense', matrix: npyToMatrix(f.name, parseNpy(f.name, f.bytes)) };
    default:
      return assertNever(format, 'format');
  }
}

/** A full M × M data covariance, checked symmetric and positive definite. */
export function parseCovarianceFile(f: NamedBytes, m: number): Matrix {
  const format = formatOf(f.name, ['csv', 'mtx', 'npy'], 'a data covariance');
  let c: Matrix;
  if (format === 'csv') c = parseCsv(f.name, f.bytes, { header: false }).matrix;
  else if (format === 'npy') c = npyToMatrix(f.name, parseNpy(f.name, f.bytes));
  else {
    const g = parseMatrixMarket(f.name, f.bytes);
    c = operatorAsDense(g);
  }
  if (c.rows !== m || c.cols !== m) {
    throw new FileFormatError(f.name, `must hold a ${m} × ${m} matrix (one row and column per datum), got ${c.rows} × ${c.cols}`);
  }
  checkCovariance(f.name, c);
  return c;
}

/** Symmetric and positive definite (see ./covarianceCheck.ts), else a FileFormatError naming the entry. */
export function checkCovariance(file: string, c: Matrix): void {
  const defect = covarianceDefect(c);
  if (defect === null) return;
  switch (defect.kind) {
    case 'asymmetric': {
      const { row: i, col: j } = defect;
      throw new FileFormatError(
        file,
        `entry (row ${i}, column ${j}) must equal entry (row ${j}, column ${i}) = ${formatValue(defect.mirror)} (a covariance is symmetric), got ${formatValue(defect.value)}`,
        { field: `[${i}, ${j}]` },
      );
    }
    case 'not-positive-definite':
      throw new FileFormatError(
        file,
        `must be positive definite, got a matrix whose Cholesky factorisation fails at row ${defect.pivot} (pivot ${formatValue(defect.value)})`,
      );
    default:
      assertNever(defect);
  }
}

/** The grid as typed in the form; every field is checked and named. */
export interface GridForm {
  readonly shape: readonly number[];
  readonly spacing: readonly number[];
  readonly origin?: readonly number[];
  readonly unit?: string;
}

export const GRID_FORM = 'grid form';

/** Check the typed grid: shape [nx], [nx, ny] or [nx, ny, nz] positive integers, spacing > 0, finite origin. */
export function checkGridForm(g: GridForm): Grid {
  const fail = (field: string, expected: string, value: unknown): never => {
    throw new FileFormatError(GRID_FORM, `${field} must be ${expected}, got ${formatValue(value)}`, { field });
  };
  const dim = g.shape.length;
  if (dim < 1 || dim > 3) fail('shape', '[nx], [nx, ny] or [nx, ny, nz]', g.shape as unknown[]);
  const names = ['nx', 'ny', 'nz'];
  g.shape.forEach((s, k) => {
    if (!Number.isInteger(s) || s < 1) fail(names[k], 'a positive integer', s);
  });
  const cells = g.shape.reduce((a, b) => a * b, 1);
  if (cells > MAX_CELLS) fail('shape', `at most ${MAX_CELLS} cells in all`, `${g.shape.join(' × ')} = ${cells}`);
  if (g.spacing.length !== dim) fail('spacing', `${dim} number${dim === 1 ? '' : 's'}`, g.spacing as unknown[]);
  g.spacing.forEach((s, k) => {
    if (!Number.isFinite(s) || !(s > 0)) fail(['dx', 'dy', 'dz'][k], 'a finite number > 0', s);
  });
  const grid: { -readonly [K in keyof Grid]: Grid[K] } = { shape: [...g.shape], spacing: [...g.spacing] };
  if (g.origin !== undefined) {
    if (g.origin.length !== dim) fail('origin', `${dim} number${dim === 1 ? '' : 's'}`, g.origin as unknown[]);
    g.origin.forEach((s, k) => {
      if (!Number.isFinite(s)) fail(['x0', 'y0', 'z0'][k], 'a finite number', s);
    });
    grid.origin = [...g.origin];
  }
  if (g.unit !== undefined && g.unit !== '') grid.unit = g.unit;
  return grid;
}

export interface PiecesInput {
  readonly grid: GridForm;
  readonly operator: NamedBytes;
  readonly data: NamedBytes;
  readonly covariance?: NamedBytes;
  /** Where the data were measured: a CSV with header x[,y] or sx,sy,rx,ry (./geometryCsv.ts). */
  readonly geometry?: NamedBytes;
  /** Unit of the data values. */
  readonly dataUnit?: string;
  readonly title?: string;
  readonly quantity?: { readonly name: string; readonly unit?: string };
}

/**
 * Read and cross-check the pieces: G must be M × N with M the number of data and N the grid's
 * cell count; the errors come from exactly one of the sigma column and the covariance file.
 */
export function assembleProblem(input: PiecesInput, warnings?: FileWarning[]): Problem {
  const grid = checkGridForm(input.grid);
  const n = cellCount(grid);
  const d = parseDataFile(input.data);
  warnings?.push(...d.warnings);
  const m = d.values.length;
  const operator = parseOperatorFile(input.operator, warnings);
  const g = operator.matrix;
  if (g.cols !== n) {
    throw new FileFormatError(
      input.operator.name,
      `must have ${n} columns (one per grid cell, ${grid.shape.join(' × ')} in the grid form), got ${g.cols}`,
    );
  }
  if (g.rows !== m) {
    throw new FileFormatError(input.operator.name, `must have ${m} rows (one per datum in ${input.data.name}), got ${g.rows}`);
  }
  let data: DataSpec;
  if (input.covariance) {
    if (d.sigma) {
      throw new FileFormatError(
        input.data.name,
        `has a sigma column and a covariance file (${input.covariance.name}) was given too; give exactly one of them`,
      );
    }
    data = { values: d.values, covariance: parseCovarianceFile(input.covariance, m) };
  } else {
    if (!d.sigma) {
      throw new FileFormatError(input.data.name, 'must have a sigma column (value, sigma), or give a data covariance file');
    }
    data = { values: d.values, sigma: d.sigma };
  }
  if (input.geometry) {
    formatOf(input.geometry.name, ['csv'], 'the data geometry');
    const geo = parseGeometryCsv(input.geometry.name, input.geometry.bytes, grid, m, input.data.name);
    warnings?.push(...geo.warnings);
    data = { ...data, geometry: geo.geometry };
  }
  if (input.dataUnit !== undefined && input.dataUnit.trim() !== '') data = { ...data, unit: input.dataUnit.trim() };
  const problem: { -readonly [K in keyof Problem]: Problem[K] } = { grid, operator, data };
  if (input.title !== undefined && input.title !== '') problem.title = input.title;
  if (input.quantity !== undefined && input.quantity.name !== '') problem.quantity = input.quantity;
  checkProblemScales(input.data.name, problem, input.operator.name);
  return problem;
}
