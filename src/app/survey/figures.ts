/**
 * Figures of the survey in place (pure builders, unit-tested in test/app/survey/figures.test.ts):
 *
 * - a profile: observed data (±1σ), predictions G m̃ and normalised residuals against the position
 *   where each point datum was measured;
 * - rays: each path datum drawn from its source to its receiver over the section, coloured by its
 *   normalised residual, with the misfit r² of each datum against its number beside it;
 * - the grid overlay of the Problem screen: the grid's outline (cell edges), its first cell centre
 *   (the origin), the cell size and the geometry, so that a swapped shape or a wrong origin shows.
 *
 * Coordinates are the problem's own (grid unit, grid axes); the second axis of every 2-D plot
 * increases downwards (see ../figures/common.ts mapLayout).
 */
import { formatNumber } from '../../core/format.ts';
import { gridDimension, type Grid } from '../../core/grid/grid.ts';
import { gridBounds } from '../../core/problems/geometry.ts';
import type { DataGeometry } from '../../core/problems/spec.ts';
import { fmtNum, hoverName, type Layout, mapLayout, title } from '../figures/common.ts';
import { axisLabel, axisNames, withUnit } from '../labels.ts';
import { COLOURS, type Trace } from '../traces.ts';

/** Guide lines of the residual plots at ±this many σ. */
export const RESIDUAL_GUIDE = 2;

/** Our diverging scale for residuals: blue below zero, grey at zero (visible on white), red above. */
export const RESIDUAL_SCALE: [number, string][] = [
  [0, '#2b4c9b'],
  [0.5, '#b9b9b9'],
  [1, '#b2442e'],
];

/** Number of colour classes the rays are drawn in (odd, so zero has its own grey class). */
export const RAY_CLASSES = 7;

interface DataLike {
  readonly grid: Grid;
  readonly values: ArrayLike<number>;
  readonly sigma: ArrayLike<number>;
  readonly dataUnit: string;
}

interface FitLike {
  readonly predicted: ArrayLike<number>;
  readonly residuals: ArrayLike<number>;
}

/**
 * The coordinate a profile runs along: the only one in 1-D; in 2-D the axis along which the
 * positions spread most (the first on a tie), so stations along a surface line give a profile in x.
 */
export function profileAxis(grid: Grid, positions: { rows: number; cols: number; data: Float64Array }): number {
  if (positions.cols < 2) return 0;
  const spread = [0, 1].map((k) => {
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = 0; i < positions.rows; i++) {
      const v = positions.data[i * positions.cols + k];
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
    return hi - lo;
  });
  return gridDimension(grid) === 2 && spread[1] > spread[0] ? 1 : 0;
}

/** Data indices ordered by position along `axis` (stable: equal positions keep the data order). */
function orderAlong(positions: { rows: number; cols: number; data: Float64Array }, axis: number): { order: number[]; x: number[] } {
  const at = (i: number) => positions.data[i * positions.cols + axis];
  const order = Array.from({ length: positions.rows }, (_, i) => i).sort((a, b) => at(a) - at(b) || a - b);
  return { order, x: order.map(at) };
}

/**
 * Observed data (±1σ), and with a fit the prediction G m̃ and the normalised residuals, against
 * position (sorted along the profile axis; `customdata` holds each datum's number, 1-based).
 */
