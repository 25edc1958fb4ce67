/**
 * Plot-trace builders as pure functions (no DOM): they turn typed-array results into plotly traces.
 * Unit-tested in test/app/traces.test.ts.
 */
import type { Grid } from '../core/grid/grid.ts';
import { cellCoordinates, cellCount, gridDimension } from '../core/grid/grid.ts';
import { correlationFunction, practicalRange } from '../core/kernels/correlation.ts';
import type { Term } from '../core/kernels/spec.ts';
import type { PriorSpec } from '../core/prior/spec.ts';

/** A plotly trace as a plain object (the subset of fields we use is loosely typed on purpose). */
export type Trace = Record<string, unknown>;

/** Standard-normal quantiles for the 68.27% and 95% central bands (1 and 1.959964; common practice, no source). */
export const Z68 = 1;
export const Z95 = 1.959963984540054;

/** Cell centres along x for a 1-D grid. */
export function axis1D(grid: Grid): Float64Array {
  return cellCoordinates(grid).x;
}

/** Cell-centre coordinates of each axis of a 2-D grid. */
export function axes2D(grid: Grid): { x: number[]; y: number[] } {
  const [nx, ny] = [grid.shape[0], grid.shape[1] ?? 1];
  const [x0 = 0, y0 = 0] = grid.origin ?? [];
  const [dx, dy = 1] = grid.spacing;
  return {
    x: Array.from({ length: nx }, (_, i) => x0 + dx! * i),
    y: Array.from({ length: ny }, (_, j) => y0 + dy * j),
  };
}

/** A flat field (x fastest) as the rows-of-y array a plotly heat map expects. */
export function toRows2D(grid: Grid, field: ArrayLike<number>): number[][] {
  const nx = grid.shape[0];
  const ny = grid.shape[1] ?? 1;
  if (field.length !== nx * ny) throw new RangeError(`toRows2D: field has ${field.length} values, grid has ${nx * ny} cells`);
  const out: number[][] = [];
  for (let j = 0; j < ny; j++) {
    const row = new Array<number>(nx);
    for (let i = 0; i < nx; i++) row[i] = field[i + nx * j];
    out.push(row);
  }
  return out;
}

/** Flat cell index of the heat-map cell nearest to (x, y), or null outside the grid. */
export function cellAt(grid: Grid, x: number, y: number): number | null {
  const nx = grid.shape[0];
  const ny = grid.shape[1] ?? 1;
  const [x0 = 0, y0 = 0] = grid.origin ?? [];
  const [dx, dy = 1] = grid.spacing;
  const i = Math.round((x - x0) / dx!);
  const j = gridDimension(grid) === 2 ? Math.round((y - y0) / dy) : 0;
  if (i < 0 || i >= nx || j < 0 || j >= ny) return null;
  return i + nx * j;
}

/** Lower and upper band m ± z·s. */
export function band(mean: ArrayLike<number>, std: ArrayLike<number>, z: number): { lower: Float64Array; upper: Float64Array } {
  const n = mean.length;
  const lower = new Float64Array(n);
  const upper = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    lower[i] = mean[i] - z * std[i];
    upper[i] = mean[i] + z * std[i];
  }
  return { lower, upper };
}

/**
 * One closed, filled trace drawing a band: the upper edge left to right, then the lower edge back
 * (so y[0 … n−1] is the upper edge and y[n … 2n−1] the lower edge reversed).
 */
export function bandTrace(x: ArrayLike<number>, lower: ArrayLike<number>, upper: ArrayLike<number>, name: string, fill: string): Trace {
  const n = x.length;
  const xs = new Float64Array(2 * n);
  const ys = new Float64Array(2 * n);
  for (let i = 0; i < n; i++) {
    xs[i] = x[i];
    ys[i] = upper[i];
    xs[2 * n - 1 - i] = x[i];
    ys[2 * n - 1 - i] = lower[i];
  }
  return { x: xs, y: ys, type: 'scatter', mode: 'lines', line: { width: 0 }, fill: 'toself', fillcolor: fill, name, hoverinfo: 'skip' };
}

/** Colours of our own (a slate / teal / amber palette). */
export const COLOURS = {
  mean: '#0f5d6b',
  band68: 'rgba(22, 134, 150, 0.38)',
  band95: 'rgba(22, 134, 150, 0.16)',
  prior: 'rgba(201, 140, 38, 0.16)',
  priorLine: '#b07820',
  truth: '#3a3a46',
  data: '#9b3d57',
  predicted: '#0f5d6b',
  accent: '#5b4bb7',
} as const;

/** Colour scale for maps: deep slate through teal to pale sand (our own). */
export const MAP_SCALE: [number, string][] = [
  [0, '#1d2340'],
  [0.25, '#28507a'],
  [0.5, '#2f8f8c'],
  [0.75, '#9ccc8a'],
  [1, '#f4ecc4'],
];
/** Diverging scale for averaging kernels (negative plum, zero white, positive teal). */
export const DIVERGING_SCALE: [number, string][] = [
  [0, '#6b2d5c'],
  [0.5, '#f7f7f4'],
  [1, '#0f5d6b'],
];

