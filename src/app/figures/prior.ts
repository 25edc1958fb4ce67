/** Figures of the Prior screen: correlation against distance, the 2-D correlation map, the Cm heat map. Pure builders. */
import type { Grid } from '../../core/grid/grid.ts';
import type { Matrix } from '../../core/linalg/matrix.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import { downAxisLabel, offsetLabel, withUnit } from '../labels.ts';
import { COLOURS, correlationCurves, correlationMap, MAP_SCALE, termLengths, toRows2D, type Trace } from '../traces.ts';
import { fmtNum, hoverName, type Layout, title } from './common.ts';

/** Largest extent of the grid over its axes (cells × spacing). */
export function gridExtent(grid: Grid): number {
  return Math.max(...grid.shape.map((n, k) => n * grid.spacing[k]));
}

/** Longest correlation length over the prior's terms and both axes of anisotropic ones. */
function longestLength(prior: PriorSpec): number {
  return Math.max(...prior.terms.map((t) => Math.max(...termLengths(t))));
}

/**
 * Correlation against distance along the first axis, out to four of the longest correlation length
 * (at least one cell spacing) or the grid's extent, whichever is shorter: the total with the nugget,
 * each term dotted, and each term's practical range (ρ = 0.05) as a dashed line.
 * Throws what src/core/kernels/correlation.ts throws for a kernel it cannot evaluate.
 */
export function correlationCurveTraces(prior: PriorSpec, grid: Grid): Trace[] {
  const maxLen = Math.max(longestLength(prior), ...grid.spacing);
  const c = correlationCurves(prior, Math.min(gridExtent(grid), 4 * maxLen));
  const traces: Trace[] = [
    { type: 'scatter', mode: 'lines', x: c.r, y: c.total, name: 'total (with nugget)', line: { color: COLOURS.mean, width: 2.5 } },
  ];
  c.terms.forEach((t, k) => {
    traces.push({
      type: 'scatter',
      mode: 'lines',
      x: c.r,
      y: t.y,
      name: `term ${k + 1}: ${t.term.kernel}`,
      line: { dash: 'dot', width: 1.5 },
    });
    traces.push({
      type: 'scatter',
      mode: 'lines+text',
      x: [t.practicalRange, t.practicalRange],
      y: [0, 1],
      name: `practical range ${k + 1}`,
      text: ['', `ρ = 0.05 at ${fmtNum(t.practicalRange)}`],
      textposition: 'top right',
      line: { color: COLOURS.priorLine, dash: 'dash', width: 1 },
      showlegend: false,
    });
  });
  return traces;
}

export function correlationCurveLayout(grid: Grid): Layout {
  return {
    title: title('Correlation against distance (first axis); dashed: practical range ρ = 0.05'),
    xaxis: { title: { text: withUnit('distance r', grid.unit) } },
    yaxis: { title: { text: 'correlation ρ' }, range: [-0.05, 1.1] },
  };
}

/**
 * The total correlation around a cell over offsets up to three of the longest correlation length (or
 * the grid's extent), with the ρ = 0.05 contour. Throws for a kernel it cannot evaluate.
 */
export function correlationMapTraces(prior: PriorSpec, grid: Grid): Trace[] {
  const m = correlationMap(prior, Math.min(3 * longestLength(prior), gridExtent(grid)));
  return [
    {
      type: 'heatmap',
      x: m.offsets,
      y: m.offsets,
      z: m.z,
      colorscale: MAP_SCALE,
      zmin: 0,
      zmax: 1,
      name: 'ρ',
      colorbar: { thickness: 10 },
      hovertemplate: `${hoverName(offsetLabel(grid, 0))} %{x}<br>${hoverName(offsetLabel(grid, 1))} %{y}<br>ρ %{z:.3f}<extra></extra>`,
    },
    {
      type: 'contour',
      x: m.offsets,
      y: m.offsets,
      z: m.z,
      contours: { start: 0.05, end: 0.05, size: 1, coloring: 'none', showlabels: true },
      line: { color: '#fff', width: 2 },
      showscale: false,
      name: 'ρ = 0.05',
      hoverinfo: 'skip',
    },
  ];
}

/** Same orientation as every other map: the second offset increases downwards. */
export function correlationMapLayout(grid: Grid): Layout {
  return {
    title: title('Correlation map around a cell; contour ρ = 0.05'),
    xaxis: { title: { text: offsetLabel(grid, 0) } },
    yaxis: { title: { text: downAxisLabel(grid, true) }, autorange: 'reversed', scaleanchor: 'x' },
  };
}

/** Heat map of Cm, row i down, column j across. */
export function covarianceTraces(cov: Matrix): Trace[] {
  return [{ type: 'heatmap', z: toRows2D({ shape: [cov.cols, cov.rows], spacing: [1, 1] }, cov.data), colorscale: MAP_SCALE, name: 'Cm' }];
}

export function covarianceLayout(quantityUnit: string): Layout {
  return {
    title: title(withUnit('Prior covariance Cm', quantityUnit ? `(${quantityUnit})²` : '')),
    xaxis: { title: { text: 'cell j' } },
    yaxis: { title: { text: 'cell i' }, autorange: 'reversed', scaleanchor: 'x' },
  };
}
