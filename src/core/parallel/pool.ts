/**
 * A {@link BlockPool} over message ports of any kind (worker_threads Workers in Node, Web Workers
 * in the browser), pure: the caller adapts its workers to {@link TaskPort}. Each port runs one
 * task at a time; tasks queue and go to the next free port, or to their own port when pinned
 * (products tasks: the thread keeps that share's spectra). Messages: {id, task} in, {id, kind,
 * result} or {id, error} out; a copying variance task's Bᵀ slice and all returned arrays are transferred (a task
 * over shared memory sends views of the caller's SharedArrayBuffers).
 *
 * PUBLIC API: PoolTask, PingTask, TaskPort, TaskRequest, TaskReply, portPool, answerTask.
 */
import { assertNever } from '../errors.ts';
import { isShared, runVarianceTask, type BlockPool, type VarianceTask } from './blocks.ts';
import { ProductsThreadState, runProductsTask } from './products.ts';
import type { ProductsResult, ProductsTask } from './tasks.ts';

/**
 * A task that does nothing: its reply says the thread is running. A Web Worker started from inside a worker
 * loads its script only while the starting worker's event loop is free, so a caller that is about to compute
 * for a while waits for this reply first (see {@link BlockPool.started}).
 */
export interface PingTask {
  readonly kind: 'ping';
}

/** The task kinds a pool thread answers. */
export type PoolTask = VarianceTask | ProductsTask | PingTask;

export interface TaskRequest {
  readonly id: number;
  readonly task: PoolTask;
}

export type TaskReply =
  | { readonly id: number; readonly kind: 'variance'; readonly result: Float64Array }
  | { readonly id: number; readonly kind: 'products'; readonly result: ProductsResult }
  | { readonly id: number; readonly kind: 'ping'; readonly result: null }
  | { readonly id: number; readonly error: string };

/** A reply that carries a result (not an error). */
type ResultReply = Exclude<TaskReply, { readonly error: string }>;

/** The least a worker handle must offer. */
export interface TaskPort {
  post(message: TaskRequest, transfer: ArrayBuffer[]): void;
  /** Calls `onReply` for each message, `onFailure` when the worker dies. */
  listen(onReply: (reply: TaskReply) => void, onFailure: (error: unknown) => void): void;
  terminate(): Promise<void> | void;
}

/** This thread's products state (each worker thread loads its own copy of this module). */
const threadState = new ProductsThreadState();

/** What a worker does with one request (both worker entries call this). */
export function answerTask(request: TaskRequest, state: ProductsThreadState = threadState): { reply: TaskReply; transfer: ArrayBuffer[] } {
  const { id, task } = request;
  try {
    switch (task.kind) {
      case 'variance': {
        const result = runVarianceTask(task);
        return { reply: { id, kind: 'variance', result }, transfer: [result.buffer as ArrayBuffer] };
      }
      case 'products': {
        const result = runProductsTask(task, state);
        return { reply: { id, kind: 'products', result }, transfer: result.rows === null ? [] : [result.rows.buffer as ArrayBuffer] };
      }
      case 'ping':
        return { reply: { id, kind: 'ping', result: null }, transfer: [] };
      default:
        return assertNever(task);
    }
  } catch (e) {
    return { reply: { id, error: e instanceof Error ? e.message : String(e) }, transfer: [] };
  }
}

interface Job {
  readonly id: number;
  readonly task: PoolTask;
  /** Port index the task must run on; undefined: any. */
  readonly port: number | undefined;
  readonly settle: (reply: TaskReply) => void;
  readonly reject: (e: unknown) => void;
}

function transferOf(task: PoolTask): ArrayBuffer[] {
  switch (task.kind) {
    case 'variance':
      // A task over shared memory refers to the caller's Bᵀ (a SharedArrayBuffer cannot be transferred, and need not
      // be); a copying task's slice of Bᵀ is its own.
      return isShared(task.bt) ? [] : [task.bt.buffer as ArrayBuffer];
    case 'products':
    case 'ping':
      return [];
    default:
      return assertNever(task);
  }
}

export function portPool(ports: readonly TaskPort[]): BlockPool {
  let nextId = 0;
  let closed = false;
  const queue: Job[] = [];
  const busy = new Map<TaskPort, Job>();

  const pump = () => {
    ports.forEach((port, i) => {
      if (busy.has(port)) return;
      const at = queue.findIndex((j) => j.port === undefined || j.port === i);
      if (at < 0) return;
      const job = queue.splice(at, 1)[0];
      busy.set(port, job);
      port.post({ id: job.id, task: job.task }, transferOf(job.task));
    });
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
        job.settle(reply);
        pump();
      },
      (error) => {
        closed = true;
        failAll(error);
      },
    );
  }
  const submit = <R>(task: PoolTask, port: number | undefined, pick: (reply: ResultReply) => R | undefined): Promise<R> => {
    if (closed) return Promise.reject(new Error('worker pool is closed'));
    return new Promise<R>((resolve, reject) => {
      const settle = (reply: TaskReply) => {
        if ('error' in reply) {
          reject(new Error(`${task.kind} worker: ${reply.error}`));
          return;
        }
        const r = pick(reply);
        if (r === undefined) reject(new Error(`${task.kind} worker: replied with a ${reply.kind} result`));
        else resolve(r);
      };
      queue.push({ id: nextId++, task, port, settle, reject });
      pump();
    });
  };
  let started: Promise<void> | null = null;
  return {
    size: ports.length,
    started: () =>
      (started ??= Promise.all(ports.map((_, i) => submit({ kind: 'ping' }, i, (r) => (r.kind === 'ping' ? true : undefined)))).then(
        () => undefined,
      )),
    run: (task) => submit(task, undefined, (r) => (r.kind === 'variance' ? r.result : undefined)),
    runProducts(task, port) {
      if (!Number.isInteger(port) || port < 0 || port >= ports.length) {
        return Promise.reject(new RangeError(`products task: port must be an integer in 0 … ${ports.length - 1}, got ${port}`));
      }
      return submit(task, port, (r) => (r.kind === 'products' ? r.result : undefined));
    },
    async close() {
      closed = true;
      failAll(new Error('worker pool closed'));
      await Promise.all(ports.map((p) => p.terminate()));
    },
  };
}
