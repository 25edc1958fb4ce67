/**
 * Trace builders of the overview (src/app/overview/OverviewScreen.tsx): prior realisations, the
 * posterior and the data fit of one prior, side by side. Pure functions (no DOM, no store), tested
 * in test/app/overview/traces.test.ts.
 *
 * Colour (./../colourScales.ts): realisations and the posterior mean are signed fields about the
 * prior mean and share one diverging range (or the limits fixed by hand); the posterior standard
 * deviation is a magnitude on a sequential scale from 0, on the same range as the prior's √diag Cm
 * so a reduction shows as paler colour.
 */
import type { Grid } from '../../core/grid/grid.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import { meanVector } from '../../core/prior/mean.ts';
import type { DataGeometry } from '../../core/problems/spec.ts';
import { profileAxis, profileTraces } from '../survey/figures.ts';
import { axisLabel, axisNames, downAxisLabel, withUnit } from '../labels.ts';
import { escapePlotText } from '../plotText.ts';
import { axes2D, band, bandTrace, COLOURS, rowOf, toRows2D, Z95, type Trace } from '../traces.ts';
import {
  DIVERGING,
  divergingRange,
  effectiveRange,
  SEQUENTIAL,
  sequentialRange,
  signedView,
  type ManualLimits,
  type Range,
} from '../colourScales.ts';

/** Realisations a row of the draws matrix holds (count × N, row-major). */
export interface Draws {
  readonly data: Float64Array;
  readonly rows: number;
  readonly cols: number;
}

/** Realisations shown: three curves in 1-D, two maps in 2-D. */
export const SHOWN_DRAWS_1D = 3;
export const SHOWN_DRAWS_2D = 2;

const hoverName = (s: string) => escapePlotText(s).replace(/%/g, '%%');

/**
 * The prior's pointwise mean and standard deviation from its spec alone, so the prior panel need
 * not wait for the posterior: Cm = S C S + nugget·I with C's diagonal Σₜ σₜ² (every correlation is 1
 * at distance 0), hence std_i = √(s_i² Σₜ σₜ² + nugget) with s the standard-deviation profile (1 without).
 */
export function priorBand(grid: Grid, prior: PriorSpec): { mean: Float64Array; std: Float64Array } {
  const mean = meanVector(grid, prior);
  const sill = prior.terms.reduce((a, t) => a + t.variance, 0);
  const nugget = prior.nugget ?? 0;
  const std = new Float64Array(mean.length);
  for (let i = 0; i < std.length; i++) {
    const s = prior.stdProfile?.[i] ?? 1;
    std[i] = Math.sqrt(s * s * sill + nugget);
  }
  return { mean, std };
}

/** Prior panel in 1-D: the first `count` realisations over the prior mean and its 95% band. */
export function priorTraces1D(
  x: ArrayLike<number>,
  draws: Draws | null,
  priorMean: ArrayLike<number>,
  priorStd: ArrayLike<number>,
  count = SHOWN_DRAWS_1D,
): Trace[] {
  const pb = band(priorMean, priorStd, Z95);
  const out: Trace[] = [bandTrace(x, pb.lower, pb.upper, 'prior 95%', COLOURS.prior)];
  out.push({
    type: 'scatter',
    mode: 'lines',
    x,
    y: priorMean,
    name: 'prior mean',
    line: { color: COLOURS.priorLine, width: 1.5, dash: 'dash' },
  });
  const n = draws ? Math.min(count, draws.rows) : 0;
  const shades = ['#3b6e8f', '#8a4f7d', '#5c7d3a'];
  for (let k = 0; k < n; k++) {
    out.push({
      type: 'scatter',
      mode: 'lines',
      x,
      y: rowOf(draws!.data, draws!.cols, k),
      name: `realisation ${k + 1}`,
      line: { color: shades[k % shades.length], width: 1.1 },
    });
  }
  return out;
}

/** Posterior panel in 1-D: the Posterior screen's own figure (../figures/posterior.ts), re-exported for the overview. */
export { posteriorTraces1D } from '../figures/posterior.ts';

/** Data-fit panel: observed data with ±1σ bars and the predicted data G m̃, against datum number. */
export function fitTraces(values: ArrayLike<number>, sigma: ArrayLike<number>, predicted: ArrayLike<number>): Trace[] {
  const idx = Array.from({ length: values.length }, (_, i) => i + 1);
  return [
    {
      type: 'scatter',
      mode: 'markers',
      x: idx,
      y: values,
      name: 'observed ±1σ',
      marker: { color: COLOURS.data, size: 4 },
      error_y: { type: 'data', array: sigma, visible: true, color: COLOURS.data, thickness: 1, width: 0 },
    },
    { type: 'scatter', mode: 'lines', x: idx, y: predicted, name: 'predicted G m̃', line: { color: COLOURS.predicted, width: 1.2 } },
  ];
}

