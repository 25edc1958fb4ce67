/** Figures of the Problem screen: the data with error bars and the sensitivity of G. Pure builders. */
import { gridDimension, type Grid } from '../../core/grid/grid.ts';
import { axisLabel, withUnit } from '../labels.ts';
import { axis1D, COLOURS, type Trace } from '../traces.ts';
import { datumNumbers, heatTrace, type Layout, mapLayout, title } from './common.ts';

/** Observed data against datum number with ±1σ error bars (also the first trace of the data fit). */
export function observedTrace(values: ArrayLike<number>, sigma: ArrayLike<number>): Trace {
  return {
    type: 'scatter',
    mode: 'markers',
    x: datumNumbers(values.length),
    y: values,
    name: 'observed ±1σ',
    marker: { color: COLOURS.data, size: 5 },
    error_y: { type: 'data', array: sigma, visible: true, color: COLOURS.data, thickness: 1 },
  };
}

export function dataLayout(dataUnit: string): Layout {
  return {
    title: title('Data with ±1σ error bars'),
    xaxis: { title: { text: 'datum number' } },
    yaxis: { title: { text: withUnit('d', dataUnit) } },
  };
}

const COVERAGE_TITLE = 'Sensitivity: column sums Σᵢ|Gᵢⱼ|';

/** Column sums of |G|: a heat map on a 2-D grid, a line on a 1-D one. */
export function coverageTraces(grid: Grid, coverage: ArrayLike<number>): Trace[] {
  if (gridDimension(grid) === 2) return [heatTrace(grid, coverage, 'Σ|G|')];
  return [{ type: 'scatter', mode: 'lines', x: axis1D(grid), y: coverage, name: 'Σᵢ|Gᵢⱼ|', line: { color: COLOURS.accent } }];
}

/** The sensitivity's unit is data unit per quantity unit, shown only when both are known. */
export function coverageLayout(grid: Grid, dataUnit: string, quantityUnit: string): Layout {
  if (gridDimension(grid) === 2) return mapLayout(grid, COVERAGE_TITLE);
  return {
    title: title(COVERAGE_TITLE),
    xaxis: { title: { text: axisLabel(grid) } },
    yaxis: { title: { text: withUnit('Σ|G|', dataUnit && quantityUnit ? `${dataUnit} per ${quantityUnit}` : '') } },
  };
}
