/**
 * Figures of the Posterior screen: the 1-D mean with its 68% / 95% bands and the prior's 95% band,
 * the 2-D maps (mean, standard deviation, variance reduction, truth) and the averaging kernel of a
 * selected cell (a row of R). Pure builders over the shown posterior of ../posteriorView.ts.
 */
import { gridDimension, type Grid } from '../../core/grid/grid.ts';
import { axisLabel, withUnit } from '../labels.ts';
import type { ShownPosterior } from '../posteriorView.ts';
import { axes2D, axis1D, band, bandTrace, COLOURS, DIVERGING_SCALE, type Trace, Z68, Z95 } from '../traces.ts';
import { heatTrace, type Layout, mapLayout, title } from './common.ts';

type Quantity = { readonly name: string; readonly unit: string };

/**
 * 1-D: the prior's 95% band, the posterior's 95% and 68% bands when the bands exist (not while a
 * partial, mean-only result is shown), the truth when known, and the posterior mean on top.
 */
export function posteriorBandTraces(grid: Grid, post: ShownPosterior, truth: ArrayLike<number> | null): Trace[] {
  return posteriorTraces1D(
    axis1D(grid),
    { mean: post.mean, priorMean: post.priorMean, priorStd: post.priorStd, std: post.summary?.std ?? null },
    truth,
  );
}

/** Posterior panel in 1-D: mean with 68% and 95% bands (when known), prior 95% band, truth when known. */
export function posteriorTraces1D(
  x: ArrayLike<number>,
  post: { mean: ArrayLike<number>; priorMean: ArrayLike<number>; priorStd: ArrayLike<number>; std: ArrayLike<number> | null },
  truth: ArrayLike<number> | null,
): Trace[] {
  const out: Trace[] = [];
  const pb = band(post.priorMean, post.priorStd, Z95);
  out.push(bandTrace(x, pb.lower, pb.upper, 'prior 95%', COLOURS.prior));
  if (post.std) {
    const b95 = band(post.mean, post.std, Z95);
    const b68 = band(post.mean, post.std, Z68);
    out.push(bandTrace(x, b95.lower, b95.upper, 'posterior 95%', COLOURS.band95));
    out.push(bandTrace(x, b68.lower, b68.upper, 'posterior 68%', COLOURS.band68));
  }
  if (truth)
    out.push({ type: 'scatter', mode: 'lines', x, y: truth, name: 'truth', line: { color: COLOURS.truth, width: 1.2, dash: 'dot' } });
  out.push({ type: 'scatter', mode: 'lines', x, y: post.mean, name: 'posterior mean', line: { color: COLOURS.mean, width: 2.2 } });
  return out;
}

export function posteriorBandLayout(grid: Grid, quantity: Quantity): Layout {
  return {
    title: title('Posterior mean with 68% and 95% bands; prior 95% band'),
    xaxis: { title: { text: axisLabel(grid), standoff: 4 } },
    yaxis: { title: { text: withUnit(quantity.name, quantity.unit) } },
    legend: { orientation: 'h', x: 0, y: -0.18, yanchor: 'top' },
  };
}

/** 2-D maps of the mean, and of the standard deviation and variance reduction once the bands exist (else null). */
export function posteriorMapTraces(grid: Grid, post: ShownPosterior): { mean: Trace[]; std: Trace[] | null; vr: Trace[] | null } {
  const s = post.summary;
  return {
    mean: [heatTrace(grid, post.mean, 'mean')],
    std: s ? [heatTrace(grid, s.std, 'std')] : null,
    vr: s ? [heatTrace(grid, s.varianceReduction, 'variance reduction', { zmin: 0, zmax: 1 })] : null,
  };
}

export function truthMapTraces(grid: Grid, truth: ArrayLike<number>): Trace[] {
  return [heatTrace(grid, truth, 'truth')];
}

/** Layouts of the posterior maps and of the averaging kernel (a map on 2-D grids, a line on 1-D ones). */
export function posteriorLayouts(grid: Grid, quantityUnit: string): Record<'mean' | 'std' | 'vr' | 'truth' | 'kernel', Layout> {
  const kernelTitle = 'Averaging kernel of the selected cell';
  return {
    mean: mapLayout(grid, withUnit('Posterior mean', quantityUnit)),
    std: mapLayout(grid, withUnit('Posterior standard deviation', quantityUnit)),
    vr: mapLayout(grid, 'Variance reduction 1 − σ²post/σ²prior'),
    truth: mapLayout(grid, withUnit('Truth', quantityUnit)),
    kernel:
      gridDimension(grid) === 2
        ? mapLayout(grid, kernelTitle)
        : { title: title(kernelTitle), xaxis: { title: { text: axisLabel(grid) } }, yaxis: { title: { text: 'R row' } } },
  };
}

/**
 * The averaging kernel of `cell` (row of R = Cm Gᵀ K⁻¹ G) with the cell marked: on 2-D grids a
 * diverging heat map symmetric about zero (limits ±max|row|, or ±1 for a zero row), on 1-D grids a line.
 */
export function kernelTraces(grid: Grid, resolution: { readonly cell: number; readonly row: Float64Array }): Trace[] {
  const { cell, row } = resolution;
  if (gridDimension(grid) === 2) {
    const a = row.reduce((m, v) => Math.max(m, Math.abs(v)), 0) || 1;
    const { x, y } = axes2D(grid);
    const nx = grid.shape[0];
    return [
      heatTrace(grid, row, 'R row', { colorscale: DIVERGING_SCALE, zmin: -a, zmax: a }),
      {
        type: 'scatter',
        mode: 'markers',
        x: [x[cell % nx]],
        y: [y[Math.floor(cell / nx)]],
        marker: { symbol: 'x-thin', size: 12, line: { width: 2, color: '#222' } },
        name: 'cell',
        showlegend: false,
      },
    ];
  }
  const x = axis1D(grid);
  return [
    { type: 'scatter', mode: 'lines', x, y: row, name: 'R row', line: { color: COLOURS.accent } },
    { type: 'scatter', mode: 'markers', x: [x[cell]], y: [row[cell]], name: 'cell', marker: { color: '#222', size: 8 } },
  ];
}
