/**
 * Colour limits fixed by hand, shared by every map that draws a signed field (overview,
 * realisations): the half-width of the diverging range about the prior mean, or null for the
 * automatic range. A small store of its own (not saved with the session: a viewing choice).
 */
import { createStore } from 'zustand/vanilla';
import { useStore } from 'zustand';
import type { ManualLimits } from '../colourScales.ts';

interface LimitsState extends ManualLimits {
  setHalf(half: number | null): void;
}

export const colourLimits = createStore<LimitsState>()((set) => ({
  half: null,
  setHalf(half) {
    set({ half: half !== null && Number.isFinite(half) && half > 0 ? half : null });
  },
}));

export function useColourLimits(): LimitsState {
  return useStore(colourLimits);
}
