import { describe, expect, it } from 'vitest';
import { WorkerClient, WorkerRestartedError, WorkerTaskError, type WorkerLike } from '../../src/worker/client.ts';
import { LatestWinsQueue } from '../../src/worker/queue.ts';
import { transferables, type WorkerReply, type WorkerRequest } from '../../src/worker/protocol.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';

/** A fake worker that records what it was sent and lets the test reply. */
class FakeWorker implements WorkerLike {
  sent: { message: WorkerRequest; transfer: Transferable[] | undefined }[] = [];
  terminated = false;
  onmessage: ((ev: MessageEvent<WorkerReply>) => void) | null = null;
  onerror: ((ev: ErrorEvent) => void) | null = null;
  postMessage(message: WorkerRequest, transfer?: Transferable[]) {
    this.sent.push({ message, transfer });
  }
  terminate() {
    this.terminated = true;
  }
  reply(r: WorkerReply) {
    this.onmessage?.({ data: r } as MessageEvent<WorkerReply>);
  }
  crash(message = 'out of memory') {
    this.onerror?.({ message, preventDefault() {} } as unknown as ErrorEvent);
  }
  last(kind?: WorkerRequest['kind']): WorkerRequest {
    const all = this.sent.map((s) => s.message).filter((m) => !kind || m.kind === kind);
    return all[all.length - 1];
  }
}

function setup() {
  const workers: FakeWorker[] = [];
  const client = new WorkerClient(() => {
    const w = new FakeWorker();
    workers.push(w);
    return w;
  });
  return { client, workers, w: () => workers[workers.length - 1] };
}

const prior = (length: number): PriorSpec => ({ mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length }] });
const view = { version: 1 } as never;
const settled = () => new Promise((r) => setTimeout(r, 0));

