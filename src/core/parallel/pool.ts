/**
 * A {@link BlockPool} over message ports of any kind (worker_threads Workers in Node, Web Workers
 * in the browser), pure: the caller adapts its workers to {@link TaskPort}. Each port runs one
 * task at a time; tasks queue and go to the next free port. Messages: {id, task} in,
 * {id, result} or {id, error} out; the task's Bᵀ slice and the result are transferred.
 *
 * PUBLIC API: TaskPort, TaskRequest, TaskReply, portPool, answerTask.
 */
import { runVarianceTask, type BlockPool, type VarianceTask } from './blocks.ts';

export interface TaskRequest {
  readonly id: number;
  readonly task: VarianceTask;
}

export type TaskReply = { readonly id: number; readonly result: Float64Array } | { readonly id: number; readonly error: string };

/** The least a worker handle must offer. */
export interface TaskPort {
  post(message: TaskRequest, transfer: ArrayBuffer[]): void;
  /** Calls `onReply` for each message, `onFailure` when the worker dies. */
  listen(onReply: (reply: TaskReply) => void, onFailure: (error: unknown) => void): void;
  terminate(): Promise<void> | void;
}

/** What a worker does with one request (both worker entries call this). */
export function answerTask(request: TaskRequest): { reply: TaskReply; transfer: ArrayBuffer[] } {
  try {
    const result = runVarianceTask(request.task);
    return { reply: { id: request.id, result }, transfer: [result.buffer as ArrayBuffer] };
  } catch (e) {
    return { reply: { id: request.id, error: e instanceof Error ? e.message : String(e) }, transfer: [] };
  }
}

interface Pending {
  readonly task: VarianceTask;
  readonly resolve: (v: Float64Array) => void;
  readonly reject: (e: unknown) => void;
}

export function portPool(ports: readonly TaskPort[]): BlockPool {
  let nextId = 0;
  let closed = false;
  const queue: (Pending & { id: number })[] = [];
  const busy = new Map<TaskPort, Pending & { id: number }>();

  const pump = () => {
    for (const port of ports) {
      if (busy.has(port) || queue.length === 0) continue;
      const job = queue.shift()!;
      busy.set(port, job);
      port.post({ id: job.id, task: job.task }, [job.task.bt.buffer as ArrayBuffer]);
    }
  };
  const failAll = (error: unknown) => {
    for (const job of [...busy.values(), ...queue]) job.reject(error);
    busy.clear();
    queue.length = 0;
  };
  for (const port of ports) {
    port.listen(
      (reply) => {
        const job = busy.get(port);
        if (!job || job.id !== reply.id) return;
        busy.delete(port);
        if ('error' in reply) job.reject(new Error(`variance worker: ${reply.error}`));
        else job.resolve(reply.result);
        pump();
      },
      (error) => {
        closed = true;
        failAll(error);
      },
    );
  }
  return {
    size: ports.length,
    run(task) {
      if (closed) return Promise.reject(new Error('variance pool is closed'));
      return new Promise<Float64Array>((resolve, reject) => {
        queue.push({ id: nextId++, task, resolve, reject });
        pump();
      });
    },
    async close() {
      closed = true;
      failAll(new Error('variance pool closed'));
      await Promise.all(ports.map((p) => p.terminate()));
    },
  };
}
