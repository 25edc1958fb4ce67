/// <reference lib="webworker" />
/**
 * Web Worker entry of the thread pool (./pool.ts): answers {id, task} (variance blocks and Bᵀ
 * products) with src/core/parallel/pool.ts answerTask, which keeps this worker's products spectra.
 */
import { answerTask, type TaskRequest } from '../core/parallel/pool.ts';

const scope = self as unknown as DedicatedWorkerGlobalScope;
scope.onmessage = (ev: MessageEvent<TaskRequest>) => {
  const { reply, transfer } = answerTask(ev.data);
  scope.postMessage(reply, transfer);
};
