/**
 * The session slice of the workbench store (spread into it by src/app/store.ts): loading the
 * user's own problem, importing a prior, undo / redo of prior edits, restoring a saved or shared
 * session, and "start over with the demo".
 *
 * A load that fails (a file error, or the workers refusing the problem) changes nothing but
 * `loadError`: files are parsed first (./../io/parseClient.ts, off the main thread) and the
 * workers only see a problem that parsed; if they then fail, the previous problem is sent back.
 */
import type { Problem } from '../../core/problems/spec.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import type { Matrix } from '../../core/linalg/matrix.ts';
import type { Geometry } from '../../core/grid/grid.ts';
import type { NamedBytes, PiecesInput } from '../../core/io/pieces.ts';
import { checkPriorForGrid } from '../../core/io/priorFile.ts';
import { validatePrior } from '../../core/prior/validate.ts';
import { InputError } from '../../core/errors.ts';
import { parseOffThread } from '../io/parseClient.ts';
import type { ParseResult } from '../io/parse.ts';
import { emptyHistory, record, redo, undo, type History } from './history.ts';
import { DEMO_CHOICES, DEFAULT_DEMO } from '../demos.ts';
import { defaultPrior, DRAW_COUNT } from '../defaults.ts';
import type { ClientPort } from '../../worker/client.ts';
import { emptyResults } from '../results/slice.ts';
import type { StoreGet, StoreSet, WorkbenchState, WorkbenchStore } from '../store.ts';
import type { TabId } from '../view/slice.ts';

export interface UserProblem {
  readonly problem: Problem<Geometry>;
  /** File name(s) it came from, shown as text. */
  readonly label: string;
  /** Identifies the saved copy in IndexedDB. */
  readonly key: string;
}

export interface SessionView {
  readonly prior?: PriorSpec;
  readonly seed?: number;
  readonly tab?: TabId;
  readonly selectedCell?: number | null;
}

export interface SessionSlice {
  userProblem: UserProblem | null;
  loadStatus: 'idle' | 'reading' | 'sending';
  /** The precise message of the last failed load (file, place, expectation), or null. */
  loadError: string | null;
  loadWarnings: readonly string[];
  history: History;
  saveStatus: 'off' | 'pending' | 'saved' | 'failed';

  loadProblemFiles(files: readonly NamedBytes[]): Promise<boolean>;
  loadPieces(input: PiecesInput): Promise<boolean>;
  /** Use a parsed problem (also used to restore a saved one). */
  adoptProblem(problem: Problem<Geometry>, label: string, view?: SessionView, key?: string): Promise<boolean>;
  /** Load a built-in problem and then apply a saved or shared view (prior, seed, tab, cell). */
  openDemo(demoId: string, view?: SessionView): Promise<boolean>;
  importPrior(file: NamedBytes): Promise<boolean>;
  /**
   * Run a prior edit made with a continuous control (a slider being dragged or stepped): the history
   * extends the previous step when it changed the same fields (./history.ts). The control says so
   * (../controls.tsx LogSlider `continuous`); the store reads nothing from the page.
   */
  continuousEdit(edit: () => void): void;
  undo(): void;
  redo(): void;
  startOver(): Promise<void>;
  dismissLoadError(): void;
  /** Draws for export, computed for the current prior and seed (independent of the open tab). */
  /** The shown realisations (DRAW_COUNT, shared with the realisations screen), or `count` of them with the same seed. */
  fetchDraws(which: 'prior' | 'posterior', count?: number): Promise<Matrix | null>;
  /** The dense Cm or its lower Cholesky factor for export (after any covariance view in flight). */
  fetchCovariance(form: 'covariance' | 'cholesky'): Promise<Matrix | null>;
}

/** A prior from storage or a link: every field (the core's validator), then its fit to the grid. */
export function checkSavedPrior(prior: PriorSpec, grid: Geometry): void {
  try {
    validatePrior(prior, grid);
  } catch (e) {
    if (e instanceof InputError) throw new Error(`the saved prior could not be used: ${e.message}`);
    throw new Error('the saved prior could not be used: it is damaged');
  }
  checkPriorForGrid('saved prior', prior, grid);
}

