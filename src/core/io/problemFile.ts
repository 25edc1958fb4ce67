/**
 * The problem file: JSON `{"kind": "priorscope.problem", "version": 1, …}` ⇄ core Problem.
 *
 *   title      optional string
 *   grid       {"shape": [nx] | [nx, ny] | [nx, ny, nz], "spacing": [dx] | [dx, dy] | [dx, dy, dz] (> 0),
 *               "origin"?: [...], "unit"?: "m", "axes"?: ["x"] | ["x", "depth"] | ["x", "y", "z"]}
 *              cell (ix, iy, iz) sits at (x0 + dx·ix, y0 + dy·iy, z0 + dz·iz) and has index ix + nx·(iy + ny·iz);
 *              "axes" names the axes in every label (non-empty, distinct, at most 40 characters; default x, y, z)
 *   cells      instead of grid, the user's own mesh (../io/cellList.ts): {"centres": [[x, y], …] | "c.npy" (N × d),
 *              "volumes"?: [N numbers > 0], "unit"?: "m", "axes"?: [...]}, d = 1, 2 or 3; cell i is row i
 *   operator   {"dense": [[N numbers], … M rows]}
 *              | {"sparse": {"rows": [...], "cols": [...], "values": [...]}}   zero-based, duplicates summed
 *              | {"file": "G.csv" | "G.mtx" | "G.npy"}                         a sibling file, by extension
 *   data       {"values": [M numbers], "sigma": [M numbers > 0]}  or  {"values": [...], "covariance": M×M SPD}
 *              optional "unit": "ms"; optional geometry, M rows in the grid's unit and axes, for plots only:
 *              "positions": [[x], …] (1-D), [[x, y], …] (2-D) or [[x, y, z], …] (3-D), where each point datum
 *              was measured (may lie outside the grid), or "sources" and "receivers": [[x, y], …] (2-D) or
 *              [[x, y, z], …] (3-D), the ends of each path datum (a path that misses the grid entirely is warned
 *              about; for a cell list, the box of its centres)
 *   truth      optional, N numbers
 *   quantity   optional {"name": "...", "unit"?: "..."}
 *
 * M (the number of data) is the length of data.values; N is the grid's cell count (a cell list's row count). Sibling files
 * are read through an injected `readSibling(name) → bytes`, so the browser (files picked together)
 * and the command line (the problem file's directory) share this module. A data covariance must be
 * symmetric (to 1e-12 of its largest entry) and pass the Cholesky test of positive definiteness
 * (Higham 2002, Thm 10.7).
 */
import { cellCount, type Geometry, type Grid, gridDimension, isCellList } from '../grid/grid.ts';
import { InputError } from '../errors.ts';
import { readCellList } from './cellList.ts';
import { covarianceDefect } from './covarianceCheck.ts';
import type { Matrix } from '../linalg/matrix.ts';
import { matchOperator, operatorAsDense, operatorEntries, type Operator } from '../linalg/operator.ts';
import { sparseFromCoordinates } from '../linalg/sparse.ts';
import type { DataGeometry, DataSpec, Problem } from '../problems/spec.ts';
import { gridBounds, pathsMissingGrid, rowList } from '../problems/geometry.ts';
import { formatNumber } from '../format.ts';
import { assertNever, formatValue } from '../errors.ts';
import { SCALE_LIMIT, SCALE_MIN } from '../prior/validate.ts';
import { baseName, FileFormatError, type FileWarning } from './errors.ts';
import { formatJson, JsonReader, parseJsonText } from './json.ts';
import { checkKindVersion } from './priorFile.ts';
import { headerNote, parseCsv } from './csv.ts';
import { parseMatrixMarket, writeMatrixMarket } from './matrixMarket.ts';
import { npyToMatrix, parseNpy, writeNpyMatrix } from './npy.ts';
import { writeCsv } from './csv.ts';

export const PROBLEM_KIND = 'priorscope.problem';
export const PROBLEM_VERSION = 1;

