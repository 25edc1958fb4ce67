/**
 * Browser-side session actions behind the session bar: exports, plot images, the report and
 * the share link. Pure parts live in ./exports.ts, ./report.ts and ./share.ts.
 */
import { orientationNote, withUnit } from '../labels.ts';
import Plotly from 'plotly.js-dist-min';
import type { WorkbenchStore } from '../store.ts';
import { CAUTION } from '../caution.ts';
import { axes2D, axis1D, band, bandTrace, COLOURS, commonRange, MAP_SCALE, rowOf, toRows2D, Z68, Z95, type Trace } from '../traces.ts';
import { gridDimension } from '../../core/grid/grid.ts';
import { download } from './download.ts';
import { drawsCsv, drawsNpy, posteriorCsv, posteriorNpy, priorExport } from './exports.ts';
import { renderReport, reportModel, type ReportImage } from './report.ts';
import { encodeShare } from './share.ts';
import { problemFingerprint } from '../../core/io/fingerprint.ts';

export type Format = 'csv' | 'npy';

/** The two image functions of plotly.js we use (not in ../plotly.d.ts). */
interface PlotlyImages {
  toImage(fig: HTMLElement | { data: Trace[]; layout: Record<string, unknown> }, opts: { format: 'png' | 'svg'; width: number; height: number }): Promise<string>;
  downloadImage(gd: HTMLElement, opts: { format: 'png' | 'svg'; filename: string; width: number; height: number }): Promise<string>;
}
const images = Plotly as unknown as PlotlyImages;

export function exportPrior(store: WorkbenchStore): void {
  const p = store.getState().prior;
  if (p) download(priorExport(p));
}

export function exportPosterior(store: WorkbenchStore, format: Format): boolean {
  const s = store.getState();
  if (!s.problem || !s.posterior) return false;
  download(format === 'csv' ? posteriorCsv(s.problem.grid, s.posterior.summary) : posteriorNpy(s.posterior.summary));
  return true;
}

export async function exportDraws(store: WorkbenchStore, which: 'prior' | 'posterior', format: Format): Promise<boolean> {
  const draws = await store.getState().fetchDraws(which);
  const grid = store.getState().problem?.grid;
  if (!draws || !grid) return false;
  download(format === 'csv' ? drawsCsv(grid, draws, which) : drawsNpy(draws, which));
  return true;
}

/** Every plot on the current screen as PNG or SVG, named after its element id. */
export async function exportPlots(format: 'png' | 'svg'): Promise<number> {
  const plots = [...document.querySelectorAll<HTMLElement>('.plot')].filter((el) => el.id && el.querySelector('.main-svg'));
  for (const el of plots) await images.downloadImage(el, { format, filename: el.id.replace(/^plot-/, ''), width: el.clientWidth || 700, height: el.clientHeight || 400 });
  return plots.length;
}

const FIG = { paper_bgcolor: '#fff', plot_bgcolor: '#fbfaf6', font: { size: 10 }, margin: { l: 50, r: 10, t: 26, b: 36 }, showlegend: false };

async function image(data: Trace[], layout: Record<string, unknown>, width: number, height: number): Promise<string> {
  return images.toImage({ data, layout: { ...FIG, ...layout, width, height } }, { format: 'png', width, height });
}