export function profileTraces(
  p: DataLike,
  positions: { rows: number; cols: number; data: Float64Array },
  fit: FitLike | null,
): { data: Trace[]; residuals: Trace[]; axis: number } {
  const axis = profileAxis(p.grid, positions);
  const { order, x } = orderAlong(positions, axis);
  const pick = (a: ArrayLike<number>) => order.map((i) => a[i]);
  const numbers = order.map((i) => i + 1);
  const name = hoverName(axisNames(p.grid)[axis] ?? 'x');
  const data: Trace[] = [
    {
      type: 'scatter',
      mode: 'markers',
      x,
      y: pick(p.values),
      customdata: numbers,
      name: 'observed ±1σ',
      marker: { color: COLOURS.data, size: 5 },
      error_y: { type: 'data', array: pick(p.sigma), visible: true, color: COLOURS.data, thickness: 1 },
      hovertemplate: `datum %{customdata}<br>${name} %{x}<br>d %{y:.4g}<extra></extra>`,
    },
  ];
  const residuals: Trace[] = [];
  if (fit) {
    data.push({
      type: 'scatter',
      mode: 'lines+markers',
      x,
      y: pick(fit.predicted),
      customdata: numbers,
      name: 'predicted G m̃',
      marker: { color: COLOURS.predicted, size: 4 },
      line: { width: 1 },
      hovertemplate: `datum %{customdata}<br>${name} %{x}<br>G m̃ %{y:.4g}<extra></extra>`,
    });
    const lo = x[0] ?? 0;
    const hi = x[x.length - 1] ?? 0;
    const pad = hi > lo ? (hi - lo) / 40 : 1;
    const guide = (y: number): Trace => ({
      type: 'scatter',
      mode: 'lines',
      x: [lo - pad, hi + pad],
      y: [y, y],
      line: { dash: 'dash', color: '#999', width: 1 },
      showlegend: false,
      hoverinfo: 'skip',
    });
    residuals.push(
      {
        type: 'scatter',
        mode: 'markers',
        x,
        y: pick(fit.residuals),
        customdata: numbers,
        name: 'normalised residual',
        marker: {
          color: pick(fit.residuals),
          colorscale: RESIDUAL_SCALE,
          ...symmetricRange(fit.residuals),
          size: 7,
          line: { color: '#555', width: 0.5 },
        },
        hovertemplate: `datum %{customdata}<br>${name} %{x}<br>(d − G m̃)/σ %{y:.3g}<extra></extra>`,
      },
      { ...guide(RESIDUAL_GUIDE), name: '±2' },
      guide(-RESIDUAL_GUIDE),
    );
  }
  return { data, residuals, axis };
}

export function profileLayouts(p: DataLike, axis: number, withFit = true): { data: Layout; residuals: Layout } {
  const xaxis = { title: { text: `${axisLabel(p.grid, axis)}, where each datum was measured` } };
  return {
    data: {
      title: title(withFit ? 'Data and prediction along the survey' : 'Data with ±1σ error bars along the survey'),
      xaxis,
      yaxis: { title: { text: withUnit('d', p.dataUnit) } },
    },
    residuals: {
      title: title('Normalised residuals (d − G m̃)/σ along the survey'),
      xaxis,
      yaxis: { title: { text: 'residual (σ units, dimensionless)' } },
    },
  };
}

/** The Problem screen's data plot against position, or null when the data have no positions. */
export function surveyDataFigure(p: DataLike & { readonly geometry: DataGeometry | null }): { data: Trace[]; layout: Layout } | null {
  if (p.geometry?.kind !== 'points') return null;
  const t = profileTraces(p, p.geometry.positions, null);
  return { data: t.data, layout: profileLayouts(p, t.axis, false).data };
}

/** cmin/cmax symmetric about zero, at least ±3 so that small residuals stay grey. */
export function symmetricRange(r: ArrayLike<number>): { cmin: number; cmax: number } {
  let m = 3;
  for (let i = 0; i < r.length; i++) if (Number.isFinite(r[i])) m = Math.max(m, Math.abs(r[i]));
  return { cmin: -m, cmax: m };
}

/** The colour of class k of `classes` over RESIDUAL_SCALE (linear between its three stops). */
export function classColour(k: number, classes = RAY_CLASSES): string {
  const t = classes === 1 ? 0.5 : k / (classes - 1);
  const hex = (s: string) => [1, 3, 5].map((i) => Number.parseInt(s.slice(i, i + 2), 16));
  const [a, b] = t <= 0.5 ? [hex(RESIDUAL_SCALE[0][1]), hex(RESIDUAL_SCALE[1][1])] : [hex(RESIDUAL_SCALE[1][1]), hex(RESIDUAL_SCALE[2][1])];
  const u = t <= 0.5 ? t / 0.5 : (t - 0.5) / 0.5;
  return `rgb(${a!.map((v, i) => Math.round(v + (b![i] - v) * u)).join(', ')})`;
}

/** The class of residual r on [−R, R] split into `classes` equal intervals (ends clamped). */
export function residualClass(r: number, R: number, classes = RAY_CLASSES): number {
  const k = Math.floor(((r + R) / (2 * R)) * classes);
  return Math.min(classes - 1, Math.max(0, k));
}

type Paths = Extract<DataGeometry, { kind: 'paths' }>;

/**
 * The rays over the section. With residuals: one line trace per colour class (segments separated
 * by null, so 10⁴ rays are a handful of traces), the classes nearest zero drawn first so large
 * misfits lie on top, plus a marker at each ray's midpoint that carries the colour bar and the
 * hover (datum number and residual). Without residuals: all rays in one thin grey trace.
 * Sources and receivers are marked.
 */
