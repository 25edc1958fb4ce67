/**
 * `priorscope profile`: the log evidence along one hyperparameter (ν, the nugget, any length,
 * variance or angle), everything else in the prior held: one log evidence (src/core/tuning/typeII.ts
 * logEvidence, one factorisation of K) per value, so each value's number is the same whichever
 * shard computes it. Shardable over the values.
 */
import { NotPositiveDefiniteError } from '../../core/errors.ts';
import { structuredProblem } from '../../core/inverse/structured.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import { hyperParameters, logEvidence, logSpaced, setHyperParameter, type HyperParameter } from '../../core/tuning/index.ts';
import { optionString, parseNumberListOption, parseNumberOption, UsageError } from '../args.ts';
import { emit, noPositionals, OUT, PRIOR, PROBLEM, progress, READ_FROM, reportWarnings, type Command } from '../commands.ts';
import { loadPrior } from '../files.ts';
import { cliParameterName, loadProblemOption, priorObject, ROUTE, routeOption } from './common.ts';
import { select } from './fit.ts';
import { problemKey, runShardable, SHARD } from './shard.ts';

export interface ProfileKey {
  readonly problem: string;
  readonly prior: unknown;
  readonly parameter: string;
  readonly values: readonly number[];
  readonly route: string;
}

export interface ProfilePartial {
  readonly logEvidence: (number | null)[];
}

type Target = Pick<HyperParameter, 'term' | 'field' | 'name'>;

/** The prior with one parameter set to v (natural units). */
export function setParameter(prior: PriorSpec, h: Target, v: number): PriorSpec {
  return setHyperParameter(prior, h, v);
}

/** The one parameter that --parameter names. */
function target(word: string, prior: PriorSpec): Target {
  if (word === 'nugget') return { term: null, field: 'nugget', name: 'nugget' };
  const all = hyperParameters(prior);
  const names = select(word, all, prior, '--parameter');
  if (names.length !== 1) {
    throw new UsageError(
      `--parameter must name one parameter; ${JSON.stringify(word)} names ${names.length} (${names.map(cliParameterName).join(', ')}): write termK.NAME`,
    );
  }
  return all.find((h) => h.name === names[0])!;
}

/** The profile output from the parts (values in order). */
export function combineProfile(keyValue: unknown, parts: readonly ProfilePartial[]): unknown {
  const key = keyValue as ProfileKey;
  const values = key.values;
  const ev = parts.flatMap((p) => p.logEvidence);
  if (ev.length !== values.length) throw new UsageError(`the parts hold ${ev.length} values, expected ${values.length}`);
  let best: { value: number; logEvidence: number; index: number } | null = null;
  ev.forEach((v, k) => {
    if (v !== null && (best === null || v > best.logEvidence)) best = { value: values[k], logEvidence: v, index: k };
  });
  const b = best as { index: number } | null;
  const sorted = values.every((v, k) => k === 0 || v > values[k - 1]);
  const edge = b === null || !sorted || values.length < 2 ? null : b.index === 0 ? 'low' : b.index === values.length - 1 ? 'high' : null;
  return { parameter: key.parameter, values, logEvidence: ev, best, bestOnEdge: edge };
}

