/**
 * Shared pieces of the prior-selection commands (fit, profile, score, calibrate, merge): loading a
 * problem with one or several prior files, the --route option, the names of free parameters as
 * the command line writes them (term0.length) and the core's (terms[0].length).
 */
import type { PriorSpec } from '../../core/prior/spec.ts';
import { gridProblem, type Problem } from '../../core/problems/spec.ts';
import { priorToJson } from '../../core/io/priorFile.ts';
import { optionString, UsageError, type OptionSpec, type ParsedArgs } from '../args.ts';
import { reportWarnings, type Io } from '../commands.ts';
import { loadPrior, loadProblem } from '../files.ts';

export const ROUTE: OptionSpec = {
  name: 'route',
  value: 'auto|dense|fft',
  help: 'route of the evidence computations (default auto: FFT for a stationary prior above 1024 cells, else dense)',
};

export type RouteChoice = 'auto' | 'dense' | 'fft';

export function routeOption(args: ParsedArgs): RouteChoice {
  const text = optionString(args, 'route') ?? 'auto';
  if (text !== 'auto' && text !== 'dense' && text !== 'fft')
    throw new UsageError(`--route must be one of auto, dense, fft, got ${JSON.stringify(text)}`);
  return text;
}

/**
 * The problem of --problem (with --read-from), warnings to stderr. These studies run on regular grids (lag
 * tables, FFT projections): a problem on a cell list is refused naming `command` and what runs on cell lists.
 */
export function loadProblemOption(args: ParsedArgs, io: Io, command: string): Problem {
  const readFrom = optionString(args, 'read-from');
  const p = loadProblem(optionString(args, 'problem')!, {
    readFrom: readFrom === undefined ? [] : readFrom.split(',').filter((d) => d !== ''),
  });
  reportWarnings(io, p.warnings);
  return gridProblem(p.problem, command);
}

/** Prior files checked against the problem's grid, warnings to stderr. */
export function loadPriors(paths: readonly string[], problem: Problem, io: Io): PriorSpec[] {
  return paths.map((path) => {
    const q = loadPrior(path, problem.grid);
    reportWarnings(io, q.warnings);
    return q.prior;
  });
}

/**
 * Prior files from --prior (one) and/or positional arguments (several, side by side), in the
 * order given; at least one.
 */
export function priorPaths(args: ParsedArgs): string[] {
  const one = optionString(args, 'prior');
  const paths = [...(one === undefined ? [] : [one]), ...args.positionals];
  if (paths.length === 0) throw new UsageError('give a prior file: --prior Q.json, or several prior files as arguments');
  return paths;
}

/** A prior as the object a prior file holds (kind, version, mean, terms, …). */
export function priorObject(prior: PriorSpec): Record<string, unknown> {
  return priorToJson(prior);
}

/** "terms[0].lengths[1]" → "term0.lengths[1]" (the command line's spelling). */
export function cliParameterName(coreName: string): string {
  return coreName.replace(/^terms\[(\d+)\]/, 'term$1');
}
