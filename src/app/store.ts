/**
 * The workbench store: one zustand store made of four slices (problem, prior, results, view).
 * Framework-free (zustand/vanilla); React reads it through ./context.ts (useWb). All numerics go
 * through the worker client; the store only keeps plain specs and the typed-array results.
 */
import { createStore, type StoreApi } from 'zustand/vanilla';
import type { PriorSpec, MeanSpec } from '../core/prior/spec.ts';
import { patchTerm, type Term, type TermPatch, type KernelName } from '../core/kernels/spec.ts';
import { termSmoothness } from '../core/kernels/table.ts';
import type { Diagnostics } from '../core/prior/diagnostics.ts';
import type { Matrix } from '../core/linalg/matrix.ts';
import { cellCount } from '../core/grid/grid.ts';
import { MAX_TERMS } from '../core/prior/validate.ts';
import type { Outcome } from '../worker/client.ts';
import type { Channel, PosteriorPartial, PosteriorResult, ProblemView } from '../worker/protocol.ts';
import { createSelectSlice, problemIdentity, type SelectSlice } from './select/slice.ts';
import type { Problem } from '../core/problems/spec.ts';
import { createSessionSlice, type SessionSlice } from './session/slice.ts';
import { addedTerm, defaultPrior, DRAW_COUNT, emptyResults } from './defaults.ts';

/** The subset of WorkerClient the store uses (a fake in unit tests). */
export interface ClientPort {
  loadDemo(demoId: string): Promise<Outcome<ProblemView>>;
  /** Send the user's own problem to the worker(s) (the session slice; optional for fakes). */
  setProblem?(problem: Problem): Promise<Outcome<ProblemView>>;
  /** `onPartial` (optional for fakes) receives the mean ahead of the bands, while the request is current. */
  posterior(prior: PriorSpec, onPartial?: (partial: PosteriorPartial) => void): Promise<Outcome<PosteriorResult>>;
  diagnostics(prior: PriorSpec): Promise<Outcome<Diagnostics>>;
  priorDraws(prior: PriorSpec, count: number, seed: number): Promise<Outcome<Matrix>>;
  posteriorDraws(prior: PriorSpec, count: number, seed: number): Promise<Outcome<Matrix>>;
  resolution(prior: PriorSpec, cell: number): Promise<Outcome<{ cell: number; row: Float64Array }>>;
  covariance(prior: PriorSpec): Promise<Outcome<Matrix>>;
  onRestart(listener: (reason: string) => void): () => void;
}

export type TabId = 'overview' | 'problem' | 'prior' | 'realisations' | 'posterior' | 'fit' | 'select';
export const TABS: readonly { id: TabId; label: string }[] = [
  { id: 'overview', label: 'Overview' },
  { id: 'problem', label: 'Problem' },
  { id: 'prior', label: 'Prior' },
  { id: 'realisations', label: 'Realisations' },
  { id: 'posterior', label: 'Posterior' },
  { id: 'fit', label: 'Data fit' },
  { id: 'select', label: 'Choose prior' },
];

/** Largest N for which the covariance heat map is requested. */
export const COVARIANCE_VIEW_CELLS = 400;

type ResultChannel = Exclude<Channel, 'problem'>;

export interface ProblemSlice {
  demoId: string;
  problem: ProblemView | null;
  problemStatus: 'idle' | 'loading' | 'ready' | 'error';
  problemError: string | null;
}

export interface PriorSlice {
  prior: PriorSpec | null;
  /** Incremented on every prior edit. */
  priorRevision: number;
}

export interface ResultsSlice {
  /** The newest complete posterior (mean and bands of one prior); exports and the report use only this. */
  posterior: PosteriorResult | null;
  /**
   * The mean of a newer posterior request whose bands are still being computed (or failed), drawn
   * instead of `posterior` until the full result replaces it (./posteriorView.ts). Never stored in
   * the undo history, the autosave or a share link, which hold priors only.
   */
  posteriorPartial: PosteriorPartial | null;
  diagnostics: Diagnostics | null;
  priorDraws: Matrix | null;
  posteriorDraws: Matrix | null;
  resolution: { cell: number; row: Float64Array } | null;
  covariance: Matrix | null;
  /** Error message per channel for the current prior (null when fine). */
  errors: Partial<Record<ResultChannel, string>>;
  busy: Partial<Record<ResultChannel, boolean>>;
  /** Key (revision, seed, cell) each result was computed for; avoids recomputing on tab switches. */
  computedFor: Partial<Record<ResultChannel, string>>;
  progress: { channel: Channel; stage: string; fraction: number } | null;
}

export interface ViewSlice {
  tab: TabId;
  seed: number;
  selectedCell: number | null;
  notice: string | null;
  /** A share link or a ?demo= address replaced the autosaved session; a copy was kept (./session/start.ts). */
  previousSessionKept: boolean;
}

/** The seed of a new session. */
export const DEFAULT_SEED = 20240611;

