/**
 * What the user dropped or picked, turned into a Problem or a prior by the core's file formats
 * (src/core/io). Pure and worker-safe: the same function runs in ./parseWorker.ts (large files
 * stay off the main thread) and directly in unit tests.
 */
import { assertNever } from '../../core/errors.ts';
import { FileFormatError, type FileWarning } from '../../core/io/errors.ts';
import { parseProblemFile } from '../../core/io/problemFile.ts';
import { parsePriorFile } from '../../core/io/priorFile.ts';
import { assembleProblem, type NamedBytes, type PiecesInput } from '../../core/io/pieces.ts';
import type { Problem } from '../../core/problems/spec.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import type { Geometry } from '../../core/grid/grid.ts';

export type ParseRequest =
  /** A problem JSON and the sibling files it names, picked or dropped together. */
  | { readonly kind: 'problemFiles'; readonly files: readonly NamedBytes[] }
  /** G, data and optionally a covariance file, with the grid typed in a form. */
  | { readonly kind: 'pieces'; readonly input: PiecesInput }
  /** A prior file, checked against the current grid. */
  | { readonly kind: 'prior'; readonly file: NamedBytes; readonly grid: Geometry };

export type ParseResult =
  | { readonly kind: 'problem'; readonly problem: Problem<Geometry>; readonly label: string; readonly warnings: readonly string[] }
  | { readonly kind: 'prior'; readonly prior: PriorSpec; readonly warnings: readonly string[] };

/** Serialised failure (FileFormatError keeps its file name). */
export interface ParseFailure {
  readonly message: string;
  readonly file: string | null;
}

function baseName(name: string): string {
  const k = Math.max(name.lastIndexOf('/'), name.lastIndexOf('\\'));
  return k >= 0 ? name.slice(k + 1) : name;
}

/** The problem file among several picked files: exactly one .json. */
function pickProblemFile(files: readonly NamedBytes[]): NamedBytes {
  if (files.length === 0) throw new FileFormatError('(no file)', 'nothing was chosen: pick a problem .json file and the files it names');
  const json = files.filter((f) => f.name.toLowerCase().endsWith('.json'));
  if (json.length === 0) {
    throw new FileFormatError(
      files.map((f) => f.name).join(', '),
      'none of the chosen files is a problem file (.json); to load G and data files without one, use "Load from pieces"',
    );
  }
  if (json.length > 1) {
    throw new FileFormatError(json.map((f) => f.name).join(', '), 'choose exactly one problem .json file (with the files it names)');
  }
  return json[0];
}

export function parseRequest(req: ParseRequest): ParseResult {
  switch (req.kind) {
    case 'problemFiles': {
      const main = pickProblemFile(req.files);
      const byName = new Map(req.files.map((f) => [baseName(f.name), f.bytes] as const));
      const readSibling = (name: string): Uint8Array => {
        const b = byName.get(baseName(name));
        if (!b) throw new Error(`it was not among the chosen files (choose ${baseName(name)} together with ${main.name})`);
        return b;
      };
      const r = parseProblemFile(main.name, main.bytes, { readSibling });
      return {
        kind: 'problem',
        problem: r.problem,
        label: main.name,
        warnings: r.warnings.map((w) => w.message),
      };
    }
    case 'pieces': {
      const warnings: FileWarning[] = [];
      const problem = assembleProblem(req.input, warnings);
      return {
        kind: 'problem',
        problem,
        label: `${req.input.operator.name} + ${req.input.data.name}`,
        warnings: warnings.map((w) => w.message),
      };
    }
    case 'prior': {
      const r = parsePriorFile(req.file.name, req.file.bytes, { grid: req.grid });
      return { kind: 'prior', prior: r.prior, warnings: r.warnings.map((w) => w.message) };
    }
    default:
      return assertNever(req, 'parse request');
  }
}

export function toFailure(e: unknown): ParseFailure {
  if (e instanceof FileFormatError) return { message: e.message, file: e.file };
  return { message: e instanceof Error ? e.message : String(e), file: null };
}
