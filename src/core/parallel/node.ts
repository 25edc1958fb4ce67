/**
 * The Node side of the thread split (variance columns, Bᵀ products): a {@link BlockPool} of worker_threads. Imports node modules,
 * so nothing in src/core imports this file (the core stays pure); the CLI, the benchmarks and the
 * tests do. Each thread runs ./nodeWorkerMain.ts: from the sources through ./nodeWorker.mjs (tsx's
 * loader), in the built command line as the bundle's sibling entry pool-worker.mjs (vite.cli.config.ts
 * defines __PRIORSCOPE_CLI_BUNDLE__ there).
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

declare const __PRIORSCOPE_CLI_BUNDLE__: boolean | undefined;

/**
 * The thread's entry file: in the built command line the sibling entry pool-worker.mjs (every chunk
 * of the bundle lies in one folder, so it sits beside this code), else the tsx-loading ./nodeWorker.mjs.
 * The name is a variable so that the bundler leaves the URL alone.
 */
function workerEntry(): URL {
  const name = typeof __PRIORSCOPE_CLI_BUNDLE__ !== 'undefined' && __PRIORSCOPE_CLI_BUNDLE__ ? './pool-worker.mjs' : './nodeWorker.mjs';
  return new URL(name, import.meta.url);
}

/** A pool of `size` worker threads; call close() when done (idle threads do not keep the process alive). */
export function nodeBlockPool(size = defaultThreads()): BlockPool {
  const entry = workerEntry();
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
