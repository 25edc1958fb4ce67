/**
 * Share links decoded by Python's base64 + zlib (raw deflate, RFC 1951), and a link encoded by
 * Python decoded by us: the codec is the standard one, not only self-consistent.
 */
import { describe, expect, it } from 'vitest';
import { decodeShare, encodeShare, fromBase64Url, toBase64Url } from '../../src/app/session/share.ts';
import { priorToJson } from '../../src/core/io/priorFile.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import { runPython } from './python.ts';

const priors: PriorSpec[] = [
  { mean: { constant: 20.5 }, terms: [{ kernel: 'exponential', variance: 4, length: 2.5 }], nugget: 0.01 },
  {
    mean: { trend: { intercept: 1, slope: [0.1, -0.2] } },
    terms: [
      { kernel: 'matern', variance: 1.5, lengths: [3, 0.7], angle: 30, nu: 2.5 },
      { kernel: 'gaussian', variance: 0.25, length: 1e-3 },
    ],
  },
];

describe('share link codec against Python base64 + zlib', () => {
  it('our codes decode in Python to the prior file object, and Python codes decode here', async () => {
    const codes = await Promise.all(priors.map((p, k) => encodeShare({ problem: k === 0 ? 'borehole-log' : null, prior: p })));
    const ref = runPython<{ decoded: unknown[]; encoded: string }>('share_reference.py', {
      codes: codes.map((c) => c.slice('#share='.length)),
      encode: { problem: 'crosshole-tomography', prior: priorToJson(priors[1]) },
    });
    expect(ref.decoded).toEqual(priors.map((p, k) => ({ problem: k === 0 ? 'borehole-log' : null, prior: priorToJson(p) })));
    expect(await decodeShare(ref.encoded)).toEqual({ problem: 'crosshole-tomography', prior: priors[1] });
  });

  it('round-trips exactly and refuses damaged codes with a message', async () => {
    for (const p of priors) expect((await decodeShare(await encodeShare({ problem: null, prior: p })))!.prior).toEqual(p);
    expect(await decodeShare('#other')).toBeNull();
    await expect(decodeShare('#share=ab$')).rejects.toThrow('shared link: the code after #share= must be base64url');
    await expect(decodeShare('#share=AAAA')).rejects.toThrow('shared link: the code is damaged');
    const bad = await encodeShare({ problem: null, prior: priors[0] });
    // a prior that fails the prior file's checks is refused with the field named
    const { deflateRawSync } = await import('node:zlib');
    const wrong =
      '#share=' + toBase64Url(deflateRawSync(JSON.stringify({ problem: null, prior: { ...priorToJson(priors[0]), nugget: -1 } })));
    await expect(decodeShare(wrong)).rejects.toThrow('shared link: nugget must be');
    expect(Array.from(fromBase64Url(toBase64Url(Uint8Array.from([0, 255, 251, 62, 63]))))).toEqual([0, 255, 251, 62, 63]);
    expect(bad.length).toBeLessThan(200);
  });
});
