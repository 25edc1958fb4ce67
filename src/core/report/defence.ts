/**
 * The defence document: one self-contained HTML page (no scripts; figures as inline SVG; its own
 * CSP) that states the problem, the chosen prior and the evidence for it, printable on A4. Built
 * from plain data by {@link defenceHtml} with string templates and escaping only (no DOM), so the
 * workbench (src/app/session/actions.ts) and the command line (`priorscope report`,
 * src/cli/report.ts) write the same document.
 */
import type { Grid } from '../grid/grid.ts';
import { gridDimension } from '../grid/grid.ts';
import { formatNumber } from '../format.ts';
import type { Matrix } from '../linalg/matrix.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { DataGeometry } from '../problems/spec.ts';
import { kernelInfo } from '../kernels/correlation.ts';
import { writePriorFile } from '../io/priorFile.ts';
import { esc, extent, gridExtent, heatSvg, type HeatFigure, lineSvg, type ColourScale } from './svg.ts';
import { DIVERGING, SEQUENTIAL } from './colours.ts';

export type Rows = readonly (readonly [string, string])[];

export interface DefenceInput {
  readonly title: string;
  readonly source: string;
  readonly created: string;
  readonly caution: string;
  readonly grid: Grid;
  readonly quantity: { readonly name: string; readonly unit: string };
  readonly dataUnit: string;
  readonly problemFacts: Rows;
  /** Column sums Σᵢ|Gᵢⱼ| (where the data look), or null. */
  readonly coverage: ArrayLike<number> | null;
  /** Where the data were measured (problem file data.positions or data.sources/receivers), drawn over the coverage map. */
  readonly geometry?: DataGeometry | null;
  readonly prior: PriorSpec;
  readonly priorWords: readonly string[];
  readonly pd: Rows;
  readonly priorMean: ArrayLike<number>;
  readonly priorStd: ArrayLike<number>;
  readonly draws: Matrix | null;
  readonly seed: number;
  readonly posterior: {
    readonly mean: ArrayLike<number>;
    readonly std: ArrayLike<number>;
    readonly predicted: ArrayLike<number>;
  } | null;
  readonly fitRows: Rows;
  readonly data: { readonly values: ArrayLike<number>; readonly sigma: ArrayLike<number> };
  readonly truth: ArrayLike<number> | null;
  readonly evidence: {
    readonly lengths: ArrayLike<number>;
    readonly variances: ArrayLike<number>;
    readonly logEvidence: ArrayLike<number>;
    readonly term: number;
    readonly chosen: readonly [number, number];
  } | null;
  readonly candidates: {
    readonly header: readonly string[];
    readonly rows: readonly (readonly string[])[];
    readonly caution: string | null;
  } | null;
  readonly criteria: Rows | null;
  readonly averaged: { readonly mean: ArrayLike<number>; readonly std: ArrayLike<number>; readonly rows: Rows } | null;
  /** Why a section is empty, by section id (e.g. "averaged": "not computed in the workbench"). */
  readonly missing?: Readonly<Record<string, string>>;
}

const STYLE = `
body{font:9.5pt/1.35 system-ui,sans-serif;color:#222;margin:14px auto;max-width:190mm}
h1{font-size:15pt;margin:0 0 2px} h2{font-size:11pt;margin:10px 0 3px;border-bottom:1px solid #bbb;break-after:avoid}
.meta{color:#555;font-size:8.5pt} table{border-collapse:collapse;font-size:8.5pt} td,th{padding:1px 6px 1px 0;vertical-align:top;text-align:left}
td:first-child{white-space:nowrap} .figs{display:flex;flex-wrap:wrap;gap:6px;align-items:flex-start} .figs svg{max-width:100%;height:auto}
section{break-inside:avoid} pre{font-size:7pt;white-space:pre-wrap;margin:0} .note{color:#555;font-size:8.5pt}
table.cands td,table.cands th{border-bottom:1px solid #ddd;padding:2px 6px 2px 0}
.caution{border:1px solid #b55;padding:4px 6px;font-size:8.5pt;margin-top:8px}
@page{size:A4 portrait;margin:11mm} @media print{body{margin:0;max-width:none;font-size:8.5pt}}
`;

