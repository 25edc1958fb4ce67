/**
 * Browser-side session actions behind the session bar: exports, plot images, the report and
 * the share link. Pure parts live in ./exports.ts, ./report.ts and ./share.ts.
 */
import Plotly from 'plotly.js-dist-min';
import type { WorkbenchStore } from '../store.ts';
import { CAUTION } from '../caution.ts';
import { download } from './download.ts';
import {
  covarianceNpy,
  drawsCsv,
  drawsGridFile,
  gridFile,
  drawsName,
  drawsNpy,
  PLOT_EXPORT_SCALE,
  plotFileName,
  posteriorCsv,
  posteriorNpy,
  priorExport,
} from './exports.ts';
import { reportHtml } from './report.ts';
import { encodeShare } from './share.ts';
import { problemFingerprint } from '../../core/io/fingerprint.ts';

export type Format = 'csv' | 'npy';

/** The image function of plotly.js we use (not in ../plotly.d.ts). */
interface PlotlyImages {
  downloadImage(
    gd: HTMLElement,
    opts: { format: 'png' | 'svg'; filename: string; width: number; height: number; scale?: number },
  ): Promise<string>;
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

/** `count` realisations (draws × cells) and the grid file beside them. */
export async function exportDraws(store: WorkbenchStore, which: 'prior' | 'posterior', format: Format, count: number): Promise<boolean> {
  const draws = await store.getState().fetchDraws(which, count);
  const s = store.getState();
  const p = s.problem;
  if (!draws || !p) return false;
  const base = drawsName(p.title, which, draws.rows);
  download(format === 'csv' ? drawsCsv(draws, base) : drawsNpy(draws, base));
  download(drawsGridFile(p.grid, draws, which, s.seed, base, p.title));
  return true;
}

/** The dense Cm or its Cholesky factor as .npy (cells in the grid's order, x fastest), with the grid beside it. */
export async function exportCovariance(store: WorkbenchStore, form: 'covariance' | 'cholesky'): Promise<boolean> {
  const m = await store.getState().fetchCovariance(form);
  const p = store.getState().problem;
  if (!m || !p) return false;
  const file = covarianceNpy(m, form, p.title);
  download(file);
  download(gridFile(p.grid, file.name, p.title));
  return true;
}

/**
 * Every plot on the current screen as PNG (at PLOT_EXPORT_SCALE times its size on screen) or SVG,
 * named after the problem and the plot's title (plotFileName).
 */
export async function exportPlots(format: 'png' | 'svg', problemTitle: string): Promise<number> {
  const plots = [...document.querySelectorAll<HTMLElement>('.plot')].filter((el) => el.id && el.querySelector('.main-svg'));
  const used = new Set<string>();
  for (const el of plots) {
    const layout = (el as unknown as { layout?: { title?: { text?: string } | string } }).layout;
    const plotTitle = typeof layout?.title === 'string' ? layout.title : (layout?.title?.text ?? el.getAttribute('aria-label') ?? el.id);
    const filename = plotFileName(problemTitle, plotTitle, used);
    await images.downloadImage(el, {
      format,
      filename,
      width: el.clientWidth || 700,
      height: el.clientHeight || 400,
      scale: format === 'png' ? PLOT_EXPORT_SCALE : 1,
    });
  }
  return plots.length;
}

export async function buildReport(store: WorkbenchStore): Promise<string | null> {
  const draws = await store
    .getState()
    .fetchDraws('prior')
    .catch(() => null);
  return reportHtml(store.getState(), CAUTION, draws);
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
