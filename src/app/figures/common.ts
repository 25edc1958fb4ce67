/**
 * Pieces the screens' figure builders share: plotly titles, the 2-D map layout, the field heat map
 * and escaped names inside our hover templates. Pure (no DOM, no store); unit-tested in
 * test/app/figures/.
 */
import { formatNumber } from '../../core/format.ts';
import type { Grid } from '../../core/grid/grid.ts';
import { axisLabel, axisNames, downAxisLabel } from '../labels.ts';
import { escapePlotText } from '../plotText.ts';
import { axes2D, MAP_SCALE, toRows2D, type Trace } from '../traces.ts';

/** A plotly layout as a plain object. */
export type Layout = Record<string, unknown>;

/** A figure title in the screens' size. */
export function title(text: string): { text: string; font: { size: number } } {
  return { text, font: { size: 12 } };
}

/** A number for a label or a fact: 4 significant digits (src/core/format.ts). */
export function fmtNum(x: number): string {
  return formatNumber(x, 4);
}

/** A name from a file inside one of our hover templates: escaped, and no %{…} placeholders. */
export function hoverName(s: string): string {
  return escapePlotText(s).replace(/%/g, '%%');
}

/** 1, 2, …, count: the datum numbers along the data plots' first axis. */
export function datumNumbers(count: number): number[] {
  return Array.from({ length: count }, (_, i) => i + 1);
}

/**
 * Layout of a 2-D map: equal aspect, the second axis increasing downwards (one convention on every
 * 2-D plot, the correlation map included; ../labels.ts orientationNote states it under the title).
 */
export function mapLayout(grid: Grid, text: string): Layout {
  return {
    title: title(text),
    xaxis: { title: { text: axisLabel(grid, 0) }, constrain: 'domain' },
    yaxis: { title: { text: downAxisLabel(grid) }, autorange: 'reversed', scaleanchor: 'x', constrain: 'domain' },
    margin: { l: 56, r: 10, t: 30, b: 42 },
  };
}

/** Heat map of a flat field (x fastest) over a 2-D grid's cell centres; `extra` overrides any field. */
export function heatTrace(grid: Grid, field: ArrayLike<number>, name: string, extra: Trace = {}): Trace {
  const { x, y } = axes2D(grid);
  const [a, b] = axisNames(grid);
  return {
    type: 'heatmap',
    x,
    y,
    z: toRows2D(grid, field),
    colorscale: MAP_SCALE,
    name,
    hovertemplate: `${hoverName(a!)} %{x}<br>${hoverName(b!)} %{y}<br>${hoverName(name)} %{z:.4g}<extra></extra>`,
    colorbar: { thickness: 10, len: 0.9 },
    ...extra,
  };
}