describe('WorkerClient', () => {
  it('resolves a request with the result of its id', async () => {
    const { client, w } = setup();
    const p = client.diagnostics(prior(1));
    const req = w().last('diagnostics');
    w().reply({ type: 'result', id: req.id, result: { positiveDefinite: true } as never });
    await expect(p).resolves.toEqual({ superseded: false, value: { positiveDefinite: true } });
    expect(client.pendingCount).toBe(0);
  });

  it('supersedes the older request of the same channel at once and ignores its late reply', async () => {
    const { client, w } = setup();
    const first = client.posterior(prior(1));
    const second = client.posterior(prior(2));
    await expect(first).resolves.toEqual({ superseded: true });
    const [r1, r2] = w().sent.map((s) => s.message);
    // late reply for the first one: must not resolve the second
    w().reply({ type: 'result', id: r1!.id, result: 'stale' as never });
    let done = false;
    void second.then(() => (done = true));
    await settled();
    expect(done).toBe(false);
    w().reply({ type: 'result', id: r2!.id, result: 'fresh' as never });
    await expect(second).resolves.toEqual({ superseded: false, value: 'fresh' });
  });

  it('keeps channels independent', async () => {
    const { client, w } = setup();
    const a = client.posterior(prior(1));
    const b = client.diagnostics(prior(1));
    const ra = w().last('posterior');
    const rb = w().last('diagnostics');
    w().reply({ type: 'result', id: rb.id, result: 'B' as never });
    w().reply({ type: 'result', id: ra.id, result: 'A' as never });
    await expect(a).resolves.toEqual({ superseded: false, value: 'A' });
    await expect(b).resolves.toEqual({ superseded: false, value: 'B' });
  });

  it('after 20 rapid requests only the last one resolves with a value', async () => {
    const { client, w } = setup();
    const promises = Array.from({ length: 20 }, (_, k) => client.posterior(prior(k + 1)));
    const last = w().last('posterior');
    expect(last.kind === 'posterior' && last.prior.terms[0].length).toBe(20);
    w().reply({ type: 'result', id: last.id, result: 'last' as never });
    const outcomes = await Promise.all(promises);
    expect(outcomes.filter((o) => !o.superseded)).toEqual([{ superseded: false, value: 'last' }]);
    expect(outcomes.slice(0, 19).every((o) => o.superseded)).toBe(true);
  });

  it('turns a serialised error into a WorkerTaskError with name and field', async () => {
    const { client, w } = setup();
    const p = client.posterior(prior(-1));
    w().reply({
      type: 'error',
      id: w().last().id,
      error: { name: 'InputError', message: 'terms[0].length must be > 0, got -1', field: 'terms[0].length' },
    });
    const e = await p.then(
      () => null,
      (err: unknown) => err,
    );
    expect(e).toBeInstanceOf(WorkerTaskError);
    expect((e as WorkerTaskError).field).toBe('terms[0].length');
    expect((e as WorkerTaskError).remoteName).toBe('InputError');
  });

  it('a worker "superseded" reply resolves the request as superseded', async () => {
    const { client, w } = setup();
    const p = client.resolution(prior(1), 3);
    w().reply({ type: 'superseded', id: w().last().id });
    await expect(p).resolves.toEqual({ superseded: true });
  });

  it('stamps requests with the problem version and a new problem supersedes pending work', async () => {
    const { client, w } = setup();
    const d1 = client.loadDemo('a');
    w().reply({ type: 'result', id: w().last().id, result: view });
    await d1;
    const post = client.posterior(prior(1));
    expect((w().last('posterior') as { problemVersion: number }).problemVersion).toBe(1);
    void client.loadDemo('b');
    await expect(post).resolves.toEqual({ superseded: true });
    void client.diagnostics(prior(1));
    expect((w().last('diagnostics') as { problemVersion: number }).problemVersion).toBe(2);
  });

  it('restarts a dead worker, re-sends the problem and rejects the other pending requests', async () => {
    const { client, workers, w } = setup();
    const d = client.loadDemo('borehole-log');
    w().reply({ type: 'result', id: w().last().id, result: view });
    await d;
    let restarted = '';
    client.onRestart((reason) => (restarted = reason));
    const p = client.posterior(prior(1));
    workers[0].crash('out of memory');
    await expect(p).rejects.toBeInstanceOf(WorkerRestartedError);
    expect(workers).toHaveLength(2);
    expect(workers[0].terminated).toBe(true);
    const resent = workers[1].last();
    expect(resent.kind).toBe('loadDemo');
    expect(resent.kind === 'loadDemo' && resent.demoId).toBe('borehole-log');
    expect(restarted).toBe('out of memory');
    expect(client.restarts).toBe(1);
    // the new worker answers new requests
    const q = client.diagnostics(prior(1));
    workers[1].reply({ type: 'result', id: workers[1].last('diagnostics').id, result: 'ok' as never });
    await expect(q).resolves.toEqual({ superseded: false, value: 'ok' });
  });

  it('a problem request pending during a crash is re-sent and still resolves', async () => {
    const { client, workers } = setup();
    const d = client.loadDemo('potential-field');
    workers[0].crash();
    const resent = workers[1].last();
    expect(resent.kind).toBe('loadDemo');
    workers[1].reply({ type: 'result', id: resent.id, result: view });
    await expect(d).resolves.toEqual({ superseded: false, value: view });
  });

  it('setProblem transfers copies, so the caller keeps its arrays', () => {
    const { client, w } = setup();
    const values = new Float64Array([1, 2, 3]);
    const problem = {
      grid: { shape: [3], spacing: [1] },
      operator: { kind: 'dense' as const, matrix: { rows: 3, cols: 3, data: new Float64Array(9) } },
      data: { values, sigma: new Float64Array([1, 1, 1]) },
    };
    void client.setProblem(problem);
    const sent = w().sent[0];
    expect(sent.transfer).toHaveLength(3);
    const m = sent.message as unknown as { problem: typeof problem };
    expect(m.problem.data.values).not.toBe(values);
    expect(Array.from(m.problem.data.values)).toEqual([1, 2, 3]);
  });

  it('setProblem sends the data geometry with the problem', () => {
    const { client, w } = setup();
    const positions = { rows: 3, cols: 1, data: new Float64Array([0.5, 1.5, 9]) };
    const problem = {
      grid: { shape: [3], spacing: [1] },
      operator: { kind: 'dense' as const, matrix: { rows: 3, cols: 3, data: new Float64Array(9) } },
      data: { values: new Float64Array(3), sigma: new Float64Array([1, 1, 1]), geometry: { kind: 'points' as const, positions } },
    };
    void client.setProblem(problem);
    const m = w().sent[0].message as unknown as { problem: typeof problem };
    expect(m.problem.data.geometry).toEqual({ kind: 'points', positions });
  });

  it('reports progress on the request channel', () => {
    const seen: string[] = [];
    const workers: FakeWorker[] = [];
    const client = new WorkerClient(
      () => {
        const w = new FakeWorker();
        workers.push(w);
        return w;
      },
      { onProgress: (channel, stage, f) => seen.push(`${channel}:${stage}:${f}`) },
    );
    void client.posterior(prior(1));
    workers[0].reply({ type: 'progress', id: workers[0].last().id, stage: 'factorising', fraction: 0.5 });
    expect(seen).toEqual(['posterior:factorising:0.5']);
  });
});

