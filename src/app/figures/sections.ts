/**
 * Sections through a volume: the pure builders of the three orthogonal cuts (x–y at a chosen z, x–z at a chosen y,
 * y–z at a chosen x) through a chosen cell of a 3-D grid, with the survey geometry projected onto each cut.
 * No DOM, no store: plain data in, plotly traces and layouts out (tested in test/app/figures/sections.test.ts).
 *
 * Cell order x fastest: cell (ix, iy, iz) is i = ix + nx·(iy + ny·iz) (the problem file's rule). Each section's
 * rows run along its second axis (y in x–y, z in x–z and y–z), its columns along the first, so `z[r][c]` is the
 * heat map plotly expects. The second axis increases downwards, as on every 2-D map of the workbench.
 */
import type { Grid } from '../../core/grid/grid.ts';
import type { DataGeometry } from '../../core/problems/spec.ts';
import { DIVERGING, divergingRange, SEQUENTIAL, sequentialRange, signedView } from '../colourScales.ts';
import { withUnit } from '../labels.ts';
import type { Trace } from '../traces.ts';
import { hoverName, type Layout, title } from './common.ts';

export type SectionPlane = 'xy' | 'xz' | 'yz';
export const SECTION_PLANES: readonly SectionPlane[] = ['xy', 'xz', 'yz'];

/** Axis indices (0 = x, 1 = y, 2 = z) of a plane: [across, down, held fixed]. */
export function planeAxes(plane: SectionPlane): readonly [number, number, number] {
  switch (plane) {
    case 'xy':
      return [0, 1, 2];
    case 'xz':
      return [0, 2, 1];
    case 'yz':
      return [1, 2, 0];
  }
}

/** The three axis names of a volume grid: its `axes`, else x, y, z. */
export function volumeAxisNames(grid: Grid): readonly [string, string, string] {
  const a = grid.axes;
  return a && a.length === 3 ? [a[0], a[1], a[2]] : ['x', 'y', 'z'];
}

/** Cell-centre coordinates along axis k. */
export function centres(grid: Grid, k: number): number[] {
  const n = grid.shape[k] ?? 1;
  const d = grid.spacing[k] ?? 1;
  const o = grid.origin?.[k] ?? 0;
  return Array.from({ length: n }, (_, i) => o + i * d);
}

export interface Section {
  readonly plane: SectionPlane;
  /** Cell centres along the across (first) and down (second) axes. */
  readonly x: readonly number[];
  readonly y: readonly number[];
  /** rows (down) × columns (across). */
  readonly z: readonly (readonly number[])[];
  /** The fixed axis, its cell index and the coordinate of that cell's centre. */
  readonly fixedAxis: number;
  readonly fixedIndex: number;
  readonly fixedCoordinate: number;
}

/** The section of `field` (one value per cell, x fastest) on `plane` through cell index `at` of the fixed axis. */
export function extractSection(grid: Grid, field: ArrayLike<number>, plane: SectionPlane, at: number): Section {
  const [nx, ny, nz] = [grid.shape[0], grid.shape[1] ?? 1, grid.shape[2] ?? 1];
  if (field.length !== nx * ny * nz) throw new Error(`a section needs ${nx * ny * nz} values (one per cell), got ${field.length}`);
  const [a, b, f] = planeAxes(plane);
  const n = [nx, ny, nz];
  if (!Number.isInteger(at) || at < 0 || at >= n[f]) throw new Error(`section index ${at} is outside 0 … ${n[f] - 1}`);
  const z: number[][] = [];
  const idx = [0, 0, 0];
  idx[f] = at;
  for (let r = 0; r < n[b]; r++) {
    const row: number[] = [];
    idx[b] = r;
    for (let c = 0; c < n[a]; c++) {
      idx[a] = c;
      row.push(field[idx[0] + nx * (idx[1] + ny * idx[2])]);
    }
    z.push(row);
  }
  return { plane, x: centres(grid, a), y: centres(grid, b), z, fixedAxis: f, fixedIndex: at, fixedCoordinate: centres(grid, f)[at] };
}

/** The three sections through cell (ix, iy, iz): x–y at iz, x–z at iy, y–z at ix. */
export function sectionsThrough(grid: Grid, field: ArrayLike<number>, cell: readonly [number, number, number]): Section[] {
  return SECTION_PLANES.map((p) => extractSection(grid, field, p, cell[planeAxes(p)[2]]));
}

/** Physical extent (across, down) of a plane, cell edges to cell edges: the true-aspect ratio of its map. */
export function planeExtent(grid: Grid, plane: SectionPlane): [number, number] {
  const [a, b] = planeAxes(plane);
  return [grid.shape[a] * grid.spacing[a], (grid.shape[b] ?? 1) * (grid.spacing[b] ?? 1)];
}

/** "x–y at z = 1.5 m" */
export function sectionTitle(grid: Grid, s: Section): string {
  const names = volumeAxisNames(grid);
  const [a, b] = planeAxes(s.plane);
  const unit = grid.unit ? ` ${grid.unit}` : '';
  return `${names[a]}–${names[b]} at ${names[s.fixedAxis]} = ${Number(s.fixedCoordinate.toPrecision(6))}${unit}`;
}

