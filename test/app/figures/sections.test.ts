/** Sections through a volume: the cuts against numpy slicing (test/reference/sections.py), geometry, aspect, titles. */
import { describe, expect, it } from 'vitest';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { matrix } from '../../../src/core/linalg/matrix.ts';
import {
  crossHairs,
  extractSection,
  geometryTraces,
  planeExtent,
  sectionLayout,
  sectionsThrough,
  sectionTitle,
  varianceReduction,
  volumeColour,
} from '../../../src/app/figures/sections.ts';
import { runPython } from '../../reference/python.ts';

const grid: Grid = { shape: [5, 4, 3], spacing: [2, 1, 0.5], origin: [10, 0, -1], unit: 'm', axes: ['east', 'north', 'depth'] };
const field = Float64Array.from({ length: 60 }, (_, i) => Math.sin(1.7 * i) + i / 100);

describe('volume sections', () => {
  it('equal numpy slices of the (nz, ny, nx) volume through every cell tried', () => {
    for (const cell of [
      [0, 0, 0],
      [4, 3, 2],
      [2, 1, 1],
      [3, 0, 2],
    ] as [number, number, number][]) {
      const ref = runPython<Record<'xy' | 'xz' | 'yz', number[][]>>('sections.py', { shape: grid.shape, field: Array.from(field), cell });
      const [xy, xz, yz] = sectionsThrough(grid, field, cell);
      expect(xy.z).toEqual(ref.xy);
      expect(xz.z).toEqual(ref.xz);
      expect(yz.z).toEqual(ref.yz);
    }
  });

  it('carry cell-centre coordinates, the fixed coordinate and a title with it', () => {
    const [xy, xz, yz] = sectionsThrough(grid, field, [1, 2, 2]);
    expect(xy.x).toEqual([10, 12, 14, 16, 18]);
    expect(xy.y).toEqual([0, 1, 2, 3]);
    expect(xz.y).toEqual([-1, -0.5, 0]);
    expect(yz.x).toEqual([0, 1, 2, 3]);
    expect(xy.fixedCoordinate).toBe(0);
    expect(xz.fixedCoordinate).toBe(2);
    expect(yz.fixedCoordinate).toBe(12);
    expect(sectionTitle(grid, xy)).toBe('east–north at depth = 0 m');
    expect(sectionTitle(grid, yz)).toBe('north–depth at east = 12 m');
  });

  it('refuses an index outside the grid or a field of the wrong length', () => {
    expect(() => extractSection(grid, field, 'xy', 3)).toThrow(/outside 0 … 2/);
    expect(() => extractSection(grid, field.subarray(1), 'xy', 0)).toThrow(/60 values/);
  });

  it('true aspect: extents from cell edges, the down axis anchored to the across axis and reversed', () => {
    expect(planeExtent(grid, 'xy')).toEqual([10, 4]);
    expect(planeExtent(grid, 'xz')).toEqual([10, 1.5]);
    expect(planeExtent(grid, 'yz')).toEqual([4, 1.5]);
    const l = sectionLayout(grid, extractSection(grid, field, 'xz', 1), 'posterior mean') as {
      xaxis: { title: { text: string } };
      yaxis: { title: { text: string }; scaleanchor: string; autorange: string };
    };
    expect(l.xaxis.title.text).toBe('east (m)');
    expect(l.yaxis.title.text).toBe('depth (m) ↓');
    expect(l.yaxis.scaleanchor).toBe('x');
    expect(l.yaxis.autorange).toBe('reversed');
  });

  it('project 3-D positions and path ends onto each plane; 2-D geometry lies in the x–y plane only (a 2-D cell list’s map)', () => {
    const positions = matrix(2, 3, Float64Array.from([1, 2, 3, 4, 5, 6]));
    expect(geometryTraces({ kind: 'points', positions }, 'xz')[0]).toMatchObject({ x: [1, 4], y: [3, 6] });
    expect(geometryTraces({ kind: 'points', positions }, 'yz')[0]).toMatchObject({ x: [2, 5], y: [3, 6] });
    const sources = matrix(1, 3, Float64Array.from([0, 1, 2]));
    const receivers = matrix(1, 3, Float64Array.from([9, 8, 7]));
    expect(geometryTraces({ kind: 'paths', sources, receivers }, 'xy')[0]).toMatchObject({ x: [0, 9, null], y: [1, 8, null] });
    const flat = matrix(1, 2, Float64Array.from([1, 2]));
    expect(geometryTraces({ kind: 'points', positions: flat }, 'xy')[0]).toMatchObject({ x: [1], y: [2] });
    expect(geometryTraces({ kind: 'points', positions: flat }, 'xz')).toEqual([]);
    expect(geometryTraces({ kind: 'paths', sources: flat, receivers: flat }, 'yz')).toEqual([]);
    expect(geometryTraces(undefined, 'xy')).toEqual([]);
  });

  it('cross-hairs mark the chosen cell on each plane', () => {
    const s = extractSection(grid, field, 'yz', 1);
    expect(crossHairs(s, [12, 2, -0.5])).toMatchObject({ x: [0, 3, null, 2, 2], y: [-0.5, -0.5, null, -1, 0] });
  });
});

describe('volume colours', () => {
  it('signed fields centre on a constant prior mean with one range over the whole volume; magnitudes start at 0', () => {
    const mean = new Float64Array(60).fill(0.5);
    const s = volumeColour(field, true, mean);
    const dev = Math.max(...Array.from(field, (v) => Math.abs(v - 0.5)));
    expect(s.colour.zmin).toBeCloseTo(0.5 - dev, 14);
    expect(s.colour.zmax).toBeCloseTo(0.5 + dev, 14);
    expect(s.perturbation).toBe(false);
    const m = volumeColour(Float64Array.from(field, Math.abs), false, mean);
    expect(m.colour.zmin).toBe(0);
    expect(m.colour.zmax).toBe(Math.max(...Array.from(field, Math.abs)));
  });
  it('variance reduction 1 − σ²/σ²prior (0 where the prior std is 0)', () => {
    expect(Array.from(varianceReduction([1, 0.5, 0], [2, 0.5, 0]))).toEqual([0.75, 0, 0]);
  });
});
