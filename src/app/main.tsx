/** Entry point: creates the worker client and the store, mounts the workbench. */
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { WorkerClient, type WorkerLike } from '../worker/client.ts';
import { SplitClient } from '../worker/split.ts';
import { App } from './App.tsx';
import { StoreContext } from './context.ts';
import { DEFAULT_DEMO } from './demos.ts';
import { createWorkbenchStore } from './store.ts';
import './styles.css';
import { installShortcuts, startSession } from './session/start.ts';
import { indexedDbStorage } from './session/autosave.ts';
import { ErrorBoundary } from './ErrorBoundary.tsx';

/** Removes the autosaved session (and its problem), then reopens the page on the default demo. */
async function clearSavedSession(): Promise<void> {
  if (typeof indexedDB !== 'undefined') {
    const storage = indexedDbStorage();
    for (const key of ['session', 'problem']) await storage.remove(key).catch(() => undefined);
  }
  location.assign(location.pathname);
}

const makeClient = () =>
  new WorkerClient(() => new Worker(new URL('../worker/worker.ts', import.meta.url), { type: 'module' }) as unknown as WorkerLike, {
    onProgress: (channel, stage, fraction) => store.getState().setProgress({ channel, stage, fraction }),
  });
const client = new SplitClient(makeClient(), makeClient());
const params = new URLSearchParams(location.search);
const store = createWorkbenchStore(client, { demoId: params.get('demo') ?? DEFAULT_DEMO });

/** Read-only hook for the end-to-end tests: a snapshot of plain state, never the live store. */
declare global {
  interface Window {
    __priorscope?: { getState(): unknown };
  }
}
window.__priorscope = {
  getState: () => {
    const s = store.getState();
    return structuredClone({
      demoId: s.demoId,
      problemVersion: s.problem?.version ?? null,
      numericKernels: s.problem?.numericKernels ?? null,
      prior: s.prior,
      priorRevision: s.priorRevision,
      seed: s.seed,
      tab: s.tab,
      selectedCell: s.selectedCell,
      errors: s.errors,
      busy: s.busy,
      computedFor: s.computedFor,
      diagnostics: s.diagnostics,
      candidates: s.candidates,
      restarts: client.restarts,
    });
  },
};

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <StoreContext.Provider value={store}>
      <ErrorBoundary startOver={() => store.getState().startOver()} clearSaved={clearSavedSession}>
        <App />
      </ErrorBoundary>
    </StoreContext.Provider>
  </StrictMode>,
);
// Share link, ?demo=, autosave or the default demo (precedence in ./session/start.ts), then autosave and shortcuts.
void startSession(store, {
  storage: typeof indexedDB !== 'undefined' ? indexedDbStorage() : null,
  explicitDemo: params.get('demo'),
  hash: location.hash,
  clearHash: () => history.replaceState(null, '', location.pathname + location.search),
  lifecycle: window,
});
installShortcuts(store, window);
