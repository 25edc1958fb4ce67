/**
 * `priorscope calibrate`: seeded simulation-based calibration (src/core/tuning/calibration.ts) of
 * one prior (truth and inversion the same: does the machinery give the nominal coverage?) or a
 * cross-table of several (truth from prior i, inverted with prior j). Shardable over replicates;
 * replicate r draws from its own stream seeded replicateSeed(S, r), so shards merge exactly.
 */
import { cellCount } from '../../core/grid/grid.ts';
import { structuredProblem } from '../../core/inverse/structured.ts';
import { BAND_LEVELS, calibrate, calibrationTable, replicateSeed, type CalibrationResult } from '../../core/tuning/index.ts';
import { optionString, parseNumberOption, UsageError } from '../args.ts';
import { emit, OUT, PRIOR, PROBLEM, progress, READ_FROM, type Command } from '../commands.ts';
import { loadPriors, loadProblemOption, priorObject, priorPaths, ROUTE, routeOption } from './common.ts';
import { problemKey, runShardable, SHARD } from './shard.ts';

/** Largest number of priors in a cross-table (the core's calibrationTable limit). */
export const MAX_CALIBRATION_PRIORS = 8;
/** Largest --replicates. */
export const MAX_CLI_REPLICATES = 1_000_000;

export interface CalibrationKey {
  readonly problem: string;
  readonly priors: readonly string[];
  readonly priorObjects: readonly unknown[];
  readonly replicates: number;
  readonly seed: number;
  readonly draws: number;
  readonly route: string;
}

/** Integer counts of one (truth, inversion) pair over a range of replicates: they add up exactly across shards. */
interface PairCounts {
  readonly cellHits68: number[];
  readonly cellHits95: number[];
  readonly replicateHits68: number[];
  readonly replicateHits95: number[];
  readonly rankHistogram: number[];
  readonly route: { truth: string; inversion: string } | null;
  readonly approximateDraws: boolean;
}

export interface CalibrationPartial {
  readonly pairs: PairCounts[];
}

function counts(r: CalibrationResult, n: number): PairCounts {
  const done = r.replicates;
  return {
    cellHits68: Array.from(r.cellCoverage68, (v) => Math.round(v * done)),
    cellHits95: Array.from(r.cellCoverage95, (v) => Math.round(v * done)),
    replicateHits68: Array.from(r.replicateCoverage68, (v) => Math.round(v * n)),
    replicateHits95: Array.from(r.replicateCoverage95, (v) => Math.round(v * n)),
    rankHistogram: Array.from(r.rankHistogram),
    route: r.route ?? null,
    approximateDraws: r.approximateDraws === true,
  };
}

function emptyCounts(n: number, draws: number): PairCounts {
  return {
    cellHits68: new Array(n).fill(0),
    cellHits95: new Array(n).fill(0),
    replicateHits68: [],
    replicateHits95: [],
    rankHistogram: new Array(draws + 1).fill(0),
    route: null,
    approximateDraws: false,
  };
}

function meanAndStdError(x: readonly number[]): { mean: number; stdError: number } {
  const n = x.length;
  let s = 0;
  for (const v of x) s += v;
  const mean = s / n;
  let q = 0;
  for (const v of x) q += (v - mean) * (v - mean);
  return { mean, stdError: n > 1 ? Math.sqrt(q / (n - 1) / n) : Number.NaN };
}

/** The calibrate output from the partial counts of every shard, in shard order. */
export function combineCalibration(keyValue: unknown, parts: readonly CalibrationPartial[]): unknown {
  const key = keyValue as CalibrationKey;
  const k = key.priors.length;
  const pairs = Array.from({ length: k * k }, (_, p) => {
    const first = parts.find((x) => x.pairs[p].replicateHits68.length > 0)?.pairs[p] ?? parts[0].pairs[p];
    const n = first.cellHits68.length;
    const cell68 = new Array<number>(n).fill(0);
    const cell95 = new Array<number>(n).fill(0);
    const hist = new Array<number>(first.rankHistogram.length).fill(0);
    const rep68: number[] = [];
    const rep95: number[] = [];
    let approximate = false;
    for (const part of parts) {
      const c = part.pairs[p];
      for (let i = 0; i < n; i++) {
        cell68[i] += c.cellHits68[i];
        cell95[i] += c.cellHits95[i];
      }
      c.rankHistogram.forEach((v, b) => (hist[b] += v));
      rep68.push(...c.replicateHits68);
      rep95.push(...c.replicateHits95);
      approximate ||= c.approximateDraws;
    }
    const R = rep68.length;
    if (R !== key.replicates) throw new UsageError(`the parts hold ${R} replicates of pair ${p}, expected ${key.replicates}`);
    const total = R * n;
    const sum = (a: number[]) => a.reduce((x, y) => x + y, 0);
    const r68 = rep68.map((v) => v / n);
    const r95 = rep95.map((v) => v / n);
    const s68 = meanAndStdError(r68);
    const s95 = meanAndStdError(r95);
    return {
      truth: Math.floor(p / k),
      inversion: p % k,
      truthPrior: key.priors[Math.floor(p / k)],
      inversionPrior: key.priors[p % k],
      coverage68: sum(cell68) / total,
      coverage95: sum(cell95) / total,
      coverage68StdError: s68.stdError,
      coverage95StdError: s95.stdError,
      cellCoverage68: cell68.map((v) => v / R),
      cellCoverage95: cell95.map((v) => v / R),
      replicateCoverage68: r68,
      replicateCoverage95: r95,
      rankHistogram: hist,
      route: first.route,
      approximateDraws: approximate,
    };
  });
  const table = (f: 'coverage68' | 'coverage95') => Array.from({ length: k }, (_, i) => pairs.slice(i * k, (i + 1) * k).map((x) => x[f]));
  return {
    priors: key.priors,
    replicates: key.replicates,
    seed: key.seed,
    draws: key.draws,
    nominal: { coverage68: BAND_LEVELS.inner.nominal, coverage95: BAND_LEVELS.outer.nominal },
    results: pairs,
    coverage68Table: table('coverage68'),
    coverage95Table: table('coverage95'),
  };
}

