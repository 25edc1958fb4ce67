import { describe, expect, it } from 'vitest';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { rayOperator, rayPathLengths, type Ray } from '../../../src/core/problems/rays.ts';

const grid: Grid = { shape: [7, 5], spacing: [1.5, 0.8], origin: [0.75, 0.4] }; // x ∈ [0, 10.5], y ∈ [0, 4]

/**
 * Independent length of a segment inside one axis-aligned rectangle by Liang–Barsky parametric
 * clipping (Liang & Barsky 1984, ACM Trans. Graph. 3:1–22, memory) — a different algorithm from the
 * edge-crossing walk under test.
 */
function clippedLength(ray: Ray, xmin: number, xmax: number, ymin: number, ymax: number): number {
  const [x0, y0] = ray.from;
  const dx = ray.to[0] - x0;
  const dy = ray.to[1] - y0;
  let t0 = 0;
  let t1 = 1;
  const edges: [number, number][] = [
    [-dx, x0 - xmin],
    [dx, xmax - x0],
    [-dy, y0 - ymin],
    [dy, ymax - y0],
  ];
  for (const [p, q] of edges) {
    if (p === 0) {
      if (q < 0) return 0;
    } else {
      const r = q / p;
      if (p < 0) t0 = Math.max(t0, r);
      else t1 = Math.min(t1, r);
    }
  }
  return t1 > t0 ? (t1 - t0) * Math.hypot(dx, dy) : 0;
}

function bruteForce(ray: Ray): Float64Array {
  const [nx, ny] = grid.shape as [number, number];
  const out = new Float64Array(nx * ny);
  for (let iy = 0; iy < ny; iy++) {
    for (let ix = 0; ix < nx; ix++) {
      out[ix + nx * iy] = clippedLength(ray, 1.5 * ix, 1.5 * (ix + 1), 0.8 * iy, 0.8 * (iy + 1));
    }
  }
  return out;
}

const RAYS: Ray[] = [
  { from: [0, 0.3], to: [10.5, 3.7] },
  { from: [0, 3.9], to: [10.5, 0.1] },
  { from: [-2, 2], to: [12, 1] }, // starts and ends outside the grid
  { from: [2.2, 0.5], to: [2.2, 3.5] }, // vertical, inside one column
  { from: [0, 0], to: [10.5, 4] }, // passes through grid corners
  { from: [1, 1], to: [1, 1] }, // zero length
];

describe('rayPathLengths', () => {
  it.each(RAYS.map((r, k) => [k, r] as const))('ray %i matches Liang–Barsky clipping cell by cell', (_k, ray) => {
    const want = bruteForce(ray);
    const got = new Float64Array(want.length);
    for (const s of rayPathLengths(grid, ray)) got[s.cell] = s.length;
    want.forEach((v, j) => expect(Math.abs(got[j] - v)).toBeLessThan(1e-12));
  });
  it('a ray fully inside the grid has total length |Q − P|', () => {
    const ray: Ray = { from: [0, 0.3], to: [10.5, 3.7] };
    const total = rayPathLengths(grid, ray).reduce((a, s) => a + s.length, 0);
    expect(total).toBeCloseTo(Math.hypot(10.5, 3.4), 12);
  });
  it('rayOperator stacks one sparse row per ray', () => {
    const G = rayOperator(grid, RAYS);
    expect(G.kind).toBe('sparse');
    expect(G.matrix.rows).toBe(RAYS.length);
    expect(G.matrix.cols).toBe(35);
  });
  it('rejects a 1-D grid', () => {
    expect(() => rayPathLengths({ shape: [4], spacing: [1] }, RAYS[0])).toThrow('grid.shape must be [nx, ny] or [nx, ny, nz]');
  });
});

/** Length of a 3-D segment inside one box by Liang–Barsky clipping against its six faces (as above, one more axis). */
function clippedLength3(ray: Ray, lo: number[], hi: number[]): number {
  const v = ray.to.map((q, k) => q - ray.from[k]);
  let t0 = 0;
  let t1 = 1;
  for (let k = 0; k < 3; k++) {
    for (const [p, q] of [
      [-v[k], ray.from[k] - lo[k]],
      [v[k], hi[k] - ray.from[k]],
    ]) {
      if (p === 0) {
        if (q < 0) return 0;
      } else if (p < 0) t0 = Math.max(t0, q / p);
      else t1 = Math.min(t1, q / p);
    }
  }
  return t1 > t0 ? (t1 - t0) * Math.hypot(...v) : 0;
}

describe('rayPathLengths on a 3-D grid', () => {
  const g3: Grid = { shape: [5, 4, 3], spacing: [2, 1.5, 1], origin: [1, 0.75, 0.5] }; // [0, 10] × [0, 6] × [0, 3]
  const rays: Ray[] = [
    { from: [0, 0.2, 0.1], to: [10, 5.9, 2.8] },
    { from: [-3, 3, 1.5], to: [13, 2, 0.7] },
    { from: [4.3, 0, 2.2], to: [4.3, 6, 2.2] },
    { from: [0, 0, 0], to: [10, 6, 3] },
    { from: [2, 2, 5], to: [8, 4, 4] }, // above the block: misses
  ];
  it.each(rays.map((r, k) => [k, r] as const))('ray %i matches six-face clipping cell by cell', (_k, ray) => {
    const got = new Float64Array(60);
    for (const s of rayPathLengths(g3, ray)) got[s.cell] = s.length;
    for (let iz = 0; iz < 3; iz++)
      for (let iy = 0; iy < 4; iy++)
        for (let ix = 0; ix < 5; ix++) {
          const want = clippedLength3(ray, [2 * ix, 1.5 * iy, iz], [2 * (ix + 1), 1.5 * (iy + 1), iz + 1]);
          expect(Math.abs(got[ix + 5 * (iy + 4 * iz)] - want)).toBeLessThan(1e-12);
        }
  });
  it('a ray inside the block has total length |Q − P|; a 2-D ray end on a 3-D grid is refused', () => {
    const total = rayPathLengths(g3, rays[0]).reduce((a, s) => a + s.length, 0);
    expect(total).toBeCloseTo(Math.hypot(10, 5.7, 2.7), 12);
    expect(rayPathLengths(g3, rays[4])).toEqual([]);
    expect(() => rayPathLengths(g3, { from: [0, 0], to: [1, 1] })).toThrow(/ends of 3 coordinates/);
  });
});
