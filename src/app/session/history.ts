/**
 * Undo / redo of prior edits, as pure functions over an immutable history value.
 *
 * Coalescing: an edit made with a continuous control (a slider being dragged or stepped with the
 * arrow keys) that changes the same fields as the previous edit, within {@link COALESCE_MS} of
 * it, extends that step instead of adding one, so a slider drag (dozens of edits of one length)
 * is undone in one step; typed values, imports and edits of other fields are steps of their own
 * (common practice in editors, no source).
 */
import type { PriorSpec } from '../../core/prior/spec.ts';

export const COALESCE_MS = 800;
/** Oldest steps are dropped beyond this. */
export const HISTORY_LIMIT = 200;

export interface History {
  readonly past: readonly PriorSpec[];
  readonly future: readonly PriorSpec[];
  /** Fields changed by the newest step and when it was last extended (for coalescing). */
  readonly lastSignature: string | null;
  readonly lastTime: number;
}

export const emptyHistory: History = { past: [], future: [], lastSignature: null, lastTime: -Infinity };

/** Dotted paths of the leaves that differ between two JSON values, sorted and joined. */
export function changedPaths(a: unknown, b: unknown, path = ''): string[] {
  if (Object.is(a, b)) return [];
  const isObj = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null;
  if (!isObj(a) || !isObj(b) || Array.isArray(a) !== Array.isArray(b)) return [path || '.'];
  const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
  const out: string[] = [];
  for (const k of keys) out.push(...changedPaths(a[k], b[k], path ? `${path}.${k}` : k));
  return out.sort();
}

/** Record an edit from `before` to `after` made at time `now` (ms); `continuous` for slider edits. */
export function record(h: History, before: PriorSpec, after: PriorSpec, now: number, continuous = false): History {
  const paths = changedPaths(before, after);
  if (paths.length === 0) return h;
  const signature = (continuous ? 'slider:' : 'typed:') + paths.join('|');
  if (continuous && signature === h.lastSignature && now - h.lastTime < COALESCE_MS && h.past.length > 0) {
    return { ...h, future: [], lastTime: now };
  }
  const past = [...h.past, before];
  if (past.length > HISTORY_LIMIT) past.splice(0, past.length - HISTORY_LIMIT);
  return { past, future: [], lastSignature: signature, lastTime: now };
}

/** Step back: the prior to show and the new history, or null when there is nothing to undo. */
export function undo(h: History, current: PriorSpec): { prior: PriorSpec; history: History } | null {
  const prior = h.past[h.past.length - 1];
  if (prior === undefined) return null;
  return { prior, history: { past: h.past.slice(0, -1), future: [current, ...h.future], lastSignature: null, lastTime: -Infinity } };
}

export function redo(h: History, current: PriorSpec): { prior: PriorSpec; history: History } | null {
  const prior = h.future[0];
  if (prior === undefined) return null;
  return { prior, history: { past: [...h.past, current], future: h.future.slice(1), lastSignature: null, lastTime: -Infinity } };
}
