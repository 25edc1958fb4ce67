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
    expect(() => rayPathLengths({ shape: [4], spacing: [1] }, RAYS[0])).toThrow('grid.shape must be [nx, ny]');
  });
});
