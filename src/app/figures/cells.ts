/**
 * A cell list (the user's own mesh, given by its cell centres) on screen: the pure builders of the cells screen.
 * 1-D: the field against the coordinate. 2-D: one map of the centres, each a marker coloured by its value. 3-D:
 * three slabs through the cloud, x–y, x–z and y–z, each holding the centres within half a slab width of a chosen
 * position along the third axis, projected onto the plane. The slab width is twice the typical cell size of
 * src/core/problems/geometry.ts geometryScale (our choice: thin enough to read as a section, thick enough to hold
 * the cells of an irregular mesh). No DOM, no store; tested in test/app/figures/cells.test.ts.
 */
import type { CellList } from '../../core/grid/grid.ts';
import { geometryScale, gridBounds } from '../../core/problems/geometry.ts';
import { axisNames, withUnit } from '../labels.ts';
import type { Trace } from '../traces.ts';
import { hoverName, type Layout, title } from './common.ts';
import { planeAxes, type SectionPlane } from './sections.ts';

/** The axis names of a cell list: its `axes`, else x, y, z (../labels.ts axisNames), padded to three. */
export function cloudAxisNames(cells: CellList): readonly [string, string, string] {
  const a = axisNames(cells);
  return [a[0], a[1] ?? 'y', a[2] ?? 'z'];
}

/** The coordinate arrays by axis index (0 = x, 1 = y, 2 = z). */
function axisOf(cells: CellList, k: number): Float64Array {
  return k === 0 ? cells.x : k === 1 ? cells.y : cells.z;
}

/** Half the slab width: one typical cell size. */
export function slabHalfWidth(cells: CellList): number {
  return geometryScale(cells).spacing;
}

/** The sorted distinct coordinates along axis k: the positions a slab slider steps through. */
export function slabPositions(cells: CellList, k: number): number[] {
  return [...new Set(axisOf(cells, k))].sort((a, b) => a - b);
}

/** Indices of the centres within `half` of `at` along axis k (all of them when k is beyond the list's dimension). */
export function slabMembers(cells: CellList, k: number, at: number, half: number): number[] {
  const v = axisOf(cells, k);
  const out: number[] = [];
  for (let i = 0; i < v.length; i++) if (k >= cells.dim || Math.abs(v[i] - at) <= half) out.push(i);
  return out;
}

/** The centre nearest to the point p (its first `dim` coordinates; the first one wins a tie). */
export function nearestCell(cells: CellList, p: readonly number[]): number {
  return nearestAmong(cells, Array.from(cells.x.keys()), p);
}

/** The centre among `members` (non-empty) nearest to the point p (the first one wins a tie). */
export function nearestAmong(cells: CellList, members: readonly number[], p: readonly number[]): number {
  let best = members[0];
  let bestD = Number.POSITIVE_INFINITY;
  for (const i of members) {
    let d = 0;
    for (let k = 0; k < cells.dim; k++) d += (axisOf(cells, k)[i] - p[k]) ** 2;
    if (d < bestD) {
      bestD = d;
      best = i;
    }
  }
  return best;
}

/** The centre nearest to the point (u, v) of a plane, among `members` (e.g. a click on a slab). */
export function nearestInPlane(cells: CellList, plane: SectionPlane, members: readonly number[], u: number, v: number): number | null {
  const [a, b] = planeAxes(plane);
  const ua = axisOf(cells, a);
  const vb = axisOf(cells, b);
  let best: number | null = null;
  let bestD = Number.POSITIVE_INFINITY;
  for (const i of members) {
    const d = (ua[i] - u) ** 2 + (vb[i] - v) ** 2;
    if (d < bestD) {
      bestD = d;
      best = i;
    }
  }
  return best;
}

/** Marker size (px) of a map with `count` points: large for a coarse mesh, small for a dense one. */
export function markerSize(count: number): number {
  return Math.max(4, Math.min(14, Math.round(260 / Math.sqrt(Math.max(count, 1)))));
}

/**
 * The centres of `members` on `plane` as markers coloured by `values` (one per cell of the list); `colour` carries
 * the view's colorscale and zmin / zmax (as for the grid's heat maps), mapped onto the markers.
 */
