/**
 * The view slice of the workbench store (spread into it by ../store.ts): the open tab, the seed of
 * the realisations, the cell whose averaging kernel is shown, and the notice line. Changing any of
 * them asks the results slice for what the screen now needs.
 */
import type { StoreGet, StoreSet } from '../store.ts';

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

/** The seed of a new session. */
export const DEFAULT_SEED = 20240611;

/** Next seed in a fixed sequence (a 31-bit linear congruential step; any new value will do). */
export function nextSeed(seed: number): number {
  return (Math.imul(seed, 1103515245) + 12345) >>> 1;
}

export interface ViewSlice {
  tab: TabId;
  seed: number;
  selectedCell: number | null;
  notice: string | null;
  /** A share link or a ?demo= address replaced the autosaved session; a copy was kept (../session/start.ts). */
  previousSessionKept: boolean;

  setTab(tab: TabId): void;
  setSeed(seed: number): void;
  newSeed(): void;
  selectCell(cell: number | null): void;
  dismissNotice(): void;
}

export function createViewSlice(set: StoreSet, get: StoreGet, initial: { seed?: number }): ViewSlice {
  return {
    tab: 'overview',
    seed: initial.seed ?? DEFAULT_SEED,
    selectedCell: null,
    notice: null,
    previousSessionKept: false,

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
    dismissNotice() {
      set({ notice: null });
    },
  };
}
