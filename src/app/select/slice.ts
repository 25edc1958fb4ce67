/**
 * The prior-selection slice of the workbench store: pinned candidates and the state of
 * each tuning task (evidence map, profile, type-II fit, criteria, calibration, candidate scores,
 * cross-calibration). Spread into the store by src/app/store.ts; framework-free.
 *
 * `candidates` is plain JSON-able data ({id, name, prior, colour}) so that sessions can
 * save and restore it. Tuning requests go to the secondary worker of the split client (the
 * posterior worker stays free); every task keeps the key it was computed for, and the screen
 * shows a result only while the key still matches.
 */
import { assertNever } from '../../core/errors.ts';
import type { HyperPrior } from '../../core/tuning/averaged.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import { setTermLength, withTerm, type LogAxis, type ProfileParameter } from '../../core/tuning/index.ts';
import type { TuningKind, TuningResultMap } from '../../worker/tuningProtocol.ts';
import type { ClientPort, TuningPayload } from '../../worker/client.ts';
import { TUNING_KINDS } from '../../worker/tuningProtocol.ts';
import type { StoreGet, StoreSet, WorkbenchState } from '../store.ts';
import { CANDIDATE_STYLES, MAX_PINNED, nextCandidateStyle } from './candidates.ts';
import { termSmoothness } from '../../core/kernels/table.ts';

export interface Candidate {
  readonly id: string;
  readonly name: string;
  readonly prior: PriorSpec;
  readonly colour: string;
}

export type TaskStatus = 'idle' | 'running' | 'done' | 'cancelled' | 'error';

export interface Task<T> {
  readonly status: TaskStatus;
  readonly value: T | null;
  readonly error: string | null;
  /** What the value was computed for (problem version, prior revision, settings). */
  readonly key: string | null;
  /** The prior it was computed for. */
  readonly prior: PriorSpec | null;
}

export type SelectTasks = { readonly [K in TuningKind]: Task<TuningResultMap[K]> };

export interface MapSettings {
  readonly term: number;
  readonly lengths: LogAxis;
  readonly variances: LogAxis;
}

export interface SelectSlice {
  candidates: Candidate[];
  selectTasks: SelectTasks;
  runEvidenceMap(settings: MapSettings): void;
  runProfile(which: ProfileParameter, values: number[]): void;
  runFit(fixed: string[]): void;
  refreshCriteria(): void;
  runCalibration(replicates: number, draws: number): void;
  refreshCandidates(): void;
  runCrossCalibration(replicates: number, draws: number): void;
  /** Average the posterior over the last evidence map's cells (src/core/tuning/averaged.ts). */
  runAveraged(hyperPrior: HyperPrior): void;
  cancelTuning(kind: TuningKind): void;
  /** Apply map cell `index` (row-major over length, variance) of the last map to the prior's term. */
  applyMapCell(index: number): void;
  /** Make the prior `prior` (e.g. a fit or a discrepancy scaling) the current prior. */
  applyTuned(prior: PriorSpec): void;
  pinPrior(): void;
  unpin(id: string): void;
  renameCandidate(id: string, name: string): void;
  useCandidate(id: string): void;
  /** Forget every tuning result (a new problem). */
  resetSelect(): void;
  /**
   * A different problem is shown: its tuning results are forgotten, the pinned candidates of the
   * problem left are set aside and those of the problem shown (if it was open before) come back.
   */
  problemShown(identity: string): void;
  /** Where the pinned candidates went on the last change of problem (null: nothing to say). */
  candidatesNote: string | null;
}

/** Which problem is shown: a built-in one by id, or the user's own by its saved key. */
export function problemIdentity(s: Pick<WorkbenchState, 'problem' | 'userProblem' | 'demoId'>): string | null {
  if (!s.problem) return null;
  return s.problem.demoId != null ? `demo:${s.problem.demoId}` : `user:${s.userProblem?.key ?? s.problem.title ?? ''}`;
}