/** Longest axis name accepted in grid.axes (characters). */
const AXIS_NAME_MAX = 40;

/** Largest grid accepted from a file (cells). Dense covariances beyond this do not fit in memory anyway. */
export const MAX_CELLS = 4_000_000;

/** Reads a file named in the problem file (relative to it). May throw; the message is reported. */
export type ReadSibling = (name: string) => Uint8Array;

export interface ProblemReadOptions {
  readonly readSibling?: ReadSibling;
}

export interface ProblemFileResult {
  /** On a regular grid or, when the file gave `cells`, on a cell list. */
  readonly problem: Problem<Geometry>;
  readonly warnings: readonly FileWarning[];
}

/** The fields each object of a problem file may hold (the `--help formats` test checks that every one is documented). */
export const TOP_FIELDS = ['kind', 'version', 'title', 'grid', 'cells', 'operator', 'data', 'truth', 'quantity'] as const;
export const CELLS_FIELDS = ['centres', 'volumes', 'unit', 'axes'] as const;
export const GRID_FIELDS = ['shape', 'spacing', 'origin', 'unit', 'axes'] as const;
export const OPERATOR_FIELDS = ['dense', 'sparse', 'file'] as const;
export const DATA_FIELDS = ['values', 'sigma', 'covariance', 'unit', 'positions', 'sources', 'receivers'] as const;

function readGrid(r: JsonReader, value: unknown): Grid {
  const g = r.object(value, 'grid', GRID_FIELDS);
  const shapeValue = r.required(g, 'grid', 'shape', '[nx], [nx, ny] or [nx, ny, nz]');
  if (!Array.isArray(shapeValue) || shapeValue.length < 1 || shapeValue.length > 3) {
    r.fail('grid.shape', '[nx], [nx, ny] or [nx, ny, nz] (positive integers)', shapeValue);
  }
  const shape = r.numbers(shapeValue, 'grid.shape', undefined, { integer: true, ge: 1 });
  const dim = shape.length;
  const cells = shape.reduce((a, b) => a * b, 1);
  if (cells > MAX_CELLS) r.fail('grid.shape', `at most ${MAX_CELLS} cells in all`, `${shape.join(' × ')} = ${cells}`);
  const spacing = r.numbers(r.required(g, 'grid', 'spacing', ['[dx]', '[dx, dy]', '[dx, dy, dz]'][dim - 1]), 'grid.spacing', dim, {
    gt: 0,
  });
  const grid: { -readonly [K in keyof Grid]: Grid[K] } = { shape, spacing };
  if (g.origin !== undefined) grid.origin = r.numbers(g.origin, 'grid.origin', dim);
  if (g.unit !== undefined) grid.unit = r.string(g.unit, 'grid.unit');
  if (g.axes !== undefined) {
    const names = r
      .array(g.axes, 'grid.axes', dim, dim === 1 ? 'name (a string)' : 'names (strings)')
      .map((a, k) => r.string(a, `grid.axes[${k}]`).trim());
    names.forEach((a, k) => {
      if (a === '' || a.length > AXIS_NAME_MAX) r.fail(`grid.axes[${k}]`, `a name of 1 to ${AXIS_NAME_MAX} characters`, a);
    });
    names.forEach((a, k) => {
      if (names.indexOf(a) < k) r.fail(`grid.axes[${k}]`, `a name different from grid.axes[${names.indexOf(a)}]`, a);
    });
    grid.axes = names;
  }
  return grid;
}

/**
 * The data fields; `operatorRows` is the row count of an inline dense operator, so that when
 * data.values alone disagrees with data.sigma and the operator, data.values is the field named.
 */
