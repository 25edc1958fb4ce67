/** Figures of the Data fit screen: observed against predicted data, and the normalised residuals. Pure builders. */
import { withUnit } from '../labels.ts';
import { COLOURS, type Trace } from '../traces.ts';
import { datumNumbers, type Layout, title } from './common.ts';
import { observedTrace } from './problem.ts';

/** Guide lines of the residual plot at ±this many σ. */
export const RESIDUAL_GUIDE = 2;

/**
 * Observed data with ±1σ bars and the prediction G m̃; the residuals (d − G m̃)/σ as bars with dashed
 * guides at ±2 across the whole datum range.
 */
export function fitTraces(
  data: { readonly values: ArrayLike<number>; readonly sigma: ArrayLike<number> },
  post: { readonly predicted: ArrayLike<number>; readonly residuals: ArrayLike<number> },
): { obs: Trace[]; res: Trace[] } {
  const m = data.values.length;
  const idx = datumNumbers(m);
  const guide = (y: number): Trace => ({
    type: 'scatter',
    mode: 'lines',
    x: [0.5, m + 0.5],
    y: [y, y],
    line: { dash: 'dash', color: '#999', width: 1 },
    showlegend: false,
    hoverinfo: 'skip',
  });
  return {
    obs: [
      observedTrace(data.values, data.sigma),
      {
        type: 'scatter',
        mode: 'lines+markers',
        x: idx,
        y: post.predicted,
        name: 'predicted G m̃',
        marker: { color: COLOURS.predicted, size: 4 },
        line: { width: 1 },
      },
    ],
    res: [
      { type: 'bar', x: idx, y: post.residuals, name: 'normalised residual', marker: { color: COLOURS.accent } },
      { ...guide(RESIDUAL_GUIDE), name: '±2' },
      guide(-RESIDUAL_GUIDE),
    ],
  };
}

export function fitLayouts(dataUnit: string): { obs: Layout; res: Layout } {
  return {
    obs: {
      title: title('Observed and predicted data'),
      xaxis: { title: { text: 'datum number' } },
      yaxis: { title: { text: withUnit('d', dataUnit) } },
    },
    res: {
      title: title('Normalised residuals (d − G m̃)/σ'),
      xaxis: { title: { text: 'datum number' } },
      yaxis: { title: { text: 'residual (σ units, dimensionless)' } },
    },
  };
}
