/**
 * The problem slice of the workbench store (spread into it by ../store.ts): the built-in problem
 * shown and its loading state. A user's own problem is loaded by the session slice
 * (../session/slice.ts), which fills the same fields.
 */
import type { ClientPort } from '../../worker/client.ts';
import type { ProblemView } from '../../worker/protocol.ts';
import { defaultPrior } from '../defaults.ts';
import { emptyResults } from '../results/slice.ts';
import type { StoreGet, StoreSet } from '../store.ts';

export interface ProblemSlice {
  demoId: string;
  problem: ProblemView | null;
  problemStatus: 'idle' | 'loading' | 'ready' | 'error';
  problemError: string | null;

  /** Load a built-in problem: the results are cleared, the prior becomes the problem's starting prior. */
  loadDemo(demoId: string): Promise<void>;
}

export function createProblemSlice(
  set: StoreSet,
  get: StoreGet,
  client: Pick<ClientPort, 'loadDemo'>,
  initial: { demoId: string },
): ProblemSlice {
  return {
    demoId: initial.demoId,
    problem: null,
    problemStatus: 'idle',
    problemError: null,

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
  };
}
