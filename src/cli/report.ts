/**
 * `priorscope report`: the workbench's report (the defence document of src/core/report/defence.ts)
 * as one self-contained HTML file, computed here from the problem and prior files: the
 * positive-definiteness verdict, the posterior, three prior realisations, an evidence map around the
 * prior's first term with the hyperparameter-averaged posterior, the criteria and, with --compare,
 * other candidate priors side by side.
 */
import { UsageError, optionString, parseNumberOption } from './args.ts';
import { OUT, PRIOR, PROBLEM, progress, READ_FROM, type Command } from './commands.ts';
import { writeOutputFile } from './files.ts';
import { loadPriors, loadProblemOption } from './study/common.ts';
import { formatJson } from '../core/io/json.ts';
import { cellCount, gridDimension } from '../core/grid/grid.ts';
import { operatorColumnAbsSums, operatorShape } from '../core/linalg/operator.ts';
import { computePosteriorSerial } from '../core/inverse/compute.ts';
import { diagnosePriorAuto } from '../core/prior/structuredDiagnostics.ts';
import { meanVector } from '../core/prior/mean.ts';
import { priorRealisations } from '../core/sampling/realisations.ts';
import { evidenceMap, termLength } from '../core/tuning/evidenceMap.ts';
import { averagedPosterior, HYPER_PRIORS, type HyperPrior } from '../core/tuning/averaged.ts';
import { priorCriteria } from '../core/tuning/criteria.ts';
import { defenceHtml, type DefenceInput } from '../core/report/defence.ts';
import { averagedRows, criteriaRows, fitReferenceRows, g4, pdRows, priorInWords } from '../core/report/words.ts';
import { candidateTable } from '../core/report/candidates.ts';
import { CAUTION } from '../core/report/caution.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import type { Problem } from '../core/problems/spec.ts';

function candidateRows(
  problem: Problem,
  named: readonly { name: string; prior: PriorSpec }[],
  lengthUnit: string,
  valueUnit: string,
): NonNullable<DefenceInput['candidates']> {
  const scored = named.map((c) => {
    try {
      const crit = priorCriteria(problem, c.prior);
      const s = computePosteriorSerial(problem, c.prior).summary;
      const ref = s.fitReference ?? null;
      return {
        ...c,
        logEvidence: crit.logEvidence,
        loo: crit.leaveOneOut.logScore,
        chi2OverExpected: ref ? s.chi2 / ref.expected : null,
        chi2Interval95OverExpected: ref ? ([ref.interval95[0] / ref.expected, ref.interval95[1] / ref.expected] as const) : null,
      };
    } catch (e) {
      return { ...c, logEvidence: null, loo: null, chi2OverExpected: null, error: e instanceof Error ? e.message : String(e) };
    }
  });
  return candidateTable(scored, problem.grid, lengthUnit, valueUnit);
}

