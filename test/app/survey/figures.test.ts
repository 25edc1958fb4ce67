/** Figures of the survey in place: profile against position, rays coloured by residual, the grid overlay. */
import { describe, expect, it } from 'vitest';
import {
  classColour,
  gridOverlayTraces,
  misfitTraces,
  profileAxis,
  profileLayouts,
  profileTraces,
  RAY_CLASSES,
  rayTraces,
  residualClass,
  surveyDataFigure,
  symmetricRange,
} from '../../../src/app/survey/figures.ts';
import { fromRows } from '../../../src/core/linalg/matrix.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';

const grid2: Grid = { shape: [4, 2], spacing: [50, 25], origin: [25, 12.5], unit: 'm', axes: ['x', 'depth'] };
const grid1: Grid = { shape: [5], spacing: [2], origin: [1], unit: 'm', axes: ['depth'] };

describe('profile against position', () => {
  // Three stations given out of order along x, 1 m above the section.
  const positions = fromRows([
    [150, -1],
    [50, -1],
    [100, -1],
  ]);
  const p = { grid: grid2, values: [3, 1, 2], sigma: [0.1, 0.2, 0.3], dataUnit: 'mGal' };

  it('runs along the axis the positions spread along', () => {
    expect(profileAxis(grid2, positions)).toBe(0);
    expect(
      profileAxis(
        grid2,
        fromRows([
          [5, 0],
          [5, 10],
          [6, 40],
        ]),
      ),
    ).toBe(1);
    expect(profileAxis(grid1, fromRows([[1], [3]]))).toBe(0);
  });

  it('sorts the data by position, keeping each datum with its σ, prediction, residual and number', () => {
    const t = profileTraces(p, positions, { predicted: [2.9, 1.1, 2.2], residuals: [1, -0.5, -0.67] });
    expect(t.data[0]).toMatchObject({ name: 'observed ±1σ', x: [50, 100, 150], y: [1, 2, 3], customdata: [2, 3, 1] });
    expect((t.data[0].error_y as { array: number[] }).array).toEqual([0.2, 0.3, 0.1]);
    expect(t.data[1]).toMatchObject({ name: 'predicted G m̃', x: [50, 100, 150], y: [1.1, 2.2, 2.9] });
    expect(t.residuals[0]).toMatchObject({ name: 'normalised residual', x: [50, 100, 150], y: [-0.5, -0.67, 1] });
    // Guides at ±2 across the positions with a margin.
    expect(t.residuals[1]).toMatchObject({ y: [2, 2] });
    expect((t.residuals[1].x as number[])[0]).toBeLessThan(50);
    expect((t.residuals[1].x as number[])[1]).toBeGreaterThan(150);
  });

  it('labels the position axis with the grid’s name and unit, the data axis with the data unit', () => {
    const l = profileLayouts(p, 0);
    expect((l.data.xaxis as { title: { text: string } }).title.text).toBe('x (m), where each datum was measured');
    expect((l.data.yaxis as { title: { text: string } }).title.text).toBe('d (mGal)');
  });

  it('the Problem screen plots the data against position only when the data have positions', () => {
    const f = surveyDataFigure({ ...p, geometry: { kind: 'points', positions } })!;
    expect(f.data).toHaveLength(1);
    expect(f.data[0].x).toEqual([50, 100, 150]);
    expect(surveyDataFigure({ ...p, geometry: null })).toBeNull();
  });
});

