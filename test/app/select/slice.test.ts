/** The select slice in the real store with a fake client: pinning, applying, cancelling, stale replies. */
import { describe, expect, it } from 'vitest';
import { createWorkbenchStore } from '../../../src/app/store.ts';
import type { ClientPort, Outcome, TuningPort } from '../../../src/worker/client.ts';
import type { ProblemView } from '../../../src/worker/protocol.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { freshness, freshnessText, problemIdentity } from '../../../src/app/select/slice.ts';
import type { EvidenceMap } from '../../../src/core/tuning/index.ts';

const prior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 0.25, length: 10 }], nugget: 0.01 };
const view = {
  version: 1,
  demoId: 'x',
  title: 't',
  description: '',
  grid: { shape: [4], spacing: [1] },
  dataCount: 2,
  values: new Float64Array(2),
  sigma: new Float64Array(2).fill(1),
  truth: null,
  coverage: new Float64Array(4),
  operatorKind: 'dense',
  operatorNonZeros: 8,
  quantity: { name: 'T', unit: 'K' },
  dataUnit: '',
  startPrior: prior,
  truthPrior: null,
} as unknown as ProblemView;

function fakeClient() {
  const never = <T>() => new Promise<Outcome<T>>(() => {});
  const sent: { kind: string; payload: unknown; resolve: (o: Outcome<unknown>) => void }[] = [];
  const cancelled: string[] = [];
  const tuning = {
    request(kind: string, payload: unknown) {
      return new Promise<Outcome<unknown>>((resolve) => sent.push({ kind, payload, resolve }));
    },
    cancel(kind: string) {
      cancelled.push(kind);
    },
  };
  const client: ClientPort = {
    loadDemo: async () => ({ superseded: false, value: view }),
    posterior: never,
    diagnostics: never,
    priorDraws: never,
    posteriorDraws: never,
    resolution: never,
    covariance: never,
    onRestart: () => () => {},
    // The fake answers whatever the test resolves; the port's result types are the worker's to keep.
    tuning: tuning as unknown as TuningPort,
  };
  return { client, sent, cancelled };
}

const map: EvidenceMap = {
  term: 0,
  lengths: Float64Array.from([2, 20]),
  variances: Float64Array.from([0.1, 1, 10]),
  logEvidence: Float64Array.from([1, 2, 3, 4, 5, 6]),
  method: 'cholesky',
  methodByLength: ['cholesky', 'cholesky'],
  best: { length: 20, variance: 10, logEvidence: 6, index: 5 },
  cancelled: false,
};

describe('select slice', () => {
  it('says so, and sends nothing, when the client has no tuning port', async () => {
    const { client, sent } = fakeClient();
    const store = createWorkbenchStore({ ...client, tuning: null }, { demoId: 'x' });
    await store.getState().loadDemo('x');
    store.getState().runEvidenceMap({ term: 0, lengths: { min: 2, max: 20, count: 2 }, variances: { min: 0.1, max: 10, count: 3 } });
    expect(sent).toHaveLength(0);
    expect(store.getState().selectTasks.evidenceMap).toMatchObject({ status: 'error', error: 'no worker available for prior selection' });
  });

  it('runs a map, applies a clicked cell to the term, ignores a reply for an older request', async () => {
    const { client, sent } = fakeClient();
    const store = createWorkbenchStore(client, { demoId: 'x' });
    await store.getState().loadDemo('x');
    const settings = { term: 0, lengths: { min: 2, max: 20, count: 2 }, variances: { min: 0.1, max: 10, count: 3 } };
    store.getState().runEvidenceMap(settings);
    store.getState().runEvidenceMap({ ...settings, lengths: { ...settings.lengths, count: 3 } });
    expect(sent.map((s) => s.kind)).toEqual(['evidenceMap', 'evidenceMap']);
    expect(store.getState().selectTasks.evidenceMap.status).toBe('running');
    sent[0].resolve({ superseded: false, value: { ...map, best: null } });
    await Promise.resolve();
    expect(store.getState().selectTasks.evidenceMap.value).toBeNull();
    sent[1].resolve({ superseded: false, value: map });
    await new Promise((r) => setTimeout(r, 0));
    expect(store.getState().selectTasks.evidenceMap.status).toBe('done');
    store.getState().applyMapCell(1 * 3 + 0);
    expect(store.getState().prior!.terms[0]).toEqual({ kernel: 'exponential', variance: 0.1, length: 20 });
    expect(store.getState().prior!.nugget).toBe(0.01);
  });

  it('cancel marks the task and tells the worker; pins up to four candidates and uses one', async () => {
    const { client, cancelled } = fakeClient();
    const store = createWorkbenchStore(client, { demoId: 'x' });
    await store.getState().loadDemo('x');
    store.getState().runFit(['nugget']);
    store.getState().cancelTuning('typeII');
    expect(cancelled).toEqual(['typeII']);
    expect(store.getState().selectTasks.typeII.status).toBe('cancelled');
    for (let k = 0; k < 6; k++) store.getState().pinPrior();
    const c = store.getState().candidates;
    expect(c).toHaveLength(4);
    expect(new Set(c.map((x) => x.colour)).size).toBe(4);
    expect(JSON.parse(JSON.stringify(c))).toEqual(c); // plain data for autosave
    store.getState().updateTerm(0, { length: 3 });
    store.getState().useCandidate(c[2].id);
    expect(store.getState().prior).toEqual(prior);
    store.getState().unpin(c[0].id);
    expect(store.getState().candidates).toHaveLength(3);
  });
});

