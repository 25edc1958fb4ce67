/**
 * Restoring the autosaved session: nothing read back from storage is trusted. The stored record
 * may come from an older build, a damaged database or a hand-edited one, and a bad record must
 * never give a blank page or errors that persist across reloads.
 *
 * - The session record keeps only known keys, each checked (tab, seed, selected cell, candidates);
 *   what fails is dropped with a note in our words.
 * - The user's problem goes through the same validators as a problem file: it is written as a
 *   problem file with its operator in a sibling .npy file and parsed back (src/core/io/problemFile.ts),
 *   so a short G, σ 0, non-finite numbers or an oversized grid are refused with the file reader's
 *   message naming the field.
 * - Priors (the session's and the candidates') are checked against the problem's grid by the
 *   prior-file checks when the problem is open (./slice.ts openDemo / adoptProblem, ./start.ts).
 */
import { InputError } from '../../core/errors.ts';
import { fieldError, FileFormatError } from '../../core/io/errors.ts';
import { JsonReader } from '../../core/io/json.ts';
import { PRIOR_KIND, PRIOR_VERSION, readPriorObject } from '../../core/io/priorFile.ts';
import type { Geometry } from '../../core/grid/grid.ts';
import { MAX_CELL_LIST } from '../../core/prior/cells.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import { validatePrior } from '../../core/prior/validate.ts';
import { DEMO_CHOICES } from '../demos.ts';
import { MAX_CELLS, parseProblemFile, writeProblemFile } from '../../core/io/problemFile.ts';
import type { Problem } from '../../core/problems/spec.ts';
import { DEFAULT_SEED, TABS, type TabId } from '../view/slice.ts';
import { SESSION_FORMAT, type SavedSession } from './autosave.ts';

/** Candidates kept at most (the selection screen pins up to four). */
export const MAX_RESTORED_CANDIDATES = 4;

export interface RestoredSession {
  readonly session: SavedSession;
  /** What was dropped, in plain words (shown once as a notice). */
  readonly notes: readonly string[];
}

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const isTab = (v: unknown): v is TabId => TABS.some((t) => t.id === v);

/** The saved session with only known, well-formed keys; null when it cannot be used at all. */
export function sanitizeSavedSession(raw: unknown): RestoredSession | null {
  if (!isObject(raw) || raw.format !== SESSION_FORMAT) return null;
  const notes: string[] = [];
  const src = raw.source;
  let source: SavedSession['source'];
  if (isObject(src) && src.kind === 'demo' && typeof src.demoId === 'string') source = { kind: 'demo', demoId: src.demoId };
  else if (isObject(src) && src.kind === 'user' && typeof src.problemKey === 'string' && typeof src.label === 'string') {
    source = { kind: 'user', problemKey: src.problemKey, label: src.label.slice(0, 200) };
  } else return null;
  if (isObject(src) && src.kind === 'demo' && !DEMO_CHOICES.some((d) => d.id === src.demoId)) return null;
  // The prior through the prior-file reader (kinds, finite numbers, the term limit); grid checks follow when the problem is open.
  let prior: PriorSpec | undefined;
  try {
    prior = readStoredPrior('saved prior', raw.prior);
  } catch (e) {
    notes.push(damagedPrior(e));
  }
  const tab: TabId = isTab(raw.tab) ? raw.tab : 'posterior';
  if (!isTab(raw.tab)) notes.push('the saved screen was not recognised, so the posterior is shown');
  const seedOk = typeof raw.seed === 'number' && Number.isInteger(raw.seed) && raw.seed >= 0 && raw.seed <= 0xffffffff;
  if (!seedOk) notes.push('the saved seed was not valid, so the default seed is used');
  const cellOk =
    raw.selectedCell === null || (typeof raw.selectedCell === 'number' && Number.isInteger(raw.selectedCell) && raw.selectedCell >= 0);
  const extra: Record<string, unknown> = {};
  if (isObject(raw.extra) && raw.extra.candidates !== undefined) {
    const c = raw.extra.candidates;
    const kept = Array.isArray(c) ? c.filter(isCandidateShape).slice(0, MAX_RESTORED_CANDIDATES) : [];
    if (!Array.isArray(c) || kept.length !== c.length) notes.push('some saved candidate priors were damaged and were dropped');
    extra.candidates = kept;
  }
  const session: SavedSession = {
    format: SESSION_FORMAT,
    source,
    // Undefined when damaged: the problem's starting prior is used (see ./start.ts restoreSaved).
    prior: prior as PriorSpec,
    seed: seedOk ? (raw.seed as number) : DEFAULT_SEED,
    tab,
    selectedCell: cellOk ? (raw.selectedCell as number | null) : null,
    ...(Object.keys(extra).length > 0 ? { extra } : {}),
    savedAt: typeof raw.savedAt === 'number' && Number.isFinite(raw.savedAt) ? raw.savedAt : 0,
  };
  return { session, notes };
}

function isCandidateShape(v: unknown): boolean {
  if (!(isObject(v) && typeof v.id === 'string' && typeof v.name === 'string' && typeof v.colour === 'string')) return false;
  try {
    readStoredPrior('candidate prior', v.prior);
    return true;
  } catch {
    return false;
  }
}

/** A plain copy with typed arrays turned into arrays (NaN kept), for the JSON-shaped prior reader. */
function plain(v: unknown, depth = 0): unknown {
  if (depth > 20) return null;
  if (ArrayBuffer.isView(v) && !(v instanceof DataView)) return Array.from(v as unknown as ArrayLike<number>);
  if (Array.isArray(v)) return v.map((x) => plain(x, depth + 1));
  if (isObject(v)) return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, plain(x, depth + 1)]));
  return v;
}

