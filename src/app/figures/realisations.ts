/** The realisation gallery (prior or posterior draws): six small panels on one colour scale. Pure builders. */
import { gridDimension, type Grid } from '../../core/grid/grid.ts';
import type { Matrix } from '../../core/linalg/matrix.ts';
import { orientationTag } from '../labels.ts';
import { axis1D, COLOURS, rowOf, type Trace } from '../traces.ts';
import { DIVERGING } from '../colourScales.ts';
import { heatTrace, type Layout, title as titleOf } from './common.ts';

/** Axis suffix of panel k in plotly's subplot grid: '' for the first, then '2', '3', … */
function axisSuffix(k: number): string {
  return k === 0 ? '' : String(k + 1);
}

/** One trace per draw (row of `draws`), each on its own pair of axes; 2-D draws share one colour axis. */
export function galleryTraces(grid: Grid, draws: Matrix): Trace[] {
  const out: Trace[] = [];
  const is2D = gridDimension(grid) === 2;
  const x = axis1D(grid);
  for (let k = 0; k < draws.rows; k++) {
    const f = rowOf(draws.data, draws.cols, k);
    const ax = axisSuffix(k);
    if (is2D) {
      out.push({ ...heatTrace(grid, f, `draw ${k + 1}`), xaxis: `x${ax}`, yaxis: `y${ax}`, coloraxis: 'coloraxis' });
    } else {
      out.push({
        type: 'scatter',
        mode: 'lines',
        x,
        y: f,
        name: `draw ${k + 1}`,
        xaxis: `x${ax}`,
        yaxis: `y${ax}`,
        line: { color: COLOURS.mean, width: 1.2 },
        showlegend: false,
      });
    }
  }
  return out;
}

/**
 * A 2 × 3 grid of panels. `range` is the colour range (2-D) or the value axis (1-D) shared by both
 * galleries, so prior and posterior draws compare on one scale; in 2-D on the diverging scale (the
 * caller centres the range on the prior mean, ../colourScales.ts) with each panel at true aspect.
 */
export function galleryLayout(grid: Grid, quantityUnit: string, panels: number, range: [number, number], title: string): Layout {
  const is2D = gridDimension(grid) === 2;
  const l: Layout = {
    title: titleOf(is2D ? `${title} ${orientationTag(grid)}` : title),
    grid: { rows: 2, columns: 3, pattern: 'independent', xgap: 0.08, ygap: 0.16 },
    margin: { l: 40, r: 10, t: 30, b: 30 },
    showlegend: false,
  };
  if (is2D)
    l.coloraxis = { colorscale: DIVERGING, cmin: range[0], cmax: range[1], colorbar: { thickness: 10, title: { text: quantityUnit } } };
  for (let k = 0; k < panels; k++) {
    const ax = axisSuffix(k);
    l[`yaxis${ax}`] = is2D ? { autorange: 'reversed', showticklabels: false, scaleanchor: `x${ax}`, constrain: 'domain' } : { range };
    l[`xaxis${ax}`] = is2D ? { showticklabels: false, constrain: 'domain' } : {};
  }
  return l;
}