describe('WorkerClient: partial posterior results', () => {
  const partial = (tag: number) => ({ path: 'fft', mean: new Float64Array([tag]) }) as never;
  const got = (seen: unknown[]) => seen.map((p) => (p as { mean: Float64Array }).mean[0]);

  it('hands the partial of the pending request to its handler, before the result resolves it', async () => {
    const { client, w } = setup();
    const seen: unknown[] = [];
    let resolved = false;
    const p = client.posterior(prior(1), (x) => seen.push(x));
    void p.then(() => (resolved = true));
    const id = w().last('posterior').id;
    w().reply({ type: 'partial', id, partial: partial(1) });
    await settled();
    expect(got(seen)).toEqual([1]);
    expect(resolved).toBe(false);
    w().reply({ type: 'result', id, result: 'full' as never });
    await expect(p).resolves.toEqual({ superseded: false, value: 'full' });
  });

  it('drops the partial of a superseded request (a newer posterior, or a new problem) and of a settled one', async () => {
    const { client, w } = setup();
    const first: unknown[] = [];
    const second: unknown[] = [];
    void client.posterior(prior(1), (x) => first.push(x));
    const r1 = w().last('posterior').id;
    const p2 = client.posterior(prior(2), (x) => second.push(x));
    const r2 = w().last('posterior').id;
    // the worker was already computing the first one: its partial arrives late
    w().reply({ type: 'partial', id: r1, partial: partial(1) });
    expect(first).toEqual([]);
    expect(second).toEqual([]);
    w().reply({ type: 'partial', id: r2, partial: partial(2) });
    w().reply({ type: 'result', id: r2, result: 'r2' as never });
    await p2;
    w().reply({ type: 'partial', id: r2, partial: partial(3) });
    expect(got(second)).toEqual([2]);
    // a new problem supersedes the pending posterior: its partial is dropped too
    const third: unknown[] = [];
    void client.posterior(prior(3), (x) => third.push(x));
    const r3 = w().last('posterior').id;
    void client.loadDemo('borehole-log');
    w().reply({ type: 'partial', id: r3, partial: partial(4) });
    expect(third).toEqual([]);
  });

  it('a cancelled posterior hears no partial; one without a handler ignores it', async () => {
    const { client, w } = setup();
    const seen: unknown[] = [];
    const p = client.posterior(prior(1), (x) => seen.push(x));
    const id = w().last('posterior').id;
    client.cancel('posterior');
    await expect(p).resolves.toEqual({ superseded: true });
    w().reply({ type: 'partial', id, partial: partial(1) });
    expect(seen).toEqual([]);
    const q = client.posterior(prior(2));
    const id2 = w().last('posterior').id;
    expect(() => w().reply({ type: 'partial', id: id2, partial: partial(2) })).not.toThrow();
    w().reply({ type: 'result', id: id2, result: 'ok' as never });
    await expect(q).resolves.toEqual({ superseded: false, value: 'ok' });
  });
});

describe('LatestWinsQueue', () => {
  it('keeps only the newest request per channel and hands out by priority', () => {
    const q = new LatestWinsQueue<{ id: number }>();
    expect(q.push('priorDraws', { id: 1 })).toBeUndefined();
    expect(q.push('posterior', { id: 2 })).toBeUndefined();
    expect(q.push('posterior', { id: 3 })).toEqual({ id: 2 });
    expect(q.size).toBe(2);
    expect(q.take()).toEqual({ id: 3 });
    expect(q.take()).toEqual({ id: 1 });
    expect(q.take()).toBeUndefined();
  });

  it('removes a waiting request by id', () => {
    const q = new LatestWinsQueue<{ id: number }>();
    q.push('covariance', { id: 7 });
    expect(q.remove(8)).toBe(false);
    expect(q.remove(7)).toBe(true);
    expect(q.size).toBe(0);
  });
});

describe('transferables', () => {
  it('lists whole buffers once and skips views into larger buffers', () => {
    const a = new Float64Array(4);
    const big = new Float64Array(10);
    const view = big.subarray(2, 5);
    const list = transferables({ a, again: a, nested: { m: { data: a } }, view, arr: [new Float64Array(2)] });
    expect(list).toHaveLength(2);
    expect(list).toContain(a.buffer);
    expect(list).not.toContain(big.buffer);
  });
});

describe('WorkerClient.tuning', () => {
  it('sends a prior-selection request with its payload and the problem version, and cancels it on its channel', async () => {
    const { client, w } = setup();
    const loaded = client.loadDemo('x');
    w().reply({ type: 'result', id: w().last('loadDemo').id, result: view });
    await loaded;
    const port = client.tuning;
    expect(client.tuning).toBe(port);
    const p = port.request('criteria', { prior: prior(3) });
    const req = w().last('criteria') as Extract<WorkerRequest, { kind: 'criteria' }>;
    expect(req).toMatchObject({ kind: 'criteria', problemVersion: 1, prior: prior(3) });
    port.cancel('criteria');
    await expect(p).resolves.toEqual({ superseded: true });
    expect(w().last('cancel')).toMatchObject({ kind: 'cancel', target: req.id });
  });
});
