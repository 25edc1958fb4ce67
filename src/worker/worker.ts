/// <reference lib="webworker" />
/**
 * Worker entry: receives requests, keeps only the newest pending one per channel (./queue.ts),
 * runs them one at a time on the {@link Engine}, and transfers result buffers back. A posterior's
 * `partial` (the mean ahead of the bands) is posted as soon as the engine has it, with its own
 * buffers; the client drops it if the request was superseded meanwhile (./client.ts).
 */
import { answerRequest, Engine } from './engine.ts';
import { lazyPool } from './pool.ts';
import { LatestWinsQueue } from './queue.ts';
import { channelOf, type WorkerReply, type WorkerRequest } from './protocol.ts';

type Job = Exclude<WorkerRequest, { kind: 'cancel' }>;

const scope = self as unknown as DedicatedWorkerGlobalScope;
// Variance blocks of large FFT posteriors go to one Web Worker per core (started on first use).
const engine = new Engine({ pool: lazyPool() });
const queue = new LatestWinsQueue<Job>();
let scheduled = false;
let running = false;

function post(reply: WorkerReply, transfer: Transferable[] = []): void {
  scope.postMessage(reply, transfer);
}

function schedule(): void {
  if (scheduled || running) return;
  scheduled = true;
  // A macrotask, so that messages that arrived during the last job are queued (and coalesced) first.
  setTimeout(drain, 0);
}

async function drain(): Promise<void> {
  scheduled = false;
  const job = queue.take();
  if (!job) return;
  running = true;
  try {
    await answerRequest(engine, job, post);
  } finally {
    running = false;
    if (queue.size > 0) schedule();
  }
}

scope.onmessage = (ev: MessageEvent<WorkerRequest>) => {
  const req = ev.data;
  if (req.kind === 'cancel') {
    if (queue.remove(req.target)) post({ type: 'superseded', id: req.target });
    return;
  }
  const replaced = queue.push(channelOf(req.kind), req);
  if (replaced) post({ type: 'superseded', id: replaced.id });
  schedule();
};
