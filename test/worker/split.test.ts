/** The split client's typed tuning accessor routes prior-selection work to the secondary worker. */
import { describe, expect, it } from 'vitest';
import { SplitClient } from '../../src/worker/split.ts';
import type { WorkerClient } from '../../src/worker/client.ts';
import { tuningPortOf } from '../../src/app/select/slice.ts';

function recorder(name: string, log: string[]): WorkerClient {
  return {
    request: (kind: string) => {
      log.push(`${name}.request ${kind}`);
      return Promise.resolve({ superseded: false, value: { from: name } });
    },
    cancel: (kind: string) => log.push(`${name}.cancel ${kind}`),
  } as unknown as WorkerClient;
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

  it('is what the select slice uses for a split client', async () => {
    const log: string[] = [];
    const split = new SplitClient(recorder('primary', log), recorder('secondary', log));
    const port = tuningPortOf(split);
    expect(port).toBe(split.tuning);
    await port!.request('criteria', { prior: { mean: { constant: 0 }, terms: [] } });
    expect(log).toEqual(['secondary.request criteria']);
  });
});
