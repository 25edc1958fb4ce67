/**
 * Promise-based client of the numerics worker with "latest wins" per channel.
 *
 * - Each request kind belongs to a channel (protocol.ts). A newer request on a channel supersedes
 *   the older one at once: the older promise resolves as `{ superseded: true }` and its reply, if
 *   it ever comes, is ignored. The worker itself only runs the newest waiting request of a channel.
 * - A posterior request may take an `onPartial` handler: it is called with the mean-only first part
 *   (protocol.ts PosteriorPartial) when the worker sends one, and only while the request is still
 *   pending, so a superseded request never delivers a stale partial.
 * - Loading a problem supersedes every pending request of every channel and bumps the problem
 *   version that later requests carry.
 * - If the worker dies (an `error` event), the client terminates it, starts a new one, re-sends the
 *   current problem, rejects the other pending requests with {@link WorkerRestartedError} and
 *   tells its `onRestart` listeners, who re-request what they need.
 */
import { assertNever } from '../core/errors.ts';
import type { Matrix } from '../core/linalg/matrix.ts';
import type { Diagnostics } from '../core/prior/diagnostics.ts';
import { matchOperator, type Operator } from '../core/linalg/operator.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import type { Problem } from '../core/problems/spec.ts';
import type { Geometry } from '../core/grid/grid.ts';
import {
  channelOf,
  type Channel,
  type PosteriorPartial,
  type PosteriorResult,
  type ProblemView,
  type RequestKind,
  type ResultMap,
  type SerialisedError,
  type WorkerReply,
  type WorkerRequest,
} from './protocol.ts';
import type { TuningKind, TuningRequest, TuningResultMap } from './tuningProtocol.ts';

/** The part of a Worker the client uses (a fake in tests). */
export interface WorkerLike {
  postMessage(message: WorkerRequest, transfer?: Transferable[]): void;
  terminate(): void;
  onmessage: ((ev: MessageEvent<WorkerReply>) => void) | null;
  onerror: ((ev: ErrorEvent) => void) | null;
}

export type Outcome<T> = { readonly superseded: false; readonly value: T } | { readonly superseded: true };

/** What a tuning request carries besides its id, kind and problem version. */
export type TuningPayload<K extends TuningKind> = Omit<Extract<TuningRequest, { kind: K }>, 'id' | 'kind' | 'problemVersion'>;

/** The tuning (prior-selection) requests of a client: send one, cancel a kind. */
export interface TuningPort {
  request<K extends TuningKind>(kind: K, payload: TuningPayload<K>): Promise<Outcome<TuningResultMap[K]>>;
  cancel(channel: TuningKind): void;
}

/**
 * What the workbench store asks of a client: {@link WorkerClient}, the two-worker
 * {@link ./split.ts SplitClient}, or a fake in unit tests.
 */
export interface ClientPort {
  loadDemo(demoId: string): Promise<Outcome<ProblemView>>;
  /** Send the user's own problem to the worker(s) (the session slice; optional for fakes). */
  setProblem?(problem: Problem<Geometry>): Promise<Outcome<ProblemView>>;
  /** `onPartial` (optional for fakes) receives the mean ahead of the bands, while the request is current. */
  posterior(prior: PriorSpec, onPartial?: (partial: PosteriorPartial) => void): Promise<Outcome<PosteriorResult>>;
  diagnostics(prior: PriorSpec): Promise<Outcome<Diagnostics>>;
  priorDraws(prior: PriorSpec, count: number, seed: number): Promise<Outcome<Matrix>>;
  posteriorDraws(prior: PriorSpec, count: number, seed: number): Promise<Outcome<Matrix>>;
  resolution(prior: PriorSpec, cell: number): Promise<Outcome<{ cell: number; row: Float64Array }>>;
  covariance(prior: PriorSpec, form?: 'covariance' | 'cholesky'): Promise<Outcome<Matrix>>;
  onRestart(listener: (reason: string) => void): () => void;
  /** Where prior-selection requests go; null for a client that runs none (the select slice then says so). */
  readonly tuning: TuningPort | null;
}

/** An error thrown inside the worker, re-created on the main thread with its name and field. */
export class WorkerTaskError extends Error {
  readonly field: string | undefined;
  readonly remoteName: string;
  constructor(e: SerialisedError) {
    super(e.message);
    this.name = 'WorkerTaskError';
    this.remoteName = e.name;
    this.field = e.field;
  }
}

/** The worker died while this request was pending. */
export class WorkerRestartedError extends Error {
  constructor(reason: string) {
    super(`the numerics worker stopped (${reason}) and was restarted`);
    this.name = 'WorkerRestartedError';
  }
}

type Payload<K extends RequestKind> = Omit<Extract<WorkerRequest, { kind: K }>, 'id' | 'kind' | 'problemVersion' | 'version'>;

