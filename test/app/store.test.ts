/**
 * The store's progressive posterior: a partial mean of the current request is shown at once with
 * the bands marked as computing, the full result replaces it; a failure of the bands keeps the
 * mean (and the last complete result) with a clear message; stale partials are ignored; the undo
 * history and the autosave never see a partial. The partials and results are real ones from the
 * worker Engine (partials always on: partialMinFlops 0) for the borehole-log demo (FFT path).
 */
import { describe, expect, it } from 'vitest';
import { createWorkbenchStore } from '../../src/app/store.ts';
import { HEAVY_POSTERIOR } from '../../src/app/results/slice.ts';
import type { ClientPort } from '../../src/worker/client.ts';
import { bandsState, bandsText, shownPosterior } from '../../src/app/posteriorView.ts';
import { Engine } from '../../src/worker/engine.ts';
import type { PosteriorPartial, PosteriorResult } from '../../src/worker/protocol.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import { memoryStorage } from '../../src/app/session/autosave.ts';
import { installAutosave } from '../../src/app/session/start.ts';
import { inProcessClient, tick } from './session/inProcessClient.ts';

interface Pending {
  prior: PriorSpec;
  onPartial: ((p: PosteriorPartial) => void) | undefined;
  resolve: (o: { superseded: false; value: PosteriorResult }) => void;
  reject: (e: Error) => void;
}

/** The in-process client with a posterior the test answers by hand. */
async function setup() {
  const base = inProcessClient();
  const pending: Pending[] = [];
  const client: ClientPort = {
    ...base,
    posterior: (prior, onPartial) => new Promise((resolve, reject) => pending.push({ prior, onPartial, resolve, reject })),
  };
  const engine = new Engine({ partialMinFlops: 0 });
  await engine.handle({ id: 1, kind: 'loadDemo', version: 1, demoId: 'borehole-log' });
  let id = 2;
  const compute = async (prior: PriorSpec) => {
    let partial: PosteriorPartial | null = null;
    const result = await engine.handle({ id: id++, kind: 'posterior', problemVersion: 1, prior }, undefined, (p) => (partial = p));
    expect(partial).not.toBeNull();
    return { partial: partial! as PosteriorPartial, result };
  };
  const store = createWorkbenchStore(client, { demoId: 'borehole-log' });
  await store.getState().loadDemo('borehole-log');
  expect(pending).toHaveLength(1);
  return { store, pending, compute };
}

const view = (s: ReturnType<Awaited<ReturnType<typeof setup>>['store']['getState']>) => ({
  shown: shownPosterior(s.posterior, s.posteriorPartial),
  bands: bandsState(s.posterior, s.posteriorPartial, s.busy.posterior ?? false, s.errors.posterior ?? null),
});