function readData(r: JsonReader, value: unknown, grid: Geometry, operatorRows?: number): DataSpec {
  const d = r.object(value, 'data', DATA_FIELDS);
  const values = r.vector(r.required(d, 'data', 'values', 'an array of numbers (the data)'), 'data.values');
  const m = values.length;
  if (m === 0) r.fail('data.values', 'a non-empty array of numbers', values);
  const geometry = readGeometry(r, d, grid, m);
  const unit = {
    ...(d.unit !== undefined ? { unit: r.string(d.unit, 'data.unit') } : {}),
    ...(geometry ? { geometry } : {}),
  };
  if (d.sigma !== undefined && d.covariance !== undefined) {
    r.fail('data', 'an object with either sigma or covariance, not both', 'both');
  }
  if (d.covariance !== undefined) {
    const c = r.matrixRows(d.covariance, 'data.covariance', m, m);
    checkDataCovariance(r, c);
    return { values, covariance: c, ...unit };
  }
  if (d.sigma === undefined) r.fail('data.sigma', `an array of ${m} numbers > 0 (or give data.covariance)`, undefined);
  if (Array.isArray(d.sigma) && d.sigma.length !== m && d.sigma.length === operatorRows) {
    r.fail('data.values', `an array of ${operatorRows} numbers (as data.sigma and operator.dense have ${operatorRows})`, values);
  }
  return { values, sigma: r.vector(d.sigma, 'data.sigma', m, { gt: 0 }), ...unit };
}

/** "[x, depth]": one row of coordinates named by the grid's axes. */
function coordinateWords(grid: Geometry, dim: number): string {
  const names = grid.axes ?? ['x', 'y', 'z'];
  return `[${names.slice(0, dim).join(', ')}]`;
}

/** M rows of `dim` finite numbers each. */
function readCoordinates(r: JsonReader, value: unknown, field: string, m: number, dim: number, words: string) {
  const rows = r.array(value, field, undefined, 'rows');
  if (rows.length !== m) r.fail(field, `an array of ${m} rows ${words} (one per datum in data.values)`, rows);
  for (let k = 0; k < m; k++) {
    const row = rows[k];
    if (!Array.isArray(row) || row.length !== dim)
      r.fail(`${field}[${k}]`, `${words}: an array of ${dim} number${dim === 1 ? '' : 's'}`, row);
  }
  return r.matrixRows(rows, field, m, dim);
}

/** The optional geometry fields of `data` (see the module comment); warns about paths that miss the grid. */
function readGeometry(r: JsonReader, d: Record<string, unknown>, grid: Geometry, m: number): DataGeometry | null {
  const dim = gridDimension(grid);
  const paths = d.sources !== undefined || d.receivers !== undefined;
  if (d.positions !== undefined && paths) {
    r.fail('data', 'an object with either positions (point data) or sources and receivers (path data), not both', 'both');
  }
  if (d.positions !== undefined) {
    return { kind: 'points', positions: readCoordinates(r, d.positions, 'data.positions', m, dim, coordinateWords(grid, dim)) };
  }
  if (!paths) return null;
  if (dim === 1) {
    const field = d.sources !== undefined ? 'data.sources' : 'data.receivers';
    r.fail(
      field,
      'absent on a 1-D grid (paths need a 2-D or 3-D grid; give data.positions [[x], …] for point data)',
      d.sources ?? d.receivers,
    );
  }
  const words = coordinateWords(grid, dim);
  for (const [k, other] of [
    ['sources', 'receivers'],
    ['receivers', 'sources'],
  ] as const) {
    if (d[k] === undefined)
      r.fail(`data.${k}`, `an array of ${m} rows ${words} (given with data.${other}: each path has both ends)`, undefined);
  }
  const geometry: DataGeometry = {
    kind: 'paths',
    sources: readCoordinates(r, d.sources, 'data.sources', m, dim, words),
    receivers: readCoordinates(r, d.receivers, 'data.receivers', m, dim, words),
  };
  const missing = pathsMissingGrid(grid, geometry);
  if (missing.length > 0) r.warn('data.sources', pathsMissWarning(grid, missing, m));
  return geometry;
}

