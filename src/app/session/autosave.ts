/**
 * The session on disk: IndexedDB database "priorscope", object store "session", two records:
 *   "session"  SavedSession (small: which problem, the prior, the view; written on every change, debounced)
 *   "problem"  the user's own Problem with its typed arrays (written only when a new problem is loaded)
 * Structured clone keeps Float64Arrays as they are, so a reload restores the numbers bit for bit.
 */
import type { Problem } from '../../core/problems/spec.ts';
import type { Geometry } from '../../core/grid/grid.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import type { TabId } from '../view/slice.ts';

export const SESSION_FORMAT = 1;
/** Delay after the last change before the session is written. */
export const AUTOSAVE_DEBOUNCE_MS = 300;

export interface SavedSession {
  readonly format: typeof SESSION_FORMAT;
  /** A built-in problem by id, or the user's own problem (record "problem", identified by `problemKey`). */
  readonly source:
    | { readonly kind: 'demo'; readonly demoId: string }
    | { readonly kind: 'user'; readonly problemKey: string; readonly label: string };
  readonly prior: PriorSpec;
  readonly seed: number;
  readonly tab: TabId;
  readonly selectedCell: number | null;
  /** Anything else a slice wants kept (e.g. candidate priors), stored as structured-clone data. */
  readonly extra?: Record<string, unknown>;
  readonly savedAt: number;
}

export interface SavedProblem {
  readonly key: string;
  readonly problem: Problem<Geometry>;
}

/** Storage behind the autosave (IndexedDB in the browser, a Map in tests). */
export interface SessionStorage {
  get<T>(key: string): Promise<T | undefined>;
  put(key: string, value: unknown): Promise<void>;
  remove(key: string): Promise<void>;
}

const DB = 'priorscope';
const STORE = 'session';

function request<T>(r: IDBRequest<T>): Promise<T> {
  return new Promise((resolve, reject) => {
    r.onsuccess = () => resolve(r.result);
    r.onerror = () => reject(r.error ?? new Error('IndexedDB request failed'));
  });
}

export function indexedDbStorage(factory: IDBFactory = indexedDB): SessionStorage {
  let db: Promise<IDBDatabase> | null = null;
  const open = () => {
    if (!db) {
      const r = factory.open(DB, 1);
      r.onupgradeneeded = () => r.result.createObjectStore(STORE);
      db = request(r);
    }
    return db;
  };
  const tx = async (mode: IDBTransactionMode) => (await open()).transaction(STORE, mode).objectStore(STORE);
  return {
    async get<T>(key: string) {
      return (await request((await tx('readonly')).get(key))) as T | undefined;
    },
    async put(key, value) {
      await request((await tx('readwrite')).put(value, key));
    },
    async remove(key) {
      await request((await tx('readwrite')).delete(key));
    },
  };
}

export function memoryStorage(): SessionStorage & { readonly map: Map<string, unknown> } {
  const map = new Map<string, unknown>();
  return {
    map,
    async get<T>(key: string) {
      return map.has(key) ? (structuredClone(map.get(key)) as T) : undefined;
    },
    async put(key, value) {
      map.set(key, structuredClone(value));
    },
    async remove(key) {
      map.delete(key);
    },
  };
}