export function rayTraces(grid: Grid, paths: Paths, residuals: ArrayLike<number> | null): Trace[] {
  const m = paths.sources.rows;
  const s = paths.sources.data;
  const r = paths.receivers.data;
  const [a, b] = axisNames(grid);
  const segments = (ks: readonly number[]) => {
    const x: (number | null)[] = [];
    const y: (number | null)[] = [];
    for (const k of ks) {
      x.push(s[2 * k], r[2 * k], null);
      y.push(s[2 * k + 1], r[2 * k + 1], null);
    }
    return { x, y };
  };
  const out: Trace[] = [];
  const all = Array.from({ length: m }, (_, k) => k);
  if (!residuals) {
    // Light lines over the sensitivity map, fainter the more rays there are (so 10⁴ rays do not hide it).
    const alpha = Math.min(0.8, Math.max(0.08, 6 / Math.sqrt(m)));
    out.push({
      type: 'scatter',
      mode: 'lines',
      ...segments(all),
      name: `${m} ray${m === 1 ? '' : 's'}`,
      line: { color: `rgba(235, 235, 240, ${alpha.toFixed(2)})`, width: 1 },
      hoverinfo: 'skip',
    });
  } else {
    const { cmax: R } = symmetricRange(residuals);
    const byClass: number[][] = Array.from({ length: RAY_CLASSES }, () => []);
    for (let k = 0; k < m; k++) byClass[residualClass(residuals[k], R)].push(k);
    const mid = (RAY_CLASSES - 1) / 2;
    const drawOrder = Array.from({ length: RAY_CLASSES }, (_, k) => k).sort((p, q) => Math.abs(p - mid) - Math.abs(q - mid) || p - q);
    for (const c of drawOrder) {
      if (byClass[c].length === 0) continue;
      const lo = -R + (2 * R * c) / RAY_CLASSES;
      const hi = lo + (2 * R) / RAY_CLASSES;
      out.push({
        type: 'scatter',
        mode: 'lines',
        ...segments(byClass[c]),
        name: `residual ${fmtNum(lo)} to ${fmtNum(hi)}`,
        line: { color: classColour(c), width: Math.abs(c - mid) >= 2 ? 1.6 : 1 },
        showlegend: false,
        hoverinfo: 'skip',
      });
    }
    out.push({
      type: 'scatter',
      mode: 'markers',
      x: all.map((k) => (s[2 * k] + r[2 * k]) / 2),
      y: all.map((k) => (s[2 * k + 1] + r[2 * k + 1]) / 2),
      customdata: all.map((k) => k + 1),
      name: 'normalised residual per ray',
      marker: {
        color: Array.from(residuals),
        colorscale: RESIDUAL_SCALE,
        cmin: -R,
        cmax: R,
        size: 3,
        opacity: 0.6,
        colorbar: { thickness: 10, len: 0.9, title: { text: '(d − G m̃)/σ', side: 'right' } },
      },
      hovertemplate: `ray %{customdata}<br>normalised residual %{marker.color:.3g}<extra></extra>`,
      showlegend: false,
    });
  }
  out.push(
    endsTrace(paths.sources, 'sources', 'triangle-right', '#3a3a46', a!, b!),
    endsTrace(paths.receivers, 'receivers', 'triangle-left', '#0f5d6b', a!, b!),
  );
  return out;
}

/** The distinct ends (sources or receivers) as markers. */
function endsTrace(ends: { rows: number; data: Float64Array }, name: string, symbol: string, color: string, a: string, b: string): Trace {
  const seen = new Set<string>();
  const x: number[] = [];
  const y: number[] = [];
  for (let k = 0; k < ends.rows; k++) {
    const key = `${ends.data[2 * k]},${ends.data[2 * k + 1]}`;
    if (seen.has(key)) continue;
    seen.add(key);
    x.push(ends.data[2 * k]);
    y.push(ends.data[2 * k + 1]);
  }
  return {
    type: 'scatter',
    mode: 'markers',
    x,
    y,
    name: `${name} (${x.length})`,
    marker: { symbol, size: 8, color },
    hovertemplate: `${name}<br>${hoverName(a)} %{x}<br>${hoverName(b)} %{y}<extra></extra>`,
  };
}