/** The warning about paths outside the grid, with the grid's outline so a wrong origin or swapped shape shows. */
export function pathsMissWarning(
  grid: Geometry,
  missing: readonly number[],
  m: number,
  words = {
    ends: 'data.sources → data.receivers',
    origin: 'grid.origin',
    shape: gridDimension(grid) === 3 ? 'grid.shape [nx, ny, nz]' : 'grid.shape [nx, ny]',
  },
): string {
  const b = gridBounds(grid);
  const [ax, ay, az] = grid.axes ?? ['x', 'y', 'z'];
  const u = grid.unit ? ` ${grid.unit}` : '';
  const range = (name: string, v: readonly [number, number]) => `${name} ${formatNumber(v[0])} to ${formatNumber(v[1])}${u}`;
  const span = [range(ax, b.x), range(ay, b.y), ...(b.z ? [range(az ?? 'z', b.z)] : [])].join(', ');
  const check = isCellList(grid)
    ? 'check the coordinates of cells.centres and of the path ends (same unit and axes)'
    : `check ${words.origin} (the first cell centre) and the order of ${words.shape}`;
  const what = isCellList(grid) ? 'the cell list' : 'the grid';
  return `${missing.length} of ${m} path${m === 1 ? '' : 's'} (${words.ends}, ${rowList(missing)}) miss ${what} entirely (it spans ${span}); ${check}`;
}

/** The data covariance must be symmetric and positive definite (see ./covarianceCheck.ts). */
function checkDataCovariance(r: JsonReader, c: Matrix): void {
  const defect = covarianceDefect(c);
  if (defect === null) return;
  switch (defect.kind) {
    case 'asymmetric': {
      const { row: i, col: j } = defect;
      r.fail(
        `data.covariance[${i}][${j}]`,
        `equal to data.covariance[${j}][${i}] = ${defect.mirror} (the covariance must be symmetric)`,
        defect.value,
      );
      break;
    }
    case 'not-positive-definite':
      throw new FileFormatError(
        r.file,
        `data.covariance must be positive definite, got a matrix whose Cholesky factorisation fails at row ${defect.pivot} (pivot ${formatValue(defect.value)})`,
        { field: 'data.covariance' },
      );
    default:
      assertNever(defect);
  }
}

function readIndex(r: JsonReader, value: unknown, array: string, p: number, limit: number, what: string): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 0 || value >= limit) {
    r.fail(`${array}[${p}]`, `an integer from 0 to ${limit - 1} (zero-based ${what})`, value);
  }
  return value as number;
}