interface Pending {
  readonly channel: Channel;
  readonly request: WorkerRequest;
  readonly onPartial?: ((partial: PosteriorPartial) => void) | undefined;
  readonly resolve: (o: Outcome<unknown>) => void;
  readonly reject: (e: Error) => void;
}

export interface ClientOptions {
  onProgress?: (channel: Channel, stage: string, fraction: number) => void;
}

export class WorkerClient implements ClientPort {
  private worker: WorkerLike;
  private nextId = 1;
  private version = 0;
  private readonly pending = new Map<number, Pending>();
  private readonly latest = new Map<Channel, number>();
  private problemRequest: WorkerRequest | null = null;
  private readonly restartListeners = new Set<(reason: string) => void>();
  /** Number of times the worker was restarted. */
  restarts = 0;

  constructor(
    private readonly factory: () => WorkerLike,
    private readonly options: ClientOptions = {},
  ) {
    this.worker = this.start();
  }

  /** Version of the problem the next requests are made for (0 before any problem). */
  get problemVersion(): number {
    return this.version;
  }

  /** This worker's prior-selection requests as a {@link TuningPort}. */
  get tuning(): TuningPort {
    return (this.tuningPort ??= {
      // The generic `request` takes exactly TuningPayload<K> for a tuning kind and answers TuningResultMap[K]
      // (protocol.ts spreads the tuning unions into its own); the compiler cannot see that through two
      // generic Omit/Extract layers, hence the casts.
      request: <K extends TuningKind>(kind: K, payload: TuningPayload<K>) =>
        this.request(kind, payload as never) as Promise<Outcome<TuningResultMap[K]>>,
      cancel: (kind: TuningKind) => this.cancel(kind),
    });
  }
  private tuningPort: TuningPort | null = null;

  /** Ids of requests still awaiting a reply (for tests and diagnostics). */
  get pendingCount(): number {
    return this.pending.size;
  }

  onRestart(listener: (reason: string) => void): () => void {
    this.restartListeners.add(listener);
    return () => this.restartListeners.delete(listener);
  }

  loadDemo(demoId: string): Promise<Outcome<ProblemView>> {
    return this.sendProblem({ id: this.nextId++, kind: 'loadDemo', version: ++this.version, demoId });
  }

  /** The problem's buffers are copied before they are transferred, so the caller keeps its arrays. */
  setProblem(problem: Problem<Geometry>, options: { readonly startPrior?: boolean } = {}): Promise<Outcome<ProblemView>> {
    const request: WorkerRequest = { id: this.nextId++, kind: 'setProblem', version: ++this.version, problem };
    return this.sendProblem(options.startPrior === false ? { ...request, startPrior: false } : request);
  }

  /** `onPartial` receives the mean ahead of the bands (FFT path, large problems), at most once, before the promise settles. */
  posterior(prior: PriorSpec, onPartial?: (partial: PosteriorPartial) => void): Promise<Outcome<ResultMap['posterior']>> {
    const request: WorkerRequest = { id: this.nextId++, kind: 'posterior', problemVersion: this.version, prior };
    return this.send(request, onPartial) as Promise<Outcome<ResultMap['posterior']>>;
  }
  diagnostics(prior: PriorSpec) {
    return this.request('diagnostics', { prior });
  }
  priorDraws(prior: PriorSpec, count: number, seed: number) {
    return this.request('priorDraws', { prior, count, seed });
  }
  posteriorDraws(prior: PriorSpec, count: number, seed: number) {
    return this.request('posteriorDraws', { prior, count, seed });
  }
  resolution(prior: PriorSpec, cell: number) {
    return this.request('resolution', { prior, cell });
  }
  covariance(prior: PriorSpec, form?: 'covariance' | 'cholesky') {
    return this.request('covariance', form === undefined ? { prior } : { prior, form });
  }

  /** Drop the pending request of a channel (its promise resolves as superseded). */
  cancel(channel: Channel): void {
    const id = this.latest.get(channel);
    if (id === undefined) return;
    this.supersede(id);
    this.worker.postMessage({ id: this.nextId++, kind: 'cancel', target: id });
  }

  terminate(): void {
    this.worker.terminate();
    for (const id of [...this.pending.keys()]) this.supersede(id);
  }

  request<K extends Exclude<RequestKind, 'loadDemo' | 'setProblem'>>(kind: K, payload: Payload<K>): Promise<Outcome<ResultMap[K]>> {
    const request = { ...payload, id: this.nextId++, kind, problemVersion: this.version } as unknown as WorkerRequest;
    return this.send(request) as Promise<Outcome<ResultMap[K]>>;
  }

  private sendProblem(request: WorkerRequest): Promise<Outcome<ProblemView>> {
    // A new problem makes every other pending request stale.
    for (const id of [...this.pending.keys()]) this.supersede(id);
    this.problemRequest = request;
    return this.send(request) as Promise<Outcome<ProblemView>>;
  }

