/**
 * Files written by numpy (np.save in C and Fortran order, float64/float32, both byte orders;
 * np.savetxt with and without a header) read by src/core/io/pieces.ts to numpy's own numbers, and
 * the positive-definiteness verdict on covariances matching numpy.linalg.cholesky.
 */
import { describe, expect, it } from 'vitest';
import { parseCovarianceFile, parseDataCsv, parseDataNpy } from '../../src/core/io/pieces.ts';
import { FileFormatError } from '../../src/core/io/errors.ts';
import { runPython } from './python.ts';

interface Ref {
  npy: { bytes: string; values: number[]; sigma: number[] }[];
  csv: { text: string; values: number[]; sigma: number[] }[];
  pd: { text: string; pd: boolean; minEig: number }[];
}

const ref = runPython<Ref>('pieces_reference.py', { seed: 5 });

describe('data and covariance files written by numpy', () => {
  it('reads np.save (M, 2) arrays in every order and dtype exactly', () => {
    for (const c of ref.npy) {
      const d = parseDataNpy('d.npy', Uint8Array.from(Buffer.from(c.bytes, 'base64')));
      expect(Array.from(d.values)).toEqual(c.values);
      expect(Array.from(d.sigma!)).toEqual(c.sigma);
    }
  });
  it('reads np.savetxt CSV with and without a header exactly (savetxt writes %.18e, which round-trips)', () => {
    for (const c of ref.csv) {
      const d = parseDataCsv('d.csv', c.text);
      expect(Array.from(d.values)).toEqual(c.values);
      expect(Array.from(d.sigma!)).toEqual(c.sigma);
    }
  });
  it('accepts exactly the covariances numpy.linalg.cholesky factorises', () => {
    let accepted = 0;
    for (const c of ref.pd) {
      // near the boundary the two Cholesky codes may disagree by round-off; such cases are skipped
      if (Math.abs(c.minEig) < 1e-9) continue;
      let ok = true;
      try {
        parseCovarianceFile({ name: 'C.csv', bytes: new TextEncoder().encode(c.text) }, 5);
      } catch (e) {
        expect(e).toBeInstanceOf(FileFormatError);
        ok = false;
      }
      expect(ok).toBe(c.pd);
      if (ok) accepted++;
    }
    expect(accepted).toBeGreaterThan(0);
    expect(accepted).toBeLessThan(ref.pd.length);
  });
});
