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
import { DEFAULT_DEMO, DEMO_CHOICES } from '../demos.ts';
import { AUTOSAVE_DEBOUNCE_MS, SESSION_FORMAT, type SavedProblem, type SavedSession, type SessionStorage } from './autosave.ts';
import { damagedPrior, readStoredPrior, sanitizeSavedSession, validateSavedProblem } from './restore.ts';
import { decodeShare } from './share.ts';
import { cellCount } from '../../core/grid/grid.ts';
import { problemFingerprint } from '../../core/io/fingerprint.ts';
import { checkSavedPrior } from './slice.ts';

export interface StartOptions {
  readonly storage: SessionStorage | null;
  readonly explicitDemo: string | null;
  readonly hash: string;
  /** Removes the share code from the address bar once applied. */
  readonly clearHash?: () => void;
  /** The page, for saving at once when it is hidden or closed (pagehide, visibilitychange). */
  readonly lifecycle?: Lifecycle;
}

export const SHARED_NOTICE = 'Opened the prior from the shared link (a link takes precedence over the autosaved session).';

interface Saved {
  /** Null when nothing of the record could be used (the notes say so). */
  readonly session: SavedSession | null;
  readonly problem: SavedProblem | null;
  /** What could not be restored, in plain words. */
  readonly notes: string[];
}

/** The autosaved session, every part checked (./restore.ts); null when there is none or nothing usable. */
async function readSaved(storage: SessionStorage | null, lifecycle?: Lifecycle): Promise<Saved | null> {
  if (!storage) return null;
  let raw: unknown;
  try {
    raw = pendingNewer(lifecycle, await storage.get<unknown>('session'));
  } catch {
    return null;
  }
  if (raw === undefined) return null;
  const r = sanitizeSavedSession(raw);
  if (!r) {
    // Unusable as a whole (foreign format, unknown source or problem): say so rather than dropping it silently.
    return {
      session: null,
      problem: null,
      notes: ['the saved session could not be read (it is damaged or from another version), so the demo is shown'],
    };
  }
  const notes = [...r.notes];
  const { session } = r;
  if (session.source.kind !== 'user') return { session, problem: null, notes };
  try {
    const stored = await storage.get<unknown>('problem');
    const key = (stored as { key?: unknown } | undefined)?.key;
    if (key !== session.source.problemKey) throw new Error('The saved problem is missing or belongs to another session.');
    const problem = validateSavedProblem((stored as { problem?: unknown }).problem);
    return { session, problem: { key: session.source.problemKey, problem }, notes };
  } catch (e) {
    // The problem is unusable: keep nothing of the session that belongs to it, say why.
    notes.push(e instanceof Error ? e.message : 'The saved problem could not be restored.');
    return {
      session: { ...session, source: { kind: 'demo', demoId: DEFAULT_DEMO }, extra: {} },
      problem: null,
      notes: [...notes, 'the default demo is shown instead'],
    };
  }
}

/** Restores the saved view; candidates whose prior does not fit the problem's grid are dropped. */
async function restoreSaved(store: WorkbenchStore, saved: Saved, override?: SavedSession['prior']) {
  const s = store.getState();
  const { session } = saved;
  if (!session) return false;
  const userGrid = session.source.kind === 'user' && saved.problem ? saved.problem.problem.grid : null;
  let prior: SavedSession['prior'] | undefined = override ?? session.prior;
  if (prior && userGrid && !override) {
    try {
      readStoredPrior('saved prior', prior, userGrid);
    } catch (e) {
      saved.notes.push(damagedPrior(e));
      prior = undefined;
    }
  }
  const cellOk = (n: number) => session.selectedCell !== null && session.selectedCell < n;
  const view = {
    ...(prior ? { prior } : {}),
    seed: session.seed,
    tab: session.tab,
    selectedCell: userGrid && cellOk(cellCount(userGrid)) ? session.selectedCell : null,
  };
  let ok: boolean;
  if (session.source.kind === 'user' && saved.problem)
    ok = await s.adoptProblem(saved.problem.problem, session.source.label, view, saved.problem.key);
  else {
    const demo = session.source.kind === 'demo' ? session.source.demoId : DEFAULT_DEMO;
    ok = await s.openDemo(demo, view);
    if (!ok && view.prior && !override && store.getState().problemStatus === 'ready') {
      // The saved prior does not fit the built-in problem: keep the problem, drop the prior.
      saved.notes.push(damagedPrior(new Error(store.getState().loadError ?? 'it does not fit the problem')));
      store.setState({ loadError: null });
      const { prior: _dropped, ...rest } = view;
      ok = await s.openDemo(demo, rest);
    }
    const p = store.getState().problem;
    if (ok && p && cellOk(cellCount(p.grid))) s.selectCell(session.selectedCell);
  }
  if (session.selectedCell !== null && store.getState().selectedCell === null)
    saved.notes.push('the saved selected cell is not on the grid and was cleared');
  const problem = store.getState().problem;
  if (ok && problem && session.extra && Array.isArray(session.extra.candidates)) {
    const all = session.extra.candidates as { prior: SavedSession['prior'] }[];
    const fits = all.filter((c) => {
      try {
        readStoredPrior('candidate prior', c.prior, problem.grid);
        return true;
      } catch {
        return false;
      }
    });
    if (fits.length !== all.length) saved.notes.push('saved candidate priors that do not fit this problem were dropped');
    store.setState({ candidates: fits } as unknown as Partial<WorkbenchState>);
  }
  if (problem && store.getState().selectedCell !== null && store.getState().selectedCell! >= cellCount(problem.grid)) {
    store.setState({ selectedCell: null });
  }
  return ok;
}

