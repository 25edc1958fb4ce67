/**
 * VTK XML image data (src/core/io/vti.ts) read back by Python's xml.etree and numpy (test/reference/vti_reference.py,
 * no VTK code of ours or theirs): extent in points, origin at the first cell's corner, cell data x fastest.
 */
import { describe, expect, it } from 'vitest';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { writeVti } from '../../../src/core/io/vti.ts';
import { runPython } from '../../reference/python.ts';

type Read = { extent: number[]; origin: number[]; spacing: number[]; fields: Record<string, number[][][]> };

describe('writeVti', () => {
  it('a 3-D grid: extent, corner origin, spacing and x-fastest cell data as an XML reader sees them', () => {
    const grid: Grid = { shape: [4, 3, 2], spacing: [10, 20, 5], origin: [5, 10, -2.5] };
    const f = Float64Array.from({ length: 24 }, (_, i) => (i % 4) + 10 * (Math.floor(i / 4) % 3) + 100 * Math.floor(i / 12) + 1 / 3);
    const text = writeVti(grid, [
      { name: 'posterior mean', values: f },
      { name: 'std <m/s>', values: f.map((v) => -v * 1e-300) },
    ]);
    const r = runPython<Read>('vti_reference.py', { text });
    expect(r.extent).toEqual([0, 4, 0, 3, 0, 2]);
    expect(r.origin).toEqual([0, 0, -5]);
    expect(r.spacing).toEqual([10, 20, 5]);
    for (let iz = 0; iz < 2; iz++)
      for (let iy = 0; iy < 3; iy++)
        for (let ix = 0; ix < 4; ix++) {
          expect(r.fields['posterior mean']![iz]![iy]![ix]).toBe(ix + 10 * iy + 100 * iz + 1 / 3);
          expect(r.fields['std <m/s>']![iz]![iy]![ix]).toBe(-(ix + 10 * iy + 100 * iz + 1 / 3) * 1e-300);
        }
  });

  it('a 2-D grid is an image one cell thick; wrong lengths and non-finite values are refused by name', () => {
    const grid: Grid = { shape: [3, 2], spacing: [1, 2] };
    const r = runPython<Read>('vti_reference.py', { text: writeVti(grid, [{ name: 'm', values: [1, 2, 3, 4, 5, 6] }]) });
    expect(r.extent).toEqual([0, 3, 0, 2, 0, 1]);
    expect(r.fields.m).toEqual([
      [
        [1, 2, 3],
        [4, 5, 6],
      ],
    ]);
    expect(() => writeVti(grid, [{ name: 'm', values: [1, 2, 3] }])).toThrow(/field m has 3 values for 6 cells/);
    expect(() => writeVti(grid, [{ name: 'm', values: [1, 2, 3, 4, 5, Number.NaN] }])).toThrow(/cell 5 is NaN/);
  });
});