export const calibrateCommand: Command = {
  name: 'calibrate',
  summary: 'seeded coverage and rank histograms of the posterior, for one prior or a cross-table of several',
  usage: 'priorscope calibrate --problem P.json --prior Q.json [Q2.json …] --replicates R --seed S [--draws L] [--shard K/N] [--out FILE]',
  details:
    'Simulation-based calibration (Cook, Gelman & Rubin 2006; Talts et al. 2018): R times, draw a truth from the truth\n' +
    'prior and data d = G m + e with e ~ N(0, Cd), invert with the inversion prior, and count the cells whose truth lies\n' +
    "in the posterior mean ± 1σ (nominal 68.27%) and ± 1.96σ (95%), and the truth's rank among L posterior draws\n" +
    '(uniform on 0 … L when calibrated). One prior: truth and inversion are the same (the posterior must be calibrated;\n' +
    'a check of the machinery and of approximate draws). Several prior files (--prior and/or arguments, at most 8): every\n' +
    'pair, truth i inverted with j, all pairs on the same truths and data (common random numbers).\n' +
    'Replicate r draws from its own random stream seeded from S and r only, so results do not depend on sharding.\n' +
    'Prints {"priors": [files], "replicates", "seed", "draws", "nominal": {"coverage68", "coverage95"}, "results":\n' +
    '[{"truth", "inversion" (indices into priors), "truthPrior", "inversionPrior", "coverage68", "coverage95",\n' +
    '"coverage68StdError", "coverage95StdError" (of the mean of the independent per-replicate coverages), "cellCoverage68"\n' +
    '[N], "cellCoverage95" [N], "replicateCoverage68" [R], "replicateCoverage95" [R], "rankHistogram" [L + 1 counts],\n' +
    '"route": {"truth", "inversion"}, "approximateDraws"}], "coverage68Table" [[K × K], truth-major], "coverage95Table"}.\n' +
    'With --shard K/N only replicates ⌊(K−1)R/N⌋ … ⌊KR/N⌋ − 1 run and a partial result is written; `priorscope merge`\n' +
    'combines the N parts into exactly this output. No verdict of its own: 3 only when a prior covariance does not factor.',
  options: [
    PROBLEM,
    READ_FROM,
    { ...PRIOR, required: false, help: 'prior file; more prior files may follow as arguments (a cross-table)' },
    { name: 'replicates', value: 'R', help: `number of simulated (truth, data) replicates, 1 to ${MAX_CLI_REPLICATES}`, required: true },
    { name: 'seed', value: 'S', help: 'seed, an integer from 0 to 4294967295', required: true },
    { name: 'draws', value: 'L', help: 'posterior draws per replicate for the rank histogram (default 19: 20 bins)' },
    ROUTE,
    SHARD,
    OUT,
  ],
  run(args, io) {
    const paths = priorPaths(args);
    if (paths.length > MAX_CALIBRATION_PRIORS)
      throw new UsageError(`give at most ${MAX_CALIBRATION_PRIORS} prior files for a cross-table, got ${paths.length}`);
    const replicates = parseNumberOption('replicates', optionString(args, 'replicates')!, { integer: true, ge: 1, le: MAX_CLI_REPLICATES });
    const seed = parseNumberOption('seed', optionString(args, 'seed')!, { integer: true, ge: 0, le: 0xffffffff });
    const drawsText = optionString(args, 'draws');
    const draws = drawsText === undefined ? 19 : parseNumberOption('draws', drawsText, { integer: true, ge: 1, le: 65534 });
    const route = routeOption(args);
    const problem = loadProblemOption(args, io, 'priorscope calibrate');
    const priors = loadPriors(paths, problem, io);
    const n = cellCount(problem.grid);
    const key: CalibrationKey = {
      problem: problemKey(problem),
      priors: paths,
      priorObjects: priors.map(priorObject),
      replicates,
      seed,
      draws,
      route,
    };
    runShardable<CalibrationPartial>((t) => emit(io, args, t), args, {
      command: 'calibrate',
      total: replicates,
      key,
      compute: (first, end) => {
        const count = end - first;
        if (count === 0) return { pairs: priors.flatMap(() => priors.map(() => emptyCounts(n, draws))) };
        progress(io, `calibration: replicates ${first + 1} to ${end} of ${replicates}, ${priors.length * priors.length} pair(s) …`);
        const options = {
          replicates: count,
          draws,
          seed,
          streamSeed: (r: number) => replicateSeed(seed, first + r),
          route,
          structured: structuredProblem(problem),
        };
        if (priors.length === 1) return { pairs: [counts(calibrate(problem, priors[0], priors[0], options), n)] };
        const t = calibrationTable(problem, priors, options);
        return { pairs: t.results.flatMap((row) => row.map((r) => counts(r, n))) };
      },
      combine: (k, parts) => combineCalibration(k, parts),
    });
    return 0;
  },
};