/** Misfit of each datum r² against its number, with its expectation 1 under the model for reference. */
export function misfitTraces(residuals: ArrayLike<number>): Trace[] {
  const m = residuals.length;
  const idx = Array.from({ length: m }, (_, i) => i + 1);
  const r2 = Array.from(residuals, (v) => v * v);
  return [
    {
      type: 'bar',
      x: idx,
      y: r2,
      name: 'misfit r²',
      marker: { color: Array.from(residuals), colorscale: RESIDUAL_SCALE, ...symmetricRange(residuals) },
    },
    {
      type: 'scatter',
      mode: 'lines',
      x: [0.5, m + 0.5],
      y: [1, 1],
      name: 'r² = 1',
      line: { dash: 'dash', color: '#999', width: 1 },
      hoverinfo: 'skip',
    },
  ];
}

export function rayLayouts(grid: Grid): { rays: Layout; misfit: Layout } {
  return {
    rays: { ...mapLayout(grid, 'Rays coloured by normalised residual (d − G m̃)/σ'), ...overlayLegend() },
    misfit: {
      title: title('Misfit of each datum r² = ((d − G m̃)/σ)²'),
      xaxis: { title: { text: 'datum number' } },
      yaxis: { title: { text: 'r² (dimensionless)' } },
    },
  };
}

/**
 * The Problem screen's overlay: the grid's outline at the outer cell edges, named with its shape
 * and cell size; the first cell centre (the origin); and the geometry (positions as markers, rays
 * as thin lines with their ends). On a 1-D grid the outline is a segment at height 0 of the
 * sensitivity plot and positions are markers on it.
 */
export function gridOverlayTraces(grid: Grid, geometry: DataGeometry | null): Trace[] {
  const b = gridBounds(grid);
  const u = grid.unit ? ` ${grid.unit}` : '';
  const [a, c] = axisNames(grid);
  const twoD = gridDimension(grid) === 2;
  const outline: Trace = {
    type: 'scatter',
    mode: 'lines',
    x: twoD ? [b.x[0], b.x[1], b.x[1], b.x[0], b.x[0]] : [b.x[0], b.x[1]],
    y: twoD ? [b.y[0], b.y[0], b.y[1], b.y[1], b.y[0]] : [0, 0],
    name: `grid ${grid.shape.join(' × ')} cells of ${grid.spacing.map((d) => formatNumber(d)).join(' × ')}${u}`,
    line: { color: '#d0352b', width: 2 },
    hoverinfo: 'skip',
  };
  const o = [grid.origin?.[0] ?? 0, grid.origin?.[1] ?? 0];
  const origin: Trace = {
    type: 'scatter',
    mode: 'markers',
    x: [o[0]],
    y: [twoD ? o[1] : 0],
    name: `first cell centre (${twoD ? `${formatNumber(o[0])}, ${formatNumber(o[1])}` : formatNumber(o[0])})${u}`,
    marker: { symbol: 'x', size: 10, color: '#d0352b' },
    hovertemplate: `first cell centre (origin)<br>${hoverName(a!)} %{x}${twoD ? `<br>${hoverName(c!)} %{y}` : ''}<extra></extra>`,
  };
  const out = [outline, origin];
  if (geometry?.kind === 'points') {
    const p = geometry.positions;
    out.push({
      type: 'scatter',
      mode: 'markers',
      x: Array.from({ length: p.rows }, (_, i) => p.data[i * p.cols]),
      y: Array.from({ length: p.rows }, (_, i) => (p.cols > 1 && twoD ? p.data[i * p.cols + 1] : 0)),
      customdata: Array.from({ length: p.rows }, (_, i) => i + 1),
      name: `data positions (${p.rows})`,
      marker: { symbol: 'triangle-down', size: 8, color: COLOURS.data, line: { color: 'white', width: 0.5 } },
      hovertemplate: `datum %{customdata}<br>${hoverName(a!)} %{x}${twoD ? `<br>${hoverName(c!)} %{y}` : ''}<extra></extra>`,
    });
  } else if (geometry?.kind === 'paths') {
    out.push(...rayTraces(grid, geometry, null));
  }
  return out;
}

/** Legend below a map so that it does not cover the section. */
export function overlayLegend(): Layout {
  return {
    showlegend: true,
    legend: { orientation: 'h', yanchor: 'top', y: -0.3, font: { size: 10 } },
    margin: { l: 56, r: 10, t: 30, b: 100 },
  };
}
