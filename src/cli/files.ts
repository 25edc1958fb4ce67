/**
 * The command line's file access (node:fs lives here and nowhere in src/core): reading problem and
 * prior files with their sibling operator files, and writing outputs.
 */
import { closeSync, constants as fsConstants, fstatSync, openSync, readSync, realpathSync, writeFileSync } from 'node:fs';
import { dirname, isAbsolute, relative, resolve } from 'node:path';
import type { Geometry } from '../core/grid/grid.ts';
import { InputError } from '../core/errors.ts';
import { validatePrior } from '../core/prior/covariance.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import type { Problem } from '../core/problems/spec.ts';
import { FileFormatError, MAX_FILE_BYTES, type FileWarning } from '../core/io/errors.ts';
import { parsePriorFile } from '../core/io/priorFile.ts';
import { parseProblemFile } from '../core/io/problemFile.ts';
import { parseCsv } from '../core/io/csv.ts';
import { parseMatrixMarket } from '../core/io/matrixMarket.ts';
import { npyToMatrix, parseNpy } from '../core/io/npy.ts';
import { asymmetry } from '../core/io/covarianceCheck.ts';
import { operatorToDense } from '../core/linalg/operator.ts';
import type { Matrix } from '../core/linalg/matrix.ts';

/** Why a file could not be read, in words (from a Node.js error code). */
function describeFsError(e: unknown): string {
  const code = (e as { code?: string }).code;
  switch (code) {
    case 'ENOENT':
      return 'no such file';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    case 'EISDIR':
      return 'is a directory, not a file';
    default:
      return (e as Error).message;
  }
}

/**
 * Bytes of a regular file, reading at most {@link MAX_FILE_BYTES} (the limit is enforced while
 * reading, so a file that grows or lies about its size cannot exhaust memory). FIFOs, devices
 * (/dev/zero), sockets and directories are refused without reading: the file is opened
 * non-blocking, so a FIFO without a writer cannot hang the open. Failures are FileFormatErrors
 * naming `label` (the path as the user wrote it).
 */
export function readInputFile(path: string, label = path): Uint8Array {
  let fd: number;
  try {
    fd = openSync(path, fsConstants.O_RDONLY | (fsConstants.O_NONBLOCK ?? 0));
  } catch (e) {
    throw new FileFormatError(label, `cannot be read: ${describeFsError(e)}`);
  }
  try {
    const st = fstatSync(fd);
    if (st.isDirectory()) throw new FileFormatError(label, 'cannot be read: it is a directory, not a file');
    if (!st.isFile()) throw new FileFormatError(label, 'cannot be read: it is not a regular file (a pipe, device or socket)');
    if (st.size > MAX_FILE_BYTES) {
      throw new FileFormatError(
        label,
        `file is ${(st.size / 1024 / 1024).toFixed(1)} MiB, larger than the limit of ${MAX_FILE_BYTES / 1024 / 1024} MiB`,
      );
    }
    const chunks: Uint8Array[] = [];
    let total = 0;
    for (;;) {
      const chunk = new Uint8Array(Math.min(1 << 20, MAX_FILE_BYTES + 1 - total) || 1);
      const got = readSync(fd, chunk, 0, chunk.length, null);
      if (got === 0) break;
      total += got;
      if (total > MAX_FILE_BYTES) throw tooLarge(label, total);
      chunks.push(got === chunk.length ? chunk : chunk.subarray(0, got));
    }
    if (chunks.length === 1) return chunks[0];
    const out = new Uint8Array(total);
    let o = 0;
    for (const c of chunks) {
      out.set(c, o);
      o += c.length;
    }
    return out;
  } catch (e) {
    if (e instanceof FileFormatError) throw e;
    throw new FileFormatError(label, `cannot be read: ${describeFsError(e)}`);
  } finally {
    closeSync(fd);
  }
}

function tooLarge(label: string, bytes: number): FileFormatError {
  return new FileFormatError(
    label,
    `file grew past the limit of ${MAX_FILE_BYTES / 1024 / 1024} MiB while being read (${(bytes / 1024 / 1024).toFixed(1)} MiB read)`,
  );
}

/** Options of the file access. */
export interface FileAccess {
  /**
   * Folders (besides the problem file's own) from which files named inside a problem file may be
   * read: the command line's --read-from. Symbolic links are resolved before the check.
   */
  readonly readFrom?: readonly string[];
}

function realOrNull(p: string): string | null {
  try {
    return realpathSync(p);
  } catch {
    return null;
  }
}

