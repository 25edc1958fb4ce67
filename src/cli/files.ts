/**
 * The command line's file access (node:fs lives here and nowhere in src/core): reading problem and
 * prior files with their sibling operator files, and writing outputs.
 */
import { readFileSync, statSync, writeFileSync } from 'node:fs';
import { dirname, isAbsolute, resolve } from 'node:path';
import type { Grid } from '../core/grid/grid.ts';
import { InputError } from '../core/errors.ts';
import { validatePrior } from '../core/prior/covariance.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import type { Problem } from '../core/problems/spec.ts';
import { FileFormatError, MAX_FILE_BYTES, type FileWarning } from '../core/io/errors.ts';
import { parsePriorFile } from '../core/io/priorFile.ts';
import { parseProblemFile } from '../core/io/problemFile.ts';

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
 * Bytes of a file; a missing, unreadable or too large file is a FileFormatError naming `label`
 * (the path as the user wrote it).
 */
export function readInputFile(path: string, label = path): Uint8Array {
  let size: number;
  try {
    const st = statSync(path);
    if (st.isDirectory()) throw new FileFormatError(label, 'cannot be read: it is a directory, not a file');
    size = st.size;
  } catch (e) {
    if (e instanceof FileFormatError) throw e;
    throw new FileFormatError(label, `cannot be read: ${describeFsError(e)}`);
  }
  if (size > MAX_FILE_BYTES) {
    throw new FileFormatError(label, `file is ${(size / 1024 / 1024).toFixed(1)} MiB, larger than the limit of ${MAX_FILE_BYTES / 1024 / 1024} MiB`);
  }
  try {
    return readFileSync(path);
  } catch (e) {
    throw new FileFormatError(label, `cannot be read: ${describeFsError(e)}`);
  }
}

/** Read a problem file and its sibling operator file (resolved against the problem file's directory). */
export function loadProblem(path: string): { problem: Problem; warnings: readonly FileWarning[] } {
  const bytes = readInputFile(path);
  const dir = dirname(resolve(path));
  return parseProblemFile(path, bytes, {
    readSibling: (name) => {
      const full = isAbsolute(name) ? name : resolve(dir, name);
      try {
        const st = statSync(full);
        if (st.size > MAX_FILE_BYTES) throw new Error(`${full} is larger than the limit of ${MAX_FILE_BYTES / 1024 / 1024} MiB`);
        return readFileSync(full);
      } catch (e) {
        if ((e as { code?: string }).code === undefined) throw e;
        throw new Error(`${describeFsError(e)} (${full})`);
      }
    },
  });
}

/**
 * Read a prior file and check it against the grid: the file format's own checks, then the core's
 * validatePrior (its InputError is reported against the prior file).
 */
export function loadPrior(path: string, grid: Grid): { prior: PriorSpec; warnings: readonly FileWarning[] } {
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
