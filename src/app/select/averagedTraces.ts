/**
 * Traces of the hyperparameter-averaged posterior beside the current prior's (pure; tested in
 * test/app/select/averagedTraces.test.ts): in 1-D both means with their 95% bands on one plot; in
 * 2-D four maps, the two means on one diverging range about the prior mean, the two standard
 * deviations on one sequential range from 0.
 */
import type { Grid } from '../../core/grid/grid.ts';
import { band, bandTrace, Z95, type Trace } from '../traces.ts';
import { DIVERGING, divergingRange, SEQUENTIAL, sequentialRange, signedView } from '../colourScales.ts';
import { mapTrace } from '../overview/traces.ts';

export interface MeanStd {
  readonly mean: ArrayLike<number>;
  readonly std: ArrayLike<number>;
}

export const AVERAGED_COLOUR = '#b0601a';
const AVERAGED_FILL = 'rgba(201, 120, 30, 0.22)';
const CHOSEN_COLOUR = '#0f5d6b';
const CHOSEN_FILL = 'rgba(22, 134, 150, 0.22)';

export function averagedTraces1D(x: ArrayLike<number>, chosen: MeanStd, averaged: MeanStd): Trace[] {
  const a = band(averaged.mean, averaged.std, Z95);
  const c = band(chosen.mean, chosen.std, Z95);
  return [
    bandTrace(x, a.lower, a.upper, 'averaged 95%', AVERAGED_FILL),
    bandTrace(x, c.lower, c.upper, 'this prior 95%', CHOSEN_FILL),
    { type: 'scatter', mode: 'lines', x, y: averaged.mean, name: 'averaged mean', line: { color: AVERAGED_COLOUR, width: 2 } },
    {
      type: 'scatter',
      mode: 'lines',
      x,
      y: chosen.mean,
      name: 'this prior: mean',
      line: { color: CHOSEN_COLOUR, width: 1.6, dash: 'dash' },
    },
  ];
}

export function averagedMaps(grid: Grid, unit: string, priorMean: ArrayLike<number>, chosen: MeanStd, averaged: MeanStd) {
  const c = signedView(chosen.mean, priorMean);
  const a = signedView(averaged.mean, priorMean);
  const range = divergingRange([c.values, a.values], c.centre);
  const srange = sequentialRange([chosen.std, averaged.std]);
  const title = c.perturbation ? `− prior mean (${unit})` : unit;
  return {
    chosenMean: [mapTrace(grid, c.values, 'this prior: mean', DIVERGING, range, title)],
    averagedMean: [mapTrace(grid, a.values, 'averaged mean', DIVERGING, range, title)],
    chosenStd: [mapTrace(grid, chosen.std, 'this prior: std', SEQUENTIAL, srange, unit)],
    averagedStd: [mapTrace(grid, averaged.std, 'averaged std', SEQUENTIAL, srange, unit)],
    range,
    srange,
    perturbation: c.perturbation,
  };
}

/** Largest |averaged − chosen| of the means and the ratio of the largest standard deviations. */
export function averagedChange(chosen: MeanStd, averaged: MeanStd): { maxMeanChange: number; stdRatio: number } {
  let d = 0;
  let sc = 0;
  let sa = 0;
  for (let i = 0; i < chosen.mean.length; i++) {
    d = Math.max(d, Math.abs(averaged.mean[i] - chosen.mean[i]));
    sc = Math.max(sc, chosen.std[i]);
    sa = Math.max(sa, averaged.std[i]);
  }
  return { maxMeanChange: d, stdRatio: sc > 0 ? sa / sc : Number.NaN };
}