export interface Actions {
  loadDemo(demoId: string): Promise<void>;
  setPrior(prior: PriorSpec): void;
  updateTerm(index: number, patch: TermPatch): void;
  setKernel(index: number, kernel: KernelName): void;
  setAnisotropic(index: number, on: boolean): void;
  addTerm(): void;
  removeTerm(index: number): void;
  moveTerm(index: number, delta: -1 | 1): void;
  setNugget(nugget: number): void;
  setMean(mean: MeanSpec): void;
  applySuggestedJitter(): void;
  resetPrior(): void;
  setTab(tab: TabId): void;
  setSeed(seed: number): void;
  newSeed(): void;
  selectCell(cell: number | null): void;
  setProgress(p: ResultsSlice['progress']): void;
  dismissNotice(): void;
  /** Request every result the current screen needs that is not up to date. */
  refresh(): void;
}

export type WorkbenchState = ProblemSlice & PriorSlice & ResultsSlice & ViewSlice & Actions & SessionSlice & SelectSlice;
export type WorkbenchStore = StoreApi<WorkbenchState>;

/** Performance mark names read by the UI benchmark. */
export const MARK_PARAM_CHANGE = 'ps:param-change';
export const MARK_POSTERIOR_DRAWN = 'ps:posterior-drawn';

function mark(name: string): void {
  if (typeof performance !== 'undefined' && typeof performance.mark === 'function') performance.mark(name);
}

/** Next seed in a fixed sequence (a 31-bit linear congruential step; any new value will do). */
export function nextSeed(seed: number): number {
  return (Math.imul(seed, 1103515245) + 12345) >>> 1;
}

