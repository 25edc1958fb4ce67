/**
 * Opening the page: which session to show, and keeping it saved.
 *
 * Precedence (first that applies):
 *   1. a share link (#share=…): its prior, on its built-in problem — or, for a prior shared from a
 *      user's own problem, on the autosaved problem when the prior fits its grid. It takes
 *      precedence over the autosaved session (the page says so); the hash is then removed so that
 *      a later reload restores the autosave with the edits made since.
 *   2. an explicit ?demo=<id> in the address;
 *   3. the session autosaved in IndexedDB;
 *   4. the default demo.
 * Autosave: every change of the problem, prior or view writes the session after
 * AUTOSAVE_DEBOUNCE_MS; the user's problem itself is written only when it changes.
 */
import type { WorkbenchState, WorkbenchStore } from '../store.ts';
import { DEFAULT_DEMO } from '../demos.ts';
import { AUTOSAVE_DEBOUNCE_MS, isSavedSession, SESSION_FORMAT, type SavedProblem, type SavedSession, type SessionStorage } from './autosave.ts';
import { decodeShare } from './share.ts';

export interface StartOptions {
  readonly storage: SessionStorage | null;
  readonly explicitDemo: string | null;
  readonly hash: string;
  /** Removes the share code from the address bar once applied. */
  readonly clearHash?: () => void;
}

export const SHARED_NOTICE = 'Opened the prior from the shared link (a link takes precedence over the autosaved session).';

async function readSaved(storage: SessionStorage | null): Promise<{ session: SavedSession; problem: SavedProblem | null } | null> {
  if (!storage) return null;
  try {
    const session = await storage.get<unknown>('session');
    if (!isSavedSession(session)) return null;
    const problem = session.source.kind === 'user' ? ((await storage.get<SavedProblem>('problem')) ?? null) : null;
    if (session.source.kind === 'user' && problem?.key !== session.source.problemKey) return null;
    return { session, problem };
  } catch {
    return null;
  }
}

async function restoreSaved(store: WorkbenchStore, saved: { session: SavedSession; problem: SavedProblem | null }, override?: SavedSession['prior']) {
  const s = store.getState();
  const { session } = saved;
  const view = { prior: override ?? session.prior, seed: session.seed, tab: session.tab, selectedCell: session.selectedCell };
  if (session.source.kind === 'user' && saved.problem) {
    const ok = await s.adoptProblem(saved.problem.problem, session.source.label, view, saved.problem.key);
    if (ok && session.extra) store.setState(session.extra as Partial<WorkbenchState>);
    return ok;
  }
  const ok = await s.openDemo(session.source.kind === 'demo' ? session.source.demoId : DEFAULT_DEMO, view);
  if (ok && session.extra) store.setState(session.extra as Partial<WorkbenchState>);
  return ok;
}

/** Decide what to open, open it, then start autosaving. */
export async function startSession(store: WorkbenchStore, o: StartOptions): Promise<void> {
  const s = store.getState();
  let shared = null;
  let shareError: string | null = null;
  try {
    shared = await decodeShare(o.hash);
  } catch (e) {
    shareError = e instanceof Error ? e.message : String(e);
  }
  if (shared) {
    o.clearHash?.();
    if (shared.problem !== null) {
      await s.openDemo(shared.problem, { prior: shared.prior, tab: 'posterior' });
    } else {
      const saved = await readSaved(o.storage);
      if (saved) await restoreSaved(store, saved, shared.prior);
      else await s.openDemo(DEFAULT_DEMO);
    }
    if (!store.getState().loadError) store.setState({ notice: SHARED_NOTICE });
  } else if (o.explicitDemo) {
    await s.openDemo(o.explicitDemo);
  } else {
    const saved = await readSaved(o.storage);
    if (!saved || !(await restoreSaved(store, saved))) {
      if (store.getState().problemStatus !== 'ready') await s.openDemo(DEFAULT_DEMO);
    }
  }
  if (shareError) store.setState({ loadError: shareError });
  if (o.storage) installAutosave(store, o.storage);
}

