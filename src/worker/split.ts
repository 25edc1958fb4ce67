/**
 * Two workers behind one client interface, so that the posterior is never queued behind slower
 * side work on a 2-core machine: the primary worker runs the posterior, averaging kernels and
 * prior and posterior draws; the secondary runs the positive-definiteness diagnostics and the
 * covariance view, and the prior-selection requests ({@link SplitClient.tuning}). Both hold the
 * same problem (each loads it once).
 */
import type { PriorSpec } from '../core/prior/spec.ts';
import type { Problem } from '../core/problems/spec.ts';
import type { ClientPort, Outcome, TuningPort, WorkerClient } from './client.ts';
import type { PosteriorPartial, ProblemView } from './protocol.ts';

export class SplitClient implements ClientPort {
  constructor(
    readonly primary: WorkerClient,
    readonly secondary: WorkerClient,
  ) {}

  /**
   * Where prior-selection work goes: the secondary worker, so that the posterior worker stays free
   * while a map or a calibration runs.
   */
  get tuning(): TuningPort {
    return this.secondary.tuning;
  }

  get restarts(): number {
    return this.primary.restarts + this.secondary.restarts;
  }

  async loadDemo(demoId: string): Promise<Outcome<ProblemView>> {
    const [a, b] = await Promise.all([this.primary.loadDemo(demoId), this.secondary.loadDemo(demoId)]);
    return b.superseded ? b : a;
  }
  /**
   * The user's own problem, to both workers (each copies its buffers). Only the primary fits the
   * starting prior: the secondary's would be thrown away, and on 2 cores it would slow the primary's.
   */
  async setProblem(problem: Problem): Promise<Outcome<ProblemView>> {
    const [a, b] = await Promise.all([this.primary.setProblem(problem), this.secondary.setProblem(problem, { startPrior: false })]);
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
  covariance(prior: PriorSpec, form?: 'covariance' | 'cholesky') {
    return this.secondary.covariance(prior, form);
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
