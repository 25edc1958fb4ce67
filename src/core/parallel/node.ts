/**
 * The Node side of the thread split (variance columns, Bᵀ products): a {@link BlockPool} of worker_threads. Imports node modules,
 * so nothing in src/core imports this file (the core stays pure); the CLI, the benchmarks and the
 * tests do. The workers start ./nodeWorker.mjs, which registers tsx's loader (as src/cli/bin.mjs
 * does) and answers tasks with ./pool.ts answerTask.
 *
 * PUBLIC API: nodeBlockPool, defaultThreads.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { BlockPool } from './blocks.ts';
import { portPool, type TaskPort, type TaskReply } from './pool.ts';

/** os.availableParallelism(): the cores this process may use (2 on the project machine). */
export function defaultThreads(): number {
  return Math.max(1, availableParallelism());
}

/** A pool of `size` worker threads; call close() when done (idle threads do not keep the process alive). */
export function nodeBlockPool(size = defaultThreads()): BlockPool {
  const entry = new URL('./nodeWorker.mjs', import.meta.url);
  const ports: TaskPort[] = Array.from({ length: size }, () => {
    const w = new Worker(entry);
    // An idle thread does not keep the process alive (a pool left open cannot hang a script);
    // a thread with a task in flight does (each port runs one task at a time).
    w.unref();
    return {
      post: (message, transfer) => {
        w.ref();
        w.postMessage(message, transfer);
      },
      listen: (onReply, onFailure) => {
        w.on('message', (m: TaskReply) => {
          w.unref();
          onReply(m);
        });
        w.on('error', onFailure);
        w.on('exit', (code) => {
          if (code !== 0) onFailure(new Error(`pool worker exited with code ${code}`));
        });
      },
      terminate: async () => {
        await w.terminate();
      },
    };
  });
  return portPool(ports);
}
