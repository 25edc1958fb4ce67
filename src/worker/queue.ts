/**
 * The worker's pending-work queue: at most one request per channel. Pushing a request for a
 * channel that already has one waiting replaces (and returns) the older one, so superseded work is
 * never run. `take` hands out the waiting request of the highest-priority channel.
 */
import { CHANNEL_PRIORITY, type Channel } from './protocol.ts';
import { abortChannel, abortRequest } from './tuningSignals.ts';

export class LatestWinsQueue<T extends { readonly id: number }> {
  private readonly waiting = new Map<Channel, T>();

  /** Queue `item` on `channel`; returns the request it replaced, if any. */
  push(channel: Channel, item: T): T | undefined {
    // A running tuning request of this channel is superseded too (./tuningSignals.ts).
    abortChannel(channel);
    const old = this.waiting.get(channel);
    this.waiting.set(channel, item);
    return old;
  }

  /** Remove the waiting request with this id, or abort it if it is a running tuning request; true if either. */
  remove(id: number): boolean {
    for (const [channel, item] of this.waiting) {
      if (item.id === id) {
        this.waiting.delete(channel);
        return true;
      }
    }
    return abortRequest(id);
  }

  take(): T | undefined {
    for (const channel of CHANNEL_PRIORITY) {
      const item = this.waiting.get(channel);
      if (item) {
        this.waiting.delete(channel);
        return item;
      }
    }
    return undefined;
  }

  get size(): number {
    return this.waiting.size;
  }
}