/** The report's figures, drawn off-screen from the current results. */
async function reportImages(store: WorkbenchStore): Promise<{ plots: ReportImage[]; gallery: ReportImage[] }> {
  const s = store.getState();
  const p = s.problem;
  const post = s.posterior;
  const plots: ReportImage[] = [];
  const gallery: ReportImage[] = [];
  if (!p) return { plots, gallery };
  const twoD = gridDimension(p.grid) === 2;
  const unit = p.quantity.unit;
  if (post) {
    const sm = post.summary;
    if (!twoD) {
      const x = axis1D(p.grid);
      const b95 = band(sm.mean, sm.std, Z95);
      const b68 = band(sm.mean, sm.std, Z68);
      const traces: Trace[] = [
        bandTrace(x, b95.lower, b95.upper, 'posterior 95%', COLOURS.band95),
        bandTrace(x, b68.lower, b68.upper, 'posterior 68%', COLOURS.band68),
        { type: 'scatter', mode: 'lines', x, y: sm.mean, name: 'posterior mean', line: { color: COLOURS.mean, width: 2 } },
      ];
      if (p.truth) traces.push({ type: 'scatter', mode: 'lines', x, y: p.truth, line: { color: COLOURS.truth, dash: 'dot', width: 1 } });
      plots.push({ caption: 'Posterior mean with 68% and 95% bands (dotted: truth)', src: await image(traces, {}, 700, 260) });
    } else {
      const { x, y } = axes2D(p.grid);
      const heat = (z: ArrayLike<number>): Trace => ({ type: 'heatmap', x, y, z: toRows2D(p.grid, z), colorscale: MAP_SCALE, colorbar: { thickness: 8 } });
      const rev = { yaxis: { autorange: 'reversed' } };
      const how = orientationNote(p.grid);
      plots.push({ caption: `${withUnit('Posterior mean', unit)}; ${how}`, src: await image([heat(sm.mean)], rev, 400, 260) });
      plots.push({ caption: `${withUnit('Posterior standard deviation', unit)}; ${how}`, src: await image([heat(sm.std)], rev, 400, 260) });
    }
  }
  const draws = await s.fetchDraws('prior').catch(() => null);
  if (draws) {
    const range = commonRange(Array.from({ length: draws.rows }, (_, k) => rowOf(draws.data, draws.cols, k)));
    for (let k = 0; k < draws.rows; k++) {
      const row = rowOf(draws.data, draws.cols, k);
      const data: Trace[] = twoD
        ? [{ type: 'heatmap', ...axes2D(p.grid), z: toRows2D(p.grid, row), colorscale: MAP_SCALE, zmin: range[0], zmax: range[1], showscale: false }]
        : [{ type: 'scatter', mode: 'lines', x: axis1D(p.grid), y: row, line: { color: COLOURS.mean, width: 1 } }];
      const layout = twoD ? { yaxis: { autorange: 'reversed' }, margin: { l: 24, r: 4, t: 4, b: 18 } } : { yaxis: { range }, margin: { l: 30, r: 4, t: 4, b: 18 } };
      gallery.push({ caption: `draw ${k + 1} (seed ${s.seed})`, src: await image(data, layout, 300, 150) });
    }
  }
  return { plots, gallery };
}

export async function buildReport(store: WorkbenchStore): Promise<string | null> {
  const model = reportModel(store.getState(), CAUTION);
  if (!model) return null;
  const { plots, gallery } = await reportImages(store);
  return renderReport(document.implementation.createHTMLDocument(''), model, plots, gallery);
}

/** Open the report in a new window (falls back to a download when pop-ups are blocked). */
export async function openReport(store: WorkbenchStore, mode: 'open' | 'download'): Promise<string | null> {
  const html = await buildReport(store);
  if (!html) return null;
  const file = { name: 'prior-report.html', mime: 'text/html', bytes: new TextEncoder().encode(html) };
  if (mode === 'open') {
    const url = URL.createObjectURL(new Blob([file.bytes as BlobPart], { type: file.mime }));
    const w = window.open(url, '_blank');
    setTimeout(() => URL.revokeObjectURL(url), 60_000);
    if (w !== null) {
      w.opener = null;
      return html;
    }
  }
  download(file);
  return html;
}

/** The share link for the current prior (and built-in problem). Not written to the address bar: a reload restores the autosave. */
export async function shareLink(store: WorkbenchStore): Promise<string | null> {
  const s = store.getState();
  if (!s.prior) return null;
  const user = s.userProblem;
  const hash = await encodeShare({
    problem: user ? null : (s.problem?.demoId ?? s.demoId),
    prior: s.prior,
    ...(user ? { madeFor: { title: user.problem.title ?? user.label, fingerprint: problemFingerprint(user.problem) } } : {}),
  });
  return `${location.origin}${location.pathname}${hash}`;
}