function readOperator(r: JsonReader, value: unknown, m: number, n: number, options: ProblemReadOptions, cellWord = 'grid cell'): Operator {
  const o = r.object(value, 'operator', OPERATOR_FIELDS);
  const forms = ['dense', 'sparse', 'file'].filter((k) => o[k] !== undefined);
  if (forms.length !== 1) {
    r.fail('operator', 'an object with exactly one of dense, sparse, file', forms.length === 0 ? 'none of them' : forms.join(' and '));
  }
  if (o.dense !== undefined) {
    const rows = r.array(o.dense, 'operator.dense', undefined, 'rows');
    if (rows.length !== m) r.fail('operator.dense', `an array of ${m} rows (one per datum in data.values)`, rows);
    for (let i = 0; i < m; i++) {
      const row = rows[i];
      if (!Array.isArray(row) || row.length !== n) r.fail(`operator.dense[${i}]`, `an array of ${n} numbers (one per ${cellWord})`, row);
    }
    return { kind: 'dense', matrix: r.matrixRows(o.dense, 'operator.dense', m, n) };
  }
  if (o.sparse !== undefined) {
    const s = r.object(o.sparse, 'operator.sparse', ['rows', 'cols', 'values']);
    const values = r.numbers(r.required(s, 'operator.sparse', 'values', 'an array of numbers'), 'operator.sparse.values');
    const k = values.length;
    const ri = r.array(r.required(s, 'operator.sparse', 'rows', `an array of ${k} row indices`), 'operator.sparse.rows', k, 'row indices');
    const ci = r.array(
      r.required(s, 'operator.sparse', 'cols', `an array of ${k} column indices`),
      'operator.sparse.cols',
      k,
      'column indices',
    );
    const rows = ri.map((v, p) => readIndex(r, v, 'operator.sparse.rows', p, m, 'datum index'));
    const cols = ci.map((v, p) => readIndex(r, v, 'operator.sparse.cols', p, n, 'cell index'));
    return { kind: 'sparse', matrix: sparseFromCoordinates(m, n, rows, cols, values) };
  }
  const name = r.string(o.file, 'operator.file');
  const lower = name.toLowerCase();
  const format = lower.endsWith('.csv') ? 'csv' : lower.endsWith('.mtx') ? 'mtx' : lower.endsWith('.npy') ? 'npy' : null;
  if (!format) r.fail('operator.file', 'the name of a .csv, .mtx (Matrix Market) or .npy file', name);
  const bytes = siblingBytes(r, 'operator.file', name, options);
  const sibling = baseName(name);
  let g: Operator;
  switch (format!) {
    case 'csv': {
      const table = parseCsv(sibling, bytes, { header: 'auto' });
      const note = headerNote(sibling, table);
      if (note) r.warn('operator.file', `operator.file ${note}`);
      g = { kind: 'dense', matrix: table.matrix };
      break;
    }
    case 'mtx':
      g = parseMatrixMarket(sibling, bytes);
      break;
    case 'npy':
      g = { kind: 'dense', matrix: npyToMatrix(sibling, parseNpy(sibling, bytes)) };
      break;
    default:
      return assertNever(format!);
  }
  if (g.matrix.rows !== m || g.matrix.cols !== n) {
    throw new FileFormatError(
      r.file,
      `operator.file ${formatValue(name)} must hold a ${m} × ${n} matrix (data × ${cellWord}s), got ${g.matrix.rows} × ${g.matrix.cols}`,
      { field: 'operator.file' },
    );
  }
  return g;
}

/**
 * The scale rule of src/core/prior/validate.ts (SCALE_LIMIT) for the problem: |data| and |G| entries
 * ≤ 1e50, sigma from 1e-50 to 1e50 (σ = 1e-300 used to overflow 1/σ² into null results). Throws a
 * FileFormatError of `file` naming the field.
 */
export function checkProblemScales(file: string, problem: Problem<Geometry>, operatorField = 'operator'): void {
  const fail = (field: string, expected: string, v: number): never => {
    throw new FileFormatError(
      file,
      `${field} must be ${expected} (results at this scale cannot be computed in double precision; change the unit), got ${formatValue(v)}`,
      { field },
    );
  };
  const d = problem.data;
  d.values.forEach((v, i) => {
    if (Math.abs(v) > SCALE_LIMIT) fail(`data.values[${i}]`, `of magnitude ≤ ${SCALE_LIMIT}`, v);
  });
  d.sigma?.forEach((v, i) => {
    if (v > SCALE_LIMIT || v < SCALE_MIN) fail(`data.sigma[${i}]`, `from ${SCALE_MIN} to ${SCALE_LIMIT}`, v);
  });
  const entries = operatorEntries(problem.operator);
  for (let k = 0; k < entries.length; k++) {
    if (Math.abs(entries[k]) > SCALE_LIMIT) fail(operatorField, `a matrix with entries of magnitude ≤ ${SCALE_LIMIT}`, entries[k]);
  }
}

/** Bytes of a sibling file named in `field`, the failure worded as a FileFormatError of the problem file. */
function siblingBytes(r: JsonReader, field: string, name: string, options: ProblemReadOptions): Uint8Array {
  if (!options.readSibling) {
    throw new FileFormatError(r.file, `${field} ${formatValue(name)} cannot be read here (no access to files next to ${r.file})`, {
      field,
    });
  }
  try {
    return options.readSibling(name);
  } catch (e) {
    throw new FileFormatError(r.file, `${field} ${formatValue(name)} could not be read: ${(e as Error).message}`, { field });
  }
}