describe('rays coloured by normalised residual', () => {
  const paths = {
    kind: 'paths' as const,
    sources: fromRows([
      [0, 5],
      [0, 5],
      [0, 45],
      [0, 45],
    ]),
    receivers: fromRows([
      [200, 10],
      [200, 40],
      [200, 10],
      [200, 40],
    ]),
  };

  it('classes residuals symmetrically about zero, at least ±3, and colours the middle class grey', () => {
    expect(symmetricRange([0.5, -1])).toEqual({ cmin: -3, cmax: 3 });
    expect(symmetricRange([0.5, -4.5])).toEqual({ cmin: -4.5, cmax: 4.5 });
    expect(residualClass(0, 3)).toBe((RAY_CLASSES - 1) / 2);
    expect(residualClass(-3, 3)).toBe(0);
    expect(residualClass(3, 3)).toBe(RAY_CLASSES - 1);
    expect(residualClass(-99, 3)).toBe(0);
    expect(classColour((RAY_CLASSES - 1) / 2)).toBe('rgb(185, 185, 185)');
    expect(classColour(0)).toBe('rgb(43, 76, 155)');
    expect(classColour(RAY_CLASSES - 1)).toBe('rgb(178, 68, 46)');
  });

  it('draws every ray once, in the class of its residual, large misfits on top', () => {
    const residuals = [0, 2.9, -2.9, 0.1];
    const t = rayTraces(grid2, paths, residuals);
    const lines = t.filter((x) => x.mode === 'lines');
    // Each ray is 2 points and a null.
    expect(lines.reduce((a, x) => a + (x.x as unknown[]).length / 3, 0)).toBe(4);
    // Rays 0 and 3 share the grey middle class, drawn first; the extremes last.
    expect(lines[0].x).toEqual([0, 200, null, 0, 200, null]);
    expect((lines[0].line as { color: string }).color).toBe('rgb(185, 185, 185)');
    expect(lines.map((x) => (x.y as unknown[]).slice(0, 2))).toContainEqual([5, 40]);
    const mid = t.find((x) => x.name === 'normalised residual per ray')!;
    expect(mid.x).toEqual([100, 100, 100, 100]);
    expect(mid.y).toEqual([7.5, 22.5, 27.5, 42.5]);
    expect((mid.marker as { color: number[] }).color).toEqual(residuals);
    expect(mid.customdata).toEqual([1, 2, 3, 4]);
    // The two distinct sources and receivers are marked once each.
    expect(t.find((x) => String(x.name).startsWith('sources'))).toMatchObject({ name: 'sources (2)', x: [0, 0], y: [5, 45] });
    expect(t.find((x) => String(x.name).startsWith('receivers'))).toMatchObject({ name: 'receivers (2)' });
  });

  it('without residuals draws all rays in one grey trace', () => {
    const t = rayTraces(grid2, paths, null);
    expect(t[0]).toMatchObject({ name: '4 rays' });
    expect((t[0].x as unknown[]).length).toBe(12);
  });

  it('misfit r² against datum number with the reference line at 1', () => {
    const t = misfitTraces([1, -2, 0.5]);
    expect(t[0]).toMatchObject({ type: 'bar', x: [1, 2, 3], y: [1, 4, 0.25] });
    expect(t[1]).toMatchObject({ x: [0.5, 3.5], y: [1, 1] });
  });
});

describe('the grid overlay on the Problem screen', () => {
  it('outlines the grid at its cell edges, names shape and cell size, marks the first cell centre and the stations', () => {
    const t = gridOverlayTraces(grid2, {
      kind: 'points',
      positions: fromRows([
        [25, -1],
        [75, -1],
      ]),
    });
    expect(t[0]).toMatchObject({ x: [0, 200, 200, 0, 0], y: [0, 0, 50, 50, 0], name: 'grid 4 × 2 cells of 50 × 25 m' });
    expect(t[1]).toMatchObject({ x: [25], y: [12.5], name: 'first cell centre (25, 12.5) m' });
    expect(t[2]).toMatchObject({ x: [25, 75], y: [-1, -1], name: 'data positions (2)' });
  });

  it('a swapped shape draws a different outline (the same cells, the other way round)', () => {
    const swapped = gridOverlayTraces({ ...grid2, shape: [2, 4] }, null);
    expect(swapped[0]).toMatchObject({ x: [0, 100, 100, 0, 0], y: [0, 0, 100, 100, 0] });
    expect(swapped).toHaveLength(2);
  });

  it('in 1-D: a segment at 0 with positions on it', () => {
    const t = gridOverlayTraces(grid1, { kind: 'points', positions: fromRows([[2], [9]]) });
    expect(t[0]).toMatchObject({ x: [0, 10], y: [0, 0], name: 'grid 5 cells of 2 m' });
    expect(t[2]).toMatchObject({ x: [2, 9], y: [0, 0] });
  });

  it('with paths: the rays and their ends', () => {
    const t = gridOverlayTraces(grid2, { kind: 'paths', sources: fromRows([[0, 5]]), receivers: fromRows([[200, 45]]) });
    expect(t.map((x) => x.name)).toEqual([
      'grid 4 × 2 cells of 50 × 25 m',
      'first cell centre (25, 12.5) m',
      '1 ray',
      'sources (1)',
      'receivers (1)',
    ]);
  });
});