/** What a result can be applied to: the kernels, their smoothness, isotropy and the number of terms. */
export function priorStructure(p: PriorSpec): string {
  return JSON.stringify(p.terms.map((t) => [t.kernel, termSmoothness(t) ?? null, t.lengths ? 'anisotropic' : 'isotropic']));
}

/**
 * How a task's result relates to what is on screen now: computed for the current prior; for an
 * earlier prior of the same structure (shown as out of date, still applicable); for a prior of
 * another structure (out of date, cannot be applied); or for another problem.
 */
export type Freshness = 'current' | 'earlier-prior' | 'other-structure' | 'other-problem';

export function freshness(
  task: Pick<Task<unknown>, 'key' | 'prior'>,
  s: Pick<WorkbenchState, 'problem' | 'priorRevision' | 'prior'>,
): Freshness {
  const [version, revision] = (task.key ?? '').split(':');
  if (!s.problem || version !== String(s.problem.version)) return 'other-problem';
  if (task.prior && s.prior && priorStructure(task.prior) !== priorStructure(s.prior)) return 'other-structure';
  return revision === String(s.priorRevision) ? 'current' : 'earlier-prior';
}

/** The structure of a prior in words: its terms' kernels (with ν for Matérn) and isotropy. */
export function structureWords(p: PriorSpec): string {
  const terms = p.terms.map((t) => {
    const nu = termSmoothness(t);
    return `${t.kernel}${nu !== undefined ? ` ν = ${nu}` : ''}${t.lengths ? ' (anisotropic)' : ''}`;
  });
  return terms.length === 0 ? 'no terms' : `${terms.length} term${terms.length === 1 ? '' : 's'}: ${terms.join(' + ')}`;
}

/**
 * One plain sentence for a result that is not current (null when it is). With the prior the result
 * was computed for (`was`) and the current prior (`now`), a change of structure is named.
 */
export function freshnessText(f: Freshness, was?: PriorSpec | null, now?: PriorSpec | null): string | null {
  switch (f) {
    case 'current':
      return null;
    case 'earlier-prior':
      return 'Out of date: computed for an earlier prior of the same structure. Recompute to update it.';
    case 'other-structure': {
      const why = was && now ? ` (${structureWords(was)}; the current prior has ${structureWords(now)})` : '';
      return `Out of date: computed for a prior with other kernels or terms${why}, so it cannot be applied to the current prior. Recompute it.`;
    }
    case 'other-problem':
      return 'Out of date: computed for another problem. Recompute it.';
    default:
      return assertNever(f, 'freshness');
  }
}

const idleTask = <T>(): Task<T> => ({ status: 'idle', value: null, error: null, key: null, prior: null });
export function emptyTasks(): SelectTasks {
  return Object.fromEntries(TUNING_KINDS.map((k) => [k, idleTask()])) as unknown as SelectTasks;
}

/** Key of the current (problem, prior) pair. */
export function priorKey(s: Pick<WorkbenchState, 'problem' | 'priorRevision'>): string {
  return `${s.problem?.version ?? 0}:${s.priorRevision}`;
}

/** Key of the pinned candidates for the current problem and seed. */
export function candidatesKey(s: Pick<WorkbenchState, 'problem' | 'candidates' | 'seed'>): string {
  return `${s.problem?.version ?? 0}:${s.seed}:${JSON.stringify(s.candidates.map((c) => c.prior))}`;
}

/** Posterior realisations shown per candidate. */
export const CANDIDATE_DRAWS = 3;

