/**
 * `priorscope score`: the workbench's closed-form prior-selection criteria (src/core/tuning/criteria.ts
 * priorCriteria: log evidence, leave-one-out, the discrepancy rule in both forms, the prior
 * predictive check) for one prior or several side by side. Shardable over the prior files.
 */
import { NotPositiveDefiniteError, InputError } from '../../core/errors.ts';
import { structuredProblem } from '../../core/inverse/structured.ts';
import { CRITERIA_DIFFER_EXPLANATION, priorCriteria, tuningRoute, type DiscrepancyResult } from '../../core/tuning/index.ts';
import { emit, OUT, PRIOR, PROBLEM, progress, READ_FROM, type Command, type Io } from '../commands.ts';
import { loadPriors, loadProblemOption, priorObject, priorPaths, ROUTE, routeOption } from './common.ts';
import { problemKey, runShardable, SHARD } from './shard.ts';

export interface ScoreKey {
  readonly problem: string;
  readonly priors: readonly string[];
  readonly priorObjects: readonly unknown[];
  readonly route: string;
}

type ScoreItem = Record<string, unknown> & { prior: string };

export interface ScorePartial {
  readonly scores: ScoreItem[];
}

function discrepancy(d: DiscrepancyResult) {
  return { status: d.status, scale: d.scale, chi2: d.chi2, target: d.target, chi2Range: d.chi2Range };
}

/** The score output from the parts (prior files in order); the comparison with the best is made here. */
export function combineScores(keyValue: unknown, parts: readonly ScorePartial[]): { output: unknown; verdictNegative: boolean } {
  const key = keyValue as ScoreKey;
  const scores = parts.flatMap((p) => p.scores);
  const ok = scores.filter((s) => typeof s.logEvidence === 'number');
  const bestOf = (f: (s: ScoreItem) => number): number | null => {
    let best: number | null = null;
    scores.forEach((s, k) => {
      if (typeof s.logEvidence === 'number' && (best === null || f(s) > f(scores[best]))) best = k;
    });
    return best;
  };
  const byEvidence = bestOf((s) => s.logEvidence as number);
  const byLoo = bestOf((s) => (s.leaveOneOut as { logScore: number }).logScore);
  const top = byEvidence === null ? Number.NaN : (scores[byEvidence].logEvidence as number);
  const rows = scores.map((s) => (typeof s.logEvidence === 'number' ? { ...s, logEvidenceToBest: (s.logEvidence as number) - top } : s));
  const plausible = ok.filter((s) => (s.predictive as { plausible: boolean }).plausible).length;
  return {
    output: {
      priors: key.priors,
      scores: rows,
      bestByEvidence: byEvidence,
      bestByLeaveOneOut: byLoo,
      plausibleCount: plausible,
      explanation: CRITERIA_DIFFER_EXPLANATION,
    },
    verdictNegative: plausible === 0,
  };
}