/** One line for the notices of a restore (null when nothing was dropped). */
export function restoreNotice(notes: readonly string[]): string | null {
  if (notes.length === 0) return null;
  const text = notes.join('; ');
  return `Restored the saved session, but ${text}.`;
}

/**
 * The page's lifecycle for the autosave. IndexedDB writes are asynchronous and may not finish while a
 * page unloads, so on pagehide the (small) session record is also written synchronously to
 * `localStorage` under {@link PENDING_KEY}; the next start prefers it when it is newer than the
 * IndexedDB record of the same problem.
 */
export type Lifecycle = Pick<Window, 'addEventListener'> & {
  readonly document?: { readonly visibilityState: string };
  readonly localStorage?: Pick<Storage, 'getItem' | 'setItem' | 'removeItem'>;
};
export const PENDING_KEY = 'priorscope.pending-session';

/** The pending record written on pagehide, when it is newer than `session` and of the same problem. */
function pendingNewer(lifecycle: Lifecycle | undefined, session: unknown): unknown {
  try {
    const text = lifecycle?.localStorage?.getItem(PENDING_KEY);
    if (!text) return session;
    const pending = JSON.parse(text) as SavedSession;
    const saved = session as Partial<SavedSession> | undefined;
    if (!saved?.source || typeof saved.savedAt !== 'number') return pending.source?.kind === 'demo' ? pending : session;
    const same = JSON.stringify(pending.source) === JSON.stringify(saved.source);
    return same && pending.savedAt > saved.savedAt ? pending : session;
  } catch {
    return session;
  }
}

const PREVIOUS_SESSION = 'previous-session';
const PREVIOUS_PROBLEM = 'previous-problem';

/**
 * Before a share link or a ?demo= address replaces what is on screen, the autosaved session (and
 * the user's problem) are copied aside, so the autosave that follows cannot lose them. True when
 * there was a session to keep.
 */
async function keepPrevious(storage: SessionStorage | null): Promise<boolean> {
  if (!storage) return false;
  try {
    const session = await storage.get<unknown>('session');
    if (session === undefined) return false;
    const problem = await storage.get<unknown>('problem');
    await storage.put(PREVIOUS_SESSION, session);
    if (problem !== undefined) await storage.put(PREVIOUS_PROBLEM, problem);
    else await storage.remove(PREVIOUS_PROBLEM);
    return true;
  } catch {
    return false;
  }
}

/** Puts the kept session back as the autosaved one (the caller then reloads the page without ?demo= or a link). */
export async function restorePreviousSession(storage: SessionStorage): Promise<boolean> {
  const session = await storage.get<unknown>(PREVIOUS_SESSION);
  if (session === undefined) return false;
  const problem = await storage.get<unknown>(PREVIOUS_PROBLEM);
  await storage.put('session', session);
  if (problem !== undefined) await storage.put('problem', problem);
  await storage.remove(PREVIOUS_SESSION);
  await storage.remove(PREVIOUS_PROBLEM);
  return true;
}

/**
 * A shared prior waiting for its problem: when the user loads a problem with the link's
 * fingerprint, the prior is applied (checked like a saved prior) and the page says so.
 */
