/**
 * src/core/fft against Debian's numpy (test/reference/fft_reference.py, run with /usr/bin/python3):
 * transforms against numpy.fft.fft2/ifft2, circulant-embedding products against Cm @ x with Cm
 * built in Python from the kernel formulas (Matérn via scipy.special.kv, Rasmussen & Williams 2006
 * eq. 4.14), embedding eigenvalues against numpy.linalg.eigvalsh of the explicit BCCB matrix.
 */
import { describe, expect, it } from 'vitest';
import { Fft2 } from '../../src/core/fft/fft2.ts';
import { covarianceOperator } from '../../src/core/fft/covariance.ts';
import { circulantEmbedding } from '../../src/core/fft/embedding.ts';
import { nonNegativeEmbedding } from '../../src/core/fft/realisations.ts';
import type { Grid } from '../../src/core/grid/grid.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import { runPython } from './python.ts';
import { fftBatch, fftEngine } from '../../src/core/fft/transform.ts';
import { CirculantProduct } from '../../src/core/fft/covariance.ts';
import { COVARIANCE_CASES, relErr, seededVector } from '../core/fft/cases.ts';

describe('Fft2 vs numpy.fft.fft2 / ifft2 (Debian python3-numpy)', () => {
  const sizes: [number, number][] = [
    [2, 1],
    [1, 16],
    [2, 2],
    [8, 4],
    [4, 32],
    [64, 32],
    [256, 128],
  ];
  const inputs = sizes.flatMap(([px, py], k) =>
    [false, true].map((inverse) => ({ px, py, inverse, buf: seededVector(2 * px * py, 10 + k) })),
  );
  const ref = runPython<{ results: { re: number[]; im: number[] }[] }>('fft_reference.py', {
    cases: inputs.map(({ px, py, inverse, buf }) => ({
      op: 'fft2',
      px,
      py,
      inverse,
      re: Array.from(buf.filter((_, i) => i % 2 === 0)),
      im: Array.from(buf.filter((_, i) => i % 2 === 1)),
    })),
  }).results;
  inputs.forEach(({ px, py, inverse, buf }, k) => {
    it(`${px} × ${py} ${inverse ? 'inverse' : 'forward'}: 1e-12 relative to the norm`, () => {
      const ours = buf.slice();
      new Fft2(px, py).transform(ours, { inverse });
      const want = new Float64Array(2 * px * py);
      ref[k].re.forEach((v, i) => (want[2 * i] = v));
      ref[k].im.forEach((v, i) => (want[2 * i + 1] = v));
      expect(relErr(ours, want)).toBeLessThan(1e-12);
    });
  });
});

/**
 * The FFT engine (WebAssembly SIMD kernel src/core/wasm/wat/fft.wat; its JavaScript twin
 * src/core/fft/stockham.ts gives the same bits, test/core/fft/stockham.test.ts) against
 * numpy.fft.fft / ifft. Allowance
 * for ‖ours − numpy‖₂ / ‖numpy‖₂: twice the bound of Higham 2002, Accuracy and Stability of
 * Numerical Algorithms, Thm 24.2 (memory) — log2(n) η / (1 − log2(n) η), η = μ + γ₄(√2 + μ),
 * μ = 4u our twiddle error (a judgement: one rounding in the argument and one in cos/sin) — once
 * for each side (numpy's pocketfft satisfies a bound of the same form), radix-4 stages counted as
 * two radix-2 stages (conservative).
 */
function higham(n: number): number {
  const u = 2 ** -53;
  const g4 = (4 * u) / (1 - 4 * u);
  const eta = 4 * u + g4 * (Math.SQRT2 + 4 * u);
  const lg = Math.max(1, Math.log2(n));
  return (2 * lg * eta) / (1 - lg * eta);
}

describe('FFT engine vs numpy.fft.fft / ifft (Debian python3-numpy)', () => {
  const sizes = [1, 2, 4, 8, 16, 32, 64, 128, 256, 512, 1024, 2048, 4096];
  const inputs = sizes.flatMap((n, k) =>
    [false, true].map((inverse) => {
      const count = n <= 64 ? 5 : 2;
      return { n, count, inverse, buf: seededVector(2 * n * count, 200 + 2 * k + (inverse ? 1 : 0)) };
    }),
  );
  const ref = runPython<{ results: { re: number[]; im: number[] }[] }>('fft_reference.py', {
    cases: inputs.map(({ n, count, inverse, buf }) => ({
      op: 'fft1',
      n,
      count,
      inverse,
      re: Array.from(buf.filter((_, i) => i % 2 === 0)),
      im: Array.from(buf.filter((_, i) => i % 2 === 1)),
    })),
  }).results;
  it('runs the WebAssembly kernel here (not the fallback)', () => expect(fftEngine().implementation).toBe('webassembly'));
  inputs.forEach(({ n, count, inverse, buf }, k) => {
    it(`n = ${n} ${inverse ? 'inverse' : 'forward'}, batch of ${count}: each row within 2× Higham's bound (${higham(n).toExponential(1)})`, () => {
      const ours = fftBatch(buf, n, count, inverse);
      for (let b = 0; b < count; b++) {
        const want = new Float64Array(2 * n);
        for (let i = 0; i < n; i++) {
          want[2 * i] = ref[k].re[b * n + i];
          want[2 * i + 1] = ref[k].im[b * n + i];
        }
        expect(relErr(ours.subarray(2 * n * b, 2 * n * (b + 1)), want)).toBeLessThan(higham(n));
      }
    });
  });
});