/** The `cells` object (../io/cellList.ts); centres inline or in a sibling .npy of shape (N, d). */
function readCells(r: JsonReader, value: unknown, options: ProblemReadOptions): Geometry {
  const c = r.object(value, 'cells', CELLS_FIELDS);
  let npy: Matrix | undefined;
  if (typeof c.centres === 'string') {
    const name = c.centres;
    if (!name.toLowerCase().endsWith('.npy')) r.fail('cells.centres', 'rows [[x, y], …] or the name of a sibling .npy file (N × d)', name);
    const sibling = baseName(name);
    const a = parseNpy(sibling, siblingBytes(r, 'cells.centres', name, options));
    if (a.shape.length !== 2 || a.shape[1] < 1 || a.shape[1] > 3) {
      throw new FileFormatError(
        sibling,
        `must hold the cell centres as shape (N, d) with d = 1, 2 or 3 coordinates per row, got shape (${a.shape.join(', ')}${a.shape.length === 1 ? ',' : ''})`,
      );
    }
    npy = npyToMatrix(sibling, a);
  }
  try {
    return readCellList(c, npy, 'cells');
  } catch (e) {
    if (e instanceof InputError) throw new FileFormatError(r.file, e.message, { field: e.field });
    throw e;
  }
}

/** Parse a problem file (text or UTF-8 bytes). */
export function parseProblemFile(file: string, input: string | Uint8Array, options: ProblemReadOptions = {}): ProblemFileResult {
  const r = new JsonReader(file);
  const obj = r.object(parseJsonText(file, input), '', TOP_FIELDS);
  checkKindVersion(r, obj, PROBLEM_KIND, PROBLEM_VERSION);
  if (obj.cells !== undefined && obj.grid !== undefined) {
    r.fail('cells', 'absent when grid is given (a problem has either a regular grid or a cell list of its own mesh)', 'both');
  }
  const grid: Geometry =
    obj.cells !== undefined
      ? readCells(r, obj.cells, options)
      : readGrid(r, r.required(obj, '', 'grid', 'an object with shape and spacing'));
  const n = cellCount(grid);
  const op = obj.operator as { dense?: unknown } | undefined;
  const operatorRows = op !== null && typeof op === 'object' && Array.isArray(op.dense) ? op.dense.length : undefined;
  const data = readData(r, r.required(obj, '', 'data', 'an object with values and sigma or covariance'), grid, operatorRows);
  const operator = readOperator(
    r,
    r.required(obj, '', 'operator', 'an object with dense, sparse or file'),
    data.values.length,
    n,
    options,
    isCellList(grid) ? 'cell (row of cells.centres)' : 'grid cell',
  );
  const problem: { -readonly [K in keyof Problem<Geometry>]: Problem<Geometry>[K] } = { grid, operator, data };
  if (obj.title !== undefined) problem.title = r.string(obj.title, 'title');
  if (obj.truth !== undefined) problem.truth = r.vector(obj.truth, 'truth', n);
  if (obj.quantity !== undefined) {
    const q = r.object(obj.quantity, 'quantity', ['name', 'unit']);
    const name = r.string(r.required(q, 'quantity', 'name', 'a string'), 'quantity.name');
    problem.quantity = q.unit !== undefined ? { name, unit: r.string(q.unit, 'quantity.unit') } : { name };
  }
  checkProblemScales(file, problem);
  return { problem, warnings: r.warnings };
}

/** How the writer stores the operator: inline in the JSON, or in a sibling file of this name. */
export type OperatorPlacement = 'inline' | { readonly file: string };

export interface ProblemWriteResult {
  /** The problem file text (JSON from formatJson: one field per line, number arrays on one line). */
  readonly json: string;
  /** The sibling operator file, when the placement asked for one. */
  readonly operatorFile?: { readonly name: string; readonly bytes: Uint8Array };
}

function vec(a: ArrayLike<number>): number[] {
  return Array.from(a);
}

