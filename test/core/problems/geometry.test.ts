import { describe, expect, it } from 'vitest';
import { gridBounds, pathsMissingGrid, rowList, segmentMeetsBox } from '../../../src/core/problems/geometry.ts';
import { fromRows } from '../../../src/core/linalg/matrix.ts';
import { rayPathLengths } from '../../../src/core/problems/rays.ts';
import { Random } from '../../../src/core/sampling/random.ts';

describe('grid outline', () => {
  it('spans half a cell beyond the first and last cell centres', () => {
    expect(gridBounds({ shape: [40, 20], spacing: [50, 25], origin: [25, 12.5] })).toEqual({ x: [0, 2000], y: [0, 500] });
    expect(gridBounds({ shape: [4], spacing: [2] })).toEqual({ x: [-1, 7], y: [0, 0] });
  });
});

describe('segmentMeetsBox', () => {
  const box = { x: [0, 10], y: [0, 5] } as const;
  it.each([
    ['inside', [1, 1], [2, 2], true],
    ['crossing', [-5, 2], [15, 3], true],
    ['above', [-5, -1], [15, -1], false],
    ['touching a corner', [-1, 1], [1, -1], true],
    ['cutting a corner', [-1, 1.5], [1.5, -1], true],
    ['passing outside a corner', [-1, -0.1], [-0.1, -1], false],
    ['a point outside', [11, 1], [11, 1], false],
    ['a point inside', [3, 3], [3, 3], true],
    ['along an edge', [-3, 5], [20, 5], true],
  ] as const)('%s', (_what, p, q, meets) => {
    expect(segmentMeetsBox(p, q, box)).toBe(meets);
    expect(segmentMeetsBox(q, p, box)).toBe(meets);
  });

  // Outside check: the ray operator's exact cell walk (src/core/problems/rays.ts) gives a path
  // length inside the grid > 0 exactly when the segment crosses the grid's interior.
  it('agrees with the ray operator on 500 random segments', () => {
    const grid = { shape: [6, 4], spacing: [2, 3], origin: [1, 1.5] };
    const box = gridBounds(grid);
    const rnd = new Random(11);
    let crossing = 0;
    for (let k = 0; k < 500; k++) {
      const p: [number, number] = [rnd.nextDouble() * 30 - 9, rnd.nextDouble() * 30 - 9];
      const q: [number, number] = [rnd.nextDouble() * 30 - 9, rnd.nextDouble() * 30 - 9];
      const inside = rayPathLengths(grid, { from: p, to: q }).reduce((a, s) => a + s.length, 0) > 1e-12;
      expect(segmentMeetsBox(p, q, box)).toBe(inside);
      if (inside) crossing++;
    }
    expect(crossing).toBeGreaterThan(50);
    expect(crossing).toBeLessThan(450);
  });
});

describe('segmentMeetsBox in 3-D', () => {
  // Outside check: points sampled densely along the segment (10,001 of them); a segment is counted as
  // meeting the box when a sample lies inside, as missing when every sample is more than 0.01 away.
  it('agrees with dense sampling along 500 random segments around a 3-D grid', () => {
    const grid = { shape: [6, 4, 5], spacing: [2, 3, 1], origin: [1, 1.5, 0.5] };
    const box = gridBounds(grid);
    expect(box.z).toEqual([0, 5]);
    const lo = [box.x[0], box.y[0], box.z![0]];
    const hi = [box.x[1], box.y[1], box.z![1]];
    const rnd = new Random(5);
    let meets = 0;
    let misses = 0;
    for (let k = 0; k < 500; k++) {
      const p = [0, 1, 2].map((a) => lo[a] - 8 + rnd.nextDouble() * (hi[a] - lo[a] + 16));
      const q = [0, 1, 2].map((a) => lo[a] - 8 + rnd.nextDouble() * (hi[a] - lo[a] + 16));
      let gap = Number.POSITIVE_INFINITY;
      for (let j = 0; j <= 10000; j++) {
        const t = j / 10000;
        const out = [0, 1, 2].map((a) => {
          const v = p[a] + t * (q[a] - p[a]);
          return Math.max(lo[a] - v, v - hi[a], 0);
        });
        gap = Math.min(gap, Math.hypot(...out));
      }
      if (gap === 0) {
        expect(segmentMeetsBox(p, q, box)).toBe(true);
        meets++;
      } else if (gap > 0.01) {
        expect(segmentMeetsBox(p, q, box)).toBe(false);
        misses++;
      }
    }
    expect(meets).toBeGreaterThan(50);
    expect(misses).toBeGreaterThan(50);
    // A path passing above the volume (z beyond its top) misses, though its x–y shadow crosses the grid.
    expect(segmentMeetsBox([-5, 2, 7], [20, 8, 6], box)).toBe(false);
    expect(segmentMeetsBox([-5, 2, 4], [20, 8, 3], box)).toBe(true);
  });
});

describe('pathsMissingGrid', () => {
  it('lists the paths outside the grid and none for point data', () => {
    const grid = { shape: [2, 2], spacing: [10, 10], origin: [5, 5] };
    const sources = fromRows([
      [0, 2],
      [-5, -5],
      [25, 0],
    ]);
    const receivers = fromRows([
      [20, 3],
      [30, -1],
      [25, 20],
    ]);
    expect(pathsMissingGrid(grid, { kind: 'paths', sources, receivers })).toEqual([1, 2]);
    expect(pathsMissingGrid(grid, { kind: 'points', positions: sources })).toEqual([]);
  });
  it('rowList says rows in words', () => {
    expect(rowList([3])).toBe('row 3');
    expect(rowList([1, 4])).toBe('rows 1 and 4');
    expect(rowList([0, 1, 2, 3, 4, 5, 6])).toBe('rows 0, 1, 2, 3, 4 and 2 more');
  });
});

describe('3-D path ends in a problem file', () => {
  it('are read as M × 3 and a path above the volume is warned about with the z range', async () => {
    const { parseProblemFile } = await import('../../../src/core/io/problemFile.ts');
    const n = 4 * 3 * 2;
    const text = JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      grid: { shape: [4, 3, 2], spacing: [1, 1, 1] },
      operator: { dense: [new Array(n).fill(0.1), new Array(n).fill(0.2)] },
      data: {
        values: [1, 2],
        sigma: [0.1, 0.1],
        sources: [
          [-1, 1, 0.5],
          [-1, 1, 9],
        ],
        receivers: [
          [5, 1, 0.5],
          [5, 1, 9],
        ],
      },
    });
    const r = parseProblemFile('p.json', text);
    const geo = r.problem.data.geometry;
    expect(geo?.kind === 'paths' && geo.sources.cols).toBe(3);
    expect(r.warnings.map((w) => w.message)).toEqual([
      expect.stringMatching(
        /1 of 2 paths \(data\.sources → data\.receivers, row 1\) miss the grid entirely .*z -0\.5 to 1\.5.*grid\.shape \[nx, ny, nz\]/,
      ),
    ]);
  });
});