export const score: Command = {
  name: 'score',
  summary: 'log evidence, leave-one-out, discrepancy rule and predictive check of one or several priors',
  usage: 'priorscope score --problem P.json --prior Q.json [Q2.json …] [--shard K/N] [--out FILE]',
  details:
    'Scores each prior file (--prior and/or arguments, in order) on the problem, r = d − G m0, K = G Cm Gᵀ + Cd:\n' +
    '  logEvidence      log N(d; G m0, K), natural log, with −(M/2) log 2π; logEvidenceToBest: minus the best one\n' +
    '                   (a difference of log evidence is a log Bayes factor);\n' +
    '  leaveOneOut      {"logScore": Σ log p(d_i | d_−i), "contributions" [M], "standardised" [M]} (Rasmussen &\n' +
    '                   Williams 2006, eqs. 5.10–5.12; the full Cd, correlated errors included);\n' +
    '  discrepancy      {"classical": χ² = M (Morozov), "expected": χ² = M − tr R}, each {"status": "found" |\n' +
    '                   "mean-fits" | "unreachable", "scale" (the factor on every variance and the nugget), "chi2",\n' +
    '                   "target", "chi2Range": [χ² at scale → 0, at → ∞]};\n' +
    '  predictive       prior predictive check q = rᵀK⁻¹r ~ χ²_M: {"statistic", "dataCount", "reduced", "pUpper",\n' +
    '                   "pLower", "pTwoSided", "interval95", "plausible"};\n' +
    '  route            "dense" | "fft" (FFT for a stationary prior above 1024 cells, unless --route says).\n' +
    'A prior whose K does not factor gets {"prior", "error"}. Prints {"priors", "scores": [one per prior, with "prior"],\n' +
    '"bestByEvidence", "bestByLeaveOneOut" (indices or null), "plausibleCount", "explanation"}.\n' +
    'With --shard K/N only prior files ⌊(K−1)T/N⌋ … ⌊KT/N⌋ − 1 are scored into a partial result for `priorscope merge`.',
  exitCodes: '3 here: no prior passes the predictive check (the data are implausible under every one; the scores are still printed)',
  options: [
    PROBLEM,
    READ_FROM,
    { ...PRIOR, required: false, help: 'prior file; more prior files may follow as arguments' },
    ROUTE,
    SHARD,
    OUT,
  ],
  run(args, io) {
    const paths = priorPaths(args);
    const route = routeOption(args);
    const problem = loadProblemOption(args, io, 'priorscope score');
    const priors = loadPriors(paths, problem, io);
    const key: ScoreKey = { problem: problemKey(problem), priors: paths, priorObjects: priors.map(priorObject), route };
    const out = runShardable<ScorePartial>((t) => emit(io, args, t), args, {
      command: 'score',
      total: priors.length,
      key,
      compute: (first, end) => ({
        scores: priors.slice(first, end).map((p, k) => scoreOne(io, problem, p, paths[first + k], route, priors.length)),
      }),
      combine: (k, parts) => combineScores(k, parts).output,
    });
    if (out !== null && (out as { plausibleCount: number }).plausibleCount === 0) {
      const failed = (out as { scores: { error?: string }[] }).scores.filter((s) => s.error !== undefined).length;
      io.stderr(
        failed === priors.length
          ? 'priorscope score: no prior could be scored (see "error" of each)'
          : `priorscope score: no prior passes the prior predictive check (q = rᵀK⁻¹r outside the central 95% of χ²_M for every one${failed > 0 ? `; ${failed} could not be scored` : ''})`,
      );
      return 3;
    }
    return 0;
  },
};

function scoreOne(
  io: Io,
  problem: Parameters<typeof priorCriteria>[0],
  prior: Parameters<typeof priorCriteria>[1],
  label: string,
  route: 'auto' | 'dense' | 'fft',
  count: number,
): ScoreItem {
  progress(io, `scoring ${label}${count > 1 ? ` (${count} priors)` : ''} …`);
  try {
    const c = priorCriteria(problem, prior, { route, structured: structuredProblem(problem) });
    const p = c.priorPredictive;
    return {
      prior: label,
      logEvidence: c.logEvidence,
      leaveOneOut: {
        logScore: c.leaveOneOut.logScore,
        contributions: c.leaveOneOut.contributions,
        standardised: c.leaveOneOut.standardised,
      },
      discrepancy: { classical: discrepancy(c.discrepancy), expected: discrepancy(c.discrepancyExpected) },
      predictive: {
        statistic: p.statistic,
        dataCount: p.dataCount,
        reduced: p.reduced,
        pUpper: p.pUpper,
        pLower: p.pLower,
        pTwoSided: p.pTwoSided,
        interval95: p.interval95,
        plausible: p.plausible,
      },
      route: route === 'auto' ? tuningRoute(problem, prior) : route,
    };
  } catch (e) {
    if (e instanceof NotPositiveDefiniteError || e instanceof InputError) return { prior: label, error: e.message };
    throw e;
  }
}
