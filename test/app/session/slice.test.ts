/**
 * The session slice in the real store, with the real worker Engine in-process: failed loads
 * change nothing, a good load shows the user's problem, autosave + restore, and the precedence
 * share link > ?demo= > autosave > default demo.
 */
import { describe, expect, it } from 'vitest';
import { createWorkbenchStore, type WorkbenchState, type WorkbenchStore } from '../../../src/app/store.ts';
import { memoryStorage } from '../../../src/app/session/autosave.ts';
import { installAutosave, sessionRecord, SHARED_NOTICE, startSession } from '../../../src/app/session/start.ts';
import { encodeShare } from '../../../src/app/session/share.ts';
import { enc, fiveCells } from './fixtures.ts';
import { inProcessClient, tick } from './inProcessClient.ts';

const good = () => fiveCells();

/** Plain parts of the state that a failed load must leave exactly as they were. */
function snapshot(s: WorkbenchState) {
  const { loadError: _e, loadStatus: _l, loadWarnings: _w, saveStatus: _s, ...rest } = s;
  return Object.fromEntries(Object.entries(rest).filter(([, v]) => typeof v !== 'function'));
}

async function ready(store: WorkbenchStore) {
  const done = () => {
    const s = store.getState();
    return (
      s.problemStatus === 'ready' &&
      !!s.problem &&
      s.computedFor.posterior === `${s.problem.version}:${s.priorRevision}` &&
      !s.busy.posterior &&
      !Object.values(s.busy).some(Boolean)
    );
  };
  for (let k = 0; k < 400 && !done(); k++) await tick(5);
  expect(done()).toBe(true);
  expect(store.getState().posterior).not.toBeNull();
}

async function demoStore() {
  const client = inProcessClient();
  const store = createWorkbenchStore(client, { demoId: 'borehole-log' });
  await store.getState().openDemo('borehole-log');
  await ready(store);
  return { client, store };
}

describe('loading the user problem', () => {
  it('a broken data file changes nothing but the message (same values, same objects)', async () => {
    const { client, store } = await demoStore();
    store.getState().updateTerm(0, { length: 3 });
    await ready(store);
    const before = snapshot(store.getState());
    const calls = client.calls.length;
    const ok = await store.getState().loadPieces({ ...good(), data: { name: 'd.csv', bytes: enc('value,sigma\n1,0.1\n2,-1\n3,0.2\n') } });
    expect(ok).toBe(false);
    expect(store.getState().loadError).toBe('d.csv: line 3, column 2 (sigma) must be > 0, got -1');
    const after = snapshot(store.getState());
    expect(Object.keys(after)).toEqual(Object.keys(before));
    for (const k of Object.keys(before)) expect(after[k], k).toBe(before[k]);
    expect(client.calls.length).toBe(calls); // the workers were never asked
  });

  it('a shape mismatch names G and the grid form', async () => {
    const { store } = await demoStore();
    await store.getState().loadPieces({ ...good(), grid: { shape: [6], spacing: [1] } });
    expect(store.getState().loadError).toBe('G.mtx: must have 6 columns (one per grid cell, 6 in the grid form), got 5');
  });

  it('when the workers refuse a parsed problem, the previous problem is sent back and the state kept', async () => {
    const { client, store } = await demoStore();
    const before = snapshot(store.getState());
    client.failSetProblem = true;
    expect(await store.getState().loadPieces(good())).toBe(false);
    expect(store.getState().loadError).toContain('G.mtx + d.csv: problem.data must be refused');
    expect(client.calls.slice(-2)).toEqual(['setProblem', 'loadDemo borehole-log']);
    const after = snapshot(store.getState());
    for (const k of Object.keys(before)) expect(after[k], k).toBe(before[k]);
  });

  it('a good load shows the problem with a default prior and a fresh undo history', async () => {
    const { store } = await demoStore();
    store.getState().updateTerm(0, { length: 3 });
    expect(store.getState().history.past.length).toBe(1);
    expect(await store.getState().loadPieces(good())).toBe(true);
    await ready(store);
    const s = store.getState();
    expect(s.problem!.title).toBe('Five cells');
    expect(s.problem!.demoId).toBeNull();
    expect(s.userProblem!.label).toBe('G.mtx + d.csv');
    expect(s.posterior!.summary.mean.length).toBe(5);
    expect(s.history.past.length).toBe(0);
    // a demo afterwards forgets the user problem
    await s.openDemo('borehole-log');
    expect(store.getState().userProblem).toBeNull();
  });

  it('a prior file that does not fit the grid is refused with its field', async () => {
    const { store } = await demoStore();
    const before = store.getState().prior;
    const text = JSON.stringify({
      kind: 'priorscope.prior',
      version: 1,
      mean: { values: [1, 2] },
      terms: [{ kernel: 'exponential', variance: 1, length: 1 }],
    });
    expect(await store.getState().importPrior({ name: 'p.json', bytes: enc(text) })).toBe(false);
    expect(store.getState().loadError).toMatch(/^p\.json: mean\.values must be/);
    expect(store.getState().prior).toBe(before);
  });
});