  private send(request: WorkerRequest, onPartial?: (partial: PosteriorPartial) => void): Promise<Outcome<unknown>> {
    if (request.kind === 'cancel') throw new Error('send: cancel is not a request');
    const channel = channelOf(request.kind);
    const older = this.latest.get(channel);
    if (older !== undefined) this.supersede(older);
    return new Promise((resolve, reject) => {
      this.pending.set(request.id, { channel, request, resolve, reject, onPartial });
      this.latest.set(channel, request.id);
      this.post(request);
    });
  }

  private post(request: WorkerRequest): void {
    if (request.kind === 'setProblem') {
      const copy = copyProblem(request.problem);
      this.worker.postMessage({ ...request, problem: copy.problem }, copy.transfer);
    } else {
      this.worker.postMessage(request);
    }
  }

  private supersede(id: number): void {
    const p = this.pending.get(id);
    if (!p) return;
    this.pending.delete(id);
    if (this.latest.get(p.channel) === id) this.latest.delete(p.channel);
    p.resolve({ superseded: true });
  }

  private settle(id: number): Pending | undefined {
    const p = this.pending.get(id);
    if (!p) return undefined;
    this.pending.delete(id);
    if (this.latest.get(p.channel) === id) this.latest.delete(p.channel);
    return p;
  }

  private start(): WorkerLike {
    const w = this.factory();
    w.onmessage = (ev) => this.receive(ev.data);
    w.onerror = (ev) => {
      ev.preventDefault?.();
      this.restart(ev.message || 'worker error');
    };
    return w;
  }

  private receive(reply: WorkerReply): void {
    switch (reply.type) {
      case 'progress': {
        const p = this.pending.get(reply.id);
        if (p) this.options.onProgress?.(p.channel, reply.stage, reply.fraction);
        return;
      }
      case 'partial':
        // Only a request still pending (not superseded, not settled) hears its partial.
        this.pending.get(reply.id)?.onPartial?.(reply.partial);
        return;
      case 'superseded':
        this.supersede(reply.id);
        return;
      case 'result':
        this.settle(reply.id)?.resolve({ superseded: false, value: reply.result });
        return;
      case 'error':
        this.settle(reply.id)?.reject(new WorkerTaskError(reply.error));
        return;
      default:
        assertNever(reply, 'reply');
    }
  }

  /** Replace a dead worker; re-send the problem, fail the rest, tell the listeners. */
  restart(reason: string): void {
    this.restarts++;
    try {
      this.worker.terminate();
    } catch {
      // already gone
    }
    this.worker = this.start();
    for (const [id, p] of [...this.pending]) {
      if (p.channel === 'problem') continue;
      this.settle(id);
      p.reject(new WorkerRestartedError(reason));
    }
    if (this.problemRequest) {
      const problemPending = this.pending.get(this.problemRequest.id);
      if (problemPending) {
        this.post(this.problemRequest);
      } else {
        // Re-send silently: the reply resolves nobody, it only restores the worker's state.
        const silent: WorkerRequest = { ...this.problemRequest, id: this.nextId++ };
        this.pending.set(silent.id, { channel: 'problem', request: silent, resolve: () => {}, reject: () => {} });
        this.latest.set('problem', silent.id);
        this.post(silent);
      }
    }
    for (const l of this.restartListeners) l(reason);
  }
}

/** Copies of a problem's typed arrays, with the list of their buffers for transfer. */
function copyProblem(problem: Problem<Geometry>): { problem: Problem<Geometry>; transfer: ArrayBuffer[] } {
  const transfer: ArrayBuffer[] = [];
  const c = <T extends Float64Array | Int32Array>(a: T): T => {
    const b = a.slice() as T;
    transfer.push(b.buffer as ArrayBuffer);
    return b;
  };
  const g = problem.operator;
  const operator = matchOperator<Operator>(g, {
    dense: (a) => ({ kind: 'dense', matrix: { ...a, data: c(a.data) } }),
    sparse: (s) => ({ kind: 'sparse', matrix: { ...s, rowPtr: c(s.rowPtr), colIdx: c(s.colIdx), values: c(s.values) } }),
  });
  const d = problem.data;
  const data = {
    values: c(d.values),
    ...(d.sigma ? { sigma: c(d.sigma) } : {}),
    ...(d.covariance ? { covariance: { ...d.covariance, data: c(d.covariance.data) } } : {}),
    // The unit too: without it a loaded problem's data.unit never reached the labels.
    ...(d.unit !== undefined ? { unit: d.unit } : {}),
    // The geometry is small (M × 2 at most per end); it is copied by the structured clone.
    ...(d.geometry ? { geometry: d.geometry } : {}),
  };
  return {
    problem: { ...problem, operator, data, ...(problem.truth ? { truth: c(problem.truth) } : {}) },
    transfer,
  };
}