function inside(folder: string, file: string): boolean {
  const rel = relative(folder, file);
  return rel === '' ? false : !rel.startsWith('..') && !isAbsolute(rel);
}

/**
 * Read a problem file and its sibling operator file. A sibling is read only when its real path
 * (symbolic links resolved) lies inside the problem file's real folder, or inside a folder given
 * in `access.readFrom`; only regular files, within the size limit. Messages name the sibling as
 * written in the problem file and never echo its contents.
 */
export function loadProblem(path: string, access: FileAccess = {}): { problem: Problem<Geometry>; warnings: readonly FileWarning[] } {
  const bytes = readInputFile(path);
  const dir = dirname(resolve(path));
  const allowed = [dir, ...(access.readFrom ?? [])].map((d) => realOrNull(resolve(d))).filter((d): d is string => d !== null);
  return parseProblemFile(path, bytes, {
    readSibling: (name) => {
      const full = isAbsolute(name) ? name : resolve(dir, name);
      const real = realOrNull(full);
      if (real === null) throw new Error(`no such file (${full})`);
      if (!allowed.some((d) => inside(d, real))) {
        throw new Error(
          `it lies outside the problem file's folder ${dir}${real !== full ? ` (it resolves to ${real})` : ''}; ` +
            'files named inside a problem file are read only from its folder, unless --read-from FOLDER allows another',
        );
      }
      try {
        return readInputFile(real, name);
      } catch (e) {
        if (e instanceof FileFormatError) throw new Error(e.detail);
        throw e;
      }
    },
  });
}

/**
 * Read a prior file and check it against the grid: the file format's own checks, then the core's
 * validatePrior (its InputError is reported against the prior file).
 */
export function loadPrior(path: string, grid: Geometry): { prior: PriorSpec; warnings: readonly FileWarning[] } {
  const result = parsePriorFile(path, readInputFile(path), { grid });
  try {
    validatePrior(result.prior, grid);
  } catch (e) {
    if (e instanceof InputError) throw new FileFormatError(path, e.message, { field: e.field });
    throw e;
  }
  return result;
}

/** Write text or bytes to a file; failures are reported naming the file. */
export function writeOutputFile(path: string, content: string | Uint8Array): void {
  try {
    writeFileSync(path, content);
  } catch (e) {
    throw new FileFormatError(path, `cannot be written: ${describeFsError(e)}`);
  }
}

/** Largest N of a matrix given to `check --covariance` (8·N² bytes: 288 MB at 6000; its Cholesky takes seconds). */
export const MAX_CHECK_MATRIX = 6000;

/**
 * A symmetric matrix from a .npy, .mtx (Matrix Market) or .csv file, for `check --covariance`:
 * square, at most {@link MAX_CHECK_MATRIX} rows, symmetric to 1e-12 of its largest |entry|
 * (../core/io/covarianceCheck.ts asymmetry). Errors name the file and what was expected.
 */
export function loadSymmetricMatrix(path: string): Matrix {
  const lower = path.toLowerCase();
  if (!/\.(npy|mtx|csv)$/.test(lower)) throw new FileFormatError(path, '--covariance must name a .npy, .mtx (Matrix Market) or .csv file');
  const bytes = readInputFile(path);
  let m: Matrix;
  if (lower.endsWith('.npy')) m = npyToMatrix(path, parseNpy(path, bytes));
  else if (lower.endsWith('.mtx')) m = operatorToDense(parseMatrixMarket(path, bytes));
  else if (lower.endsWith('.csv')) m = parseCsv(path, bytes, { header: 'auto' }).matrix;
  else throw new FileFormatError(path, `--covariance must name a .npy, .mtx (Matrix Market) or .csv file`);
  if (m.rows !== m.cols) throw new FileFormatError(path, `must hold a square matrix, got ${m.rows} × ${m.cols}`);
  if (m.rows > MAX_CHECK_MATRIX) {
    throw new FileFormatError(
      path,
      `must hold at most ${MAX_CHECK_MATRIX} rows for the dense check, got ${m.rows}; for a prior on a regular grid, check the prior file instead (check --problem P --prior Q, which needs no dense matrix)`,
    );
  }
  const a = asymmetry(m);
  if (a) {
    throw new FileFormatError(
      path,
      `must hold a symmetric matrix, but entry (${a.row + 1}, ${a.col + 1}) is ${a.value} and (${a.col + 1}, ${a.row + 1}) is ${a.mirror} (rows and columns from 1)`,
    );
  }
  return m;
}
