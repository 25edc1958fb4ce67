/**
 * The problem as the grid screens see it. A problem on a cell list (the user's own mesh) is shown by the cells
 * screen instead (App.tsx routes every tab there), so the grid screens read the problem through
 * {@link useGridView}, which is null for a cell list as for no problem at all.
 */
import { isCellList, type Grid } from '../core/grid/grid.ts';
import type { ProblemView } from '../worker/protocol.ts';
import { useWb } from './context.ts';

/** A problem view on a regular grid. */
export type GridView = ProblemView & { readonly grid: Grid };

export function isGridView(p: ProblemView | null): p is GridView {
  return p !== null && !isCellList(p.grid);
}

/** The loaded problem when it is on a regular grid, else null. */
export function useGridView(): GridView | null {
  return useWb((s) => (isGridView(s.problem) ? s.problem : null));
}
