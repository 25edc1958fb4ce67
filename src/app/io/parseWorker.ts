/// <reference lib="webworker" />
/**
 * A short-lived worker that parses the user's files (one request, one reply, then it is
 * terminated by ./parseClient.ts), so that a large G never blocks the main thread.
 */
import { parseRequest, toFailure, type ParseRequest } from './parse.ts';
import { transferables } from '../../worker/protocol.ts';

const scope = self as unknown as DedicatedWorkerGlobalScope;

scope.onmessage = (ev: MessageEvent<ParseRequest>) => {
  try {
    const result = parseRequest(ev.data);
    scope.postMessage({ ok: true, result }, transferables(result));
  } catch (e) {
    scope.postMessage({ ok: false, failure: toFailure(e) });
  }
};