const message = (e: unknown) => (e instanceof Error ? e.message : String(e));

export function createSessionSlice(set: StoreSet, get: StoreGet, api: WorkbenchStore, client: ClientPort): SessionSlice {
  /** Resolves when nothing is running on `channel` (so an export does not supersede a screen's request). */
  const idle = (channel: 'priorDraws' | 'posteriorDraws' | 'covariance') =>
    new Promise<void>((resolve) => {
      if (!get().busy[channel]) return resolve();
      const off = api.subscribe((t) => {
        if (!t.busy[channel]) {
          off();
          resolve();
        }
      });
    });
  /** True while the slice itself replaces the prior (undo, redo, restore): not recorded. */
  let applying = false;
  /** True while an edit passed to continuousEdit runs. */
  let continuous = false;

  api.subscribe((s, prev) => {
    if (s.problem !== prev.problem) {
      if (s.history !== emptyHistory) set({ history: emptyHistory });
      if (s.problem?.demoId != null && s.userProblem) set({ userProblem: null });
      return;
    }
    if (s.prior !== prev.prior && s.prior && prev.prior && !applying) {
      const h = record(s.history, prev.prior, s.prior, Date.now(), continuous);
      if (h !== s.history) set({ history: h });
    }
  });

  const applyPrior = (prior: PriorSpec) => {
    applying = true;
    try {
      get().setPrior(prior);
    } finally {
      applying = false;
    }
  };

  const applyView = (v: SessionView) => {
    applying = true;
    try {
      const patch: Partial<WorkbenchState> = {};
      if (v.seed !== undefined && Number.isInteger(v.seed) && v.seed >= 0) patch.seed = v.seed;
      if (v.tab !== undefined) patch.tab = v.tab;
      if (v.selectedCell !== undefined) patch.selectedCell = v.selectedCell;
      set(patch);
      if (v.prior) get().setPrior(v.prior);
      else get().refresh();
    } finally {
      applying = false;
    }
  };

  const fromParse = async (p: Promise<ParseResult>): Promise<boolean> => {
    set({ loadStatus: 'reading', loadError: null });
    let r: ParseResult;
    try {
      r = await p;
    } catch (e) {
      set({ loadStatus: 'idle', loadError: message(e) });
      return false;
    }
    if (r.kind !== 'problem') {
      set({ loadStatus: 'idle', loadError: 'expected a problem, got a prior file (use "Import prior")' });
      return false;
    }
    set({ loadWarnings: r.warnings });
    return get().adoptProblem(r.problem, r.label);
  };

  return {
    userProblem: null,
    loadStatus: 'idle',
    loadError: null,
    loadWarnings: [],
    history: emptyHistory,
    saveStatus: 'off',

    loadProblemFiles(files) {
      return fromParse(parseOffThread({ kind: 'problemFiles', files }));
    },
    loadPieces(input) {
      return fromParse(parseOffThread({ kind: 'pieces', input }));
    },

    async adoptProblem(problem, label, view = {}, key) {
      if (!client.setProblem) {
        set({ loadStatus: 'idle', loadError: 'this workbench build cannot load problems from files' });
        return false;
      }
      const previous = get().userProblem;
      const previousDemo = get().demoId;
      set({ loadStatus: 'sending', loadError: null });
      try {
        const o = await client.setProblem(problem);
        if (o.superseded) {
          set({ loadStatus: 'idle' });
          return false;
        }
        const pv = o.value;
        // The problem's own starting prior (the rule of src/core/tuning/startPrior.ts), else the generic one.
        let prior = pv.startPrior ?? defaultPrior(pv);
        if (view.prior) {
          checkSavedPrior(view.prior, pv.grid);
          prior = view.prior;
        }
        set({
          problem: pv,
          problemStatus: 'ready',
          problemError: null,
          prior,
          priorRevision: get().priorRevision + 1,
          ...emptyResults(),
          selectedCell: view.selectedCell ?? null,
          ...(view.seed !== undefined ? { seed: view.seed } : {}),
          ...(view.tab !== undefined ? { tab: view.tab } : {}),
          userProblem: { problem, label, key: key ?? `user:${Date.now()}` },
          loadStatus: 'idle',
        });
        get().refresh();
        return true;
      } catch (e) {
        set({ loadStatus: 'idle', loadError: `${label}: ${message(e)}` });
        // The workers may now hold the refused problem: give them the previous one back.
        try {
          if (previous && client.setProblem) await client.setProblem(previous.problem);
          else await client.loadDemo(previousDemo);
        } catch {
          // the page keeps showing the previous results either way
        }
        return false;
      }
    },

    async openDemo(demoId, view = {}) {
      const id = DEMO_CHOICES.some((d) => d.id === demoId) ? demoId : DEFAULT_DEMO;
      await get().loadDemo(id);
      if (get().problemStatus !== 'ready') return false;
      if (view.prior) {
        try {
          checkSavedPrior(view.prior, get().problem!.grid);
        } catch (e) {
          set({ loadError: message(e) });
          return false;
        }
      }
      applyView(view);
      set({ history: emptyHistory });
      return true;
    },

    async importPrior(file) {
      const problem = get().problem;
      if (!problem) return false;
      set({ loadStatus: 'reading', loadError: null });
      try {
        const r = await parseOffThread({ kind: 'prior', file, grid: problem.grid });
        if (r.kind !== 'prior') throw new Error('expected a prior file');
        set({ loadStatus: 'idle', loadWarnings: r.warnings });
        get().setPrior(r.prior);
        return true;
      } catch (e) {
        set({ loadStatus: 'idle', loadError: message(e) });
        return false;
      }
    },

    continuousEdit(edit) {
      continuous = true;
      try {
        edit();
      } finally {
        continuous = false;
      }
    },
    undo() {
      const s = get();
      if (!s.prior) return;
      const u = undo(s.history, s.prior);
      if (!u) return;
      set({ history: u.history });
      applyPrior(u.prior);
    },
    redo() {
      const s = get();
      if (!s.prior) return;
      const r = redo(s.history, s.prior);
      if (!r) return;
      set({ history: r.history });
      applyPrior(r.prior);
    },

    async startOver() {
      // 'pending' at once, so that nobody reads the previous session's "Saved" as this one's.
      set({
        userProblem: null,
        loadError: null,
        loadWarnings: [],
        ...(get().saveStatus !== 'off' ? { saveStatus: 'pending' as const } : {}),
      });
      await get().openDemo(DEFAULT_DEMO, { tab: 'posterior', selectedCell: null });
    },

    dismissLoadError() {
      set({ loadError: null });
    },

    async fetchDraws(which, count = DRAW_COUNT) {
      const s = get();
      if (!s.prior) return null;
      const channel = which === 'prior' ? 'priorDraws' : 'posteriorDraws';
      const key = `${s.problem?.version}:${s.priorRevision}:${s.seed}`;
      if (s.computedFor[channel] === key) {
        // Requested by the realisations screen already: wait for it rather than superseding it
        // (also before asking for another number of draws on the same channel).
        await idle(channel);
        const t = get();
        const cached = which === 'prior' ? t.priorDraws : t.posteriorDraws;
        if (count === DRAW_COUNT && cached && t.computedFor[channel] === key && !t.errors[channel]) return cached;
        if (count === DRAW_COUNT && t.errors[channel]) throw new Error(t.errors[channel]);
      }
      const o = await (which === 'prior' ? client.priorDraws(s.prior, count, s.seed) : client.posteriorDraws(s.prior, count, s.seed));
      return o.superseded ? null : o.value;
    },
    async fetchCovariance(form) {
      const s = get();
      if (!s.prior) return null;
      // Wait for the Prior screen's view request rather than superseding it.
      await idle('covariance');
      const o = await client.covariance(s.prior, form);
      return o.superseded ? null : o.value;
    },
  };
}