/** `client.tuning`: the split client's secondary worker, so the posterior worker stays free. */
export function createSelectSlice(set: StoreSet, get: StoreGet, client: Pick<ClientPort, 'tuning'>): SelectSlice {
  const port = client.tuning;
  let nextId = 1;
  /** Pinned candidates of the problems shown earlier in this session, by problem identity. */
  const setAside = new Map<string, Candidate[]>();
  let shown: string | null = null;
  let shownTitle = '';

  const patchTask = <K extends TuningKind>(kind: K, patch: Partial<Task<TuningResultMap[K]>>) => {
    const tasks = get().selectTasks;
    set({ selectTasks: { ...tasks, [kind]: { ...tasks[kind], ...patch } } as SelectTasks });
  };

  /** Send one tuning request and keep its outcome in the task of its kind. */
  const start = <K extends TuningKind>(kind: K, key: string, prior: PriorSpec | null, payload: TuningPayload<K>) => {
    if (!port) {
      patchTask(kind, { status: 'error', error: 'no worker available for prior selection', key, prior });
      return;
    }
    patchTask(kind, { status: 'running', error: null, key, prior });
    port.request(kind, payload).then(
      (o) => {
        if (get().selectTasks[kind].key !== key) return;
        if (o.superseded) {
          // Superseded by something other than a newer request of this kind (a new problem, a restart).
          if (get().selectTasks[kind].status === 'running') patchTask(kind, { status: 'cancelled' });
          return;
        }
        const v = o.value as { cancelled?: boolean };
        patchTask(kind, { status: v.cancelled ? 'cancelled' : 'done', value: o.value, error: null });
        if (get().progress?.channel === kind) set({ progress: null });
      },
      (e: unknown) => {
        if (get().selectTasks[kind].key !== key) return;
        patchTask(kind, { status: 'error', error: e instanceof Error ? e.message : String(e), value: null });
        if (get().progress?.channel === kind) set({ progress: null });
      },
    );
  };

  const current = () => {
    const s = get();
    return s.prior && s.problem && s.problemStatus === 'ready' ? { s, prior: s.prior } : null;
  };

  return {
    candidates: [],
    selectTasks: emptyTasks(),
    candidatesNote: null,

    runEvidenceMap(settings) {
      const c = current();
      if (!c) return;
      start('evidenceMap', `${priorKey(c.s)}:${JSON.stringify(settings)}`, c.prior, { prior: c.prior, ...settings });
    },
    runProfile(which, values) {
      const c = current();
      if (!c) return;
      start('evidenceProfile', `${priorKey(c.s)}:${JSON.stringify(which)}:${values.join(',')}`, c.prior, { prior: c.prior, which, values });
    },
    runAveraged(hyperPrior) {
      const c = current();
      const t = c?.s.selectTasks.evidenceMap;
      if (!c || !t?.value || !t.prior || !t.key) return;
      const { term, lengths, variances, logEvidence } = t.value;
      start('averaged', `${t.key}:${hyperPrior}`, t.prior, { prior: t.prior, map: { term, lengths, variances, logEvidence }, hyperPrior });
    },
    runFit(fixed) {
      const c = current();
      if (!c) return;
      start('typeII', `${priorKey(c.s)}:${fixed.join(',')}`, c.prior, { prior: c.prior, fixed });
    },
    refreshCriteria() {
      const c = current();
      if (!c) return;
      const key = priorKey(c.s);
      const t = c.s.selectTasks.criteria;
      if (t.key === key && (t.status === 'done' || t.status === 'running')) return;
      start('criteria', key, c.prior, { prior: c.prior });
    },
    runCalibration(replicates, draws) {
      const c = current();
      if (!c) return;
      const seed = c.s.seed;
      start('calibration', `${priorKey(c.s)}:${replicates}:${draws}:${seed}`, c.prior, { prior: c.prior, replicates, draws, seed });
    },
    refreshCandidates() {
      const s = get();
      if (!s.problem || s.problemStatus !== 'ready' || s.candidates.length === 0) return;
      const key = candidatesKey(s);
      const t = s.selectTasks.candidates;
      if (t.key === key && (t.status === 'done' || t.status === 'running')) return;
      start('candidates', key, null, { priors: s.candidates.map((c) => c.prior), draws: CANDIDATE_DRAWS, seed: s.seed });
    },
    runCrossCalibration(replicates, draws) {
      const s = get();
      if (!s.problem || s.candidates.length === 0) return;
      start('crossCalibration', `${candidatesKey(s)}:${replicates}:${draws}`, null, {
        priors: s.candidates.map((c) => c.prior),
        replicates,
        draws,
        seed: s.seed,
      });
    },
    cancelTuning(kind) {
      const t = get().selectTasks[kind];
      if (t.status !== 'running') return;
      port?.cancel(kind);
      patchTask(kind, { status: 'cancelled' });
      if (get().progress?.channel === kind) set({ progress: null });
    },
    applyMapCell(index) {
      const s = get();
      const map = s.selectTasks.evidenceMap.value;
      if (!map || !s.prior) return;
      const f = freshness(s.selectTasks.evidenceMap, s);
      if (f === 'other-structure' || f === 'other-problem') {
        set({ notice: `The evidence map was not applied. ${freshnessText(f, s.selectTasks.evidenceMap.prior, s.prior)}` });
        return;
      }
      const nv = map.variances.length;
      const i = Math.floor(index / nv);
      const j = index % nv;
      const term = s.prior.terms[map.term];
      if (!term || i < 0 || i >= map.lengths.length) return;
      s.setPrior(withTerm(s.prior, map.term, { ...setTermLength(term, map.lengths[i]), variance: map.variances[j] }));
    },
    applyTuned(prior) {
      const s = get();
      if (s.prior && priorStructure(prior) !== priorStructure(s.prior)) {
        set({ notice: `The result was not applied. ${freshnessText('other-structure', prior, s.prior)}` });
        return;
      }
      s.setPrior(prior);
    },
    pinPrior() {
      const s = get();
      if (!s.prior || s.candidates.length >= MAX_PINNED) return;
      const style = nextCandidateStyle(s.candidates.map((c) => c.colour));
      set({
        candidates: [
          ...s.candidates,
          { id: `cand-${Date.now().toString(36)}-${nextId++}`, name: style.name, colour: style.colour, prior: s.prior },
        ],
        candidatesNote: null,
      });
      get().refreshCandidates();
    },
    unpin(id) {
      set({ candidates: get().candidates.filter((c) => c.id !== id), candidatesNote: null });
      get().refreshCandidates();
    },
    renameCandidate(id, name) {
      const trimmed = name.trim();
      if (!trimmed) return;
      set({ candidates: get().candidates.map((c) => (c.id === id ? { ...c, name: trimmed.slice(0, 40) } : c)) });
    },
    useCandidate(id) {
      const c = get().candidates.find((x) => x.id === id);
      if (c) get().setPrior(c.prior);
    },
    resetSelect() {
      for (const k of TUNING_KINDS) if (get().selectTasks[k].status === 'running') port?.cancel(k);
      set({ selectTasks: emptyTasks() });
    },
    problemShown(identity) {
      if (identity === shown) return;
      const left = get().candidates;
      if (shown !== null) setAside.set(shown, left);
      const leftTitle = shownTitle;
      shown = identity;
      shownTitle = get().problem?.title ?? '';
      get().resetSelect();
      const back = setAside.get(identity) ?? [];
      const count = (n: number) => `${n} pinned candidate${n === 1 ? '' : 's'}`;
      const parts: string[] = [];
      if (left.length > 0)
        parts.push(
          `The ${count(left.length)} of “${leftTitle}” ${left.length === 1 ? 'is' : 'are'} kept for that problem and come${left.length === 1 ? 's' : ''} back when it is shown again.`,
        );
      if (back.length > 0) parts.push(`The ${count(back.length)} of this problem ${back.length === 1 ? 'is' : 'are'} back.`);
      set({ candidates: back, candidatesNote: parts.length > 0 ? parts.join(' ') : null });
    },
  };
}

export { CANDIDATE_STYLES };
