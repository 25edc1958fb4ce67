/**
 * Abort flags of the tuning requests that are running in this worker, by request id and channel.
 *
 * The worker's message loop (./worker.ts) only knows the waiting queue; a tuning request that is
 * already running yields to the loop between units of work (./tuning.ts), and the queue
 * (./queue.ts) calls {@link abortChannel} when a newer request of the same channel arrives and
 * {@link abortRequest} when a `cancel` names a request that is no longer waiting. The running job
 * sees its flag at the next unit and returns a result marked `cancelled` (which the client, having
 * already superseded the request, ignores).
 */
export interface AbortFlag {
  aborted: boolean;
}

const running = new Map<number, { readonly channel: string; readonly flag: AbortFlag }>();

/** Register a running request; returns its abort flag. */
export function openSignal(id: number, channel: string): AbortFlag {
  const flag: AbortFlag = { aborted: false };
  running.set(id, { channel, flag });
  return flag;
}

export function closeSignal(id: number): void {
  running.delete(id);
}

/**
 * Abort every running request of `channel` (a newer one of that channel arrived). A new problem
 * (channel 'problem') makes every running tuning request stale, so it aborts them all.
 */
export function abortChannel(channel: string): void {
  for (const r of running.values()) if (r.channel === channel || channel === 'problem') r.flag.aborted = true;
}

/** Abort the running request `id`; true when it was running. */
export function abortRequest(id: number): boolean {
  const r = running.get(id);
  if (!r) return false;
  r.flag.aborted = true;
  return true;
}

/** Number of registered running requests (tests). */
export function runningCount(): number {
  return running.size;
}
