/** Properties of the 2-D transform (numpy.fft is the outside check in test/reference/fft.test.ts). */
import { describe, expect, it } from 'vitest';
import { Fft2, fft1, nextPowerOfTwo } from '../../../src/core/fft/fft2.ts';
import { relErr, seededVector } from './cases.ts';

describe('Fft2', () => {
  it('inverse(forward(x)) = x', () => {
    const x = seededVector(2 * 32 * 16, 1);
    const f = new Fft2(32, 16);
    const y = x.slice();
    f.transform(y);
    f.transform(y, { inverse: true });
    expect(relErr(y, x)).toBeLessThan(1e-14);
  });

  it('inputRows pruning equals the full transform when those rows are zero', () => {
    const x = seededVector(2 * 16 * 32, 2);
    x.fill(0, 2 * 16 * 10);
    const f = new Fft2(16, 32);
    const a = x.slice();
    const b = x.slice();
    f.transform(a);
    f.transform(b, { inputRows: 10 });
    expect(relErr(b, a)).toBeLessThan(1e-14);
  });

  it('outputRows pruning gives the wanted rows of the full transform', () => {
    const x = seededVector(2 * 16 * 32, 3);
    const f = new Fft2(16, 32);
    const a = x.slice();
    const b = x.slice();
    f.transform(a, { inverse: true });
    f.transform(b, { inverse: true, outputRows: 7 });
    expect(relErr(b.subarray(0, 2 * 16 * 7), a.subarray(0, 2 * 16 * 7))).toBeLessThan(1e-14);
  });

  it("Parseval: Σ|X|² = P Σ|x|² (the DFT's unitary scaling, common practice, no source)", () => {
    const x = seededVector(2 * 64 * 8, 4);
    const y = x.slice();
    new Fft2(64, 8).transform(y);
    const e = (v: Float64Array) => v.reduce((s, t) => s + t * t, 0);
    expect(Math.abs(e(y) - 512 * e(x)) / e(y)).toBeLessThan(1e-13);
  });

  it('fft1 of an impulse is all ones; sizes that are not powers of two are refused', () => {
    const x = new Float64Array(16);
    x[0] = 1;
    fft1(x);
    for (let k = 0; k < 8; k++) expect([x[2 * k], x[2 * k + 1]]).toEqual([1, 0]);
    expect(() => new Fft2(12, 4)).toThrow(/powers of two/);
    expect(nextPowerOfTwo(127)).toBe(128);
    expect(nextPowerOfTwo(1)).toBe(1);
  });
});
