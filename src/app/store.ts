/**
 * The workbench store: one zustand store composed of its slices, each in its own file:
 * problem (./problem/slice.ts), prior (./prior/slice.ts), results (./results/slice.ts),
 * view (./view/slice.ts), session (./session/slice.ts) and prior selection (./select/slice.ts).
 * Framework-free (zustand/vanilla) and without DOM reads; React reads it through ./context.ts (useWb).
 * All numerics go through the worker client (../worker/client.ts ClientPort); the store only keeps
 * plain specs and the typed-array results.
 */
import { createStore, type StoreApi } from 'zustand/vanilla';
import type { ClientPort } from '../worker/client.ts';
import { createPriorSlice, type PriorSlice } from './prior/slice.ts';
import { createProblemSlice, type ProblemSlice } from './problem/slice.ts';
import { createResultsSlice, type ResultsSlice } from './results/slice.ts';
import { createSelectSlice, problemIdentity, type SelectSlice } from './select/slice.ts';
import { createSessionSlice, type SessionSlice } from './session/slice.ts';
import { createViewSlice, type ViewSlice } from './view/slice.ts';

export type WorkbenchState = ProblemSlice & PriorSlice & ResultsSlice & ViewSlice & SessionSlice & SelectSlice;
export type WorkbenchStore = StoreApi<WorkbenchState>;
/** The store's setter and getter as each slice receives them. */
export type StoreSet = WorkbenchStore['setState'];
export type StoreGet = WorkbenchStore['getState'];

export function createWorkbenchStore(client: ClientPort, initial: { demoId: string; seed?: number }): WorkbenchStore {
  const store = createStore<WorkbenchState>()((set, get, api) => ({
    ...createProblemSlice(set, get, client, initial),
    ...createPriorSlice(set, get),
    ...createResultsSlice(set, get, client),
    ...createViewSlice(set, get, initial),
    ...createSessionSlice(set, get, api, client),
    ...createSelectSlice(set, get, client),
  }));

  client.onRestart((reason) => {
    store.setState({
      notice: `The numerics worker stopped (${reason}); it was restarted and the results are being recomputed.`,
      computedFor: {},
      busy: {},
    });
    store.getState().refresh();
  });
  // Results and pinned candidates belong to their problem (./select/slice.ts problemShown).
  store.subscribe((s, prev) => {
    if (s.problem === prev.problem && s.userProblem === prev.userProblem) return;
    const id = problemIdentity(s);
    if (id !== null && id !== problemIdentity(prev)) s.problemShown(id);
  });
  return store;
}
