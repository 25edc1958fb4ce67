/**
 * The one-page report for stakeholders: a standalone, print-ready HTML document.
 *
 * {@link reportModel} gathers plain facts from the store (pure, unit-tested); {@link renderReport}
 * builds the document with DOM calls only — every text from the user's files goes in through
 * textContent / attribute setters, never as markup — and serialises it. The document carries
 * its own CSP (no scripts at all; images only as data: URLs) and an @media print rule that fits
 * A4 portrait on one page (common practice, no source).
 */
import type { WorkbenchState } from '../store.ts';
import { cellCount } from '../../core/grid/grid.ts';
import { kernelInfo, practicalRange } from '../../core/kernels/correlation.ts';
import type { Term } from '../../core/kernels/spec.ts';
import { termSmoothness } from '../../core/kernels/table.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import type { Diagnostics } from '../../core/prior/diagnostics.ts';
import { writePriorFile } from '../../core/io/priorFile.ts';
import type { DataFitReference } from '../../core/inverse/fitReference.ts';
import { fitVerdict, formatTail } from '../posteriorView.ts';

export interface ReportModel {
  readonly title: string;
  readonly source: string;
  readonly problemFacts: readonly (readonly [string, string])[];
  readonly priorWords: readonly string[];
  readonly priorJson: string;
  readonly pd: readonly (readonly [string, string])[];
  readonly fit: readonly (readonly [string, string])[];
  readonly caution: string;
  readonly created: string;
}

/** The data-fit reference rows: expected χ², its 95% interval, the tail probability, the verdict and what it rests on. */
export function fitReferenceRows(chi2: number, ref: DataFitReference | null): [string, string][] {
  if (!ref) return [['Reference for χ²', 'not available (no data)']];
  return [
    [
      'Reference for χ²',
      `expected ${g4(ref.expected)} (M − tr R, tr R = resolved parameters), 95% interval ${g4(ref.interval95[0])} – ${g4(ref.interval95[1])}, P(χ² ≥ observed) = ${formatTail(ref.upperTail)}; weighted sum of χ²₁, weights eig(L⁻¹ Cd L⁻ᵀ), not χ²_M; Imhof (1961)`,
    ],
    ['Fit', fitVerdict(chi2, ref).text],
  ];
}

const g4 = (x: number) => (Number.isFinite(x) ? Number(x.toPrecision(4)).toString() : String(x));

/** One sentence per term, with the practical range (distance where ρ = 0.05) of its kernel. */
export function termInWords(t: Term, lengthUnit: string, valueUnit: string): string {
  const nu = termSmoothness(t);
  const kernel = nu !== undefined ? `${kernelInfo(t.kernel).label.split(' (')[0]} (ν = ${g4(nu)})` : t.kernel;
  const pr = practicalRange(t.kernel, nu);
  const sd = `${g4(Math.sqrt(t.variance))}${valueUnit ? ' ' + valueUnit : ''}`;
  const u = lengthUnit ? ` ${lengthUnit}` : '';
  if (t.lengths) {
    const [a, b] = t.lengths;
    return `${kernel} correlation, standard deviation ${sd}, lengths ${g4(a)}${u} and ${g4(b)}${u} at ${g4(t.angle ?? 0)}°; correlation falls to 0.05 at ${g4(pr * a)}${u} and ${g4(pr * b)}${u}.`;
  }
  const l = t.length ?? 1;
  return `${kernel} correlation, standard deviation ${sd}, length ${g4(l)}${u}; correlation falls to 0.05 at ${g4(pr * l)}${u}.`;
}

export function priorInWords(prior: PriorSpec, lengthUnit: string, valueUnit: string): string[] {
  const m = prior.mean;
  const mean =
    'constant' in m
      ? `Mean: constant ${g4(m.constant)}${valueUnit ? ' ' + valueUnit : ''}.`
      : 'values' in m
        ? 'Mean: given cell by cell.'
        : `Mean: linear trend, intercept ${g4(m.trend.intercept)}, slope ${Array.from(m.trend.slope, g4).join(', ')}.`;
  const out = [mean, ...prior.terms.map((t, i) => `Term ${i + 1}: ${termInWords(t, lengthUnit, valueUnit)}`)];
  out.push(`Nugget (uncorrelated variance): ${g4(prior.nugget ?? 0)}.`);
  return out;
}

const VERDICT_TEXT: Record<Diagnostics['verdict'], string> = {
  'positive-definite': 'yes, proven',
  'not-positive-definite': 'no, proven',
  'not-decided': 'not decided',
};

const DECIDED_BY_TEXT: Record<Diagnostics['decidedBy'], string> = {
  cholesky: 'Cholesky factorisation of the dense Cm',
  'fft-bracket': 'certified eigenvalue bound from the FFT embedding',
  'lanczos-ritz': 'a direction of negative variance (Lanczos)',
  none: 'no route could decide at this size',
};

