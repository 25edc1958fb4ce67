/**
 * evenRealSpectrum (src/core/fft/embedding.ts), the quarter-work transform of a real, jointly even
 * array, against the full complex 2-D transform of src/core/fft/fft2.ts (itself checked against
 * numpy.fft.fft2 in test/reference/fft.test.ts), on random even arrays and on the circulant bases
 * of rotated, anisotropic and summed priors.
 */
import { describe, expect, it } from 'vitest';
import { circulantBase, evenRealSpectrum } from '../../../src/core/fft/embedding.ts';
import { Fft2 } from '../../../src/core/fft/fft2.ts';
import type { Term } from '../../../src/core/kernels/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import { forceWasmOffForTesting } from '../../../src/core/wasm/runtime.ts';
import { fftEngine } from '../../../src/core/fft/transform.ts';

/** A random real array with a(−j) = a(j) (indices mod p, both axes at once). */
function randomEven(px: number, py: number, seed: number): Float64Array {
  const r = new Random(seed);
  const a = new Float64Array(px * py);
  for (let jy = 0; jy < py; jy++) {
    for (let jx = 0; jx < px; jx++) {
      const m = (jx === 0 ? 0 : px - jx) + px * (jy === 0 ? 0 : py - jy);
      const k = jx + px * jy;
      if (m >= k) a[k] = a[m] = r.nextNormal();
    }
  }
  return a;
}

function fullSpectrum(a: Float64Array, px: number, py: number): { re: Float64Array; maxIm: number } {
  const buf = new Float64Array(2 * px * py);
  for (let i = 0; i < a.length; i++) buf[2 * i] = a[i];
  new Fft2(px, py).transform(buf);
  const re = new Float64Array(px * py);
  let maxIm = 0;
  for (let i = 0; i < re.length; i++) {
    re[i] = buf[2 * i];
    maxIm = Math.max(maxIm, Math.abs(buf[2 * i + 1]));
  }
  return { re, maxIm };
}

function maxAbs(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]));
  return m;
}

describe('evenRealSpectrum', () => {
  const shapes: [number, number][] = [
    [1, 1],
    [2, 1],
    [1, 2],
    [4, 1],
    [1, 8],
    [2, 2],
    [8, 2],
    [2, 16],
    [16, 32],
    [64, 8],
    [128, 128],
  ];
  it.each(shapes)('equals the complex 2-D transform on a random even %i × %i array (1e-13 of max |λ|)', (px, py) => {
    const a = randomEven(px, py, 7 * px + py);
    const { re, maxIm } = fullSpectrum(a, px, py);
    const got = evenRealSpectrum(a, px, py);
    const scale = maxAbs(re);
    // The input really is even: the full transform is real (a check that the test input is valid).
    expect(maxIm).toBeLessThan(1e-12 * Math.max(1, scale));
    let worst = 0;
    for (let i = 0; i < re.length; i++) worst = Math.max(worst, Math.abs(got[i] - re[i]));
    expect(worst).toBeLessThanOrEqual(1e-13 * Math.max(1, scale));
  });

  const priors: { name: string; terms: Term[] }[] = [
    { name: 'rotated anisotropic Gaussian', terms: [{ kernel: 'gaussian', variance: 2, lengths: [9, 3], angle: 30 }] },
    {
      name: 'Matérn 2.5 + exponential',
      terms: [
        { kernel: 'matern', nu: 2.5, variance: 1, length: 5 },
        { kernel: 'exponential', variance: 0.5, lengths: [2, 6], angle: -50 },
      ],
    },
  ];
  it.each(priors)('equals the complex transform on the circulant base of a $name prior', ({ terms }) => {
    const grid = { shape: [20, 12] as [number, number], spacing: [1, 1.5] as [number, number] };
    for (const [px, py] of [
      [64, 32],
      [32, 32],
      [64, 64],
    ] as const) {
      const base = circulantBase(grid, terms, px, py);
      const { re } = fullSpectrum(base, px, py);
      const got = evenRealSpectrum(base, px, py);
      const scale = maxAbs(re);
      let worst = 0;
      for (let i = 0; i < re.length; i++) worst = Math.max(worst, Math.abs(got[i] - re[i]));
      expect(worst).toBeLessThanOrEqual(1e-13 * scale);
    }
  });

  it('the WebAssembly engine (used here) and the JavaScript fallback give the same bits', () => {
    expect(fftEngine().implementation).toBe('webassembly'); // Node 20 has WebAssembly SIMD
    const a = randomEven(64, 32, 3);
    const fast = evenRealSpectrum(a, 64, 32);
    forceWasmOffForTesting(true);
    try {
      expect(fftEngine().implementation).toBe('javascript');
      const slow = evenRealSpectrum(a, 64, 32);
      expect(Array.from(slow)).toEqual(Array.from(fast));
    } finally {
      forceWasmOffForTesting(false);
    }
  });
});
