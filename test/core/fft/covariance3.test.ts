/**
 * The FFT route on 3-D grids: covariance products by circulant embedding equal the dense product (the dense
 * 3-D route, itself checked against scipy in test/reference/dense3d.test.ts) to 1e-10, and the 3-D transform
 * equals the DFT's definition.
 */
import { describe, expect, it } from 'vitest';
import { covarianceOperator, nonStationaryReason } from '../../../src/core/fft/covariance.ts';
import { fft3, fft3Block } from '../../../src/core/fft/fft3.ts';
import { circulantBase3, evenRealSpectrum3, stationaryCovariance3 } from '../../../src/core/fft/embedding.ts';
import { matrix } from '../../../src/core/linalg/matrix.ts';
import { COVARIANCE_CASES_3D, relErr, seededVector } from './cases.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import type { Term } from '../../../src/core/kernels/spec.ts';

/** X(k) = Σ_j x(j) e^(∓2πi Σ_a k_a j_a / p_a), straight from the definition (numpy.fft.fftn's convention). */
function directDft3(x: Float64Array, p: readonly [number, number, number], inverse: boolean): Float64Array {
  const [px, py, pz] = p;
  const n = px * py * pz;
  const out = new Float64Array(2 * n);
  const sign = inverse ? 1 : -1;
  for (let k = 0; k < n; k++) {
    const kx = k % px;
    const ky = Math.floor(k / px) % py;
    const kz = Math.floor(k / (px * py));
    let re = 0;
    let im = 0;
    for (let j = 0; j < n; j++) {
      const jx = j % px;
      const jy = Math.floor(j / px) % py;
      const jz = Math.floor(j / (px * py));
      const a = sign * 2 * Math.PI * ((kx * jx) / px + (ky * jy) / py + (kz * jz) / pz);
      const c = Math.cos(a);
      const s = Math.sin(a);
      re += x[2 * j] * c - x[2 * j + 1] * s;
      im += x[2 * j] * s + x[2 * j + 1] * c;
    }
    out[2 * k] = inverse ? re / n : re;
    out[2 * k + 1] = inverse ? im / n : im;
  }
  return out;
}

describe('fft3', () => {
  for (const p of [
    [8, 4, 2],
    [2, 8, 4],
    [4, 1, 8],
  ] as const) {
    it(`${p.join(' × ')} forward and inverse equal the DFT's definition`, () => {
      const x = seededVector(2 * p[0] * p[1] * p[2], p[0] + 10 * p[1]);
      expect(relErr(fft3(x, p[0], p[1], p[2]), directDft3(x, p, false))).toBeLessThan(1e-13);
      expect(relErr(fft3(x, p[0], p[1], p[2], true), directDft3(x, p, true))).toBeLessThan(1e-13);
    });
  }
});