const CSP = "default-src 'none'; img-src data:; style-src 'unsafe-inline'; base-uri 'none'; form-action 'none'";

function table(rows: Rows): string {
  return `<table>${rows.map(([k, v]) => `<tr><td>${esc(k)}</td><td>${esc(v)}</td></tr>`).join('')}</table>`;
}

function section(id: string, title: string, body: string): string {
  return `<section id="${id}"><h2>${esc(title)}</h2>${body}</section>`;
}

function withUnit(name: string, unit: string): string {
  return unit ? `${name} (${unit})` : name;
}

function axisName(grid: Grid, k: number): string {
  const dim = gridDimension(grid);
  const names = grid.axes && grid.axes.length === dim ? grid.axes : dim === 2 ? ['x', 'y'] : ['x'];
  return withUnit(names[k] ?? `axis ${k + 1}`, grid.unit ?? '');
}

function cellCentres(grid: Grid): number[] {
  const d = grid.spacing[0];
  const o = grid.origin?.[0] ?? 0;
  return Array.from({ length: grid.shape[0] }, (_, i) => o + i * d);
}

function symmetric(fields: readonly ArrayLike<number>[], centre: number): [number, number] {
  let a = 0;
  for (const f of fields) for (let i = 0; i < f.length; i++) if (Number.isFinite(f[i])) a = Math.max(a, Math.abs(f[i] - centre));
  if (a === 0) a = 1e-12 * Math.max(1, Math.abs(centre));
  return [centre - a, centre + a];
}

function upTo(fields: readonly ArrayLike<number>[]): [number, number] {
  let hi = 0;
  for (const f of fields) for (let i = 0; i < f.length; i++) if (Number.isFinite(f[i])) hi = Math.max(hi, f[i]);
  return [0, hi > 0 ? hi : 1];
}

/** A map of a field on a 2-D grid, true aspect, second axis down. */
/** The survey geometry as points and segments in the grid's axes (2-D; null without geometry). */
export function geometryOverlay(geometry: DataGeometry | null | undefined): HeatFigure['overlay'] | undefined {
  if (!geometry) return undefined;
  if (geometry.kind === 'points') {
    const { rows, cols, data } = geometry.positions;
    if (cols < 2) return undefined;
    return { points: Array.from({ length: rows }, (_, i) => [data[i * cols] ?? 0, data[i * cols + 1] ?? 0] as const) };
  }
  const s = geometry.sources.data;
  const r = geometry.receivers.data;
  // Path ends of 3 coordinates (a volume) are drawn by their first two, on the x–y plane.
  const c = geometry.sources.cols;
  return {
    segments: Array.from(
      { length: geometry.sources.rows },
      (_, i) => [s[c * i] ?? 0, s[c * i + 1] ?? 0, r[c * i] ?? 0, r[c * i + 1] ?? 0] as const,
    ),
  };
}

function geometryCaption(geometry: DataGeometry | null | undefined): string {
  if (!geometry) return '';
  return geometry.kind === 'points'
    ? `, with the ${geometry.positions.rows} measurement positions (dots)`
    : `, with the ${geometry.sources.rows} paths (lines)`;
}

function map(
  input: DefenceInput,
  field: ArrayLike<number>,
  title: string,
  scale: ColourScale,
  range: [number, number],
  unit: string,
  width = 220,
  overlay?: HeatFigure['overlay'],
): string {
  const g = input.grid;
  return heatSvg({
    ...(overlay ? { overlay } : {}),
    title,
    field,
    nx: g.shape[0],
    ny: g.shape[1] ?? 1,
    xRange: gridExtent(g, 0),
    yRange: gridExtent(g, 1),
    xLabel: axisName(g, 0),
    yLabel: `${axisName(g, 1)} ↓`,
    scale,
    range,
    unit,
    yDown: true,
    width,
  });
}

