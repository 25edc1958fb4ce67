import { describe, expect, it } from 'vitest';
import { cellCoordinates, cellCount, gridDimension, validateGrid, type Grid } from '../../../src/core/grid/grid.ts';
import { InputError } from '../../../src/core/errors.ts';

describe('grid', () => {
  it('flat index i = ix + nx·iy, coordinates origin + spacing·index', () => {
    const g: Grid = { shape: [3, 2], spacing: [0.5, 2], origin: [10, -1] };
    const { x, y } = cellCoordinates(g);
    expect(Array.from(x)).toEqual([10, 10.5, 11, 10, 10.5, 11]);
    expect(Array.from(y)).toEqual([-1, -1, -1, 1, 1, 1]);
    expect([cellCount(g), gridDimension(g), gridDimension({ shape: [4], spacing: [1] })]).toEqual([6, 2, 1]);
  });
  it.each([
    [{ shape: [], spacing: [] }, 'grid.shape'],
    [{ shape: [2, 0], spacing: [1, 1] }, 'grid.shape[1]'],
    [{ shape: [2], spacing: [1, 1] }, 'grid.spacing'],
    [{ shape: [2], spacing: [-1] }, 'grid.spacing[0]'],
    [{ shape: [2], spacing: [1], origin: [NaN] }, 'grid.origin[0]'],
  ] as [Grid, string][])('rejects %j at %s', (g, field) => {
    expect(() => validateGrid(g)).toThrow(InputError);
    try {
      validateGrid(g);
    } catch (e) {
      expect((e as InputError).field).toBe(field);
    }
  });
});
