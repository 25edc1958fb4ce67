/**
 * Errors and warnings of the file formats (problem, prior, CSV, Matrix Market, NumPy .npy).
 *
 * Every message is one line that names the file, the place in it (a dotted JSON field such as
 * `data.sigma[3]`, or a line and column of a text file, or a byte offset of a binary file) and what
 * was expected, in the core's style "field must be expected, got value":
 *
 *   problem.json: data.sigma[3] must be > 0, got -1
 *   G.csv: line 4, column 2 must be a finite number, got "abc"
 *
 * These modules are pure (no node:fs) so that the browser and the command line share them.
 */
import { formatValue } from '../errors.ts';

/**
 * Largest file the parsers accept: 512 MiB. A dense 8000 × 8000 float64 operator is 512 MB as
 * .npy, which is already beyond what the dense posterior handles in memory on a laptop; larger
 * inputs are far more likely a wrong file than a real problem.
 */
export const MAX_FILE_BYTES = 512 * 1024 * 1024;

/** Where in a file an error was found. All parts are optional; `field` is a dotted JSON path. */
export interface FileLocation {
  readonly field?: string;
  /** 1-based line of a text file. */
  readonly line?: number;
  /** 1-based column (cell number for CSV, entry number for Matrix Market). */
  readonly column?: number;
  /** 0-based byte offset of a binary file. */
  readonly offset?: number;
}

/** A file that could not be read as the format it claims to be. */
export class FileFormatError extends Error {
  readonly file: string;
  readonly field: string | undefined;
  readonly line: number | undefined;
  readonly column: number | undefined;
  readonly offset: number | undefined;
  /** The message without the leading "file: ". */
  readonly detail: string;
  constructor(file: string, detail: string, where: FileLocation = {}) {
    super(`${file}: ${detail}`);
    this.name = 'FileFormatError';
    this.file = file;
    this.detail = detail;
    this.field = where.field;
    this.line = where.line;
    this.column = where.column;
    this.offset = where.offset;
  }
}

/** "field must be expected, got value" as a FileFormatError of `file`. */
export function fieldError(file: string, field: string, expected: string, value: unknown): FileFormatError {
  return new FileFormatError(file, `${field} must be ${expected}, got ${formatValue(value)}`, { field });
}

/** A non-fatal remark about a file (unknown field, ignored value). */
export interface FileWarning {
  readonly file: string;
  readonly field?: string;
  /** One line, starting with the file name, like the error messages. */
  readonly message: string;
}

/** Throws unless `byteLength` is within {@link MAX_FILE_BYTES}. */
export function checkFileSize(file: string, byteLength: number): void {
  if (byteLength > MAX_FILE_BYTES) {
    throw new FileFormatError(
      file,
      `file is ${(byteLength / 1024 / 1024).toFixed(1)} MiB, larger than the limit of ${MAX_FILE_BYTES / 1024 / 1024} MiB`,
    );
  }
}

/** Last path component of a file name (for messages about files named inside other files). */
export function baseName(path: string): string {
  const k = Math.max(path.lastIndexOf('/'), path.lastIndexOf('\\'));
  return k >= 0 ? path.slice(k + 1) : path;
}
