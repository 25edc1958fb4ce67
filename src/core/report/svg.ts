/**
 * Small SVG figures for the report (pure strings, no DOM, so the command line writes the same
 * document as the browser): line plots with bands and error bars, and heat maps drawn to true
 * aspect ratio with a colour bar and units. Every text goes through {@link esc}.
 */
import type { Grid } from '../grid/grid.ts';

/** Text for XML: &, <, >, " and ' as entities. */
export function esc(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

/** Colour stops [position 0…1, #rrggbb]. */
export type ColourScale = readonly (readonly [number, string])[];

/** The colour at t ∈ [0, 1] by linear interpolation in RGB between stops. */
export function colourAt(scale: ColourScale, t: number): string {
  const u = Math.min(1, Math.max(0, Number.isFinite(t) ? t : 0));
  let k = 1;
  while (k < scale.length - 1 && scale[k][0] < u) k++;
  const [p0, c0] = scale[k - 1];
  const [p1, c1] = scale[k];
  const f = p1 > p0 ? (u - p0) / (p1 - p0) : 0;
  const a = Number.parseInt(c0.slice(1), 16);
  const b = Number.parseInt(c1.slice(1), 16);
  const ch = (s: number) => Math.round(((a >> s) & 255) * (1 - f) + ((b >> s) & 255) * f);
  return `#${((ch(16) << 16) | (ch(8) << 8) | ch(0)).toString(16).padStart(6, '0')}`;
}

/** Up to `count` round tick values covering [lo, hi] (1, 2, 5 × 10^k steps). */
export function ticks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * p).find((s) => s >= raw)!;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