/** The JSON object of a problem file (operator inline unless `operatorFile` names a sibling). */
function geometryJson(g: Geometry): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  if (isCellList(g)) {
    const axis = [g.x, g.y, g.z];
    out.centres = Array.from({ length: g.x.length }, (_, i) => axis.slice(0, g.dim).map((a) => a[i]));
    if (g.volumes !== undefined) out.volumes = vec(g.volumes);
  } else {
    out.shape = vec(g.shape);
    out.spacing = vec(g.spacing);
    if (g.origin !== undefined) out.origin = vec(g.origin);
  }
  if (g.unit !== undefined) out.unit = g.unit;
  if (g.axes !== undefined) out.axes = [...g.axes];
  return out;
}

export function problemToJson(problem: Problem<Geometry>, operatorFile?: string): Record<string, unknown> {
  let operator: Record<string, unknown>;
  if (operatorFile !== undefined) operator = { file: operatorFile };
  else {
    operator = matchOperator<Record<string, unknown>>(problem.operator, {
      dense: ({ rows, cols, data }) => ({ dense: Array.from({ length: rows }, (_, i) => vec(data.subarray(i * cols, (i + 1) * cols))) }),
      sparse: (s) => {
        const rows: number[] = [];
        for (let i = 0; i < s.rows; i++) for (let p = s.rowPtr[i]; p < s.rowPtr[i + 1]; p++) rows.push(i);
        return { sparse: { rows, cols: vec(s.colIdx), values: vec(s.values) } };
      },
    });
  }
  const d = problem.data;
  const data: Record<string, unknown> = { values: vec(d.values) };
  if (d.covariance) {
    const c = d.covariance;
    data.covariance = Array.from({ length: c.rows }, (_, i) => vec(c.data.subarray(i * c.cols, (i + 1) * c.cols)));
  } else if (d.sigma) data.sigma = vec(d.sigma);
  if (d.unit !== undefined) data.unit = d.unit;
  const geo = d.geometry;
  if (geo?.kind === 'points') data.positions = matrixRowsJson(geo.positions);
  else if (geo?.kind === 'paths') {
    data.sources = matrixRowsJson(geo.sources);
    data.receivers = matrixRowsJson(geo.receivers);
  }
  const out: Record<string, unknown> = { kind: PROBLEM_KIND, version: PROBLEM_VERSION };
  if (problem.title !== undefined) out.title = problem.title;
  out[isCellList(problem.grid) ? 'cells' : 'grid'] = geometryJson(problem.grid);
  out.operator = operator;
  out.data = data;
  if (problem.truth !== undefined) out.truth = vec(problem.truth);
  if (problem.quantity !== undefined) out.quantity = { ...problem.quantity };
  return out;
}

/** Bytes of an operator in the sibling format chosen by the file name's extension. */
export function encodeOperatorFile(name: string, g: Operator): Uint8Array {
  const lower = name.toLowerCase();
  if (lower.endsWith('.npy')) return writeNpyMatrix(operatorAsDense(g));
  if (lower.endsWith('.mtx')) return new TextEncoder().encode(writeMatrixMarket(g));
  if (lower.endsWith('.csv')) return new TextEncoder().encode(writeCsv(operatorAsDense(g)));
  throw new RangeError(`operator file name must end in .npy, .mtx or .csv, got ${JSON.stringify(name)}`);
}

/**
 * Problem file text, and the operator's sibling file when `placement` names one. The output reads
 * back (with the sibling) to an equal Problem: numbers are written in their shortest round-trip
 * form, a sparse operator as its (sorted, duplicate-free) coordinates.
 */
export function writeProblemFile(problem: Problem<Geometry>, placement: OperatorPlacement = 'inline'): ProblemWriteResult {
  if (placement === 'inline') return { json: formatJson(problemToJson(problem)) };
  const bytes = encodeOperatorFile(placement.file, problem.operator);
  return {
    json: formatJson(problemToJson(problem, placement.file)),
    operatorFile: { name: placement.file, bytes },
  };
}

/** A dense matrix → nested rows (for JSON output). */
export function matrixRowsJson(m: Matrix): number[][] {
  return Array.from({ length: m.rows }, (_, i) => vec(m.data.subarray(i * m.cols, (i + 1) * m.cols)));
}
