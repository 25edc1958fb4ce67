/**
 * Pure trace builders of the prior-selection screen (no DOM): evidence map heat map with its
 * maximum, profiles, leave-one-out contributions, rank histogram, candidate bands. Unit-tested in
 * test/app/select/traces.test.ts.
 */
import type { EvidenceMap, EvidenceProfile } from '../../core/tuning/index.ts';
import type { Grid } from '../../core/grid/grid.ts';
import type { Matrix } from '../../core/linalg/matrix.ts';
import { axisLabel, downAxisLabel } from '../labels.ts';
import { axes2D, COLOURS, rowOf, toRows2D, type Trace } from '../traces.ts';

/** Colour scale of the evidence map (our own: ink blue through plum to warm cream). */
export const EVIDENCE_SCALE: [number, string][] = [
  [0, '#1b1f3b'],
  [0.35, '#4b3b75'],
  [0.65, '#a65a7a'],
  [0.85, '#e3a46f'],
  [1, '#fbf0d0'],
];

/** Lower colour limit: the map is clipped this far (natural-log units) below its maximum, so the ridge stays readable. */
export const MAP_DEPTH = 30;

/**
 * Heat map of an evidence map over log₁₀ length (x) and log₁₀ variance (y): z[j][i] is the value
 * at lengths[i], variances[j] (the map is stored row-major over (length, variance)); NaN cells
 * (not computed, or K did not factor) become null (gaps). Plus markers for the maximum and, when
 * given, the current prior.
 */
export function evidenceMapTraces(map: EvidenceMap, current: { length: number; variance: number } | null = null): Trace[] {
  const nl = map.lengths.length;
  const nv = map.variances.length;
  const x = Array.from(map.lengths, Math.log10);
  const y = Array.from(map.variances, Math.log10);
  const z: (number | null)[][] = [];
  const text: string[][] = [];
  for (let j = 0; j < nv; j++) {
    const row: (number | null)[] = new Array(nl);
    const trow: string[] = new Array(nl);
    for (let i = 0; i < nl; i++) {
      const v = map.logEvidence[i * nv + j];
      row[i] = Number.isFinite(v) ? v : null;
      trow[i] = `ℓ = ${map.lengths[i].toPrecision(4)}, σ² = ${map.variances[j].toPrecision(4)}`;
    }
    z.push(row);
    text.push(trow);
  }
  const top = map.best?.logEvidence ?? 0;
  const traces: Trace[] = [
    {
      type: 'heatmap',
      name: 'log evidence',
      x,
      y,
      z,
      text,
      colorscale: EVIDENCE_SCALE,
      zmax: map.best ? top : undefined,
      zmin: map.best ? top - MAP_DEPTH : undefined,
      hovertemplate: '%{text}<br>log evidence %{z:.6g}<extra></extra>',
      colorbar: { thickness: 10, title: { text: 'log p(d)' } },
    },
  ];
  if (map.best) {
    traces.push({
      type: 'scatter',
      mode: 'markers',
      name: 'maximum',
      x: [Math.log10(map.best.length)],
      y: [Math.log10(map.best.variance)],
      marker: { symbol: 'star', size: 14, color: '#ffffff', line: { color: '#1b1f3b', width: 1.5 } },
      hovertemplate: `maximum: ℓ = ${map.best.length.toPrecision(4)}, σ² = ${map.best.variance.toPrecision(4)}<extra></extra>`,
    });
  }
  if (current && current.length > 0 && current.variance > 0) {
    traces.push({
      type: 'scatter',
      mode: 'markers',
      name: 'current prior',
      x: [Math.log10(current.length)],
      y: [Math.log10(current.variance)],
      marker: { symbol: 'circle-open', size: 12, color: '#e3a46f', line: { width: 2.5, color: '#e3a46f' } },
      hoverinfo: 'skip',
    });
  }
  return traces;
}

/**
 * The keyboard cursor on the evidence map (./mapKeys.ts): an open square on cell `cell` (the map's
 * row-major index over (length, variance)), at the same log₁₀ coordinates as the heat map.
 */