/** What the overview's data-fit panel needs of the problem: the data, and where they were measured if known. */
interface FitProblem {
  readonly grid: Grid;
  readonly values: ArrayLike<number>;
  readonly sigma: ArrayLike<number>;
  readonly dataUnit: string;
  readonly geometry: DataGeometry | null;
}

/**
 * The overview's data-fit panel: against where each datum was measured when the data are point data
 * with positions (the Data fit screen's profile, ../survey/figures.ts), else against datum number
 * (path data and data without geometry; their rays are on the Data fit screen).
 */
export function overviewFit(p: FitProblem, fit: { readonly predicted: ArrayLike<number>; readonly residuals: ArrayLike<number> }): Trace[] {
  if (p.geometry?.kind === 'points') return profileTraces(p, p.geometry.positions, fit).data;
  return fitTraces(p.values, p.sigma, fit.predicted);
}

/** The x-axis title matching {@link overviewFit}. */
export function overviewFitAxis(p: FitProblem): string {
  if (p.geometry?.kind !== 'points') return 'datum number';
  return `${axisLabel(p.grid, profileAxis(p.grid, p.geometry.positions))}, where measured`;
}

/** One heat map of a flat field on a 2-D grid with a given scale and fixed limits. */
export function mapTrace(
  grid: Grid,
  field: ArrayLike<number>,
  name: string,
  scale: [number, string][],
  range: Range,
  colourTitle: string,
): Trace {
  const { x, y } = axes2D(grid);
  const [a, b] = axisNames(grid);
  return {
    type: 'heatmap',
    x,
    y,
    z: toRows2D(grid, field),
    colorscale: scale,
    zmin: range[0],
    zmax: range[1],
    name,
    hovertemplate: `${hoverName(a!)} %{x}<br>${hoverName(b!)} %{y}<br>${hoverName(name)} %{z:.4g}<extra></extra>`,
    colorbar: { thickness: 9, len: 0.9, title: { text: colourTitle, side: 'right' } },
  };
}

/** Layout of an overview map: true aspect ratio (y anchored to x), axis names with units, the second axis down. */
export function mapLayout(grid: Grid, title: string): Record<string, unknown> {
  return {
    title: { text: title, font: { size: 12 } },
    xaxis: { title: { text: axisLabel(grid, 0), standoff: 2 }, constrain: 'domain' },
    yaxis: {
      title: { text: downAxisLabel(grid), standoff: 2 },
      autorange: 'reversed',
      scaleanchor: 'x',
      scaleratio: 1,
      constrain: 'domain',
    },
    margin: { l: 52, r: 8, t: 28, b: 40 },
    showlegend: false,
  };
}

/** Everything the 2-D overview draws for one prior. */
export interface OverviewMaps {
  readonly draws: Trace[][];
  readonly mean: Trace[] | null;
  readonly std: Trace[] | null;
  /** Diverging range shared by the realisations and the posterior mean. */
  readonly signedRange: Range;
  /** Sequential range shared by the prior and posterior standard deviations. */
  readonly stdRange: Range;
  /** True when the fields are drawn as departures from a prior mean that varies from cell to cell. */
  readonly perturbation: boolean;
}

/**
 * The 2-D overview's maps: `count` prior realisations and the posterior mean on one diverging range
 * centred on the prior mean (or as departures from it), the posterior standard deviation on a
 * sequential range [0, max prior std].
 */
export function overviewMaps(
  grid: Grid,
  unit: string,
  priorMean: ArrayLike<number>,
  draws: Draws | null,
  post: { mean: ArrayLike<number>; priorStd: ArrayLike<number>; std: ArrayLike<number> | null } | null,
  manual: ManualLimits,
  count = SHOWN_DRAWS_2D,
): OverviewMaps {
  const n = draws ? Math.min(count, draws.rows) : 0;
  const drawViews = Array.from({ length: n }, (_, k) => signedView(rowOf(draws!.data, draws!.cols, k), priorMean));
  const meanView = post ? signedView(post.mean, priorMean) : null;
  const centre = (meanView ?? drawViews[0])?.centre ?? 0;
  const perturbation = (meanView ?? drawViews[0])?.perturbation ?? false;
  const auto = divergingRange([...drawViews.map((v) => v.values), ...(meanView ? [meanView.values] : [])], centre);
  const signedRange = effectiveRange(auto, centre, manual);
  const signedTitle = perturbation ? withUnit('− prior mean', unit) : unit;
  const stdRange = post ? sequentialRange([post.priorStd]) : ([0, 1] as Range);
  return {
    draws: drawViews.map((v, k) => [mapTrace(grid, v.values, `realisation ${k + 1}`, DIVERGING, signedRange, signedTitle)]),
    mean: meanView ? [mapTrace(grid, meanView.values, 'posterior mean', DIVERGING, signedRange, signedTitle)] : null,
    std: post?.std ? [mapTrace(grid, post.std, 'posterior std', SEQUENTIAL, stdRange, unit)] : null,
    signedRange,
    stdRange,
    perturbation,
  };
}
