/**
 * Data geometry (see DataGeometry in ./spec.ts): the grid's outline and which paths miss it.
 * PUBLIC API: gridBounds, segmentMeetsBox, pathsMissingGrid, geometryRows.
 */
import { gridDimension, isCellList, type Geometry } from '../grid/grid.ts';
import type { DataGeometry } from './spec.ts';

/** Axis-aligned box: the grid's outer cell edges (a cell list: the span of its centres). */
export interface Bounds {
  readonly x: readonly [number, number];
  /** [0, 0] for a 1-D grid. */
  readonly y: readonly [number, number];
  /** Present on 3-D geometries only. */
  readonly z?: readonly [number, number];
}

function span(v: Float64Array): [number, number] {
  let lo = Number.POSITIVE_INFINITY;
  let hi = Number.NEGATIVE_INFINITY;
  for (let i = 0; i < v.length; i++) {
    if (v[i] < lo) lo = v[i];
    if (v[i] > hi) hi = v[i];
  }
  return [lo, hi];
}

/**
 * Outer edges of the grid: cell k along an axis is centred at origin + k·spacing and spans half a
 * spacing either side, so the grid covers [x0 − dx/2, x0 + (nx − ½)·dx] (and the same along y).
 */
export function gridBounds(grid: Geometry): Bounds {
  const dim = gridDimension(grid);
  if (isCellList(grid)) {
    // No cell sizes are known: the box of the centres themselves.
    const b = { x: span(grid.x), y: dim >= 2 ? span(grid.y) : ([0, 0] as [number, number]) };
    return dim === 3 ? { ...b, z: span(grid.z) } : b;
  }
  const edge = (k: number): [number, number] => {
    const o = grid.origin?.[k] ?? 0;
    const d = grid.spacing[k];
    return [o - d / 2, o + (grid.shape[k] - 0.5) * d];
  };
  const b = { x: edge(0), y: dim >= 2 ? edge(1) : ([0, 0] as [number, number]) };
  return dim === 3 ? { ...b, z: edge(2) } : b;
}

/**
 * Whether the closed segment from p to q meets the closed box, by Liang–Barsky clipping
 * (Liang & Barsky 1984, ACM Trans. Graph. 3:1; from memory): the parameter interval
 * t ∈ [0, 1] is narrowed by each of the four edges (six faces in 3-D: points [x, y, z] and a box with z)
 * and the segment meets the box when it stays non-empty.
 */
export function segmentMeetsBox(p: readonly number[], q: readonly number[], box: Bounds): boolean {
  let t0 = 0;
  let t1 = 1;
  const dx = q[0] - p[0];
  const dy = q[1] - p[1];
  const clip = (den: number, num: number): boolean => {
    // Inside half-plane: den·t ≤ num.
    if (den === 0) return num >= 0;
    const t = num / den;
    if (den > 0) {
      if (t < t0) return false;
      if (t < t1) t1 = t;
    } else {
      if (t > t1) return false;
      if (t > t0) t0 = t;
    }
    return true;
  };
  const inPlane = clip(-dx, p[0] - box.x[0]) && clip(dx, box.x[1] - p[0]) && clip(-dy, p[1] - box.y[0]) && clip(dy, box.y[1] - p[1]);
  if (!inPlane) return false;
  if (box.z !== undefined && p.length > 2) {
    const dz = q[2] - p[2];
    if (!(clip(-dz, p[2] - box.z[0]) && clip(dz, box.z[1] - p[2]))) return false;
  }
  return t0 <= t1;
}

/** Zero-based indices of the path data whose source–receiver segment does not touch the grid (points: none). */
export function pathsMissingGrid(grid: Geometry, geometry: DataGeometry): number[] {
  if (geometry.kind !== 'paths') return [];
  const box = gridBounds(grid);
  const s = geometry.sources;
  const r = geometry.receivers;
  const d = s.cols;
  const out: number[] = [];
  for (let k = 0; k < s.rows; k++) {
    if (!segmentMeetsBox(Array.from(s.data.subarray(d * k, d * k + d)), Array.from(r.data.subarray(d * k, d * k + d)), box)) out.push(k);
  }
  return out;
}

/** Number of data the geometry describes. */
export function geometryRows(geometry: DataGeometry): number {
  return geometry.kind === 'points' ? geometry.positions.rows : geometry.sources.rows;
}

/** "rows 3, 7 and 9" (zero-based), the first `max` listed. */
export function rowList(rows: readonly number[], max = 5): string {
  const shown = rows.slice(0, max).map(String);
  const more = rows.length > max ? ` and ${rows.length - max} more` : '';
  if (rows.length === 1) return `row ${shown[0]}`;
  if (more) return `rows ${shown.join(', ')}${more}`;
  return `rows ${shown.slice(0, -1).join(', ')} and ${shown[shown.length - 1]}`;
}

/**
 * The largest extent of the geometry and its smallest cell size, for default lengths and slider ranges. A grid:
 * n·spacing along each axis and its smallest spacing. A cell list has no spacing: the spans of its centres, and the
 * side of the cube (square, segment) holding the mean share of their box, (Π spans / N)^(1/d) (our choice).
 */
export function geometryScale(g: Geometry): { readonly extent: number; readonly spacing: number } {
  if (!isCellList(g)) {
    return { extent: Math.max(...g.shape.map((n, k) => n * g.spacing[k])), spacing: Math.min(...g.spacing) };
  }
  const b = gridBounds(g);
  const spans = [b.x, b.y, b.z ?? ([0, 0] as const)].slice(0, g.dim).map(([lo, hi]) => hi - lo);
  const extent = Math.max(...spans);
  if (!(extent > 0)) return { extent: 1, spacing: 1 };
  const spacing = (spans.reduce((a, v) => a * Math.max(v, extent * 1e-6), 1) / g.x.length) ** (1 / g.dim);
  return { extent, spacing };
}