export function mapCursorTrace(map: Pick<EvidenceMap, 'lengths' | 'variances'>, cell: number): Trace {
  const nv = map.variances.length;
  return {
    type: 'scatter',
    mode: 'markers',
    name: 'keyboard cell',
    x: [Math.log10(map.lengths[Math.floor(cell / nv)])],
    y: [Math.log10(map.variances[cell % nv])],
    marker: { symbol: 'square-open', size: 16, color: '#ffffff', line: { width: 2.5, color: '#ffffff' } },
    hoverinfo: 'skip',
  };
}

/** Index (row-major over length, variance) of the map cell nearest to (log₁₀ ℓ, log₁₀ σ²), null outside the map. */
export function mapCellAt(map: Pick<EvidenceMap, 'lengths' | 'variances'>, x: number, y: number): number | null {
  const near = (axis: Float64Array, v: number): number | null => {
    const n = axis.length;
    const logs = Array.from(axis, Math.log10);
    const half = n > 1 ? (logs[n - 1] - logs[0]) / (n - 1) / 2 : 0.5;
    if (v < logs[0] - half || v > logs[n - 1] + half) return null;
    let best = 0;
    for (let k = 1; k < n; k++) if (Math.abs(logs[k] - v) < Math.abs(logs[best] - v)) best = k;
    return best;
  };
  const i = near(map.lengths, x);
  const j = near(map.variances, y);
  return i === null || j === null ? null : i * map.variances.length + j;
}

/** A profile as a line with markers over the parameter (log axis), its maximum marked. */
export function profileTraces(p: EvidenceProfile, colour = '#4b3b75'): Trace[] {
  const y = Array.from(p.logEvidence, (v) => (Number.isFinite(v) ? v : null));
  const out: Trace[] = [
    {
      type: 'scatter',
      mode: 'lines+markers',
      name: 'log evidence',
      x: Array.from(p.values),
      y,
      line: { color: colour, width: 2 },
      marker: { size: 5 },
    },
  ];
  if (p.best)
    out.push({
      type: 'scatter',
      mode: 'markers',
      name: 'maximum',
      x: [p.best.value],
      y: [p.best.logEvidence],
      marker: { symbol: 'star', size: 13, color: '#e3a46f', line: { color: '#1b1f3b', width: 1 } },
    });
  return out;
}

/** Log-spaced values from min to max inclusive (the profile's x values). */
export function logValues(min: number, max: number, count: number): number[] {
  if (count === 1) return [min];
  return Array.from({ length: count }, (_, k) => min * (max / min) ** (k / (count - 1)));
}

/** Per-datum leave-one-out contributions as bars. */
export function looTraces(contributions: ArrayLike<number>): Trace[] {
  const x = Array.from({ length: contributions.length }, (_, i) => i + 1);
  return [{ type: 'bar', name: 'log p(dᵢ | d₋ᵢ)', x, y: Array.from(contributions), marker: { color: '#4b3b75' } }];
}

/** Rank histogram bars and the flat line of a calibrated posterior (total / bins). */
export function rankTraces(hist: ArrayLike<number>): Trace[] {
  const n = hist.length;
  const total = Array.from(hist).reduce((a, v) => a + v, 0);
  const x = Array.from({ length: n }, (_, i) => i);
  return [
    { type: 'bar', name: 'count', x, y: Array.from(hist), marker: { color: '#a65a7a' } },
    {
      type: 'scatter',
      mode: 'lines',
      name: 'uniform (calibrated)',
      x: [-0.5, n - 0.5],
      y: [total / n, total / n],
      line: { color: '#1b1f3b', dash: 'dash', width: 1 },
    },
  ];
}

/** '#rrggbb' as rgba() with the given opacity. */
export function withAlpha(hex: string, alpha: number): string {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
  if (!m) throw new RangeError(`withAlpha: expected a colour '#rrggbb', got ${JSON.stringify(hex)}`);
  return `rgba(${parseInt(m[1], 16)}, ${parseInt(m[2], 16)}, ${parseInt(m[3], 16)}, ${alpha})`;
}