export const profile: Command = {
  name: 'profile',
  summary: 'log evidence along one parameter (ν, nugget, a length, variance or angle), the rest held',
  usage:
    'priorscope profile --problem P.json --prior Q.json --parameter NAME (--values V1,V2,… | --range lo:hi:n) [--shard K/N] [--out FILE]',
  details:
    'Evaluates log N(d; G m0, G Cm Gᵀ + Cd) (natural log, with −(M/2) log 2π) with the parameter NAME set to each value and\n' +
    'everything else as in the prior file. NAME as in `fit --free`, naming one parameter: nugget, termK.variance,\n' +
    'termK.length, termK.lengths[0], termK.lengths[1], termK.angle (degrees), termK.nu, or a bare word when the prior has\n' +
    'one such parameter (e.g. nu). --range lo:hi:n gives n log-spaced values (0 < lo ≤ hi).\n' +
    'Prints {"parameter", "values": [...], "logEvidence": [... null where K does not factor], "best": {"value",\n' +
    '"logEvidence", "index"} | null, "bestOnEdge": "low" | "high" | null (for increasing values: the maximum is at an\n' +
    'end, the true one may lie beyond it)}.\n' +
    'With --shard K/N only values ⌊(K−1)T/N⌋ … ⌊KT/N⌋ − 1 are computed into a partial result for `priorscope merge`.',
  exitCodes: '3 here: no value gives a data-space covariance that factors',
  options: [
    PROBLEM,
    READ_FROM,
    PRIOR,
    { name: 'parameter', value: 'NAME', help: 'the parameter to vary, e.g. nugget, nu, term0.length', required: true },
    { name: 'values', value: 'V1,V2,…', help: 'the values (natural units; degrees for an angle)' },
    { name: 'range', value: 'lo:hi:n', help: 'n log-spaced values from lo to hi' },
    ROUTE,
    SHARD,
    OUT,
  ],
  run(args, io) {
    noPositionals(args);
    const route = routeOption(args);
    const valuesText = optionString(args, 'values');
    const rangeText = optionString(args, 'range');
    if ((valuesText === undefined) === (rangeText === undefined)) throw new UsageError('give either --values V1,V2,… or --range lo:hi:n');
    let values: number[];
    if (valuesText !== undefined) values = parseNumberListOption('values', valuesText);
    else {
      const parts = rangeText!.split(':');
      if (parts.length !== 3)
        throw new UsageError(`--range must be lo:hi:n with 0 < lo ≤ hi and n an integer from 1 to 10000, got ${JSON.stringify(rangeText)}`);
      const lo = parseNumberOption('range', parts[0], { gt: 0 });
      const hi = parseNumberOption('range', parts[1], { gt: 0 });
      const n = parseNumberOption('range', parts[2], { integer: true, ge: 1, le: 10000 });
      if (hi < lo) throw new UsageError(`--range must have lo ≤ hi, got ${JSON.stringify(rangeText)}`);
      values = Array.from(logSpaced({ min: lo, max: hi, count: n }, 'range'));
    }
    const problem = loadProblemOption(args, io, 'priorscope profile');
    const q = loadPrior(optionString(args, 'prior')!, problem.grid);
    reportWarnings(io, q.warnings);
    const prior = q.prior;
    const h = target(optionString(args, 'parameter')!.trim(), prior);
    const name = cliParameterName(h.name);
    values.forEach((v, k) => {
      const ok = h.field === 'angle' ? Math.abs(v) <= 360 : h.field === 'nugget' ? v >= 0 : v > 0;
      if (!ok)
        throw new UsageError(
          `value ${k + 1} of ${name} must be ${h.field === 'angle' ? 'an angle from -360 to 360 degrees' : h.field === 'nugget' ? '≥ 0' : '> 0'}, got ${v}`,
        );
    });
    const structured = structuredProblem(problem);
    const key: ProfileKey = { problem: problemKey(problem), prior: priorObject(prior), parameter: name, values, route };
    const out = runShardable<ProfilePartial>((t) => emit(io, args, t), args, {
      command: 'profile',
      total: values.length,
      key,
      compute: (first, end) => {
        progress(io, `profile of ${name}: values ${first + 1} to ${end} of ${values.length} …`);
        return {
          logEvidence: values.slice(first, end).map((v) => {
            try {
              const e = logEvidence(problem, setParameter(prior, h, v), { route, structured });
              return Number.isFinite(e) ? e : null;
            } catch (e) {
              if (e instanceof NotPositiveDefiniteError) return null;
              throw e;
            }
          }),
        };
      },
      combine: (k, parts) => combineProfile(k, parts),
    });
    if (out !== null && (out as { best: unknown }).best === null) {
      io.stderr(`priorscope profile: no value of ${name} gives a data-space covariance that factors`);
      return 3;
    }
    return 0;
  },
};
