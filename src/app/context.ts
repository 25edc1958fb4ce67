/** React access to the workbench store: a context holding the store and a selector hook. */
import { createContext, useContext } from 'react';
import { useStore } from 'zustand';
import type { WorkbenchState, WorkbenchStore } from './store.ts';

export const StoreContext = createContext<WorkbenchStore | null>(null);

export function useWorkbenchStore(): WorkbenchStore {
  const s = useContext(StoreContext);
  if (!s) throw new Error('useWorkbench: no StoreContext provider');
  return s;
}

/** Select one value from the store; the component re-renders only when it changes (Object.is). */
export function useWb<T>(selector: (s: WorkbenchState) => T): T {
  return useStore(useWorkbenchStore(), selector);
}