/** Overlaid 95% band (mean ± 1.96 σ) and mean line of each candidate (1-D). */
export function candidateBandTraces(
  x: ArrayLike<number>,
  items: readonly { name: string; colour: string; mean: ArrayLike<number>; std: ArrayLike<number> }[],
): Trace[] {
  const z = 1.959963984540054;
  const out: Trace[] = [];
  for (const it of items) {
    const n = x.length;
    const xs = new Array<number>(2 * n);
    const ys = new Array<number>(2 * n);
    for (let i = 0; i < n; i++) {
      xs[i] = x[i];
      ys[i] = it.mean[i] + z * it.std[i];
      xs[2 * n - 1 - i] = x[i];
      ys[2 * n - 1 - i] = it.mean[i] - z * it.std[i];
    }
    out.push({
      type: 'scatter',
      mode: 'lines',
      name: `${it.name} 95%`,
      x: xs,
      y: ys,
      fill: 'toself',
      fillcolor: withAlpha(it.colour, 0.14),
      line: { width: 0.5, color: withAlpha(it.colour, 0.5) },
      hoverinfo: 'skip',
    });
    out.push({
      type: 'scatter',
      mode: 'lines',
      name: `${it.name} mean`,
      x: Array.from(x),
      y: Array.from(it.mean),
      line: { color: it.colour, width: 2 },
    });
  }
  return out;
}

/** A pinned candidate's posterior draws on a 1-D grid: one line per draw in its colour, one legend entry per candidate. */
export function candidateDrawTraces(
  x: ArrayLike<number>,
  items: readonly { id: string; name: string; colour: string; draws: Matrix }[],
): Trace[] {
  const xs = Array.from(x);
  const out: Trace[] = [];
  for (const it of items) {
    for (let k = 0; k < it.draws.rows; k++) {
      out.push({
        type: 'scatter',
        mode: 'lines',
        name: `${it.name} draw ${k + 1}`,
        x: xs,
        y: Array.from(rowOf(it.draws.data, it.draws.cols, k)),
        line: { color: it.colour, width: 1 },
        showlegend: k === 0,
        legendgroup: it.id,
      });
    }
  }
  return out;
}

/** The truth as a dotted line over the candidates' bands. */
export function candidateTruthTrace(x: ArrayLike<number>, truth: ArrayLike<number>): Trace {
  return {
    type: 'scatter',
    mode: 'lines',
    name: 'truth',
    x: Array.from(x),
    y: Array.from(truth),
    line: { color: COLOURS.truth, dash: 'dot', width: 1 },
  };
}

/** Layout of the candidates' 1-D comparison plots (bands, draws): legend below, axis titles with units. */
export function candidateLineLayout(title: string, xTitle: string, yTitle: string): Record<string, unknown> {
  return {
    title: { text: title, font: { size: 12 } },
    xaxis: { title: { text: xTitle, standoff: 4 } },
    legend: { orientation: 'h', x: 0, y: -0.2, yanchor: 'top' },
    yaxis: { title: { text: yTitle } },
  };
}

/** A candidate's map on a 2-D grid, on the colour scale and range every candidate shares (../colourScales.ts candidateRanges). */
export function candidateMapTrace(
  grid: Grid,
  field: ArrayLike<number>,
  name: string,
  scale: [number, string][],
  range: readonly [number, number],
): Trace {
  const { x, y } = axes2D(grid);
  return {
    type: 'heatmap',
    x,
    y,
    z: toRows2D(grid, field),
    colorscale: scale,
    name,
    colorbar: { thickness: 8 },
    zmin: range[0],
    zmax: range[1],
  };
}

/** Same orientation as every other map (second axis increasing downwards, ../labels.ts), marked ↓ in the axis title. */
export function candidateMapLayout(grid: Grid, title: string): Record<string, unknown> {
  return {
    title: { text: title, font: { size: 11 } },
    yaxis: { autorange: 'reversed', scaleanchor: 'x', constrain: 'domain', title: { text: downAxisLabel(grid) } },
    xaxis: { constrain: 'domain', title: { text: axisLabel(grid, 0) } },
    margin: { l: 40, r: 8, t: 26, b: 30 },
  };
}