/** The record written for the current state (null while no problem is shown). */
export function sessionRecord(s: WorkbenchState, now = Date.now()): SavedSession | null {
  if (!s.prior || !s.problem || s.problemStatus !== 'ready') return null;
  const source: SavedSession['source'] = s.userProblem
    ? { kind: 'user', problemKey: s.userProblem.key, label: s.userProblem.label }
    : { kind: 'demo', demoId: s.problem.demoId ?? s.demoId };
  // Candidate priors of the selection screen, when that slice exists.
  const candidates = (s as unknown as { candidates?: unknown }).candidates;
  return {
    format: SESSION_FORMAT,
    source,
    prior: s.prior,
    seed: s.seed,
    tab: s.tab,
    selectedCell: s.selectedCell,
    ...(candidates !== undefined ? { extra: { candidates: structuredClone(candidates) } } : {}),
    savedAt: now,
  };
}

export function installAutosave(store: WorkbenchStore, storage: SessionStorage, delay = AUTOSAVE_DEBOUNCE_MS): () => void {
  let timer: ReturnType<typeof setTimeout> | null = null;
  let savedProblemKey: string | null = null;
  const write = async () => {
    timer = null;
    const s = store.getState();
    const rec = sessionRecord(s);
    if (!rec) return;
    try {
      if (s.userProblem && savedProblemKey !== s.userProblem.key) {
        await storage.put('problem', { key: s.userProblem.key, problem: s.userProblem.problem } satisfies SavedProblem);
        savedProblemKey = s.userProblem.key;
      } else if (!s.userProblem && savedProblemKey !== '') {
        await storage.remove('problem');
        savedProblemKey = '';
      }
      await storage.put('session', rec);
      if (!timer) store.setState({ saveStatus: 'saved' });
    } catch {
      store.setState({ saveStatus: 'failed' });
    }
  };
  const schedule = () => {
    if (timer) clearTimeout(timer);
    timer = setTimeout(() => void write(), delay);
    if (store.getState().saveStatus !== 'pending') store.setState({ saveStatus: 'pending' });
  };
  const unsubscribe = store.subscribe((s, prev) => {
    const candidates = (x: WorkbenchState) => (x as unknown as { candidates?: unknown }).candidates;
    if (
      s.prior !== prev.prior ||
      s.problem !== prev.problem ||
      s.userProblem !== prev.userProblem ||
      s.seed !== prev.seed ||
      s.tab !== prev.tab ||
      s.selectedCell !== prev.selectedCell ||
      candidates(s) !== candidates(prev)
    ) {
      schedule();
    }
  });
  schedule();
  return () => {
    unsubscribe();
    if (timer) clearTimeout(timer);
  };
}

/** Ctrl/Cmd+Z undo, Shift+Ctrl/Cmd+Z and Ctrl+Y redo; text fields keep their own undo. */
export function installShortcuts(store: WorkbenchStore, target: Pick<Window, 'addEventListener' | 'removeEventListener'>): () => void {
  const onKey = (e: KeyboardEvent) => {
    if (!(e.ctrlKey || e.metaKey) || e.altKey) return;
    const el = e.target as HTMLElement | null;
    const tag = el?.tagName;
    if (tag === 'TEXTAREA' || (tag === 'INPUT' && ['text', 'number', 'search', ''].includes((el as HTMLInputElement).type))) return;
    const key = e.key.toLowerCase();
    if (key === 'z' && !e.shiftKey) {
      e.preventDefault();
      store.getState().undo();
    } else if ((key === 'z' && e.shiftKey) || key === 'y') {
      e.preventDefault();
      store.getState().redo();
    }
  };
  target.addEventListener('keydown', onKey as EventListener);
  return () => target.removeEventListener('keydown', onKey as EventListener);
}
