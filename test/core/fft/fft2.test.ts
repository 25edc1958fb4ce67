/** Properties of the 2-D transform (numpy.fft is the outside check in test/reference/fft.test.ts). */
import { describe, expect, it } from 'vitest';
import { Fft2 } from '../../../src/core/fft/fft2.ts';
import { fftBatch, nextPowerOfTwo } from '../../../src/core/fft/transform.ts';
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

  it('the transform of an impulse is all ones; sizes that are not powers of two are refused', () => {
    const i = new Float64Array(16);
    i[0] = 1;
    const x = fftBatch(i, 8, 1);
    for (let k = 0; k < 8; k++) expect([x[2 * k], x[2 * k + 1]]).toEqual([1, 0]);
    expect(() => new Fft2(12, 4)).toThrow(/powers of two/);
    expect(nextPowerOfTwo(127)).toBe(128);
    expect(nextPowerOfTwo(1)).toBe(1);
  });
});

/**
 * Direct 2-D DFT from the definition X(k) = Σ_j x(j) e^(∓2πi (kx jx / px + ky jy / py)) (the
 * convention of the header of src/core/fft/fft2.ts, numpy.fft's; O(P²), no fast algorithm).
 */
function directDft2(x: Float64Array, px: number, py: number, inverse: boolean): Float64Array {
  const out = new Float64Array(2 * px * py);
  const sign = inverse ? 1 : -1;
  for (let ky = 0; ky < py; ky++) {
    for (let kx = 0; kx < px; kx++) {
      let re = 0;
      let im = 0;
      for (let jy = 0; jy < py; jy++) {
        for (let jx = 0; jx < px; jx++) {
          const a = sign * 2 * Math.PI * (((kx * jx) % px) / px + ((ky * jy) % py) / py);
          const xr = x[2 * (jx + px * jy)];
          const xi = x[2 * (jx + px * jy) + 1];
          re += xr * Math.cos(a) - xi * Math.sin(a);
          im += xr * Math.sin(a) + xi * Math.cos(a);
        }
      }
      const o = 2 * (kx + px * ky);
      out[o] = inverse ? re / (px * py) : re;
      out[o + 1] = inverse ? im / (px * py) : im;
    }
  }
  return out;
}

describe('Fft2 on small and degenerate sizes (sizes 1 and 2 take the copy and radix-2 paths)', () => {
  const shapes: [number, number][] = [
    [1, 1],
    [1, 2],
    [2, 1],
    [2, 2],
    [4, 2],
    [2, 8],
    [8, 4],
    [16, 1],
    [1, 16],
  ];
  for (const [px, py] of shapes) {
    it(`${px} × ${py}: full, inputRows and outputRows transforms equal the direct DFT`, () => {
      for (const inverse of [false, true]) {
        for (const rows of [1, Math.max(1, py >> 1), py]) {
          const x = seededVector(2 * px * py, 70 + px + 3 * py + rows);
          const zeroed = x.slice().fill(0, 2 * px * rows);
          const want = directDft2(zeroed, px, py, inverse);
          const a = zeroed.slice();
          new Fft2(px, py).transform(a, { inverse, inputRows: rows });
          expect(relErr(a, want)).toBeLessThan(1e-14);
          const full = directDft2(x, px, py, inverse);
          const b = x.slice();
          new Fft2(px, py).transform(b, { inverse, outputRows: rows });
          expect(relErr(b.subarray(0, 2 * px * rows), full.subarray(0, 2 * px * rows))).toBeLessThan(1e-14);
        }
      }
    });
  }
});
