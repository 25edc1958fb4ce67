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
import { FileFormatError } from '../../core/io/errors.ts';
import { parseProblemFile, writeProblemFile } from '../../core/io/problemFile.ts';
import type { Problem } from '../../core/problems/spec.ts';
import { DEFAULT_SEED, TABS, type TabId } from '../store.ts';
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
  if (!isObject(raw.prior)) return null;
  const tab: TabId = isTab(raw.tab) ? raw.tab : 'posterior';
  if (!isTab(raw.tab)) notes.push('the saved screen was not recognised, so the posterior is shown');
  const seedOk = typeof raw.seed === 'number' && Number.isInteger(raw.seed) && raw.seed >= 0 && raw.seed <= 0xffffffff;
  if (!seedOk) notes.push('the saved seed was not valid, so the default seed is used');
  const cellOk = raw.selectedCell === null || (typeof raw.selectedCell === 'number' && Number.isInteger(raw.selectedCell) && raw.selectedCell >= 0);
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
    prior: raw.prior as unknown as SavedSession['prior'],
    seed: seedOk ? (raw.seed as number) : DEFAULT_SEED,
    tab,
    selectedCell: cellOk ? (raw.selectedCell as number | null) : null,
    ...(Object.keys(extra).length > 0 ? { extra } : {}),
    savedAt: typeof raw.savedAt === 'number' && Number.isFinite(raw.savedAt) ? raw.savedAt : 0,
  };
  return { session, notes };
}

function isCandidateShape(v: unknown): boolean {
  return isObject(v) && typeof v.id === 'string' && typeof v.name === 'string' && typeof v.colour === 'string' && isObject(v.prior) && Array.isArray(v.prior.terms);
}

/**
 * The saved problem through the problem-file validators (write, then parse back). Throws an Error
 * with our message when it cannot be restored.
 */
export function validateSavedProblem(raw: unknown): Problem {
  try {
    // Dense operators travel as .npy (exact binary), sparse ones as Matrix Market (exact coordinates).
    const OPERATOR = (raw as Problem).operator?.kind === 'sparse' ? 'saved-operator.mtx' : 'saved-operator.npy';
    const written = writeProblemFile(raw as Problem, { file: OPERATOR });
    const bytes = written.operatorFile?.bytes;
    return parseProblemFile('the saved problem', written.json, {
      readSibling: (name) => {
        if (name !== OPERATOR || !bytes) throw new Error('missing');
        return bytes;
      },
    }).problem;
  } catch (e) {
    if (e instanceof InputError || e instanceof FileFormatError) throw new Error(`The saved problem could not be restored: ${e.message}`);
    throw new Error('The saved problem could not be restored: the stored copy is damaged.');
  }
}
