/**
 * The browser side of the thread split: a BlockPool (src/core/parallel/blocks.ts) of Web Workers
 * running ./poolWorker.ts, one per core (navigator.hardwareConcurrency). The workers answer both
 * task kinds of src/core/parallel/pool.ts: the std's column blocks and the mean's Bᵀ products
 * (src/core/parallel/products.ts prepareStructuredPosteriorParallel; each worker keeps its share's
 * spectra between prior changes). Bᵀ is shared (SharedArrayBuffer) only when the page is
 * crossOriginIsolated; otherwise the rows come back transferred. Created lazily by the numerics
 * worker the first time a posterior is large enough to split (src/core/inverse/compute.ts stdSplits /
 * productsWorthSplitting); results are bit-identical to one thread (test/core/parallel runs the
 * same tasks over worker_threads).
 */
import type { BlockPool } from '../core/parallel/blocks.ts';
import { portPool, type TaskPort } from '../core/parallel/pool.ts';

/** Cores the browser reports (at least 1; capped at 8 — more workers copy L more often for little gain). */
export function browserThreads(): number {
  const n = typeof navigator !== 'undefined' ? navigator.hardwareConcurrency : 1;
  return Math.max(1, Math.min(8, Number.isInteger(n) && n > 0 ? n : 1));
}

export function webBlockPool(size = browserThreads()): BlockPool {
  const ports: TaskPort[] = Array.from({ length: size }, () => {
    const w = new Worker(new URL('./poolWorker.ts', import.meta.url), { type: 'module' });
    return {
      post: (message, transfer) => w.postMessage(message, transfer),
      listen: (onReply, onFailure) => {
        w.onmessage = (ev) => onReply(ev.data);
        w.onerror = (ev) => onFailure(new Error(`pool worker failed: ${ev.message}`));
      },
      terminate: () => w.terminate(),
    };
  });
  return portPool(ports);
}

/** A pool made on first use (so small problems never start workers). */
export function lazyPool(make: () => BlockPool = webBlockPool): { get(): BlockPool; readonly threads: number } {
  let pool: BlockPool | null = null;
  return {
    threads: browserThreads(),
    get: () => (pool ??= make()),
  };
}
