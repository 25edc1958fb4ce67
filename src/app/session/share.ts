/**
 * Share links: the prior (and the built-in problem id, when the problem is a demo) in the URL
 * hash as `#share=<base64url>` of the deflate-compressed JSON {"problem": id | null, "prior":
 * <prior file object>, "madeFor"?: {"title", "fingerprint"}}; madeFor names the user's own problem
 * the prior was made for, so that the link is applied only to that problem (./start.ts). The prior goes through src/core/io/priorFile.ts, so opening a link
 * validates it like a file (field-named errors) and restores it exactly.
 * Base64url: RFC 4648 §5 (the "-" and "_" alphabet, no padding). Deflate: RFC 1951 through the
 * platform's CompressionStream('deflate-raw').
 */
import { parsePriorFile, priorToJson } from '../../core/io/priorFile.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';

export const SHARE_PREFIX = '#share=';
const SHARE_FILE = 'shared link';

export interface SharedSession {
  readonly problem: string | null;
  readonly prior: PriorSpec;
  /** For a prior made on the user's own problem: that problem's title and fingerprint (src/core/io/fingerprint.ts). */
  readonly madeFor?: { readonly title: string; readonly fingerprint: string };
}

export function toBase64Url(bytes: Uint8Array): string {
  let s = '';
  for (let k = 0; k < bytes.length; k += 0x8000) s += String.fromCharCode(...bytes.subarray(k, k + 0x8000));
  return btoa(s).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
}

export function fromBase64Url(text: string): Uint8Array {
  if (!/^[A-Za-z0-9_-]*$/.test(text))
    throw new Error(`${SHARE_FILE}: the code after ${SHARE_PREFIX} must be base64url (A–Z, a–z, 0–9, - and _)`);
  const b64 = text.replace(/-/g, '+').replace(/_/g, '/') + '='.repeat((4 - (text.length % 4)) % 4);
  let bin: string;
  try {
    bin = atob(b64);
  } catch {
    throw new Error(`${SHARE_FILE}: the code after ${SHARE_PREFIX} is not valid base64url`);
  }
  return Uint8Array.from(bin, (c) => c.charCodeAt(0));
}

async function pipe(bytes: Uint8Array, stream: CompressionStream | DecompressionStream): Promise<Uint8Array> {
  const out = new Response(new Blob([bytes as BlobPart]).stream().pipeThrough(stream));
  return new Uint8Array(await out.arrayBuffer());
}

/** The hash fragment (starting with #share=) for a prior and an optional demo id. */
export async function encodeShare(s: SharedSession): Promise<string> {
  const json = JSON.stringify({ problem: s.problem, prior: priorToJson(s.prior), ...(s.madeFor ? { madeFor: s.madeFor } : {}) });
  const packed = await pipe(new TextEncoder().encode(json), new CompressionStream('deflate-raw'));
  return SHARE_PREFIX + toBase64Url(packed);
}

/** Null when the hash is not a share link; throws an Error with a one-line message when it is broken. */
export async function decodeShare(hash: string): Promise<SharedSession | null> {
  if (!hash.startsWith(SHARE_PREFIX)) return null;
  const packed = fromBase64Url(hash.slice(SHARE_PREFIX.length));
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(await pipe(packed, new DecompressionStream('deflate-raw')));
  } catch {
    throw new Error(`${SHARE_FILE}: the code is damaged (it does not decompress); was the link cut short?`);
  }
  let obj: unknown;
  try {
    obj = JSON.parse(text);
  } catch {
    throw new Error(`${SHARE_FILE}: the code does not hold JSON`);
  }
  if (typeof obj !== 'object' || obj === null || !('prior' in obj)) throw new Error(`${SHARE_FILE}: must hold an object with a prior`);
  const o = obj as { problem?: unknown; prior: unknown; madeFor?: unknown };
  if (o.problem !== null && o.problem !== undefined && typeof o.problem !== 'string') {
    throw new Error(`${SHARE_FILE}: problem must be a built-in problem id or null`);
  }
  const prior = parsePriorFile(SHARE_FILE, JSON.stringify(o.prior)).prior;
  const m = o.madeFor as { title?: unknown; fingerprint?: unknown } | undefined;
  const madeFor =
    m && typeof m === 'object' && typeof m.title === 'string' && typeof m.fingerprint === 'string' && /^[0-9a-f]{16}$/.test(m.fingerprint)
      ? { title: m.title.slice(0, 200), fingerprint: m.fingerprint }
      : undefined;
  return { problem: typeof o.problem === 'string' ? o.problem : null, prior, ...(madeFor ? { madeFor } : {}) };
}
