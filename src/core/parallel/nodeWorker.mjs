// worker_threads entry of the variance pool (./node.ts): loads the TypeScript sources through
// tsx's loader, then answers {id, task} messages with ./pool.ts answerTask.
import { parentPort } from 'node:worker_threads';
import { register } from 'tsx/esm/api';

register();
const { answerTask } = await import('./pool.ts');
parentPort.on('message', (request) => {
  const { reply, transfer } = answerTask(request);
  parentPort.postMessage(reply, transfer);
});
