/** The split client's typed tuning accessor routes prior-selection work to the secondary worker. */
import { describe, expect, it } from 'vitest';
import { SplitClient } from '../../src/worker/split.ts';
import type { WorkerClient } from '../../src/worker/client.ts';

function recorder(name: string, log: string[]): WorkerClient {
  return {
    tuning: {
      request: (kind: string) => {
        log.push(`${name}.request ${kind}`);
        return Promise.resolve({ superseded: false, value: { from: name } });
      },
      cancel: (kind: string) => log.push(`${name}.cancel ${kind}`),
    },
  } as unknown as WorkerClient;
}

/** A primary and a secondary client whose `method` records [name, ...args] in `calls` and resolves with `value(name)`. */
function recordingPair(method: string, calls: unknown[][], value: (name: string) => unknown): [WorkerClient, WorkerClient] {
  const client = (name: string) =>
    ({
      [method]: (...args: unknown[]) => {
        calls.push([name, ...args]);
        return Promise.resolve({ superseded: false, value: value(name) });
      },
    }) as unknown as WorkerClient;
  return [client('primary'), client('secondary')];
}

describe('SplitClient.tuning', () => {
  it('sends tuning requests and cancels to the secondary worker only', async () => {
    const log: string[] = [];
    const split = new SplitClient(recorder('primary', log), recorder('secondary', log));
    const o = await split.tuning.request('criteria', { prior: { mean: { constant: 0 }, terms: [] } });
    split.tuning.cancel('evidenceMap');
    expect(o).toEqual({ superseded: false, value: { from: 'secondary' } });
    expect(log).toEqual(['secondary.request criteria', 'secondary.cancel evidenceMap']);
    expect(split.tuning).toBe(split.tuning);
  });
});

describe('SplitClient.posterior', () => {
  it('sends the posterior to the primary worker with its partial handler', async () => {
    const calls: { name: string; handler: unknown }[] = [];
    const client = (name: string) =>
      ({
        posterior: (_prior: unknown, onPartial?: unknown) => {
          calls.push({ name, handler: onPartial });
          return Promise.resolve({ superseded: false, value: { from: name } });
        },
      }) as unknown as WorkerClient;
    const split = new SplitClient(client('primary'), client('secondary'));
    const onPartial = () => {};
    const o = await split.posterior({ mean: { constant: 0 }, terms: [] }, onPartial);
    expect(o).toEqual({ superseded: false, value: { from: 'primary' } });
    expect(calls).toEqual([{ name: 'primary', handler: onPartial }]);
  });
});

describe('SplitClient.covariance', () => {
  it('passes the export form (Cm or its Cholesky factor) to the secondary worker', async () => {
    const calls: unknown[][] = [];
    const split = new SplitClient(...recordingPair('covariance', calls, () => null));
    const prior = { mean: { constant: 0 }, terms: [] };
    await split.covariance(prior, 'cholesky');
    await split.covariance(prior);
    expect(calls).toEqual([
      ['secondary', prior, 'cholesky'],
      ['secondary', prior, undefined],
    ]);
  });
});

describe('SplitClient.setProblem', () => {
  it('sends the problem to both workers; only the primary fits the starting prior, and its view is returned', async () => {
    const calls: unknown[][] = [];
    const split = new SplitClient(...recordingPair('setProblem', calls, (name) => ({ from: name })));
    const problem = { title: 'invented' } as unknown as Parameters<SplitClient['setProblem']>[0];
    const o = await split.setProblem(problem);
    expect(o).toEqual({ superseded: false, value: { from: 'primary' } });
    expect(calls).toEqual([
      ['primary', problem],
      ['secondary', problem, { startPrior: false }],
    ]);
  });
});
