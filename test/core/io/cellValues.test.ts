import { describe, expect, it } from 'vitest';
import { parseCellValues } from '../../../src/core/io/cellValues.ts';
import { writeNpy } from '../../../src/core/io/npy.ts';
import { withCellValues } from '../../../src/app/prior/PerCellFields.tsx';
import { expectFileError } from './expectError.ts';
import { runPython } from '../../reference/python.ts';

const enc = (s: string) => new TextEncoder().encode(s);
const grid2 = { shape: [3, 2], spacing: [1, 1] };

describe('per-cell values for the mean and the std profile', () => {
  it('reads a one-column CSV (header allowed) and .npy of shape (N,) or (ny, nx) in the grid order', () => {
    expect(Array.from(parseCellValues('m.csv', enc('mean\n1\n2\n3\n4\n5\n6\n'), grid2, 'mean'))).toEqual([1, 2, 3, 4, 5, 6]);
    const flat = Float64Array.from([1, 2, 3, 4, 5, 6]);
    expect(Array.from(parseCellValues('m.npy', writeNpy([6], flat), grid2, 'mean'))).toEqual([1, 2, 3, 4, 5, 6]);
    // (ny, nx) = (2, 3) in C order: row iy holds cells ix = 0, 1, 2, so index ix + 3·iy is the flat order.
    expect(Array.from(parseCellValues('m.npy', writeNpy([2, 3], flat), grid2, 'mean'))).toEqual([1, 2, 3, 4, 5, 6]);
  });

  it.each([
    ['a wrong count', 'm.csv', enc('1\n2\n3\n'), 'mean', 'm.csv: must have 6 rows of values (one per grid cell, 3 × 2, x fastest), got 3'],
    ['two columns', 'm.csv', enc('1.5,2\n3,4\n'), 'mean', 'm.csv: must have 1 column (one value per grid cell), got 2'],
    ['a zero std', 's.csv', enc('1\n2\n0\n4\n5\n6\n'), 'std', 's.csv: line 3 must be a standard deviation from 1e-50 to 1e+50, got 0'],
    [
      'a transposed grid',
      's.npy',
      writeNpy([3, 2], Float64Array.from([1, 2, 3, 4, 5, 6])),
      'std',
      's.npy: must hold shape (6,) or (2, 3) (rows along y): one value per grid cell, got shape (3, 2)',
    ],
    [
      'another file type',
      's.json',
      enc('[1]'),
      'std',
      's.json: cannot be read as per-cell values: the name must end in .csv, .txt or .npy',
    ],
  ] as const)('refuses %s, naming the file and where', (_what, name, bytes, kind, message) => {
    expectFileError(() => parseCellValues(name, bytes, grid2, kind), message);
  });

  it('sets the explicit mean or the std profile on the prior, and removes the profile', () => {
    const prior = { mean: { constant: 1 }, terms: [{ kernel: 'exponential' as const, variance: 1, length: 2 }] };
    expect(withCellValues(prior, 'mean', Float64Array.from([1, 2])).mean).toEqual({ values: [1, 2] });
    const p = withCellValues(prior, 'std', Float64Array.from([0.5, 2]));
    expect(p.stdProfile).toEqual([0.5, 2]);
    expect(withCellValues(p, 'std', null)).toEqual(prior);
  });
});

describe('3-D per-cell values from .npy in either memory order', () => {
  it('numpy-written (nz, ny, nx) arrays in C and Fortran order both read as x fastest; a wrong shape names both accepted shapes', () => {
    const [nx, ny, nz] = [4, 3, 2];
    const grid = { shape: [nx, ny, nz], spacing: [1, 1, 1] };
    const files = runPython<{ c: string; f: string }>('npy3d_reference.py', { shape: [nx, ny, nz] });
    for (const order of ['c', 'f'] as const) {
      const v = parseCellValues(`m-${order}.npy`, new Uint8Array(Buffer.from(files[order], 'base64')), grid, 'mean');
      for (let i = 0; i < nx * ny * nz; i++) {
        const ix = i % nx;
        const iy = Math.floor(i / nx) % ny;
        const iz = Math.floor(i / (nx * ny));
        expect(v[i]).toBe(ix + 10 * iy + 100 * iz + 0.25);
      }
    }
    expect(() => parseCellValues('m.npy', writeNpy([nx, ny, nz], new Float64Array(24)), grid, 'mean')).toThrow(
      /must hold shape \(24,\) or \(2, 3, 4\) \(a\[iz, iy, ix\]\)/,
    );
  });
});
