// worker_threads entry of the thread pool (./node.ts; variance and products tasks): loads the
// TypeScript sources through tsx's loader, then answers {id, task} messages with ./pool.ts
// answerTask (which keeps this thread's products spectra between tasks).
import { parentPort } from 'node:worker_threads';
import { register } from 'tsx/esm/api';

register();
const { answerTask } = await import('./pool.ts');
parentPort.on('message', (request) => {
  const { reply, transfer } = answerTask(request);
  parentPort.postMessage(reply, transfer);
});
