/**
 * The body of a worker_threads thread of ./node.ts's pool: answers {id, task} messages with
 * ./pool.ts answerTask (which keeps this thread's products spectra between tasks). Started from the
 * sources through ./nodeWorker.mjs (tsx's loader), or as the built command line's
 * `dist-cli/pool-worker.mjs` (vite.cli.config.ts bundles this file as that entry).
 */
import { parentPort } from 'node:worker_threads';
import { answerTask, type TaskRequest } from './pool.ts';

if (parentPort === null) throw new Error('src/core/parallel/nodeWorkerMain.ts runs only as a worker thread');
const port = parentPort;
port.on('message', (request: TaskRequest) => {
  const { reply, transfer } = answerTask(request);
  port.postMessage(reply, transfer);
});
