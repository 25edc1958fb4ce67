/// <reference lib="webworker" />
/** Web Worker entry of the variance pool (./pool.ts): answers {id, task} with src/core/parallel/pool.ts answerTask. */
import { answerTask, type TaskRequest } from '../core/parallel/pool.ts';

const scope = self as unknown as DedicatedWorkerGlobalScope;
scope.onmessage = (ev: MessageEvent<TaskRequest>) => {
  const { reply, transfer } = answerTask(ev.data);
  scope.postMessage(reply, transfer);
};
