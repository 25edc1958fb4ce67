/**
 * The workbench's report: the defence document of src/core/report/defence.ts, filled from the
 * store (pure; the figures are the document's own SVG, so the command line's `priorscope report`
 * writes the same document). Results not computed in the workbench (the evidence map, candidate
 * scores, criteria) are said to be missing, with the command that computes them.
 */
import type { WorkbenchState } from '../store.ts';
import { cellCount } from '../../core/grid/grid.ts';
import { isGridView } from '../gridView.ts';
import type { Matrix } from '../../core/linalg/matrix.ts';
import { defenceHtml, type DefenceInput } from '../../core/report/defence.ts';
import { averagedRows, criteriaRows, fitReferenceRows, g4, pdRows, priorInWords } from '../../core/report/words.ts';
import { candidateTable } from '../../core/report/candidates.ts';
import { termLength } from '../../core/tuning/evidenceMap.ts';
export { fitReferenceRows, priorInWords, termInWords } from '../../core/report/words.ts';
export { candidateTable } from '../../core/report/candidates.ts';

/** "2026-12-04 22:40 UTC". */
export function reportTime(now: Date): string {
  return now.toISOString().slice(0, 16).replace('T', ' ') + ' UTC';
}

/** The document's input from the store; null without a problem, prior and posterior. */
export function reportInput(s: WorkbenchState, caution: string, draws: Matrix | null, now = new Date()): DefenceInput | null {
  const p = s.problem;
  const post = s.posterior;
  // The document's maps and tables are drawn on a grid; a cell list has none (the cells screen says so).
  if (!isGridView(p) || !s.prior || !post) return null;
  const n = cellCount(p.grid);
  const unit = p.grid.unit ?? '';
  const facts: [string, string][] = [
    [
      'Grid',
      `${p.grid.shape.join(' × ')} cells (${n}), spacing ${p.grid.spacing.map(g4).join(' × ')}${unit ? ' ' + unit : ''}, first cell centre at (${(p.grid.origin ?? p.grid.shape.map(() => 0)).map(g4).join(', ')}), cells numbered with the first axis fastest`,
    ],
    ['Extent', p.grid.shape.map((k, i) => `${g4(k * p.grid.spacing[i])}${unit ? ' ' + unit : ''}`).join(' × ')],
    [
      'Data',
      `${p.dataCount} values${p.dataUnit ? ` in ${p.dataUnit}` : ''}, σ from ${g4(Math.min(...p.sigma))} to ${g4(Math.max(...p.sigma))}`,
    ],
    ['Operator', `${p.operatorKind}, ${p.operatorNonZeros} non-zeros`],
    ['Quantity', `${p.quantity.name}${p.quantity.unit ? ' (' + p.quantity.unit + ')' : ''}`],
  ];
  const sm = post.summary;
  const mapTask = s.selectTasks.evidenceMap;
  const map = mapTask.value && mapTask.key?.startsWith(`${p.version}:`) ? mapTask.value : null;
  const mapTerm = map ? s.prior.terms[map.term] : undefined;
  const crit =
    s.selectTasks.criteria.value && s.selectTasks.criteria.key === `${p.version}:${s.priorRevision}` ? s.selectTasks.criteria.value : null;
  const scores = s.selectTasks.candidates.value;
  const avgTask = s.selectTasks.averaged;
  const avg = map && avgTask.value && mapTask.key && avgTask.key?.startsWith(`${mapTask.key}:`) ? avgTask.value : null;
  const candidates =
    s.candidates.length > 0
      ? candidateTable(
          s.candidates.map((c, k) => {
            const sc = scores?.[k];
            return {
              name: c.name,
              prior: c.prior,
              logEvidence: sc?.ok ? sc.logEvidence : null,
              chi2OverExpected: sc?.ok ? sc.chi2OverExpected : null,
              chi2Interval95OverExpected: sc?.ok ? sc.chi2Interval95OverExpected : null,
              loo: sc?.ok ? sc.looLogScore : null,
            };
          }),
          p.grid,
          unit,
          p.quantity.unit,
        )
      : null;
  return {
    title: p.title,
    source: s.userProblem ? `loaded from ${s.userProblem.label}` : 'built-in example problem (invented)',
    created: reportTime(now),
    caution,
    grid: p.grid,
    quantity: p.quantity,
    dataUnit: p.dataUnit,
    problemFacts: facts,
    coverage: p.coverage,
    geometry: p.geometry,
    prior: s.prior,
    priorWords: priorInWords(s.prior, unit, p.quantity.unit),
    pd: s.diagnostics ? pdRows(s.diagnostics) : [['Diagnostics', 'not computed yet']],
    priorMean: post.priorMean,
    priorStd: sm.priorStd,
    draws,
    seed: s.seed,
    posterior: { mean: sm.mean, std: sm.std, predicted: sm.predicted },
    fitRows: [
      ['χ² of the posterior mean', `${g4(sm.chi2)} (M = ${sm.dataCount} data)`],
      ...fitReferenceRows(sm.chi2, sm.fitReference ?? null),
      ['log evidence', g4(sm.logEvidence)],
    ],
    data: { values: p.values, sigma: p.sigma },
    truth: p.truth,
    evidence:
      map && mapTerm
        ? {
            lengths: map.lengths,
            variances: map.variances,
            logEvidence: map.logEvidence,
            term: map.term,
            chosen: [termLength(mapTerm), mapTerm.variance],
          }
        : null,
    candidates,
    criteria: crit ? criteriaRows(crit) : null,
    averaged:
      avg && mapTerm
        ? {
            mean: avg.mean,
            std: avg.std,
            rows: averagedRows(
              avg,
              { length: termLength(mapTerm), variance: mapTerm.variance, mean: sm.mean, std: sm.std },
              unit,
              p.quantity.unit,
            ),
          }
        : null,
    missing: {
      evidence: 'No evidence map was computed in the workbench (Choose prior screen), or it belongs to another problem.',
      candidates: 'No candidate priors were pinned.',
      criteria: 'The criteria were not computed for this prior (Choose prior screen).',
      averaged:
        'The hyperparameter-averaged posterior was not computed (Choose prior screen, after an evidence map; or priorscope report on the command line).',
    },
  };
}

/** The report as HTML, or null when there is nothing to report yet. */
export function reportHtml(s: WorkbenchState, caution: string, draws: Matrix | null, now = new Date()): string | null {
  const input = reportInput(s, caution, draws, now);
  return input ? defenceHtml(input) : null;
}