/** Heat-map trace of a section; `colour` carries the shared colorscale and zmin / zmax of the view. */
export function sectionTrace(grid: Grid, s: Section, name: string, colour: Trace, showScale: boolean): Trace {
  const names = volumeAxisNames(grid);
  const [a, b] = planeAxes(s.plane);
  return {
    type: 'heatmap',
    x: s.x,
    y: s.y,
    z: s.z,
    name,
    hovertemplate: `${hoverName(names[a])} %{x}<br>${hoverName(names[b])} %{y}<br>${hoverName(name)} %{z:.4g}<extra></extra>`,
    showscale: showScale,
    colorbar: { thickness: 10, len: 0.9 },
    ...colour,
  };
}

/**
 * The survey geometry on a section: measurement positions (3-D points) projected onto the plane, and path ends
 * when the problem gives them with three coordinates. Everything is projected (a section shows where the survey lies
 * across the whole volume, not only in the cut); null separates segments.
 */
export function geometryTraces(geometry: DataGeometry | undefined, plane: SectionPlane): Trace[] {
  if (!geometry) return [];
  const [a, b] = planeAxes(plane);
  // Three coordinates project onto any plane; two (a 2-D cell list's map) lie in the x–y plane only.
  const fits = (cols: number) => cols === 3 || (cols === 2 && plane === 'xy');
  if (geometry.kind === 'points') {
    const p = geometry.positions;
    if (!fits(p.cols)) return [];
    const x: number[] = [];
    const y: number[] = [];
    for (let i = 0; i < p.rows; i++) {
      x.push(p.data[i * p.cols + a]);
      y.push(p.data[i * p.cols + b]);
    }
    return [{ type: 'scatter', mode: 'markers', x, y, name: 'data positions', marker: { size: 5, color: '#111', symbol: 'x' } }];
  }
  const s = geometry.sources;
  const r = geometry.receivers;
  if (!fits(s.cols) || r.cols !== s.cols) return [];
  const d = s.cols;
  const x: (number | null)[] = [];
  const y: (number | null)[] = [];
  for (let i = 0; i < s.rows; i++) {
    x.push(s.data[i * d + a], r.data[i * d + a], null);
    y.push(s.data[i * d + b], r.data[i * d + b], null);
  }
  return [{ type: 'scatter', mode: 'lines', x, y, name: 'paths', line: { width: 0.5, color: 'rgba(0,0,0,0.35)' }, hoverinfo: 'skip' }];
}

/** Lines marking where the other two sections cut this one (the chosen cell's centre). */
export function crossHairs(s: Section, cellCentre: readonly [number, number, number]): Trace {
  const [a, b] = planeAxes(s.plane);
  const x0 = s.x[0];
  const x1 = s.x[s.x.length - 1];
  const y0 = s.y[0];
  const y1 = s.y[s.y.length - 1];
  return {
    type: 'scatter',
    mode: 'lines',
    x: [x0, x1, null, cellCentre[a], cellCentre[a]],
    y: [cellCentre[b], cellCentre[b], null, y0, y1],
    name: 'other sections',
    line: { width: 1, dash: 'dot', color: '#444' },
    hoverinfo: 'skip',
    showlegend: false,
  };
}

/**
 * Layout of one section: true aspect (scaleanchor), the down axis reversed, axis names with the grid's unit. The title
 * is the section alone when `heading` is empty (three sections side by side leave no room for the field's name,
 * which the screen's field list shows).
 */
export function sectionLayout(grid: Grid, s: Section, heading: string): Layout {
  const names = volumeAxisNames(grid);
  const [a, b] = planeAxes(s.plane);
  return {
    title: title(heading ? `${heading}: ${sectionTitle(grid, s)}` : sectionTitle(grid, s)),
    xaxis: { title: { text: withUnit(names[a], grid.unit) }, constrain: 'domain' },
    yaxis: { title: { text: `${withUnit(names[b], grid.unit)} ↓` }, autorange: 'reversed', scaleanchor: 'x', constrain: 'domain' },
    margin: { l: 56, r: 10, t: 30, b: 42 },
    showlegend: false,
  };
}

/**
 * A volume field ready to cut: signed fields (means, realisations) through `signedView` on the diverging scale
 * symmetric about the prior mean, magnitudes (std, variance reduction) on the sequential scale from 0; one range over
 * the whole volume, so the three sections share it.
 */
export function volumeColour(
  values: ArrayLike<number>,
  signed: boolean,
  priorMean: ArrayLike<number>,
): { values: ArrayLike<number>; colour: Trace; perturbation: boolean } {
  if (signed) {
    const v = signedView(values, priorMean);
    const [lo, hi] = divergingRange([v.values], v.centre);
    return { values: v.values, colour: { colorscale: DIVERGING, zmin: lo, zmax: hi }, perturbation: v.perturbation };
  }
  const [lo, hi] = sequentialRange([values]);
  return { values, colour: { colorscale: SEQUENTIAL, zmin: lo, zmax: hi }, perturbation: false };
}

/** 1 − std² / prior std² per cell (the variance reduction), 0 where the prior std is 0. */
export function varianceReduction(std: ArrayLike<number>, priorStd: ArrayLike<number>): Float64Array {
  return Float64Array.from({ length: std.length }, (_, i) => (priorStd[i] > 0 ? 1 - (std[i] * std[i]) / (priorStd[i] * priorStd[i]) : 0));
}