/**
 * A prior from storage, checked like a prior file (field kinds, finite numbers, at most MAX_TERMS terms)
 * and, given a grid, by the core's validatePrior against it. Throws an Error with our one-line message.
 */
export function readStoredPrior(file: string, value: unknown, grid?: Geometry): PriorSpec {
  if (!isObject(value)) throw fieldError(file, 'prior', 'an object with mean and terms', value);
  const prior = readPriorObject(
    new JsonReader(file),
    { ...(plain(value) as object), kind: PRIOR_KIND, version: PRIOR_VERSION },
    grid ? { grid } : {},
  );
  if (grid) {
    try {
      validatePrior(prior, grid);
    } catch (e) {
      throw new FileFormatError(file, e instanceof Error ? e.message : String(e));
    }
  }
  return prior;
}

/** The note for a saved prior that did not pass the checks. */
export function damagedPrior(e: unknown): string {
  return `the saved prior was damaged (${e instanceof Error ? e.message : String(e)}), so the problem's starting prior is shown`;
}

/**
 * The saved problem through the problem-file validators (write, then parse back). Throws an Error
 * with our message when it cannot be restored.
 */
export function validateSavedProblem(raw: unknown): Problem<Geometry> {
  const shape = shapeDefect(raw);
  if (shape) throw new Error(`The saved problem could not be restored: ${shape}.`);
  try {
    // Dense operators travel as .npy (exact binary), sparse ones as Matrix Market (exact coordinates).
    const OPERATOR = (raw as Problem).operator?.kind === 'sparse' ? 'saved-operator.mtx' : 'saved-operator.npy';
    const written = writeProblemFile(raw as Problem, { file: OPERATOR });
    const bytes = written.operatorFile?.bytes;
    const parsed = parseProblemFile('the saved problem', written.json, {
      readSibling: (name) => {
        if (name !== OPERATOR || !bytes) throw new Error('missing');
        return bytes;
      },
    }).problem;
    return parsed;
  } catch (e) {
    if (e instanceof InputError || e instanceof FileFormatError) throw new Error(`The saved problem could not be restored: ${e.message}`);
    throw new Error('The saved problem could not be restored: the stored copy is damaged.');
  }
}

const isCount = (v: unknown, max: number): v is number => typeof v === 'number' && Number.isInteger(v) && v >= 1 && v <= max;

/**
 * Sizes checked before the saved problem is written out for the file validators: a damaged size
 * (a row count of 1e308, arrays shorter than the sizes claim) must be refused at once, not looped over.
 */
function shapeDefect(raw: unknown): string | null {
  if (!isObject(raw) || !isObject(raw.grid) || !isObject(raw.operator) || !isObject(raw.data))
    return 'the stored copy is damaged (grid, operator or data missing)';
  let n: number;
  if (raw.grid.kind === 'cells') {
    // A cell list: three coordinate arrays of one length (the rest is checked by the problem-file reader).
    const { x, y, z } = raw.grid;
    if (!(x instanceof Float64Array) || !(y instanceof Float64Array) || !(z instanceof Float64Array))
      return 'the stored cell list is damaged (centres missing)';
    n = x.length;
    if (!isCount(n, MAX_CELL_LIST) || y.length !== n || z.length !== n)
      return `the stored cell list must have 1 to ${MAX_CELL_LIST} centres with every coordinate given`;
  } else {
    const shape = raw.grid.shape;
    if (!Array.isArray(shape) || shape.length < 1 || shape.length > 3 || !shape.every((v) => isCount(v, MAX_CELLS)))
      return 'grid.shape must be [nx], [nx, ny] or [nx, ny, nz] of positive integers';
    n = (shape as number[]).reduce((a, b) => a * b, 1);
    if (n > MAX_CELLS) return `grid.shape must have at most ${MAX_CELLS} cells in all, got ${n}`;
  }
  const g = raw.operator.matrix;
  if (!isObject(g) || !isCount(g.rows, MAX_CELLS) || g.cols !== n)
    return `the operator must have ${n} columns (one per grid cell) and a whole number of rows`;
  const m = g.rows;
  if (raw.operator.kind === 'dense') {
    if (!(g.data instanceof Float64Array) || g.data.length !== m * n) return `the operator must hold ${m} × ${n} numbers`;
  } else if (raw.operator.kind === 'sparse') {
    const { rowPtr, colIdx, values } = g;
    if (!(rowPtr instanceof Int32Array) || rowPtr.length !== m + 1) return `the sparse operator must have ${m + 1} row offsets`;
    const nnz = rowPtr[m];
    if (
      !(colIdx instanceof Int32Array) ||
      !(values instanceof Float64Array) ||
      colIdx.length !== nnz ||
      values.length !== nnz ||
      rowPtr[0] !== 0
    )
      return 'the sparse operator is damaged';
    for (let i = 0; i < m; i++) if (rowPtr[i + 1] < rowPtr[i]) return 'the sparse operator is damaged';
  } else return 'the operator must be dense or sparse';
  const d = raw.data;
  if (!(d.values instanceof Float64Array) || d.values.length !== m) return `data.values must hold ${m} numbers (one per operator row)`;
  if (d.sigma !== undefined && (!(d.sigma instanceof Float64Array) || d.sigma.length !== m)) return `data.sigma must hold ${m} numbers`;
  if (d.covariance !== undefined) {
    const c = d.covariance;
    if (!isObject(c) || c.rows !== m || c.cols !== m || !(c.data instanceof Float64Array) || c.data.length !== m * m)
      return `data.covariance must be ${m} × ${m}`;
  }
  if (raw.truth !== undefined && (!(raw.truth instanceof Float64Array) || raw.truth.length !== n)) return `truth must hold ${n} numbers`;
  return null;
}
