/**
 * The file formats against NumPy and SciPy (test/reference/cli_formats.py): files written by
 * numpy.save / numpy.lib.format.write_array (versions 1.0, 2.0, 3.0; float32, big endian, Fortran
 * order), scipy.io.mmwrite and numpy.savetxt are read by our parsers; files written by our writers
 * are read by numpy.load, scipy.io.mmread and numpy.loadtxt. Values must agree exactly.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseCsv, writeCsv } from '../../src/core/io/csv.ts';
import { parseMatrixMarket, writeMatrixMarket } from '../../src/core/io/matrixMarket.ts';
import { parseNpy, writeNpy, writeNpyMatrix } from '../../src/core/io/npy.ts';
import { matrix, toRows, type Matrix } from '../../src/core/linalg/matrix.ts';
import { denseToSparse } from '../../src/core/linalg/sparse.ts';
import { operatorToDense } from '../../src/core/linalg/operator.ts';
import { runPython } from './python.ts';
import { tempDir } from '../cli/run.ts';
import { randInt, rng } from '../core/io/random.ts';

function randomMatrix(seed: number, rows: number, cols: number): Matrix {
  const r = rng(seed);
  const m = matrix(rows, cols);
  // Zeros (for the sparse form), tiny and huge magnitudes, and awkward decimals.
  for (let k = 0; k < m.data.length; k++) m.data[k] = r() < 0.3 ? 0 : (r() - 0.5) * 10 ** (randInt(r, 60) - 30);
  m.data[0] = 0.1 + 0.2;
  return m;
}

describe('files written by numpy / scipy, read by src/core/io', () => {
  it('npy (1.0, 2.0, 3.0, float32, big endian, Fortran, 1-D), Matrix Market (coordinate, array, symmetric), CSV with header', () => {
    const dir = tempDir();
    const a = randomMatrix(1, 4, 5);
    const { files } = runPython<{ files: Record<string, number[][] | number[]> }>('cli_formats.py', {
      mode: 'write',
      dir,
      matrix: toRows(a),
    });
    expect(Object.keys(files).length).toBe(12);
    for (const [name, expected] of Object.entries(files)) {
      const bytes = new Uint8Array(readFileSync(join(dir, name)));
      let rows: number[][] | number[];
      if (name.endsWith('.npy')) {
        const arr = parseNpy(name, bytes);
        rows = arr.shape.length === 1 ? Array.from(arr.data) : toRows(matrix(arr.shape[0], arr.shape[1], arr.data));
      } else if (name.endsWith('.mtx')) {
        rows = toRows(operatorToDense(parseMatrixMarket(name, bytes)));
      } else {
        const t = parseCsv(name, bytes);
        expect(t.header).toEqual(['c0', 'c1', 'c2', 'c3', 'c4']);
        rows = toRows(t.matrix);
      }
      expect(rows, name).toEqual(expected);
    }
  });
});

describe('files written by src/core/io, read by numpy / scipy', () => {
  it('npy (2-D and 1-D), Matrix Market array and coordinate, CSV', () => {
    const dir = tempDir();
    const a = randomMatrix(2, 6, 3);
    const vec = Float64Array.from([1e-300, -2.5, 3e300]);
    const paths: Record<string, string> = {};
    const put = (name: string, content: string | Uint8Array) => {
      paths[name] = join(dir, name);
      writeFileSync(paths[name], content);
    };
    put('ours.npy', writeNpyMatrix(a));
    put('vec.npy', writeNpy([3], vec));
    put('dense.mtx', writeMatrixMarket({ kind: 'dense', matrix: a }, 'invented'));
    put('sparse.mtx', writeMatrixMarket({ kind: 'sparse', matrix: denseToSparse(a) }));
    put('plain.csv', writeCsv(a));
    const back = runPython<Record<string, { shape: number[]; dtype: string; values: number[][] | number[] }>>('cli_formats.py', {
      mode: 'read',
      files: paths,
    });
    for (const name of ['ours.npy', 'dense.mtx', 'sparse.mtx', 'plain.csv']) {
      expect(back[name].shape, name).toEqual([6, 3]);
      expect(back[name].values, name).toEqual(toRows(a));
    }
    expect(back['ours.npy'].dtype).toBe('float64');
    expect(back['vec.npy'].shape).toEqual([3]);
    expect(back['vec.npy'].values).toEqual(Array.from(vec));
  });
});