export function reportModel(s: WorkbenchState, caution: string, now = new Date()): ReportModel | null {
  const p = s.problem;
  if (!p || !s.prior) return null;
  const n = cellCount(p.grid);
  const facts: [string, string][] = [
    ['Grid', `${p.grid.shape.join(' × ')} cells (${n}), spacing ${p.grid.spacing.map(g4).join(' × ')}${p.grid.unit ? ' ' + p.grid.unit : ''}`],
    ['Data', `${p.dataCount} values`],
    ['Operator', `${p.operatorKind}, ${p.operatorNonZeros} non-zeros`],
    ['Quantity', `${p.quantity.name}${p.quantity.unit ? ' (' + p.quantity.unit + ')' : ''}`],
  ];
  const d = s.diagnostics;
  const pd: [string, string][] = d
    ? [
        ['Positive definite', `${VERDICT_TEXT[d.verdict]} (${DECIDED_BY_TEXT[d.decidedBy]})${d.nextStep ? `; next step: ${d.nextStep}` : ''}`],
        ['Smallest eigenvalue', g4(d.minEigenvalue)],
        ['Condition number', g4(d.conditionNumber)],
        ...(d.suggestedJitter !== null ? [['Suggested jitter', g4(d.suggestedJitter)] as [string, string]] : []),
        ...d.warnings.map((w, i) => [`Warning ${i + 1}`, w.message] as [string, string]),
      ]
    : [['Diagnostics', 'not computed yet']];
  const post = s.posterior;
  const fit: [string, string][] = post
    ? [
        ['χ² of the posterior mean', `${g4(post.summary.chi2)} (M = ${post.summary.dataCount} data)`],
        ...fitReferenceRows(post.summary.chi2, post.summary.fitReference ?? null),
        ['log evidence', g4(post.summary.logEvidence)],
      ]
    : [['Fit', 'not computed yet']];
  return {
    title: p.title,
    source: s.userProblem ? `loaded from ${s.userProblem.label}` : 'built-in example problem (invented)',
    problemFacts: facts,
    priorWords: priorInWords(s.prior, p.grid.unit ?? '', p.quantity.unit),
    priorJson: writePriorFile(s.prior),
    pd,
    fit,
    caution,
    created: now.toISOString().slice(0, 16).replace('T', ' ') + ' UTC',
  };
}

export interface ReportImage {
  readonly caption: string;
  /** A data:image/png URL. */
  readonly src: string;
}

const STYLE = `
body{font:10pt/1.35 system-ui,sans-serif;color:#222;margin:16px auto;max-width:190mm}
h1{font-size:15pt;margin:0 0 2px} h2{font-size:11pt;margin:8px 0 3px;border-bottom:1px solid #ccc}
.meta{color:#555;font-size:9pt} table{border-collapse:collapse;font-size:9pt} td{padding:1px 8px 1px 0;vertical-align:top}
.cols{display:flex;gap:12px} .cols>section{flex:1} .cols>section:first-child{flex:1.4} td:first-child{white-space:nowrap} figure{margin:0;text-align:center;font-size:8pt}
.gallery{display:grid;grid-template-columns:repeat(3,1fr);gap:4px} .gallery img,.plots img{width:100%;object-fit:contain} .plots img{max-height:46mm} .gallery img{max-height:30mm}
.plots{display:grid;grid-template-columns:repeat(2,1fr);gap:6px} pre{font-size:7pt;white-space:pre-wrap;margin:0}
.caution{border:1px solid #b55;padding:4px 6px;font-size:8.5pt;margin-top:6px}
@page{size:A4 portrait;margin:10mm} @media print{body{margin:0;max-width:none;font-size:8.5pt} h2{margin-top:5px} pre{font-size:6pt}}
`;

/** The report as an HTML string; all dynamic text is set as text. */
export function renderReport(doc: Document, m: ReportModel, plots: readonly ReportImage[], gallery: readonly ReportImage[]): string {
  const el = <K extends keyof HTMLElementTagNameMap>(tag: K, text?: string, cls?: string) => {
    const e = doc.createElement(tag);
    if (text !== undefined) e.textContent = text;
    if (cls) e.className = cls;
    return e;
  };
  doc.title = `Prior report: ${m.title}`;
  const csp = el('meta');
  csp.httpEquiv = 'Content-Security-Policy';
  csp.content = "default-src 'none'; img-src data:; style-src 'unsafe-inline'; base-uri 'none'; form-action 'none'";
  const charset = el('meta');
  charset.setAttribute('charset', 'utf-8');
  doc.head.prepend(charset, csp);
  doc.head.append(el('style', STYLE));
  const body = doc.body;
  body.append(el('h1', m.title), el('div', `${m.source} · report made ${m.created} with Priorscope`, 'meta'));
  const table = (rows: readonly (readonly [string, string])[]) => {
    const t = el('table');
    for (const [k, v] of rows) {
      const tr = el('tr');
      tr.append(el('td', k), el('td', v));
      t.append(tr);
    }
    return t;
  };
  const cols = el('div', undefined, 'cols');
  const left = el('section');
  left.append(el('h2', 'Problem'), table(m.problemFacts), el('h2', 'Positive-definiteness'), table(m.pd), el('h2', 'Data fit'), table(m.fit));
  const right = el('section');
  const words = el('ul');
  for (const w of m.priorWords) words.append(el('li', w));
  right.append(el('h2', 'Prior'), words, el('pre', m.priorJson));
  cols.append(left, right);
  body.append(cols);
  const figs = (list: readonly ReportImage[], cls: string) => {
    const box = el('div', undefined, cls);
    for (const im of list) {
      const f = el('figure');
      const img = el('img');
      img.src = im.src;
      img.alt = im.caption;
      f.append(img, el('figcaption', im.caption));
      box.append(f);
    }
    return box;
  };
  if (plots.length) body.append(el('h2', 'Posterior'), figs(plots, 'plots'));
  if (gallery.length) body.append(el('h2', 'Realisations of the prior'), figs(gallery, 'gallery'));
  body.append(el('div', m.caution, 'caution'));
  return '<!doctype html>\n' + doc.documentElement.outerHTML;
}

