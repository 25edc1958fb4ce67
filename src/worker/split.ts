/**
 * Two workers behind one client interface, so that the posterior is never queued behind slower
 * side work on a 2-core machine: the primary worker runs the posterior, averaging kernels and
 * posterior draws; the secondary runs the positive-definiteness diagnostics, prior draws and the
 * covariance view. Both hold the same problem (each loads it once).
 */
import type { PriorSpec } from '../core/prior/spec.ts';
import type { Problem } from '../core/problems/spec.ts';
import type { Outcome, WorkerClient } from './client.ts';
import type { ProblemView } from './protocol.ts';

export class SplitClient {
  constructor(
    readonly primary: WorkerClient,
    readonly secondary: WorkerClient,
  ) {}

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
  posterior(prior: PriorSpec) {
    return this.primary.posterior(prior);
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
  priorDraws(prior: PriorSpec, count: number, seed: number) {
    return this.secondary.priorDraws(prior, count, seed);
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