/** [min, max] of the finite values of the arrays, widened by 1 on each side when empty or flat. */
export function extent(arrays: readonly ArrayLike<number>[]): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const a of arrays) {
    for (let i = 0; i < a.length; i++) {
      const v = a[i];
      if (!Number.isFinite(v)) continue;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  if (!Number.isFinite(lo)) return [-1, 1];
  return hi > lo ? [lo, hi] : [lo - 1, hi + 1];
}

const num = (v: number) => String(Number(v.toPrecision(4)));
const f1 = (v: number) => v.toFixed(1);

export interface Series {
  readonly y: ArrayLike<number>;
  readonly colour: string;
  readonly name: string;
  readonly width?: number;
  readonly dash?: boolean;
  /** Markers with ±error bars instead of a line. */
  readonly errors?: ArrayLike<number>;
}

export interface Band {
  readonly lower: ArrayLike<number>;
  readonly upper: ArrayLike<number>;
  readonly fill: string;
  readonly name: string;
}

export interface LineFigure {
  readonly title: string;
  readonly x: ArrayLike<number>;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly bands?: readonly Band[];
  readonly series: readonly Series[];
  readonly width?: number;
  readonly height?: number;
}

/** A line plot with filled bands, a legend under the title, axis ticks and labels. */
export function lineSvg(fig: LineFigure): string {
  const W = fig.width ?? 340;
  const H = fig.height ?? 200;
  const m = { l: 50, r: 8, t: 30, b: 34 };
  const n = fig.x.length;
  const xs = extent([fig.x]);
  const ys = extent([
    ...(fig.bands ?? []).flatMap((b) => [b.lower, b.upper]),
    ...fig.series.flatMap((s) =>
      s.errors ? [Array.from(s.y, (v, i) => v - s.errors![i]), Array.from(s.y, (v, i) => v + s.errors![i])] : [s.y],
    ),
  ]);
  const [xlo, xhi] = xs;
  const pad = 0.04 * (ys[1] - ys[0]);
  const ylo = ys[0] - pad;
  const yhi = ys[1] + pad;
  const toX = (v: number) => m.l + ((v - xlo) / (xhi - xlo)) * (W - m.l - m.r);
  const toY = (v: number) => H - m.b - ((v - ylo) / (yhi - ylo)) * (H - m.t - m.b);
  const parts: string[] = [];
  for (const b of fig.bands ?? []) {
    const pts: string[] = [];
    for (let i = 0; i < n; i++) pts.push(`${f1(toX(fig.x[i]))},${f1(toY(b.upper[i]))}`);
    for (let i = n - 1; i >= 0; i--) pts.push(`${f1(toX(fig.x[i]))},${f1(toY(b.lower[i]))}`);
    parts.push(`<polygon points="${pts.join(' ')}" fill="${b.fill}" stroke="none"/>`);
  }
  for (const s of fig.series) {
    if (s.errors) {
      for (let i = 0; i < n; i++) {
        const x = f1(toX(fig.x[i]));
        parts.push(
          `<line x1="${x}" x2="${x}" y1="${f1(toY(s.y[i] - s.errors[i]))}" y2="${f1(toY(s.y[i] + s.errors[i]))}" stroke="${s.colour}" stroke-width="0.8"/>`,
        );
        parts.push(`<circle cx="${x}" cy="${f1(toY(s.y[i]))}" r="1.6" fill="${s.colour}"/>`);
      }
    } else {
      const pts: string[] = [];
      for (let i = 0; i < n; i++) pts.push(`${f1(toX(fig.x[i]))},${f1(toY(s.y[i]))}`);
      parts.push(
        `<polyline points="${pts.join(' ')}" fill="none" stroke="${s.colour}" stroke-width="${s.width ?? 1.2}"${s.dash ? ' stroke-dasharray="4 3"' : ''}/>`,
      );
    }
  }
  const legend = [
    ...(fig.bands ?? []).map((b) => ({ name: b.name, colour: b.fill })),
    ...fig.series.map((s) => ({ name: s.name, colour: s.colour })),
  ];
  return frame(W, H, m, fig.title, fig.xLabel, fig.yLabel, ticks(xlo, xhi), toX, ticks(ylo, yhi), toY, parts.join(''), legend);
}

function frame(
  W: number,
  H: number,
  m: { l: number; r: number; t: number; b: number },
  title: string,
  xLabel: string,
  yLabel: string,
  xt: number[],
  toX: (v: number) => number,
  yt: number[],
  toY: (v: number) => number,
  body: string,
  legend: readonly { name: string; colour: string }[] = [],
  extra = '',
): string {
  const axis: string[] = [];
  axis.push(
    `<rect x="${m.l}" y="${m.t}" width="${W - m.l - m.r}" height="${H - m.t - m.b}" fill="none" stroke="#888" stroke-width="0.6"/>`,
  );
  for (const v of xt) axis.push(`<text x="${f1(toX(v))}" y="${H - m.b + 10}" text-anchor="middle">${esc(num(v))}</text>`);
  for (const v of yt) axis.push(`<text x="${m.l - 3}" y="${f1(toY(v) + 3)}" text-anchor="end">${esc(num(v))}</text>`);
  axis.push(`<text x="${f1((m.l + W - m.r) / 2)}" y="${H - 4}" text-anchor="middle">${esc(xLabel)}</text>`);
  axis.push(`<text transform="translate(10 ${f1((m.t + H - m.b) / 2)}) rotate(-90)" text-anchor="middle">${esc(yLabel)}</text>`);
  axis.push(`<text x="${W / 2}" y="11" text-anchor="middle" font-weight="600">${esc(title)}</text>`);
  let lx = m.l;
  for (const it of legend) {
    axis.push(`<rect x="${lx}" y="17" width="9" height="6" fill="${it.colour}"/><text x="${lx + 11}" y="23">${esc(it.name)}</text>`);
    lx += 16 + 4.6 * it.name.length;
  }
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" font-family="sans-serif" font-size="8" role="img" aria-label="${esc(title)}">${body}${axis.join('')}${extra}</svg>`;
}

export interface HeatFigure {
  readonly title: string;
  /** x fastest, rows of y (as the grid's cells). */
  readonly field: ArrayLike<number>;
  readonly nx: number;
  readonly ny: number;
  /** Physical extent [x0, x1] and [y0, y1] of the drawn area (cell edges). */
  readonly xRange: readonly [number, number];
  readonly yRange: readonly [number, number];
  readonly xLabel: string;
  readonly yLabel: string;
  readonly scale: ColourScale;
  readonly range: readonly [number, number];
  readonly unit: string;
  /** The second axis increasing downwards (sections). */
  readonly yDown?: boolean;
  /** A marked point (the chosen cell of an evidence map), in the axes' units. */
  readonly mark?: readonly [number, number];
  /** Plot-area width in px; the height follows the extent (true aspect) unless `aspect` is 'fill'. */
  readonly width?: number;
  readonly aspect?: 'true' | 'fill';
  /** Survey geometry drawn over the map, in the axes' units: paths as lines, points as markers. */
  readonly overlay?: {
    readonly points?: readonly (readonly [number, number])[];
    readonly segments?: readonly (readonly [number, number, number, number])[];
  };
}

/** A heat map with a colour bar, at true aspect ratio (height = width · extent y / extent x, clamped). */
export function heatSvg(fig: HeatFigure): string {
  const pw = fig.width ?? 260;
  const ex = fig.xRange[1] - fig.xRange[0];
  const ey = fig.yRange[1] - fig.yRange[0];
  const ph = fig.aspect === 'fill' ? pw * 0.75 : Math.max(30, Math.min(2 * pw, (pw * ey) / ex));
  const m = { l: 50, r: 58, t: 22, b: 34 };
  const W = pw + m.l + m.r;
  const H = Math.round(ph + m.t + m.b);
  const toX = (v: number) => m.l + ((v - fig.xRange[0]) / ex) * pw;
  const toY = (v: number) => (fig.yDown ? m.t + ((v - fig.yRange[0]) / ey) * ph : m.t + ph - ((v - fig.yRange[0]) / ey) * ph);
  const [lo, hi] = fig.range;
  const cw = pw / fig.nx;
  const chh = ph / fig.ny;
  const cells: string[] = [];
  for (let j = 0; j < fig.ny; j++) {
    for (let i = 0; i < fig.nx; i++) {
      const v = fig.field[i + fig.nx * j];
      const y = fig.yDown ? m.t + j * chh : m.t + ph - (j + 1) * chh;
      cells.push(
        `<rect x="${f1(m.l + i * cw)}" y="${f1(y)}" width="${f1(cw + 0.3)}" height="${f1(chh + 0.3)}" fill="${Number.isFinite(v) ? colourAt(fig.scale, (v - lo) / (hi - lo)) : '#ffffff'}"/>`,
      );
    }
  }
  if (fig.overlay) {
    const o: string[] = [];
    for (const [x0, y0, x1, y1] of fig.overlay.segments ?? [])
      o.push(`<line x1="${f1(toX(x0))}" y1="${f1(toY(y0))}" x2="${f1(toX(x1))}" y2="${f1(toY(y1))}"/>`);
    for (const [x, y] of fig.overlay.points ?? []) o.push(`<circle cx="${f1(toX(x))}" cy="${f1(toY(y))}" r="2.2"/>`);
    cells.push(`<g class="geometry" stroke="#1b1b1b" stroke-width="0.5" stroke-opacity="0.55" fill="#ffffff">${o.join('')}</g>`);
  }
  if (fig.mark)
    cells.push(
      `<path d="M${f1(toX(fig.mark[0]) - 5)} ${f1(toY(fig.mark[1]))}h10M${f1(toX(fig.mark[0]))} ${f1(toY(fig.mark[1]) - 5)}v10" stroke="#000" stroke-width="1.6"/>`,
    );
  // colour bar
  const bx = m.l + pw + 8;
  const bar: string[] = [];
  const steps = 24;
  for (let k = 0; k < steps; k++)
    bar.push(
      `<rect x="${bx}" y="${f1(m.t + ph - ((k + 1) * ph) / steps)}" width="9" height="${f1(ph / steps + 0.3)}" fill="${colourAt(fig.scale, (k + 0.5) / steps)}"/>`,
    );
  for (const v of ticks(lo, hi, 4))
    bar.push(`<text x="${bx + 12}" y="${f1(m.t + ph - ((v - lo) / (hi - lo)) * ph + 3)}">${esc(num(v))}</text>`);
  if (fig.unit) bar.push(`<text x="${bx}" y="${m.t - 4}">${esc(fig.unit)}</text>`);
  const xt = ticks(fig.xRange[0], fig.xRange[1], 4);
  const yt = ticks(fig.yRange[0], fig.yRange[1], 3);
  return frame(W, H, m, fig.title, fig.xLabel, fig.yLabel, xt, toX, yt, toY, cells.join(''), [], bar.join(''));
}

/** Cell-edge extent of a grid along axis k. */
export function gridExtent(grid: Grid, k: number): [number, number] {
  const d = grid.spacing[k] ?? 1;
  const c0 = grid.origin?.[k] ?? 0;
  const n = grid.shape[k] ?? 1;
  return [c0 - d / 2, c0 + (n - 0.5) * d];
}