export function cloudTrace(
  cells: CellList,
  plane: SectionPlane,
  members: readonly number[],
  values: ArrayLike<number>,
  name: string,
  colour: Trace,
  showScale: boolean,
): Trace {
  const names = cloudAxisNames(cells);
  const [a, b] = planeAxes(plane);
  const ua = axisOf(cells, a);
  const vb = axisOf(cells, b);
  return {
    type: 'scatter',
    mode: 'markers',
    x: members.map((i) => ua[i]),
    y: members.map((i) => vb[i]),
    customdata: members.map((i) => i),
    name,
    hovertemplate: `cell %{customdata}<br>${hoverName(names[a])} %{x}<br>${hoverName(names[b])} %{y}<br>${hoverName(name)} %{marker.color:.4g}<extra></extra>`,
    marker: {
      size: markerSize(members.length),
      color: members.map((i) => values[i]),
      colorscale: colour.colorscale,
      cmin: colour.zmin,
      cmax: colour.zmax,
      showscale: showScale,
      colorbar: { thickness: 10, len: 0.9 },
      line: { width: 0 },
    },
  };
}

/** A ring around the chosen cell on a plane. */
export function chosenTrace(cells: CellList, plane: SectionPlane, cell: number): Trace {
  const [a, b] = planeAxes(plane);
  return {
    type: 'scatter',
    mode: 'markers',
    x: [axisOf(cells, a)[cell]],
    y: [axisOf(cells, b)[cell]],
    name: 'chosen cell',
    marker: { size: 16, color: 'rgba(0,0,0,0)', line: { width: 2, color: '#111' } },
    hoverinfo: 'skip',
  };
}

/** "x–y, |z − 1.5| ≤ 0.4 m (37 cells)"; 2-D lists have no slab. */
export function slabTitle(cells: CellList, plane: SectionPlane, at: number, half: number, count: number): string {
  const names = cloudAxisNames(cells);
  const [a, b, f] = planeAxes(plane);
  const unit = cells.unit ? ` ${cells.unit}` : '';
  const p = (x: number) => Number(x.toPrecision(4));
  const slab = cells.dim === 3 ? `, |${names[f]} − ${p(at)}| ≤ ${p(half)}${unit}` : '';
  return `${names[a]}–${names[b]}${slab} (${count} cells)`;
}

/** Layout of one plane of the cloud: true aspect, the second axis downwards (as every map of the workbench). */
export function cloudLayout(cells: CellList, plane: SectionPlane, heading: string): Layout {
  const names = cloudAxisNames(cells);
  const [a, b] = planeAxes(plane);
  return {
    title: title(heading),
    xaxis: { title: { text: withUnit(names[a], cells.unit) }, constrain: 'domain' },
    yaxis: { title: { text: `${withUnit(names[b], cells.unit)} ↓` }, autorange: 'reversed', scaleanchor: 'x', constrain: 'domain' },
    margin: { l: 56, r: 10, t: 30, b: 42 },
    showlegend: false,
  };
}

/** Physical extent (across, down) of the cloud on a plane, for the plot's height at true aspect. */
export function cloudExtent(cells: CellList, plane: SectionPlane): [number, number] {
  const [a, b] = planeAxes(plane);
  const box = gridBounds(cells);
  const spans = [box.x, box.y, box.z ?? ([0, 0] as const)].map(([lo, hi]) => hi - lo);
  const s = geometryScale(cells).spacing;
  return [spans[a] + s, spans[b] + s];
}

/** A 1-D list: the field against the coordinate, cells sorted along it. */
export function lineTrace(cells: CellList, values: ArrayLike<number>, name: string): Trace {
  const order = Array.from(cells.x.keys()).sort((i, j) => cells.x[i] - cells.x[j]);
  return {
    type: 'scatter',
    mode: 'lines+markers',
    x: order.map((i) => cells.x[i]),
    y: order.map((i) => values[i]),
    customdata: order,
    name,
    hovertemplate: `cell %{customdata}<br>${hoverName(cloudAxisNames(cells)[0])} %{x}<br>${hoverName(name)} %{y:.4g}<extra></extra>`,
    marker: { size: 5, color: '#1f4e79' },
    line: { width: 1, color: '#1f4e79' },
  };
}

export function lineLayout(cells: CellList, heading: string, valueTitle: string): Layout {
  return {
    title: title(heading),
    xaxis: { title: { text: withUnit(cloudAxisNames(cells)[0], cells.unit) } },
    yaxis: { title: { text: valueTitle } },
    margin: { l: 56, r: 10, t: 30, b: 42 },
    showlegend: false,
  };
}
