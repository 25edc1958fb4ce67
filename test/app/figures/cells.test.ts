/**
 * The cells screen's builders (src/app/figures/cells.ts) against brute-force counts written out here: slab
 * membership, the nearest centre, the typical cell size of src/core/problems/geometry.ts geometryScale, and the
 * markers' colours and cell numbers.
 */
import { describe, expect, it } from 'vitest';
import {
  cloudTrace,
  nearestAmong,
  nearestCell,
  nearestInPlane,
  slabHalfWidth,
  slabMembers,
  slabPositions,
} from '../../../src/app/figures/cells.ts';
import { readCellList } from '../../../src/core/io/cellList.ts';
import { geometryScale, gridBounds } from '../../../src/core/problems/geometry.ts';
import { Random } from '../../../src/core/sampling/random.ts';

const rnd = new Random(3);
const pts = Array.from({ length: 200 }, () => [rnd.nextDouble() * 40, rnd.nextDouble() * 30, rnd.nextDouble() * 20]);
const cells = readCellList({ centres: pts });

describe('cells screen builders', () => {
  it('the typical cell size is the side of a cube holding the mean share of the centres’ box', () => {
    const b = gridBounds(cells);
    const spans = [b.x[1] - b.x[0], b.y[1] - b.y[0], b.z![1] - b.z![0]];
    const s = geometryScale(cells);
    expect(s.extent).toBe(Math.max(...spans));
    expect(s.spacing).toBeCloseTo(Math.cbrt((spans[0] * spans[1] * spans[2]) / 200), 12);
    expect(slabHalfWidth(cells)).toBe(s.spacing);
    // A regular grid keeps its own numbers.
    expect(geometryScale({ shape: [10, 4], spacing: [2, 3] })).toEqual({ extent: 20, spacing: 2 });
  });

  it('slab members are exactly the centres within the half width, every axis', () => {
    for (const k of [0, 1, 2]) {
      const at = pts[17][k];
      const half = 2.5;
      const want = pts.flatMap((p, i) => (Math.abs(p[k] - at) <= half ? [i] : []));
      expect(slabMembers(cells, k, at, half)).toEqual(want);
      expect(want.length).toBeGreaterThan(3);
      expect(want.length).toBeLessThan(200);
    }
    expect(slabPositions(cells, 2)).toEqual([...pts.map((p) => p[2])].sort((a, b) => a - b));
  });

  it('the nearest centre by brute force, in space, among members and in a plane', () => {
    const q = [12.3, 7.7, 15.1];
    const d = (i: number, axes: number[]) => axes.reduce((a, k) => a + (pts[i][k] - q[k]) ** 2, 0);
    const argmin = (ids: number[], axes: number[]) => ids.reduce((b, i) => (d(i, axes) < d(b, axes) ? i : b), ids[0]);
    const all = pts.map((_, i) => i);
    expect(nearestCell(cells, q)).toBe(argmin(all, [0, 1, 2]));
    const some = all.filter((i) => i % 3 === 0);
    expect(nearestAmong(cells, some, q)).toBe(argmin(some, [0, 1, 2]));
    expect(nearestInPlane(cells, 'xz', some, q[0], q[2])).toBe(argmin(some, [0, 2]));
  });

  it('markers carry each member’s value and cell number on the plane’s two axes', () => {
    const values = pts.map((p) => p[0] - 2 * p[1]);
    const members = slabMembers(cells, 1, pts[5][1], 3);
    const t = cloudTrace(cells, 'yz', members, values, 'v', { colorscale: 'x', zmin: -1, zmax: 1 }, true) as {
      x: number[];
      y: number[];
      customdata: number[];
      marker: { color: number[]; cmin: number; cmax: number };
    };
    expect(t.customdata).toEqual(members);
    expect(t.x).toEqual(members.map((i) => pts[i][1]));
    expect(t.y).toEqual(members.map((i) => pts[i][2]));
    expect(t.marker.color).toEqual(members.map((i) => values[i]));
    expect([t.marker.cmin, t.marker.cmax]).toEqual([-1, 1]);
  });
});