export function createWorkbenchStore(client: ClientPort, initial: { demoId: string; seed?: number }): WorkbenchStore {
  const store = createStore<WorkbenchState>()((set, get, api) => {
    const editPrior = (f: (p: PriorSpec) => PriorSpec) => {
      const p = get().prior;
      if (!p) return;
      mark(MARK_PARAM_CHANGE);
      set({ prior: f(p), priorRevision: get().priorRevision + 1 });
      get().refresh();
    };
    const editTerms = (f: (terms: Term[]) => Term[]) => editPrior((p) => ({ ...p, terms: f([...p.terms]) }));

    /**
     * Run one channel's request and store its result (ignoring superseded outcomes); `describe`
     * turns a failure into the message shown (default: the error's own).
     */
    const run = <T>(
      channel: ResultChannel,
      key: string,
      call: () => Promise<Outcome<T>>,
      apply: (value: T) => Partial<ResultsSlice>,
      describe: (message: string) => string = (m) => m,
    ) => {
      const s = get();
      if (s.computedFor[channel] === key && !s.errors[channel]) return;
      set({ busy: { ...get().busy, [channel]: true }, computedFor: { ...get().computedFor, [channel]: key } });
      call().then(
        (o) => {
          if (o.superseded) return;
          const errors = { ...get().errors };
          delete errors[channel];
          set({ ...apply(o.value), errors, busy: { ...get().busy, [channel]: false }, progress: null });
        },
        (e: unknown) => {
          const computedFor = { ...get().computedFor };
          delete computedFor[channel];
          set({
            errors: { ...get().errors, [channel]: describe(e instanceof Error ? e.message : String(e)) },
            busy: { ...get().busy, [channel]: false },
            computedFor,
            progress: null,
          });
        },
      );
    };

    return {
      demoId: initial.demoId,
      problem: null,
      problemStatus: 'idle',
      problemError: null,
      prior: null,
      priorRevision: 0,
      ...emptyResults(),
      progress: null,
      tab: 'overview',
      seed: initial.seed ?? DEFAULT_SEED,
      previousSessionKept: false,
      selectedCell: null,
      notice: null,
      ...createSessionSlice(set, get, api, client),
      // Prior selection: src/app/select/slice.ts.
      ...createSelectSlice(set, get, client),

      async loadDemo(demoId) {
        set({ demoId, problemStatus: 'loading', problemError: null, ...emptyResults(), selectedCell: null });
        try {
          const o = await client.loadDemo(demoId);
          if (o.superseded) return;
          const view = o.value;
          set({
            problem: view,
            problemStatus: 'ready',
            prior: view.startPrior ?? defaultPrior(view),
            priorRevision: get().priorRevision + 1,
          });
          get().refresh();
        } catch (e) {
          set({ problemStatus: 'error', problemError: e instanceof Error ? e.message : String(e) });
        }
      },

      setPrior(prior) {
        editPrior(() => prior);
      },
      updateTerm(index, patch) {
        editTerms((terms) => terms.map((t, i) => (i === index ? patchTerm(t, patch) : t)));
      },
      setKernel(index, kernel) {
        editTerms((terms) =>
          terms.map((t, i) => {
            if (i !== index) return t;
            const { nu: _nu, ...rest } = t;
            const nu = termSmoothness({ kernel, nu: t.nu });
            return nu !== undefined ? { ...rest, kernel, nu } : { ...rest, kernel };
          }),
        );
      },
      setAnisotropic(index, on) {
        editTerms((terms) =>
          terms.map((t, i) => {
            if (i !== index) return t;
            const { length, lengths, angle: _angle, ...rest } = t;
            if (on) {
              const l = length ?? lengths?.[0] ?? 1;
              return { ...rest, lengths: [l, l] as const, angle: t.angle ?? 0 };
            }
            return { ...rest, length: lengths?.[0] ?? length ?? 1 };
          }),
        );
      },
      addTerm() {
        const problem = get().problem;
        if (!problem || (get().prior?.terms.length ?? 0) >= MAX_TERMS) return;
        editTerms((terms) => [...terms, addedTerm(terms, problem)]);
      },
      removeTerm(index) {
        editTerms((terms) => terms.filter((_, i) => i !== index));
      },
      moveTerm(index, delta) {
        editTerms((terms) => {
          const j = index + delta;
          if (j < 0 || j >= terms.length) return terms;
          const out = [...terms];
          [out[index], out[j]] = [out[j]!, out[index]!];
          return out;
        });
      },
      setNugget(nugget) {
        editPrior((p) => ({ ...p, nugget }));
      },
      setMean(mean) {
        editPrior((p) => ({ ...p, mean }));
      },
      applySuggestedJitter() {
        const j = get().diagnostics?.suggestedJitter;
        if (j === null || j === undefined) return;
        editPrior((p) => ({ ...p, nugget: (p.nugget ?? 0) + j }));
      },
      resetPrior() {
        const v = get().problem;
        if (v) editPrior(() => v.startPrior ?? defaultPrior(v));
      },

      setTab(tab) {
        set({ tab });
        get().refresh();
      },
      setSeed(seed) {
        if (!Number.isInteger(seed) || seed < 0) return;
        set({ seed });
        get().refresh();
      },
      newSeed() {
        get().setSeed(nextSeed(get().seed));
      },
      selectCell(cell) {
        set({ selectedCell: cell, ...(cell === null ? { resolution: null } : {}) });
        get().refresh();
      },
      setProgress(progress) {
        set({ progress });
      },
      dismissNotice() {
        set({ notice: null });
      },

      refresh() {
        const s = get();
        const prior = s.prior;
        const problem = s.problem;
        if (!prior || !problem || s.problemStatus !== 'ready') return;
        const rev = `${problem.version}:${s.priorRevision}`;
        // Mean first, bands later (FFT path, large problems): a partial of the current request is
        // drawn at once; the full result replaces it. If the bands then fail, the mean stays.
        let partialShown = false;
        run(
          'posterior',
          rev,
          () =>
            client.posterior(prior, (posteriorPartial) => {
              const now = get();
              if (now.computedFor.posterior !== rev || now.problem?.version !== problem.version) return;
              partialShown = true;
              set({ posteriorPartial });
            }),
          (posterior) => ({ posterior, posteriorPartial: null }),
          (message) => (partialShown ? `the uncertainty bands could not be computed (${message}); the posterior mean is shown without them` : message),
        );
        if (s.tab === 'posterior' && s.selectedCell !== null) {
          const cell = s.selectedCell;
          run('resolution', `${rev}:${cell}`, () => client.resolution(prior, cell), (resolution) => ({ resolution }));
        }
        // Prior draws before the diagnostics: both go to the same worker, and the overview waits for the draws.
        if (s.tab === 'realisations' || s.tab === 'overview') {
          const key = `${rev}:${s.seed}`;
          const seed = s.seed;
          run('priorDraws', key, () => client.priorDraws(prior, DRAW_COUNT, seed), (priorDraws) => ({ priorDraws }));
        }
        run('diagnostics', rev, () => client.diagnostics(prior), (diagnostics) => ({ diagnostics }));
        if (s.tab === 'realisations') {
          const key = `${rev}:${s.seed}`;
          const seed = s.seed;
          run('posteriorDraws', key, () => client.posteriorDraws(prior, DRAW_COUNT, seed), (posteriorDraws) => ({
            posteriorDraws,
          }));
        }
        if (s.tab === 'prior' && cellCount(problem.grid) <= COVARIANCE_VIEW_CELLS) {
          run('covariance', rev, () => client.covariance(prior), (covariance) => ({ covariance }));
        }
      },
    };
  });

  client.onRestart((reason) => {
    store.setState({
      notice: `The numerics worker stopped (${reason}); it was restarted and the results are being recomputed.`,
      computedFor: {},
      busy: {},
    });
    store.getState().refresh();
  });
  // Results and pinned candidates belong to their problem (src/app/select/slice.ts problemShown).
  store.subscribe((s, prev) => {
    if (s.problem === prev.problem && s.userProblem === prev.userProblem) return;
    const id = problemIdentity(s);
    if (id !== null && id !== problemIdentity(prev)) s.problemShown(id);
  });
  return store;
}