export const report: Command = {
  name: 'report',
  summary: 'the defence document of a prior as one self-contained HTML file (as the workbench writes it)',
  usage:
    'priorscope report --problem P.json --prior Q.json --out R.html [--compare Q2.json,Q3.json] [--map-count K] [--hyper-prior log-uniform|uniform] [--seed S]',
  details:
    'Computes and writes the report: the problem and its geometry; the prior in words, its formula and the prior file; the\n' +
    'positive-definiteness verdict and what proved it; three prior realisations (seed S, default 1); the posterior mean and\n' +
    "bands; the data fit against the distribution of χ² under the model; the log evidence over the first term's length\n" +
    '(ℓ/4 … 4ℓ) × variance (σ²/10 … 10σ²), K × K log-spaced cells (default 9), with the prior marked; the candidates of\n' +
    '--compare beside the prior (log evidence read on the Kass & Raftery 1995 scale); the criteria; the posterior averaged\n' +
    "over the map's cells weighted by evidence × the hyper-prior (default log-uniform); the caution. The HTML has no scripts\n" +
    'and no outside references (figures are inline SVG) and prints on A4. Prints {"out", "bytes", "sections", "averaged"} as JSON.',
  options: [
    PROBLEM,
    READ_FROM,
    PRIOR,
    { ...OUT, required: true, help: 'the HTML file to write' },
    { name: 'compare', value: 'LIST', help: 'comma-separated prior files to compare with the prior' },
    { name: 'map-count', value: 'K', help: 'cells per axis of the evidence map (2 to 40, default 9)' },
    { name: 'hyper-prior', value: 'NAME', help: 'hyper-prior of the averaged posterior: log-uniform (default) or uniform' },
    { name: 'seed', value: 'S', help: 'seed of the prior realisations (default 1)' },
  ],
  run(args, io) {
    const problem = loadProblemOption(args, io, 'priorscope report');
    const priorPath = optionString(args, 'prior')!;
    const [prior] = loadPriors([priorPath], problem, io) as [PriorSpec];
    const compare = (optionString(args, 'compare') ?? '').split(',').filter((s) => s !== '');
    const others = loadPriors(compare, problem, io);
    const count =
      optionString(args, 'map-count') === undefined
        ? 9
        : parseNumberOption('map-count', optionString(args, 'map-count')!, { integer: true, ge: 2, le: 40 });
    const seed =
      optionString(args, 'seed') === undefined
        ? 1
        : parseNumberOption('seed', optionString(args, 'seed')!, { integer: true, ge: 0, le: 4294967295 });
    const hyperText = optionString(args, 'hyper-prior') ?? 'log-uniform';
    if (!HYPER_PRIORS.includes(hyperText as HyperPrior))
      throw new UsageError(`--hyper-prior: expected log-uniform or uniform, got ${JSON.stringify(hyperText)}`);
    const hyper = hyperText as HyperPrior;
    const grid = problem.grid;
    const unit = grid.unit ?? '';
    const qUnit = problem.quantity?.unit ?? '';
    const dataUnit = problem.data.unit ?? '';
    const sigma =
      problem.data.sigma ??
      Float64Array.from({ length: problem.data.values.length }, (_, i) =>
        Math.sqrt(problem.data.covariance!.data[i * problem.data.values.length + i]),
      );

    progress(io, 'positive-definiteness diagnostics');
    const diagnostics = diagnosePriorAuto(grid, prior);
    progress(io, 'posterior');
    const sm = computePosteriorSerial(problem, prior).summary;
    const draws = priorRealisations(grid, prior, 3, seed);
    progress(io, 'criteria');
    const crit = priorCriteria(problem, prior);

    let evidence: DefenceInput['evidence'] = null;
    let averaged: DefenceInput['averaged'] = null;
    let averagedOut: Record<string, unknown> | null = null;
    const term = prior.terms[0];
    if (term) {
      progress(io, `evidence map ${count} × ${count}`);
      const l = termLength(term);
      const map = evidenceMap(problem, prior, {
        term: 0,
        lengths: { min: l / 4, max: 4 * l, count },
        variances: { min: term.variance / 10, max: term.variance * 10, count },
      });
      evidence = { lengths: map.lengths, variances: map.variances, logEvidence: map.logEvidence, term: 0, chosen: [l, term.variance] };
      progress(io, 'averaged posterior');
      const a = averagedPosterior(problem, prior, map, { hyperPrior: hyper });
      averaged = {
        mean: a.mean,
        std: a.std,
        rows: averagedRows(a, { length: l, variance: term.variance, mean: sm.mean, std: sm.std }, unit, qUnit),
      };
      averagedOut = {
        cellsUsed: a.cellsUsed,
        effectiveCells: a.effectiveCells,
        edgeWeight: a.edgeWeight,
        hyperPrior: hyper,
        maxMeanChange: maxAbsDiff(a.mean, sm.mean),
      };
    }
    const candidates =
      others.length > 0
        ? candidateRows(problem, [{ name: priorPath, prior }, ...others.map((q, k) => ({ name: compare[k], prior: q }))], unit, qUnit)
        : null;
    const shape = operatorShape(problem.operator);
    const input: DefenceInput = {
      title: problem.title ?? 'Untitled problem',
      source: `problem file ${optionString(args, 'problem')}, prior file ${priorPath}`,
      created: new Date().toISOString().slice(0, 16).replace('T', ' ') + ' UTC',
      caution: CAUTION,
      grid,
      quantity: { name: problem.quantity?.name ?? 'value', unit: qUnit },
      dataUnit,
      problemFacts: [
        [
          'Grid',
          `${grid.shape.join(' × ')} cells (${cellCount(grid)}), spacing ${grid.spacing.map(g4).join(' × ')}${unit ? ' ' + unit : ''}, first cell centre at (${(grid.origin ?? grid.shape.map(() => 0)).map(g4).join(', ')}), cells numbered with the first axis fastest`,
        ],
        ['Extent', grid.shape.map((n, i) => `${g4(n * grid.spacing[i])}${unit ? ' ' + unit : ''}`).join(' × ')],
        [
          'Data',
          `${problem.data.values.length} values${dataUnit ? ` in ${dataUnit}` : ''}, σ from ${g4(Math.min(...sigma))} to ${g4(Math.max(...sigma))}`,
        ],
        ['Operator', `${problem.operator.kind}, ${shape.rows} × ${shape.cols}`],
        ['Quantity', `${problem.quantity?.name ?? 'value'}${qUnit ? ` (${qUnit})` : ''}`],
      ],
      coverage: operatorColumnAbsSums(problem.operator),
      geometry: problem.data.geometry ?? null,
      prior,
      priorWords: priorInWords(prior, unit, qUnit),
      pd: pdRows(diagnostics),
      priorMean: meanVector(grid, prior),
      priorStd: sm.priorStd,
      draws,
      seed,
      posterior: { mean: sm.mean, std: sm.std, predicted: sm.predicted },
      fitRows: [
        ['χ² of the posterior mean', `${g4(sm.chi2)} (M = ${sm.dataCount} data)`],
        ...fitReferenceRows(sm.chi2, sm.fitReference ?? null),
        ['log evidence', g4(sm.logEvidence)],
      ],
      data: { values: problem.data.values, sigma },
      truth: problem.truth ?? null,
      evidence,
      candidates,
      criteria: criteriaRows(crit),
      averaged,
      missing: {
        candidates: 'No other candidates were given (--compare).',
        evidence: 'The prior has no covariance term to map.',
        averaged: 'The prior has no covariance term to average over.',
      },
    };
    const html = defenceHtml(input);
    const out = optionString(args, 'out')!;
    writeOutputFile(out, html);
    const sections = [...html.matchAll(/<section id="([a-z]+)">/g)].map((m) => m[1]);
    io.stdout(
      formatJson({ out, bytes: new TextEncoder().encode(html).length, sections, dimension: gridDimension(grid), averaged: averagedOut }) +
        '\n',
    );
    return 0;
  },
};

function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}
