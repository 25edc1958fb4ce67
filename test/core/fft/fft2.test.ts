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

/**
 * Direct DFT along y from the definition X(k) = Σ_j x(j) e^(−2πi jk/p) (the convention of the
 * header of src/core/fft/fft2.ts, numpy.fft's; O(p²), independent of any fast algorithm).
 */
function directColumnFilter(buf: Float64Array, lambdaT: Float64Array, px: number, py: number, gatherRows: number, scatterRows: number): Float64Array {
  const out = new Float64Array(2 * px * scatterRows);
  const dft = (re: Float64Array, im: Float64Array): [Float64Array, Float64Array] => {
    const R = new Float64Array(py);
    const I = new Float64Array(py);
    for (let k = 0; k < py; k++) {
      for (let j = 0; j < py; j++) {
        const a = (-2 * Math.PI * ((j * k) % py)) / py;
        R[k] += re[j]! * Math.cos(a) - im[j]! * Math.sin(a);
        I[k] += re[j]! * Math.sin(a) + im[j]! * Math.cos(a);
      }
    }
    return [R, I];
  };
  for (let kx = 0; kx < px; kx++) {
    const re = new Float64Array(py);
    const im = new Float64Array(py);
    for (let r = 0; r < gatherRows; r++) {
      re[r] = buf[2 * (r * px + kx)]!;
      im[r] = buf[2 * (r * px + kx) + 1]!;
    }
    const [R, I] = dft(re, im);
    for (let k = 0; k < py; k++) {
      R[k] *= lambdaT[kx * py + k]!;
      I[k] *= lambdaT[kx * py + k]!;
    }
    const [V, W] = dft(R, I);
    for (let t = 0; t < scatterRows; t++) {
      const s = (py - t) % py;
      out[2 * (t * px + kx)] = V[s]!;
      out[2 * (t * px + kx) + 1] = W[s]!;
    }
  }
  return out;
}

describe('Fft2.rowFilter (y-pass across whole rows, radix-2/4)', () => {
  // py = 2 … 128 covers the pure radix-2 case and both parities of log2(py/2); gatherRows above
  // py/2 takes the full first stage, scatterRows above py/2 the second half of the last stage.
  const cases: [number, number, number, number][] = [
    [1, 2, 1, 1], [2, 4, 2, 2], [4, 8, 3, 3], [4, 8, 7, 8], [8, 16, 8, 8], [4, 32, 9, 12], [2, 64, 32, 32], [2, 128, 64, 64],
  ];
  for (const [px, py, g, s] of cases) {
    it(`equals the direct DFT filter for ${px} × ${py}, ${g} input rows, ${s} output rows`, () => {
      const f = new Fft2(px, py);
      const buf = seededVector(2 * px * py, 40 + py);
      buf.fill(0, 2 * px * g);
      const lam = seededVector(px * py, 50 + py).map((v) => 1 + Math.abs(v));
      const want = directColumnFilter(buf, lam, px, py, g, s);
      const dest = new Float64Array(2 * px * py);
      const save = new Float64Array(f.rowSpectrumLength);
      f.rowFilter(buf, lam, g, s, dest, save);
      expect(relErr(dest.subarray(0, 2 * px * s), want)).toBeLessThan(1e-12);
      // Without `save` the spectrum is built in the workspace (read in place by the λ product).
      const plain = new Float64Array(2 * px * py);
      f.rowFilter(buf, lam, g, s, plain);
      expect(relErr(plain.subarray(0, 2 * px * s), want)).toBeLessThan(1e-12);
      // The saved spectrum reproduces the same rows bit for bit.
      const again = new Float64Array(2 * px * py);
      f.rowFilterCached(save, lam, s, again);
      expect(Array.from(again.subarray(0, 2 * px * s))).toEqual(Array.from(dest.subarray(0, 2 * px * s)));
      // A wrong λ must be detected (the check can fail).
      const off = lam.slice();
      off[px * py - 1] = off[px * py - 1]! + 1;
      const bad = new Float64Array(2 * px * py);
      f.rowFilter(buf, off, g, s, bad);
      expect(relErr(bad.subarray(0, 2 * px * s), want)).toBeGreaterThan(1e-8);
    });
  }
});