function awaitProblem(store: WorkbenchStore, prior: SavedSession['prior'], madeFor: { title: string; fingerprint: string }): void {
  const stop = store.subscribe((s, prev) => {
    if (!s.userProblem || s.userProblem === prev.userProblem || !s.problem || s.problemStatus !== 'ready') return;
    if (problemFingerprint(s.userProblem.problem) !== madeFor.fingerprint) return;
    stop();
    try {
      checkSavedPrior(prior, s.problem.grid);
    } catch (e) {
      store.setState({ loadError: `The shared link's prior could not be applied: ${e instanceof Error ? e.message : String(e)}` });
      return;
    }
    s.setPrior(prior);
    store.setState({
      notice: `Applied the prior from the shared link: this is the problem it was made for (${madeFor.title}).`,
      loadError: null,
    });
  });
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
  const openSaved = async () => {
    const saved = await readSaved(o.storage, o.lifecycle);
    if (!saved || !(await restoreSaved(store, saved))) {
      if (store.getState().problemStatus !== 'ready') await s.openDemo(DEFAULT_DEMO);
    }
    return saved?.notes ?? [];
  };
  let notes: string[] = [];
  let kept = false;
  if (shared) {
    o.clearHash?.();
    kept = await keepPrevious(o.storage);
    let ok: boolean;
    if (shared.problem !== null) {
      // openDemo falls back to the default demo for an unknown id: that would report a success that did not happen.
      ok =
        DEMO_CHOICES.some((d) => d.id === shared.problem) && (await s.openDemo(shared.problem, { prior: shared.prior, tab: 'posterior' }));
      if (!ok && !store.getState().loadError)
        shareError = `problem ${JSON.stringify(shared.problem.slice(0, 40))} is not one of the built-in problems`;
    } else {
      const saved = await readSaved(o.storage);
      const madeFor = shared.madeFor;
      const matches = saved?.problem && (!madeFor || problemFingerprint(saved.problem.problem) === madeFor.fingerprint);
      ok = !!matches && (await restoreSaved(store, saved!, shared.prior));
      if (!ok) {
        shareError = madeFor
          ? `this prior was made for the problem titled ${JSON.stringify(madeFor.title)} (fingerprint ${madeFor.fingerprint}), which is not open in this browser; load that problem and the prior will be applied`
          : 'this link carries a prior made for a problem loaded from files, and that problem is not the one saved in this browser';
        if (madeFor) awaitProblem(store, shared.prior, madeFor);
      }
    }
    if (ok) store.setState({ notice: SHARED_NOTICE, previousSessionKept: kept });
    else {
      // A link that cannot be applied changes nothing: the saved session is shown as it was.
      const why = store.getState().loadError ?? shareError;
      store.setState({ loadError: null });
      notes = await openSaved();
      shareError = `The shared link could not be opened: ${why}`;
      kept = false;
    }
  } else if (o.explicitDemo) {
    kept = await keepPrevious(o.storage);
    await s.openDemo(o.explicitDemo);
    if (kept)
      store.setState({
        notice: 'Opened the demo named in the address. Your earlier session was kept and can be restored.',
        previousSessionKept: true,
      });
  } else {
    notes = await openSaved();
  }
  const notice = restoreNotice(notes);
  if (notice) store.setState({ notice });
  if (shareError) store.setState({ loadError: shareError });
  if (o.storage) installAutosave(store, o.storage, AUTOSAVE_DEBOUNCE_MS, o.lifecycle);
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

export function installAutosave(
  store: WorkbenchStore,
  storage: SessionStorage,
  delay = AUTOSAVE_DEBOUNCE_MS,
  lifecycle?: StartOptions['lifecycle'],
): () => void {
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
      try {
        lifecycle?.localStorage?.removeItem(PENDING_KEY);
      } catch {
        // Nothing to clear.
      }
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
  // A pending write goes out at once when the page is hidden or closed (a reload right after an
  // edit must not lose it).
  const flush = () => {
    if (!timer) return;
    clearTimeout(timer);
    const rec = sessionRecord(store.getState());
    try {
      if (rec) lifecycle?.localStorage?.setItem(PENDING_KEY, JSON.stringify(rec));
    } catch {
      // Storage full or blocked: the IndexedDB write below is still attempted.
    }
    void write();
  };
  lifecycle?.addEventListener('pagehide', flush);
  lifecycle?.addEventListener('visibilitychange', () => {
    if (lifecycle.document?.visibilityState === 'hidden') flush();
  });
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