describe('3-D covariance products by circulant embedding', () => {
  for (const c of COVARIANCE_CASES_3D) {
    it(`${c.name}: Cm·x and Cm·X equal the dense product to 1e-10`, () => {
      const fft = covarianceOperator(c.grid, c.prior);
      const dense = covarianceOperator(c.grid, c.prior, { path: 'dense' });
      expect(fft.path).toBe('fft');
      expect(fft.padding).toHaveLength(3);
      const n = fft.size;
      const x = seededVector(n, 5);
      expect(relErr(fft.apply(x), dense.apply(x))).toBeLessThan(1e-10);
      const rows = 3; // odd: the last product runs alone
      const xs = matrix(rows, n);
      xs.data.set(seededVector(rows * n, 9));
      expect(relErr(fft.applyMany(xs).data, dense.applyMany(xs).data)).toBeLessThan(1e-10);
      expect(relErr(fft.diagonal(), dense.diagonal())).toBeLessThan(1e-12);
    });
  }

  it('a unit vector gives a column of the dense Cm (a single cell, not only a norm)', () => {
    const c = COVARIANCE_CASES_3D[4];
    const n = 240;
    const e = new Float64Array(n);
    e[8 * 6 * 2 + 8 * 3 + 5] = 1;
    const a = covarianceOperator(c.grid, c.prior).apply(e);
    const b = covarianceOperator(c.grid, c.prior, { path: 'dense' }).apply(e);
    for (let i = 0; i < n; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(1e-12);
  });

  it('the eigenvalues of a 3-D embedding (half-size real transform) equal the real part of its full complex transform', () => {
    for (const c of [COVARIANCE_CASES_3D[4]!, COVARIANCE_CASES_3D[5]!]) {
      for (const p of [
        [16, 16, 16],
        [32, 8, 16],
        [2, 16, 8],
      ] as const) {
        const base = circulantBase3(c.grid, c.prior.terms, p[0], p[1], p[2]);
        const z = new Float64Array(2 * base.length);
        for (let i = 0; i < base.length; i++) z[2 * i] = base[i]!;
        const full = fft3(z, p[0], p[1], p[2]);
        const want = Float64Array.from({ length: base.length }, (_, i) => full[2 * i]!);
        expect(relErr(evenRealSpectrum3(base, p[0], p[1], p[2]), want)).toBeLessThan(1e-13);
      }
    }
  });

  it('3-D grids take the FFT route (posterior, realisations, the eigenvalue bracket); 4 axes do not', () => {
    expect(nonStationaryReason(COVARIANCE_CASES_3D[0].grid, COVARIANCE_CASES_3D[0].prior)).toBeNull();
    expect(nonStationaryReason({ shape: [2, 2, 2, 2], spacing: [1, 1, 1, 1] }, COVARIANCE_CASES_3D[0].prior)).toMatch(/4 axes/);
  });
});

describe('the mirrored 3-D base (terms even in each offset component)', () => {
  // The fast path evaluates an eighth of the lags and mirrors them; the general loop (forced here by passing the
  // same covariance as an offset function) evaluates them all. They must agree bit for bit, Nyquist lags included.
  const grid: Grid = { shape: [7, 5, 4], spacing: [1, 0.7, 1.3] };
  const cases: [string, Term[], number, number, number][] = [
    ['isotropic Matérn 3/2, even embedding', [{ kernel: 'matern', nu: 1.5, variance: 1.3, length: 2 }], 12, 8, 6],
    [
      'axis-aligned anisotropic Gaussian + exponential, odd sizes',
      [
        { kernel: 'gaussian', variance: 1, lengths: [3, 1.5, 0.8], angles: [0, 0, 0] },
        { kernel: 'exponential', variance: 0.2, length: 1 },
      ],
      13,
      9,
      7,
    ],
  ];
  it.each(cases)('%s', (_name, terms, px, py, pz) => {
    const cov = stationaryCovariance3(terms);
    const fast = circulantBase3(grid, terms, px, py, pz);
    const general = circulantBase3(grid, (a, b, c) => cov(a, b, c), px, py, pz);
    expect(Array.from(fast)).toEqual(Array.from(general));
  });
});

describe('fft3Block: the leading block of the 3-D transform', () => {
  // Against the full transform (itself checked against numpy.fft.fftn above), on blocks that halve each axis
  // (the engine's halfOut) and blocks that do not (p = 2(n − 1) embeddings), to rounding.
  it.each([
    [8, 8, 4, 4, 4, 2],
    [8, 4, 8, 5, 3, 5],
    [16, 8, 4, 8, 4, 1],
    [4, 4, 4, 4, 4, 4],
  ])('%i × %i × %i, block %i × %i × %i', (px, py, pz, nx, ny, nz) => {
    const buf = seededVector(2 * px * py * pz, px + 7 * nz);
    const want = fft3(buf, px, py, pz);
    const got = fft3Block(buf, px, py, pz, nx, ny, nz).slice();
    let err = 0;
    let scale = 0;
    for (let z = 0; z < nz; z++)
      for (let y = 0; y < ny; y++)
        for (let x = 0; x < nx; x++) {
          const k = 2 * (x + px * (y + py * z));
          err = Math.max(err, Math.abs(got[k] - want[k]), Math.abs(got[k + 1] - want[k + 1]));
          scale = Math.max(scale, Math.abs(want[k]));
        }
    expect(err / scale).toBeLessThan(1e-13);
    expect(scale).toBeGreaterThan(0);
  });
});
