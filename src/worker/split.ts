/**
 * Two workers behind one client interface, so that the posterior is never queued behind slower
 * side work on a 2-core machine: the primary worker runs the posterior, averaging kernels and
 * prior and posterior draws; the secondary runs the positive-definiteness diagnostics and the
 * covariance view, and the prior-selection requests ({@link SplitClient.tuning}). Both hold the
 * same problem (each loads it once).
 */
import type { PriorSpec } from '../core/prior/spec.ts';
import type { Problem } from '../core/problems/spec.ts';
import type { Outcome, WorkerClient } from './client.ts';
import type { PosteriorPartial, ProblemView } from './protocol.ts';
import type { TuningKind, TuningRequest, TuningResultMap } from './tuningProtocol.ts';

/** What a tuning request carries besides its id, kind and problem version. */
export type TuningPayload<K extends TuningKind> = Omit<Extract<TuningRequest, { kind: K }>, 'id' | 'kind' | 'problemVersion'>;

/** The tuning (prior-selection) requests of a client: send one, cancel a kind. */
export interface TuningPort {
  request<K extends TuningKind>(kind: K, payload: TuningPayload<K>): Promise<Outcome<TuningResultMap[K]>>;
  cancel(channel: TuningKind): void;
}

export class SplitClient {
  constructor(
    readonly primary: WorkerClient,
    readonly secondary: WorkerClient,
  ) {}

  /**
   * Where prior-selection work goes: the secondary worker, so that the posterior worker stays free
   * while a map or a calibration runs.
   */
  get tuning(): TuningPort {
    return (this.#tuning ??= tuningPortOfWorker(this.secondary));
  }
  #tuning: TuningPort | null = null;

  get restarts(): number {
    return this.primary.restarts + this.secondary.restarts;
  }

  async loadDemo(demoId: string): Promise<Outcome<ProblemView>> {
    const [a, b] = await Promise.all([this.primary.loadDemo(demoId), this.secondary.loadDemo(demoId)]);
    return b.superseded ? b : a;
  }
  /** The user's own problem, to both workers (each copies its buffers). */
  async setProblem(problem: Problem): Promise<Outcome<ProblemView>> {
    const [a, b] = await Promise.all([this.primary.setProblem(problem), this.secondary.setProblem(problem)]);
    return b.superseded ? b : a;
  }
  /** `onPartial` receives the mean-first reply of a large FFT-path posterior (./engine.ts). */
  posterior(prior: PriorSpec, onPartial?: (partial: PosteriorPartial) => void) {
    return this.primary.posterior(prior, onPartial);
  }
  resolution(prior: PriorSpec, cell: number) {
    return this.primary.resolution(prior, cell);
  }
  posteriorDraws(prior: PriorSpec, count: number, seed: number) {
    return this.primary.posteriorDraws(prior, count, seed);
  }
  diagnostics(prior: PriorSpec) {
    return this.secondary.diagnostics(prior);
  }
  /** On the posterior's worker: the overview waits for both, and the secondary may be busy with a long diagnosis. */
  priorDraws(prior: PriorSpec, count: number, seed: number) {
    return this.primary.priorDraws(prior, count, seed);
  }
  covariance(prior: PriorSpec) {
    return this.secondary.covariance(prior);
  }
  onRestart(listener: (reason: string) => void): () => void {
    const a = this.primary.onRestart(listener);
    const b = this.secondary.onRestart(listener);
    return () => {
      a();
      b();
    };
  }
}

/**
 * A worker client seen as a {@link TuningPort}. The client's `request` is generic over every
 * request kind; for a tuning kind its payload type is exactly {@link TuningPayload} and its result
 * type TuningResultMap[K] (protocol.ts spreads the tuning unions into its own), which the compiler
 * cannot see through two generic Omit/Extract layers, hence the one cast here.
 */
export function tuningPortOfWorker(client: WorkerClient): TuningPort {
  return {
    request<K extends TuningKind>(kind: K, payload: TuningPayload<K>) {
      return client.request(kind, payload as never) as Promise<Outcome<TuningResultMap[K]>>;
    },
    cancel(kind: TuningKind) {
      client.cancel(kind);
    },
  };
}