describe('covarianceOperator (FFT path) vs Cm @ x from numpy / scipy.special.kv', () => {
  const ref = runPython<{ results: number[][][] }>('fft_reference.py', {
    cases: COVARIANCE_CASES.map(({ grid, prior }, k) => ({
      op: 'cov_apply',
      grid,
      prior,
      x: [0, 1, 2].map((r) => Array.from(seededVector(cellCountOf(grid), 100 * k + r))),
    })),
  }).results;
  it('every case runs the WebAssembly engine (so it is what is checked)', () => {
    for (const { grid, prior } of COVARIANCE_CASES) expect(new CirculantProduct(grid, prior).implementation).toBe('webassembly');
  });
  COVARIANCE_CASES.forEach(({ name, grid, prior }, k) => {
    it(`${name}: apply and applyMany within 1e-10 relative`, () => {
      const op = covarianceOperator(grid, prior);
      expect(op.path).toBe('fft');
      const n = cellCountOf(grid);
      const xs = [0, 1, 2].map((r) => seededVector(n, 100 * k + r));
      xs.forEach((x, r) => expect(relErr(op.apply(x), ref[k][r])).toBeLessThan(1e-10));
      const many = new Float64Array(3 * n);
      xs.forEach((x, r) => many.set(x, r * n));
      const out = op.applyMany({ rows: 3, cols: n, data: many });
      xs.forEach((_, r) => expect(relErr(out.data.subarray(r * n, (r + 1) * n), ref[k][r])).toBeLessThan(1e-10));
    });
  });
});

describe('embedding eigenvalues vs numpy.linalg.eigvalsh of the explicit block-circulant matrix', () => {
  const cases: { grid: Grid; prior: PriorSpec; px: number; py: number }[] = [
    { grid: { shape: [9], spacing: [0.5] }, prior: p([{ kernel: 'exponential', variance: 2, length: 1.5 }]), px: 16, py: 1 },
    {
      grid: { shape: [6, 5], spacing: [1, 0.7] },
      prior: p([{ kernel: 'gaussian', variance: 1, lengths: [3, 1], angle: 35 }]),
      px: 16,
      py: 16,
    },
    { grid: { shape: [5, 7], spacing: [1, 1] }, prior: p([{ kernel: 'matern', nu: 1.5, variance: 1, length: 4 }]), px: 8, py: 16 },
  ];
  const ref = runPython<{ results: number[][] }>('fft_reference.py', {
    cases: cases.map(({ grid, prior, px, py }) => ({
      op: 'bccb_eigs',
      px,
      py,
      base: Array.from(circulantEmbedding(grid, prior.terms, px, py).base),
    })),
  }).results;
  cases.forEach(({ grid, prior, px, py }, k) => {
    it(`${grid.shape.join('×')} in ${px}×${py}: sorted λ equal to 1e-10 of max |λ|`, () => {
      const e = circulantEmbedding(grid, prior.terms, px, py);
      const ours = Array.from(e.eigenvalues).sort((a, b) => a - b);
      const want = ref[k];
      const scale = Math.max(...want.map(Math.abs));
      ours.forEach((v, i) => expect(Math.abs(v - want[i])).toBeLessThan(1e-10 * scale));
      expect(e.minEigenvalue).toBeCloseTo(want[0], 10);
    });
  });
});

function p(terms: PriorSpec['terms']): PriorSpec {
  return { mean: { constant: 0 }, terms };
}

function cellCountOf(g: Grid): number {
  return g.shape.reduce((a, b) => a * b, 1);
}

describe('padding growth decisions vs numpy.linalg.eigvalsh of the explicit circulant (1-D gaussian, n = 32)', () => {
  const grid: Grid = { shape: [32], spacing: [1] };
  const lengths = [6, 12];
  const searches = lengths.map((length) => nonNegativeEmbedding(grid, [{ kernel: 'gaussian', variance: 1, length }]));
  const cases = searches.flatMap((s, k) =>
    s.tried.map(([px]) => ({
      k,
      px,
      base: Array.from(circulantEmbedding(grid, [{ kernel: 'gaussian', variance: 1, length: lengths[k] }], px, 1).base),
    })),
  );
  const ref = runPython<{ results: number[][] }>('fft_reference.py', {
    cases: cases.map(({ px, base }) => ({ op: 'bccb_eigs', px, py: 1, base })),
  }).results;
  lengths.forEach((length, k) => {
    it(`length ${length}: every rejected size has min λ < −1e-10·max λ in numpy, the chosen one does not`, () => {
      const tried = searches[k].tried;
      expect(tried.length).toBeGreaterThan(1);
      cases.forEach((c, q) => {
        if (c.k !== k) return;
        const eig = ref[q];
        const ok = eig[0] >= -1e-10 * eig[eig.length - 1];
        expect(ok).toBe(c.px === searches[k].embedding.px);
      });
    });
  });
});