/** The prior's covariance as a formula, with its kernels' correlation functions. */
export function priorFormula(prior: PriorSpec): string[] {
  const lines = [
    'Cm(x, x′) = Σₜ σₜ² ρₜ(hₜ) + nugget · [x = x′], hₜ = |x − x′| / ℓₜ (anisotropic terms: the offset rotated by θ and scaled by ℓ₁, ℓ₂).',
  ];
  const kernels = [...new Set(prior.terms.map((t) => t.kernel))];
  for (const k of kernels) {
    const info = kernelInfo(k);
    lines.push(`${info.label}: ρ(h) = ${info.formula} (${info.source})`);
  }
  return lines;
}

/**
 * A 3-D problem's document drawn on one section: the x–y layer through the middle of the third axis (iz = ⌊nz/2⌋),
 * every per-cell field cut there, the grid that layer's 2-D grid, the survey geometry projected onto it, and a fact
 * saying so (the whole volume goes to a .vti file). 1-D and 2-D inputs come back unchanged.
 */
export function sectionOfVolume(input: DefenceInput): DefenceInput {
  const g = input.grid;
  if (g.shape.length !== 3) return input;
  const [nx, ny, nz] = g.shape;
  const iz = Math.floor(nz / 2);
  const layer = nx * ny;
  const cut = (v: ArrayLike<number>): Float64Array => Float64Array.from({ length: layer }, (_, i) => v[iz * layer + i]);
  const cutOrNull = (v: ArrayLike<number> | null): Float64Array | null => (v === null ? null : cut(v));
  const names = g.axes && g.axes.length === 3 ? g.axes : ['x', 'y', 'z'];
  const z = (g.origin?.[2] ?? 0) + iz * g.spacing[2];
  const grid: Grid = {
    shape: [nx, ny],
    spacing: [g.spacing[0], g.spacing[1]],
    ...(g.origin ? { origin: [g.origin[0], g.origin[1]] } : {}),
    ...(g.unit !== undefined ? { unit: g.unit } : {}),
    axes: [names[0], names[1]],
  };
  const draws = input.draws;
  return {
    ...input,
    grid,
    problemFacts: [
      ...input.problemFacts,
      [
        'Maps',
        `the ${names[0]}–${names[1]} section at ${names[2]} = ${formatNumber(z)}${g.unit ? ` ${g.unit}` : ''} (layer ${iz + 1} of ${nz}), survey projected onto it; the whole volume: priorscope posterior --vti FILE`,
      ],
    ],
    coverage: cutOrNull(input.coverage),
    priorMean: cut(input.priorMean),
    priorStd: cut(input.priorStd),
    draws:
      draws === null
        ? null
        : (() => {
            const out = new Float64Array(draws.rows * layer);
            for (let r = 0; r < draws.rows; r++)
              out.set(draws.data.subarray(r * draws.cols + iz * layer, r * draws.cols + (iz + 1) * layer), r * layer);
            return { rows: draws.rows, cols: layer, data: out };
          })(),
    posterior: input.posterior === null ? null : { ...input.posterior, mean: cut(input.posterior.mean), std: cut(input.posterior.std) },
    truth: cutOrNull(input.truth),
    averaged: input.averaged === null ? null : { ...input.averaged, mean: cut(input.averaged.mean), std: cut(input.averaged.std) },
  };
}