/** Scaled distance h of an offset for a term (see src/core/kernels/spec.ts for the convention). */
export function scaledDistance(term: Term, dx: number, dy: number): number {
  if (term.lengths) {
    const a = ((term.angle ?? 0) * Math.PI) / 180;
    const u = Math.cos(a) * dx + Math.sin(a) * dy;
    const v = -Math.sin(a) * dx + Math.cos(a) * dy;
    return Math.hypot(u / term.lengths[0], v / term.lengths[1]);
  }
  return Math.hypot(dx, dy) / term.length;
}

/** Largest correlation length of a term (the first axis for anisotropic terms shows the longest). */
export function termLengths(term: Term): [number, number] {
  return term.lengths ? [term.lengths[0], term.lengths[1]] : [term.length, term.length];
}

/**
 * Correlation against distance along the first axis of each term: per term ρ_t(r/ℓ_t) and the
 * prior's total correlation (Σ σ_t² ρ_t + nugget·[r = 0]) / (Σ σ_t² + nugget).
 * Practical range of a term = practicalRange(kernel) · ℓ (distance where ρ = 0.05).
 */
export function correlationCurves(prior: PriorSpec, maxDistance: number, points = 241) {
  const r = Array.from({ length: points }, (_, k) => (maxDistance * k) / (points - 1));
  const sill = prior.terms.reduce((a, t) => a + t.variance, 0) + (prior.nugget ?? 0);
  const total = new Float64Array(points);
  const terms = prior.terms.map((t) => {
    const rho = correlationFunction(t.kernel, t.nu);
    const l = termLengths(t)[0];
    const y = r.map((d) => rho(d / l));
    y.forEach((v, k) => (total[k] += (t.variance * v) / sill));
    return { term: t, y, practicalRange: practicalRange(t.kernel, t.nu) * l };
  });
  if (points > 0 && sill > 0) total[0] = 1;
  return { r, terms, total: Array.from(total) };
}

/** Total correlation over a square of offsets ±extent (2-D map; nugget only at the origin). */
export function correlationMap(prior: PriorSpec, extent: number, points = 61) {
  const off = Array.from({ length: points }, (_, k) => -extent + (2 * extent * k) / (points - 1));
  const sill = prior.terms.reduce((a, t) => a + t.variance, 0) + (prior.nugget ?? 0);
  const rhos = prior.terms.map((t) => correlationFunction(t.kernel, t.nu));
  const z = off.map((dy) =>
    off.map((dx) => {
      let s = 0;
      prior.terms.forEach((t, k) => (s += t.variance * rhos[k](scaledDistance(t, dx, dy))));
      return sill > 0 ? s / sill : 0;
    }),
  );
  return { offsets: off, z };
}

/** Common colour limits over several fields (for a realisation gallery on one scale). */
export function commonRange(fields: ArrayLike<number>[]): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const f of fields) {
    for (let i = 0; i < f.length; i++) {
      const v = f[i];
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  if (!Number.isFinite(lo)) return [0, 1];
  if (lo === hi) return [lo - 1, hi + 1];
  return [lo, hi];
}

/** Row k of a row-major count × N matrix as a view. */
export function rowOf(data: Float64Array, cols: number, k: number): Float64Array {
  return data.subarray(k * cols, (k + 1) * cols);
}

/** Number of grid cells (re-exported for components). */
export { cellCount, gridDimension };

const AXIS_KEY = /^[xy]axis\d*$/;
const COLORAXIS_KEY = /^coloraxis\d*$/;
const ALLOW = 'allow';

/** A colour bar with tick-label overflow checks off (kept when the caller set its own). */
function allowColorbar(cb: unknown): Record<string, unknown> {
  const c = (cb && typeof cb === 'object' ? cb : {}) as Record<string, unknown>;
  return 'ticklabeloverflow' in c ? c : { ...c, ticklabeloverflow: ALLOW };
}

/**
 * Turn off plotly's tick-label overflow checks (`ticklabeloverflow: 'allow'`) on every cartesian
 * axis, colour axis and heat-map/contour colour bar, unless a figure sets its own value. With any
 * other value plotly measures each label against the others with getBoundingClientRect on every
 * redraw (forced layouts, quadratic in the label count; seen in a CPU profile of a slider drag).
 * Pure: returns new objects, the inputs are not changed.
 */
export const tameOverflow = {
  layout(layout: Record<string, unknown>): Record<string, unknown> {
    const out: Record<string, unknown> = { ...layout };
    for (const [k, v] of Object.entries(layout)) {
      if (AXIS_KEY.test(k)) {
        const ax = (v && typeof v === 'object' ? v : {}) as Record<string, unknown>;
        out[k] = 'ticklabeloverflow' in ax ? ax : { ...ax, ticklabeloverflow: ALLOW };
      } else if (COLORAXIS_KEY.test(k) && v && typeof v === 'object') {
        const ca = v as Record<string, unknown>;
        out[k] = { ...ca, colorbar: allowColorbar(ca.colorbar) };
      }
    }
    for (const k of ['xaxis', 'yaxis']) if (!(k in out)) out[k] = { ticklabeloverflow: ALLOW };
    return out;
  },
  traces(data: readonly Trace[]): Trace[] {
    return data.map((t) =>
      (t.type === 'heatmap' || t.type === 'contour') && t.showscale !== false && t.coloraxis === undefined
        ? { ...t, colorbar: allowColorbar(t.colorbar) }
        : t,
    );
  },
};