describe('store: mean first, bands later', () => {
  it('shows the partial mean at once with the bands computing, then the full result replaces it', async () => {
    const { store, pending, compute } = await setup();
    const { partial, result } = await compute(pending[0].prior);
    expect(view(store.getState()).bands).toBe('none');
    pending[0].onPartial!(partial);
    let s = store.getState();
    expect(s.posteriorPartial).toBe(partial);
    expect(s.posterior).toBeNull();
    expect(s.busy.posterior).toBe(true);
    expect(view(s).bands).toBe('computing');
    expect(bandsText(view(s).bands)).toBe('Uncertainty bands: computing…');
    expect(view(s).shown!.mean).toBe(partial.mean);
    expect(view(s).shown!.summary).toBeNull();
    pending[0].resolve({ superseded: false, value: result });
    await tick();
    s = store.getState();
    expect(s.posterior).toBe(result);
    expect(s.posteriorPartial).toBeNull();
    expect(view(s).bands).toBe('shown');
    expect(bandsText(view(s).bands)).toBeNull();
    expect(view(s).shown!.summary).toBe(result.summary);
  });

  it('bands failing after a partial keep the partial mean and the last complete result, with a clear message', async () => {
    const { store, pending, compute } = await setup();
    const first = await compute(pending[0].prior);
    pending[0].resolve({ superseded: false, value: first.result });
    await tick();
    store.getState().updateTerm(0, { length: 3.5 });
    expect(pending).toHaveLength(2);
    const second = await compute(pending[1].prior);
    pending[1].onPartial!(second.partial);
    pending[1].reject(new Error('out of memory'));
    await tick();
    const s = store.getState();
    expect(s.posterior).toBe(first.result);
    expect(s.posteriorPartial).toBe(second.partial);
    expect(s.errors.posterior).toBe(
      'the uncertainty bands could not be computed (out of memory); the posterior mean is shown without them',
    );
    expect(view(s).bands).toBe('failed');
    expect(view(s).shown!.mean).toBe(second.partial.mean);
    expect(bandsText('failed')).toMatch(/^Uncertainty bands: not available/);
  });

  it('a failure before any partial keeps the message as it was and the last complete result', async () => {
    const { store, pending, compute } = await setup();
    const first = await compute(pending[0].prior);
    pending[0].resolve({ superseded: false, value: first.result });
    await tick();
    store.getState().updateTerm(0, { length: 3.5 });
    pending[1].reject(new Error('terms[0].length must be > 0, got -1'));
    await tick();
    const s = store.getState();
    expect(s.errors.posterior).toBe('terms[0].length must be > 0, got -1');
    expect(s.posterior).toBe(first.result);
    expect(s.posteriorPartial).toBeNull();
    expect(view(s).shown!.summary).toBe(first.result.summary);
  });

  it('ignores the partial of a request the store has moved past', async () => {
    const { store, pending, compute } = await setup();
    const { partial } = await compute(pending[0].prior);
    store.getState().updateTerm(0, { length: 3.5 });
    expect(pending).toHaveLength(2);
    pending[0].onPartial!(partial);
    expect(store.getState().posteriorPartial).toBeNull();
    // a new problem: the pending request's partial is stale as well
    await store.getState().loadDemo('borehole-log');
    pending[1].onPartial!((await compute(pending[1].prior)).partial);
    expect(store.getState().posteriorPartial).toBeNull();
  });

  it('a partial adds no undo step and schedules no autosave; a new problem clears it', async () => {
    const { store, pending, compute } = await setup();
    store.getState().updateTerm(0, { length: 3.5 });
    const historyBefore = store.getState().history;
    const storage = memoryStorage();
    const stop = installAutosave(store, storage, 5);
    await tick(30);
    expect(store.getState().saveStatus).toBe('saved');
    const saved = storage.map.get('session');
    pending[1].onPartial!((await compute(pending[1].prior)).partial);
    expect(store.getState().posteriorPartial).not.toBeNull();
    expect(store.getState().saveStatus).toBe('saved');
    await tick(30);
    expect(storage.map.get('session')).toBe(saved);
    expect(store.getState().history).toBe(historyBefore);
    stop();
    await store.getState().loadDemo('borehole-log');
    expect(store.getState().posteriorPartial).toBeNull();
  });
});

describe('store: a heavy posterior is asked for before the verdict', () => {
  /** A client whose posterior the test answers by hand and whose verdict requests are counted (never answered). */
  async function heavySetup(heavy: boolean) {
    const base = inProcessClient();
    const pending: Pending[] = [];
    const verdicts: PriorSpec[] = [];
    const client: ClientPort = {
      ...base,
      // The borehole demo's view, with a size claimed for the rule (cells × data) above or below HEAVY_POSTERIOR.
      loadDemo: async (id) => {
        const o = await base.loadDemo(id);
        if (o.superseded || !heavy) return o;
        return { superseded: false, value: { ...o.value, grid: { shape: [1000, 1000], spacing: [1, 1] }, dataCount: 100 } };
      },
      posterior: (prior, onPartial) => new Promise((resolve, reject) => pending.push({ prior, onPartial, resolve, reject })),
      diagnostics: (prior) => {
        verdicts.push(prior);
        return new Promise(() => {});
      },
    };
    const store = createWorkbenchStore(client, { demoId: 'borehole-log' });
    await store.getState().loadDemo('borehole-log');
    await tick();
    return { store, pending, verdicts };
  }

  it('above HEAVY_POSTERIOR the verdict waits for the mean (busy meanwhile); below it both start at once', async () => {
    expect(1000 * 1000 * 100).toBeGreaterThanOrEqual(HEAVY_POSTERIOR);
    const h = await heavySetup(true);
    expect(h.pending).toHaveLength(1);
    expect(h.verdicts).toHaveLength(0);
    expect(h.store.getState().busy.diagnostics).toBe(true);
    h.pending[0].onPartial!({ mean: new Float64Array(0) } as unknown as PosteriorPartial);
    await tick();
    expect(h.verdicts).toHaveLength(1);
    const l = await heavySetup(false);
    expect(l.verdicts).toHaveLength(1);
  });

  it('a verdict deferred behind a superseded posterior is dropped: only the newer prior’s verdict is asked for', async () => {
    const h = await heavySetup(true);
    const s = h.store.getState();
    s.setNugget((s.prior!.nugget ?? 0) + 0.5);
    await tick();
    expect(h.pending).toHaveLength(2);
    // The first posterior ends as superseded; its verdict must not be sent for the old prior.
    h.pending[0].resolve({ superseded: true } as unknown as { superseded: false; value: PosteriorResult });
    await tick();
    expect(h.verdicts).toHaveLength(0);
    h.pending[1].onPartial!({ mean: new Float64Array(0) } as unknown as PosteriorPartial);
    await tick();
    expect(h.verdicts).toHaveLength(1);
    expect(h.verdicts[0].nugget).toBe(h.store.getState().prior!.nugget);
  });
});
