/**
 * The prior slice of the workbench store (spread into it by ../store.ts): the prior being edited,
 * its revision, and the edits of the Prior panel. Every edit bumps the revision and asks the results
 * slice to recompute; undo and redo are the session slice's (../session/slice.ts).
 */
import { patchTerm, type KernelName, type Term, type TermPatch } from '../../core/kernels/spec.ts';
import { termSmoothness } from '../../core/kernels/table.ts';
import type { MeanSpec, PriorSpec } from '../../core/prior/spec.ts';
import { MAX_TERMS } from '../../core/prior/validate.ts';
import { addedTerm, defaultPrior } from '../defaults.ts';
import type { StoreGet, StoreSet } from '../store.ts';

/** Performance mark of a prior edit, read by the UI benchmark (test/bench/ui.ts). */
export const MARK_PARAM_CHANGE = 'ps:param-change';

export interface PriorSlice {
  prior: PriorSpec | null;
  /** Incremented on every prior edit. */
  priorRevision: number;

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
}

function mark(name: string): void {
  if (typeof performance !== 'undefined' && typeof performance.mark === 'function') performance.mark(name);
}

export function createPriorSlice(set: StoreSet, get: StoreGet): PriorSlice {
  const editPrior = (f: (p: PriorSpec) => PriorSpec) => {
    const p = get().prior;
    if (!p) return;
    mark(MARK_PARAM_CHANGE);
    set({ prior: f(p), priorRevision: get().priorRevision + 1 });
    get().refresh();
  };
  const editTerms = (f: (terms: Term[]) => Term[]) => editPrior((p) => ({ ...p, terms: f([...p.terms]) }));

  return {
    prior: null,
    priorRevision: 0,

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
        [out[index], out[j]] = [out[j], out[index]];
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
  };
}