describe('select slice and problem changes', () => {
  it('a request superseded by a new problem ends as cancelled', async () => {
    const { client, sent } = fakeClient();
    const store = createWorkbenchStore(client, { demoId: 'x' });
    await store.getState().loadDemo('x');
    store.getState().refreshCriteria();
    expect(store.getState().selectTasks.criteria.status).toBe('running');
    sent[0].resolve({ superseded: true });
    await new Promise((r) => setTimeout(r, 0));
    expect(store.getState().selectTasks.criteria.status).toBe('cancelled');
    // and a later refresh asks again (the cancelled task is not taken as up to date)
    store.getState().refreshCriteria();
    expect(sent).toHaveLength(2);
  });

  it('results belong to their prior: after a kernel change the old map and optimum are out of date and cannot be applied', async () => {
    const { client, sent } = fakeClient();
    const store = createWorkbenchStore(client, { demoId: 'x' });
    await store.getState().loadDemo('x');
    store.getState().runEvidenceMap({ term: 0, lengths: { min: 2, max: 20, count: 2 }, variances: { min: 0.1, max: 10, count: 3 } });
    store.getState().runFit(['nugget']);
    const fitted: PriorSpec = { ...prior, terms: [{ kernel: 'exponential', variance: 0.5, length: 12 }] };
    sent[0].resolve({ superseded: false, value: map });
    sent[1].resolve({ superseded: false, value: { prior: fitted } });
    await new Promise((r) => setTimeout(r, 0));
    const s0 = store.getState();
    expect(freshness(s0.selectTasks.evidenceMap, s0)).toBe('current');
    // A change of the same structure: out of date but still applicable.
    s0.updateTerm(0, { length: 11 });
    const s1 = store.getState();
    expect(freshness(s1.selectTasks.evidenceMap, s1)).toBe('earlier-prior');
    // A kernel change: neither the map nor the optimum may be applied (before, applying the optimum brought the exponential back).
    s1.setKernel(0, 'gaussian');
    const s2 = store.getState();
    expect(freshness(s2.selectTasks.evidenceMap, s2)).toBe('other-structure');
    expect(freshness(s2.selectTasks.typeII, s2)).toBe('other-structure');
    s2.applyTuned(fitted);
    expect(store.getState().prior!.terms[0].kernel).toBe('gaussian');
    s2.applyMapCell(5);
    expect(store.getState().prior!.terms[0].kernel).toBe('gaussian');
    expect(store.getState().prior!.terms[0].length).toBe(11);
    expect(store.getState().notice).toMatch(/other kernels or terms/);
    // The reason names both structures.
    expect(store.getState().notice).toContain('other kernels or terms (1 term: exponential; the current prior has 1 term: gaussian)');
    expect(freshnessText('other-structure', s2.selectTasks.typeII.prior, s2.prior)).toContain(
      '1 term: exponential; the current prior has 1 term: gaussian',
    );
  });

  it('pinned candidates belong to their problem: set aside on a switch, back when the problem returns', async () => {
    const { client } = fakeClient();
    const store = createWorkbenchStore(client, { demoId: 'x' });
    await store.getState().loadDemo('x');
    store.getState().pinPrior();
    expect(store.getState().candidates).toHaveLength(1);
    // Another problem (another demo id): no candidates carried over, no results.
    (client as { loadDemo: unknown }).loadDemo = async () => ({ superseded: false, value: { ...view, version: 2, demoId: 'y' } });
    await store.getState().loadDemo('y');
    expect(problemIdentity(store.getState())).toBe('demo:y');
    expect(store.getState().candidates).toEqual([]);
    expect(store.getState().candidatesNote).toBe(
      'The 1 pinned candidate of “t” is kept for that problem and comes back when it is shown again.',
    );
    (client as { loadDemo: unknown }).loadDemo = async () => ({ superseded: false, value: { ...view, version: 3 } });
    await store.getState().loadDemo('x');
    expect(store.getState().candidates).toHaveLength(1);
    expect(store.getState().candidatesNote).toBe('The 1 pinned candidate of this problem is back.');
    store.getState().pinPrior();
    expect(store.getState().candidatesNote).toBeNull();
  });
});
