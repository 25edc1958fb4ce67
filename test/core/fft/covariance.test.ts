/**
 * covarianceOperator (FFT path) against the dense Cm of prior/covariance.ts (lag-table assembly
 * written independently by the prior module) on every case of the shared table; numpy is the
 * outside check in test/reference/fft.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { CirculantProduct, covarianceOperator, isStationaryOnGrid, nonStationaryReason } from '../../../src/core/fft/covariance.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { forceWasmOffForTesting } from '../../../src/core/wasm/runtime.ts';
import { cellCount, type Grid } from '../../../src/core/grid/grid.ts';
import { diagonal, matvec } from '../../../src/core/linalg/matrix.ts';
import { covarianceMatrix } from '../../../src/core/prior/covariance.ts';
import { COVARIANCE_CASES, relErr, seededVector } from './cases.ts';

describe('FFT-path Cm·x equals dense Cm·x to 1e-10 relative', () => {
  for (const { name, grid, prior } of COVARIANCE_CASES) {
    it(name, () => {
      const n = cellCount(grid);
      const cm = covarianceMatrix(grid, prior);
      const op = covarianceOperator(grid, prior);
      expect(op.path).toBe('fft');
      expect(isStationaryOnGrid(grid, prior)).toBe(true);
      for (const seed of [1, 2]) {
        const x = seededVector(n, seed);
        expect(relErr(op.apply(x), matvec(cm, x))).toBeLessThan(1e-10);
      }
      // A unit vector picks one column: exact column of Cm (the far-corner cell exercises every lag).
      const e = new Float64Array(n);
      e[n - 1] = 1;
      expect(relErr(op.apply(e), matvec(cm, e))).toBeLessThan(1e-10);
      expect(relErr(op.diagonal(), diagonal(cm))).toBeLessThan(1e-14);
    });
  }
});

describe('padding and path', () => {
  it('reports power-of-two padding ≥ 2n − 1 per axis', () => {
    const grid: Grid = { shape: [9, 7], spacing: [1, 1] };
    const op = covarianceOperator(grid, COVARIANCE_CASES[6].prior);
    expect(op.padding).toEqual([32, 16]);
    expect(covarianceOperator({ shape: [64], spacing: [1] }, COVARIANCE_CASES[0].prior).padding).toEqual([128]);
  });

  it('the dense path can be requested and agrees with the FFT path', () => {
    const { grid, prior } = COVARIANCE_CASES[12];
    const dense = covarianceOperator(grid, prior, { path: 'dense' });
    expect(dense.path).toBe('dense');
    expect(dense.reason).toMatch(/requested/);
    const x = seededVector(cellCount(grid), 5);
    expect(relErr(covarianceOperator(grid, prior).apply(x), dense.apply(x))).toBeLessThan(1e-10);
  });

  it('applyMany on an odd number of rows matches apply row by row', () => {
    const { grid, prior } = COVARIANCE_CASES[9];
    const n = cellCount(grid);
    const op = covarianceOperator(grid, prior);
    const data = seededVector(3 * n, 8);
    const out = op.applyMany({ rows: 3, cols: n, data });
    for (let r = 0; r < 3; r++)
      expect(relErr(out.data.subarray(r * n, (r + 1) * n), op.apply(data.subarray(r * n, (r + 1) * n)))).toBeLessThan(1e-13);
  });

  it('a 4-axis grid is not FFT-able and the reason says why; 3 axes are', () => {
    expect(nonStationaryReason({ shape: [2, 2, 2, 2], spacing: [1, 1, 1, 1] }, COVARIANCE_CASES[0].prior)).toMatch(/4 axes/);
    expect(nonStationaryReason({ shape: [2, 2, 2], spacing: [1, 1, 1] }, COVARIANCE_CASES[0].prior)).toBeNull();
  });

  it('names the field for a vector of the wrong length', () => {
    const { grid, prior } = COVARIANCE_CASES[0];
    expect(() => covarianceOperator(grid, prior).apply(new Float64Array(5))).toThrow(/x must be a vector of length 23/);
  });
});

describe("CirculantProduct: the JavaScript engine gives the WebAssembly engine's bits", () => {
  // Odd sizes leave zero rows between ny and py/2 and columns between nx and px/2; 64 × 64 is the
  // benchmark shape (no gap); 1 × n, n × 1 and 2 × 2 take the copy and radix-2 paths. Each pair of
  // vectors has all-zero grid rows (runs of data rows).
  const shapes: [number, number][] = [
    [9, 7],
    [16, 5],
    [3, 12],
    [64, 64],
    [1, 9],
    [9, 1],
    [2, 2],
  ];
  const prior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1.3, lengths: [3, 1.5], angle: 25 }] };
  for (const [nx, ny] of shapes) {
    it(`${nx} × ${ny}: products and saved spectra equal bit for bit, fallback when SIMD is off`, () => {
      const grid: Grid = { shape: [nx, ny], spacing: [1, 0.8] };
      const n = nx * ny;
      const wasm = new CirculantProduct(grid, prior);
      forceWasmOffForTesting(true);
      let js: CirculantProduct;
      try {
        js = new CirculantProduct(grid, prior);
      } finally {
        forceWasmOffForTesting(false);
      }
      expect(wasm.implementation).toBe('webassembly');
      expect(js.implementation).toBe('javascript');
      const a = seededVector(n, 5 + nx);
      const b = seededVector(n, 6 + ny);
      if (ny > 2) {
        a.fill(0, 0, nx); // grid row 0 zero in a only
        a.fill(0, nx * (ny - 1));
        b.fill(0, nx * (ny - 1)); // last grid row zero in both
      }
      const out = (cp: CirculantProduct, spec: Float64Array, cached: boolean) => {
        const oa = new Float64Array(n);
        const ob = new Float64Array(n);
        if (cached) cp.fromColumnSpectrum(spec, oa, ob);
        else cp.fromSpectrum(spec, oa, ob);
        return [oa, ob] as const;
      };
      const specW = wasm.spectrum(a, b, new Float64Array(wasm.spectrumLength));
      const specJ = js.spectrum(a, b, new Float64Array(js.spectrumLength));
      expect(Array.from(specJ)).toEqual(Array.from(specW));
      const saveW = new Float64Array(wasm.columnSpectrumLength);
      const saveJ = new Float64Array(js.columnSpectrumLength);
      const ow = new Float64Array(n);
      const owb = new Float64Array(n);
      wasm.fromSpectrum(specW, ow, owb, 0, 0, saveW);
      const [oj, ojb] = out(js, specJ, false);
      js.fromSpectrum(specJ, new Float64Array(n), null, 0, 0, saveJ);
      expect(Array.from(oj)).toEqual(Array.from(ow));
      expect(Array.from(ojb)).toEqual(Array.from(owb));
      expect(Array.from(saveJ)).toEqual(Array.from(saveW));
      // The saved spectrum reproduces the product bit for bit on either engine.
      for (const cp of [wasm, js]) {
        const [again, againB] = out(cp, saveW, true);
        expect(Array.from(again)).toEqual(Array.from(ow));
        expect(Array.from(againB)).toEqual(Array.from(owb));
      }
      // The check can fail: a different prior gives a different product.
      const other = new CirculantProduct(grid, { ...prior, terms: [{ kernel: 'matern', nu: 1.5, variance: 1.3, length: 2 }] });
      const [ox] = out(other, saveW, true);
      expect(relErr(ox, oj)).toBeGreaterThan(1e-6);
    });
  }
});
