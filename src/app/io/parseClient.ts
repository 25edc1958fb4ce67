/**
 * Parse files in a fresh worker (./parseWorker.ts) and resolve with the result, or reject with
 * {@link LoadError} carrying the precise message. Without Worker (unit tests) it parses inline.
 */
import { MAX_FILE_BYTES } from '../../core/io/errors.ts';
import { parseRequest, toFailure, type ParseFailure, type ParseRequest, type ParseResult } from './parse.ts';

export class LoadError extends Error {
  readonly file: string | null;
  constructor(f: ParseFailure) {
    super(f.message);
    this.name = 'LoadError';
    this.file = f.file;
  }
}

type Reply = { ok: true; result: ParseResult } | { ok: false; failure: ParseFailure };

export function parseOffThread(req: ParseRequest): Promise<ParseResult> {
  if (typeof Worker === 'undefined') {
    try {
      return Promise.resolve(parseRequest(req));
    } catch (e) {
      return Promise.reject(new LoadError(toFailure(e)));
    }
  }
  return new Promise((resolve, reject) => {
    const w = new Worker(new URL('./parseWorker.ts', import.meta.url), { type: 'module' });
    w.onmessage = (ev: MessageEvent<Reply>) => {
      w.terminate();
      if (ev.data.ok) resolve(ev.data.result);
      else reject(new LoadError(ev.data.failure));
    };
    w.onerror = (ev) => {
      ev.preventDefault();
      w.terminate();
      reject(
        new LoadError({
          message: `the file reader stopped (${ev.message || 'out of memory?'}); the current problem is unchanged`,
          file: null,
        }),
      );
    };
    // The bytes are copies read from File objects: transfer them.
    const transfer: ArrayBuffer[] = [];
    const add = (b: Uint8Array) => {
      if (b.buffer instanceof ArrayBuffer && !transfer.includes(b.buffer)) transfer.push(b.buffer);
    };
    if (req.kind === 'problemFiles') req.files.forEach((f) => add(f.bytes));
    else if (req.kind === 'pieces') [req.input.operator, req.input.data, req.input.covariance].forEach((f) => f && add(f.bytes));
    else add(req.file.bytes);
    w.postMessage(req, transfer);
  });
}

/** Bytes of picked / dropped File objects. */
export async function readFiles(files: Iterable<File>): Promise<{ name: string; bytes: Uint8Array }[]> {
  for (const f of files) {
    // Refused before reading it into memory (the parsers check the same limit on bytes).
    if (f.size > MAX_FILE_BYTES) {
      throw new LoadError({
        message: `${f.name}: file is ${(f.size / 1024 / 1024).toFixed(1)} MiB, larger than the limit of ${MAX_FILE_BYTES / 1024 / 1024} MiB`,
        file: f.name,
      });
    }
  }
  return Promise.all([...files].map(async (f) => ({ name: f.name, bytes: new Uint8Array(await f.arrayBuffer()) })));
}
