/**
 * A ClientPort that runs the real worker Engine in-process (no Worker), for store tests in Node.
 * `failSetProblem` makes the next setProblem reject, as a worker refusing a problem would.
 */
import { Engine } from '../../../src/worker/engine.ts';
import type { ClientPort } from '../../../src/worker/client.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';

export function inProcessClient() {
  const engine = new Engine();
  let version = 0;
  let id = 1;
  const calls: string[] = [];
  const ok = async <T>(p: Promise<T>) => ({ superseded: false as const, value: await p });
  const v = () => engine.problemVersion;
  const client = {
    calls,
    failSetProblem: false,
    loadDemo(demoId: string) {
      calls.push(`loadDemo ${demoId}`);
      return ok(engine.handle({ id: id++, kind: 'loadDemo', version: ++version, demoId }));
    },
    setProblem(problem: Problem) {
      calls.push('setProblem');
      if (client.failSetProblem) {
        client.failSetProblem = false;
        return Promise.reject(new Error('problem.data must be refused for this test, got it'));
      }
      return ok(engine.handle({ id: id++, kind: 'setProblem', version: ++version, problem }));
    },
    posterior: (prior: PriorSpec) => ok(engine.handle({ id: id++, kind: 'posterior', problemVersion: v(), prior })),
    diagnostics: (prior: PriorSpec) => ok(engine.handle({ id: id++, kind: 'diagnostics', problemVersion: v(), prior })),
    priorDraws: (prior: PriorSpec, count: number, seed: number) =>
      ok(engine.handle({ id: id++, kind: 'priorDraws', problemVersion: v(), prior, count, seed })),
    posteriorDraws: (prior: PriorSpec, count: number, seed: number) =>
      ok(engine.handle({ id: id++, kind: 'posteriorDraws', problemVersion: v(), prior, count, seed })),
    resolution: (prior: PriorSpec, cell: number) => ok(engine.handle({ id: id++, kind: 'resolution', problemVersion: v(), prior, cell })),
    covariance: (prior: PriorSpec) => ok(engine.handle({ id: id++, kind: 'covariance', problemVersion: v(), prior })),
    onRestart: () => () => {},
    tuning: null,
  };
  return client as typeof client & ClientPort;
}

/** Resolve after pending promise callbacks and timers of `ms` have run. */
export const tick = (ms = 0) => new Promise((r) => setTimeout(r, ms));