describe('autosave and restore', () => {
  it('restores the user problem (bit for bit), prior, seed and tab in a new store', async () => {
    const storage = memoryStorage();
    const { store } = await demoStore();
    installAutosave(store, storage, 0);
    await store.getState().loadPieces(good());
    await ready(store);
    store.getState().updateTerm(0, { length: 0.75 });
    store.getState().setSeed(42);
    store.getState().setTab('fit');
    const candidates = [{ id: 'cand-a', name: 'A', colour: '#123456', prior: store.getState().prior! }];
    store.setState({ candidates });
    await tick(20);
    const saved = sessionRecord(store.getState())!;
    expect(saved.source.kind).toBe('user');

    const fresh = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await startSession(fresh, { storage, explicitDemo: null, hash: '' });
    await ready(fresh);
    const s = fresh.getState();
    expect(s.prior).toEqual(store.getState().prior);
    expect(s.seed).toBe(42);
    expect(s.tab).toBe('fit');
    expect(s.userProblem!.label).toBe('G.mtx + d.csv');
    const a = store.getState().userProblem!.problem;
    const b = s.userProblem!.problem;
    expect(b.operator).toEqual(a.operator);
    expect(Array.from(b.data.values)).toEqual(Array.from(a.data.values));
    expect(Array.from(s.posterior!.summary.mean)).toEqual(Array.from(store.getState().posterior!.summary.mean));
    expect(s.history.past.length).toBe(0); // restoring is not an edit
    expect(s.candidates).toEqual(candidates); // the selection screen's pinned priors come back too
  });

  it('precedence: a share link beats ?demo= and the autosave; ?demo= beats the autosave', async () => {
    const storage = memoryStorage();
    const { store } = await demoStore();
    installAutosave(store, storage, 0);
    store.getState().updateTerm(0, { length: 0.9 });
    await tick(20);
    const sharedPrior = { mean: { constant: 1 }, terms: [{ kernel: 'gaussian' as const, variance: 2, length: 1.25 }], nugget: 0.001 };
    const hash = await encodeShare({ problem: 'borehole-log', prior: sharedPrior });
    let cleared = false;
    const a = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await startSession(a, { storage, explicitDemo: null, hash, clearHash: () => (cleared = true) });
    expect(a.getState().prior).toEqual(sharedPrior);
    expect(a.getState().notice).toBe(SHARED_NOTICE);
    expect(cleared).toBe(true);

    const b = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await startSession(b, { storage, explicitDemo: 'borehole-log', hash: '' });
    expect(b.getState().prior!.terms[0].length).not.toBe(0.9);

    const c = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await startSession(c, { storage, explicitDemo: null, hash: '' });
    expect(c.getState().prior!.terms[0].length).toBe(0.9);
  });

  it('a damaged share link is reported and the page opens the autosave / demo', async () => {
    const c = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await startSession(c, { storage: memoryStorage(), explicitDemo: null, hash: '#share=%%%' });
    expect(c.getState().loadError).toMatch(/^shared link: /);
    expect(c.getState().problemStatus).toBe('ready');
  });
});

describe('undo of slider gestures', () => {
  it('slider edits of one length made through continuousEdit undo in one step; typed edits one step each', async () => {
    const { store } = await demoStore();
    const start = store.getState().prior!.terms[0];
    for (let k = 1; k <= 5; k++) store.getState().continuousEdit(() => store.getState().updateTerm(0, { length: 10 + k }));
    expect(store.getState().history.past).toHaveLength(1);
    store.getState().undo();
    expect(store.getState().prior!.terms[0]).toEqual(start);
    for (let k = 1; k <= 5; k++) store.getState().updateTerm(0, { length: 20 + k });
    expect(store.getState().history.past).toHaveLength(5);
    // an edit right after a gesture, outside it, is a step of its own
    store.getState().continuousEdit(() => store.getState().updateTerm(0, { length: 30 }));
    store.getState().updateTerm(0, { length: 31 });
    expect(store.getState().history.past).toHaveLength(7);
  });
});