/** The whole document as an HTML string (a 3-D problem on its middle x–y section, {@link sectionOfVolume}). */
export function defenceHtml(whole: DefenceInput): string {
  const input = sectionOfVolume(whole);
  const g = input.grid;
  const is2D = gridDimension(g) === 2;
  const qUnit = input.quantity.unit;
  const q = withUnit(input.quantity.name, qUnit);
  const missing = (id: string, fallback: string) => `<p class="note">${esc(input.missing?.[id] ?? fallback)}</p>`;
  const out: string[] = [];
  const meanConst = 'constant' in input.prior.mean ? input.prior.mean.constant : null;
  const centre = meanConst ?? 0;

  // 1. Problem and geometry
  let geometry = table(input.problemFacts);
  if (input.coverage) {
    geometry += `<div class="figs">${
      is2D
        ? map(
            input,
            input.coverage,
            `Where the data look: column sums Σᵢ|Gᵢⱼ|${geometryCaption(input.geometry)}`,
            SEQUENTIAL,
            upTo([input.coverage]),
            '',
            300,
            geometryOverlay(input.geometry),
          )
        : lineSvg({
            title: 'Where the data look: column sums Σᵢ|Gᵢⱼ|',
            x: cellCentres(g),
            xLabel: axisName(g, 0),
            yLabel: 'Σ|G|',
            series: [{ y: input.coverage, colour: '#5b4bb7', name: 'Σᵢ|Gᵢⱼ|' }],
          })
    }</div>`;
  }
  out.push(section('problem', '1. The problem and its geometry', geometry));

  // 2. The chosen prior
  out.push(
    section(
      'prior',
      '2. The chosen prior',
      `<ul>${input.priorWords.map((w) => `<li>${esc(w)}</li>`).join('')}</ul><p class="note">${priorFormula(input.prior).map(esc).join('<br>')}</p><pre>${esc(writePriorFile(input.prior))}</pre>`,
    ),
  );

  // 3. Positive definiteness
  out.push(section('pd', '3. Is the covariance valid? Positive-definiteness verdict and what proved it', table(input.pd)));

  // 4. Prior realisations
  let real = '';
  if (input.draws && input.draws.rows > 0) {
    const n = Math.min(3, input.draws.rows);
    const rows = Array.from({ length: n }, (_, k) => input.draws!.data.subarray(k * input.draws!.cols, (k + 1) * input.draws!.cols));
    if (is2D) {
      const perturb = meanConst === null;
      const fields = perturb ? rows.map((r) => r.map((v, i) => v - input.priorMean[i])) : rows;
      const range = symmetric(fields, perturb ? 0 : centre);
      real = `<div class="figs">${fields.map((f, k) => map(input, f, `Prior realisation ${k + 1}${perturb ? ' − prior mean' : ''}`, DIVERGING, range, qUnit, 200)).join('')}</div>`;
    } else {
      const x = cellCentres(g);
      const lower = Array.from(input.priorMean, (m, i) => m - 1.959963984540054 * input.priorStd[i]);
      const upper = Array.from(input.priorMean, (m, i) => m + 1.959963984540054 * input.priorStd[i]);
      real = `<div class="figs">${lineSvg({
        title: `${n} prior realisations (seed ${input.seed}), prior mean and 95% band`,
        x,
        xLabel: axisName(g, 0),
        yLabel: q,
        width: 560,
        bands: [{ lower, upper, fill: 'rgba(201,140,38,0.2)', name: 'prior 95%' }],
        series: [
          { y: input.priorMean, colour: '#b07820', dash: true, name: 'prior mean' },
          ...rows.map((r, k) => ({ y: r, colour: ['#3b6e8f', '#8a4f7d', '#5c7d3a'][k], name: `realisation ${k + 1}`, width: 1 })),
        ],
      })}</div>`;
    }
    real += `<p class="note">Same seed, same numbers (m = m₀ + L z). ${is2D ? 'One diverging colour range, symmetric about the prior mean.' : ''}</p>`;
  } else real = missing('draws', 'Prior realisations were not computed.');
  out.push(section('realisations', '4. What the prior claims: realisations', real));

  // 5. Posterior
  let post = '';
  if (input.posterior) {
    const p = input.posterior;
    if (is2D) {
      const perturb = meanConst === null;
      const meanField = perturb ? Array.from(p.mean, (v, i) => v - input.priorMean[i]) : p.mean;
      post = `<div class="figs">${map(input, meanField, `Posterior mean${perturb ? ' − prior mean' : ''}`, DIVERGING, symmetric([meanField], perturb ? 0 : centre), qUnit, 250)}${map(
        input,
        p.std,
        'Posterior standard deviation',
        SEQUENTIAL,
        upTo([input.priorStd]),
        qUnit,
        250,
      )}</div><p class="note">Standard deviation on a scale from 0 to the largest prior standard deviation: pale = resolved.</p>`;
    } else {
      const x = cellCentres(g);
      const b = (z: number) => ({
        lower: Array.from(p.mean, (m, i) => m - z * p.std[i]),
        upper: Array.from(p.mean, (m, i) => m + z * p.std[i]),
      });
      post = `<div class="figs">${lineSvg({
        title: 'Posterior mean with 68% and 95% bands',
        x,
        xLabel: axisName(g, 0),
        yLabel: q,
        width: 560,
        bands: [
          { ...b(1.959963984540054), fill: 'rgba(22,134,150,0.18)', name: 'posterior 95%' },
          { ...b(1), fill: 'rgba(22,134,150,0.4)', name: 'posterior 68%' },
        ],
        series: [
          ...(input.truth ? [{ y: input.truth, colour: '#3a3a46', dash: true, name: 'truth', width: 1 }] : []),
          { y: p.mean, colour: '#0f5d6b', name: 'posterior mean', width: 1.8 },
        ],
      })}</div>`;
    }
  } else post = missing('posterior', 'The posterior was not computed.');
  out.push(section('posterior', '5. The posterior: mean and bands', post));

  // 6. Data fit
  let fit = table(input.fitRows);
  if (input.posterior) {
    const idx = Array.from({ length: input.data.values.length }, (_, i) => i + 1);
    fit += `<div class="figs">${lineSvg({
      title: 'Observed data ±1σ and predicted G m̃',
      x: idx,
      xLabel: 'datum number',
      yLabel: withUnit('d', input.dataUnit),
      width: 560,
      height: 170,
      series: [
        { y: input.data.values, errors: input.data.sigma, colour: '#9b3d57', name: 'observed ±1σ' },
        { y: input.posterior.predicted, colour: '#0f5d6b', name: 'predicted' },
      ],
    })}</div>`;
  }
  out.push(section('fit', '6. The data fit against its reference', fit));

  // 7. Evidence map
  let ev = missing('evidence', 'No evidence map was computed.');
  if (input.evidence) {
    const e = input.evidence;
    const nl = e.lengths.length;
    const nv = e.variances.length;
    // drawn with length across and variance up, on log axes (index space)
    const field = new Float64Array(nl * nv);
    for (let i = 0; i < nl; i++) for (let j = 0; j < nv; j++) field[i + nl * j] = e.logEvidence[i * nv + j];
    const finite = Array.from(field).some(Number.isFinite);
    const [lo, hi] = extent([field]);
    const lg = (a: ArrayLike<number>) => [Math.log10(a[0]), Math.log10(a[a.length - 1])] as const;
    const [l0, l1] = lg(e.lengths);
    const [v0, v1] = lg(e.variances);
    const hx = nl > 1 ? (l1 - l0) / (nl - 1) / 2 : 0.5;
    const hy = nv > 1 ? (v1 - v0) / (nv - 1) / 2 : 0.5;
    ev = `<div class="figs">${heatSvg({
      title: `Log evidence over term ${e.term + 1}'s length and variance; + the chosen prior`,
      field,
      nx: nl,
      ny: nv,
      xRange: [l0 - hx, l1 + hx],
      yRange: [v0 - hy, v1 + hy],
      xLabel: withUnit('log₁₀ length', g.unit ?? ''),
      yLabel: 'log₁₀ variance',
      scale: SEQUENTIAL.map(([t], k, a) => [t, a[a.length - 1 - k][1]] as const),
      range: finite ? [Math.max(lo, hi - 30), hi] : [0, 1],
      unit: 'ln Z',
      aspect: 'fill',
      width: 300,
      mark: [Math.log10(e.chosen[0]), Math.log10(e.chosen[1])],
    })}</div><p class="note">Colours cover the top 30 units of ln Z (a difference of 30 is a Bayes factor of about 10¹³).</p>`;
  }
  out.push(section('evidence', '7. The evidence map and the chosen cell', ev));

  // 8. Candidates
  let cands = missing('candidates', 'No other candidate priors were compared.');
  if (input.candidates && input.candidates.rows.length > 0) {
    const c = input.candidates;
    cands = `<table class="cands"><tr>${c.header.map((h) => `<th>${esc(h)}</th>`).join('')}</tr>${c.rows.map((r) => `<tr>${r.map((v) => `<td>${esc(v)}</td>`).join('')}</tr>`).join('')}</table>${
      c.caution ? `<p class="note">${esc(c.caution)}</p>` : ''
    }<p class="note">2 ln B read on the scale of Kass &amp; Raftery (1995, J. Am. Stat. Assoc. 90:773): 0–2 not worth more than a bare mention, 2–6 positive, 6–10 strong, above 10 very strong.</p>`;
  }
  out.push(section('candidates', '8. The candidates compared', cands));

  // 9. Criteria
  out.push(
    section(
      'criteria',
      '9. Prior-selection criteria for the chosen prior',
      input.criteria ? table(input.criteria) : missing('criteria', 'The criteria were not computed.'),
    ),
  );

  // 10. Averaged posterior
  let avg = missing('averaged', 'The hyperparameter-averaged posterior was not computed.');
  if (input.averaged && input.posterior) {
    const a = input.averaged;
    const p = input.posterior;
    if (is2D) {
      const range = symmetric([a.mean, p.mean], centre);
      const srange = upTo([a.std, p.std]);
      avg = `<div class="figs">${map(input, p.mean, 'Chosen prior: posterior mean', DIVERGING, range, qUnit, 200)}${map(input, a.mean, 'Averaged: posterior mean', DIVERGING, range, qUnit, 200)}${map(input, p.std, 'Chosen prior: std', SEQUENTIAL, srange, qUnit, 200)}${map(input, a.std, 'Averaged: std', SEQUENTIAL, srange, qUnit, 200)}</div>`;
    } else {
      const x = cellCentres(g);
      const band = (m: ArrayLike<number>, s: ArrayLike<number>) => ({
        lower: Array.from(m, (v, i) => v - 1.959963984540054 * s[i]),
        upper: Array.from(m, (v, i) => v + 1.959963984540054 * s[i]),
      });
      avg = `<div class="figs">${lineSvg({
        title: 'Averaged over the evidence map (orange) beside the chosen prior (teal): means and 95% bands',
        x,
        xLabel: axisName(g, 0),
        yLabel: q,
        width: 560,
        bands: [
          { ...band(a.mean, a.std), fill: 'rgba(201,120,30,0.22)', name: 'averaged 95%' },
          { ...band(p.mean, p.std), fill: 'rgba(22,134,150,0.25)', name: 'chosen 95%' },
        ],
        series: [
          { y: a.mean, colour: '#b0601a', name: 'averaged mean', width: 1.5 },
          { y: p.mean, colour: '#0f5d6b', name: 'chosen mean', width: 1.5, dash: true },
        ],
      })}</div>`;
    }
    avg += table(a.rows);
  }
  out.push(section('averaged', '10. How much the result depends on the length and variance: the averaged posterior', avg));

  out.push(`<div class="caution" id="caution">${esc(input.caution)}</div>`);
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta http-equiv="Content-Security-Policy" content="${esc(CSP)}"><title>${esc(`Prior report: ${input.title}`)}</title><style>${STYLE}</style></head>
<body><h1>${esc(input.title)}</h1><div class="meta">${esc(`${input.source} · report made ${input.created} with Priorscope`)}</div>
${out.join('\n')}
</body></html>
`;
}
