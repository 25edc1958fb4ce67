/**
 * `priorscope fit`: type-II maximum likelihood over the hyperparameters named in --free, through
 * the workbench's optimiser (src/core/tuning/typeII.ts maximiseEvidence: projected BFGS on the log
 * evidence, the nugget floor that keeps κ(Cm) ≤ 1e10, the optimum checked by the positive-
 * definiteness diagnosis).
 */
import { hyperParameters, maximiseEvidence, tuningRoute, type HyperParameter } from '../../core/tuning/index.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import { writePriorFile } from '../../core/io/priorFile.ts';
import { optionString, parseNumberOption, UsageError } from '../args.ts';
import { emit, noPositionals, OUT, PRIOR, PROBLEM, progress, READ_FROM, reportWarnings, toJson, type Command } from '../commands.ts';
import { loadPrior, writeOutputFile } from '../files.ts';
import { cliParameterName, loadProblemOption, priorObject, ROUTE, routeOption } from './common.ts';

/** The words of --free: every term's parameter, or one term's (termK.NAME), or the nugget. */
const FIELD_WORDS = ['variance', 'length', 'lengths', 'angle', 'nu'] as const;

/** Core names (terms[k].…) selected by one word of --free among `all` (the prior's parameters). */
export function select(word: string, all: readonly HyperParameter[], prior: PriorSpec, option: string): string[] {
  const m = /^(?:term(\d+)\.)?(variance|length|lengths|lengths\[0\]|lengths\[1\]|angle|nu|nugget)$/.exec(word);
  if (!m || (m[1] !== undefined && m[2] === 'nugget')) {
    throw new UsageError(
      `${option} items must be one of ${FIELD_WORDS.join(', ')}, nugget or termK.NAME (K from 0; NAME one of ${FIELD_WORDS.join(', ')}, lengths[0], lengths[1]), got ${JSON.stringify(word)}`,
    );
  }
  const term = m[1] === undefined ? null : Number(m[1]);
  const what = m[2];
  if (term !== null && term >= prior.terms.length) {
    throw new UsageError(
      `${option} item ${JSON.stringify(word)}: the prior has ${prior.terms.length} term${prior.terms.length === 1 ? '' : 's'} (term0 … term${prior.terms.length - 1})`,
    );
  }
  if (what === 'nugget') {
    if (!((prior.nugget ?? 0) > 0))
      throw new UsageError(
        `${option} nugget: the prior's nugget is 0; give a starting nugget > 0 in the prior file (the fit works on its logarithm)`,
      );
    return ['nugget'];
  }
  const fields: Record<string, HyperParameter['field'][]> = {
    variance: ['variance'],
    length: ['length'],
    lengths: ['lengths0', 'lengths1'],
    'lengths[0]': ['lengths0'],
    'lengths[1]': ['lengths1'],
    angle: ['angle'],
    nu: ['nu'],
  };
  const out = all.filter((h) => h.term !== null && (term === null || h.term === term) && fields[what].includes(h.field)).map((h) => h.name);
  if (out.length === 0) {
    const where = term === null ? `no term of the prior has a ${what}` : `term ${term} has no ${what}`;
    const why: Record<string, string> = {
      variance: '',
      length: ' (an anisotropic term has "lengths": free them with lengths)',
      lengths: ' (only anisotropic 2-D terms have "lengths"; an isotropic term has "length")',
      'lengths[0]': ' (only anisotropic 2-D terms have "lengths")',
      'lengths[1]': ' (only anisotropic 2-D terms have "lengths")',
      angle: ' (only anisotropic 2-D terms, with "lengths", have an angle)',
      nu: ' (only matern terms have a smoothness ν)',
    };
    throw new UsageError(`${option} item ${JSON.stringify(word)}: ${where}${why[what]}`);
  }
  return out;
}

/** Parses a comma list of --free words into core names (in the optimiser's order). */
export function freeParameters(text: string, prior: PriorSpec): { all: HyperParameter[]; free: string[] } {
  const all = hyperParameters(prior);
  const words = text.split(',').map((w) => w.trim());
  if (words.some((w) => w === '')) throw new UsageError(`--free must be a comma list without empty items, got ${JSON.stringify(text)}`);
  const chosen = new Set(words.flatMap((w) => select(w, all, prior, '--free')));
  return { all, free: all.filter((h) => chosen.has(h.name)).map((h) => h.name) };
}

/** Parses --bounds NAME=LO:HI,… (NAME as in --free, every parameter it selects) into core names. */
export function boundsOption(
  text: string,
  prior: PriorSpec,
  all: readonly HyperParameter[],
  free: readonly string[],
): Record<string, [number, number]> {
  const out: Record<string, [number, number]> = {};
  for (const item of text.split(',')) {
    const eq = item.indexOf('=');
    const range = item.slice(eq + 1).split(':');
    if (eq < 0 || range.length !== 2)
      throw new UsageError(`--bounds items must be NAME=LO:HI (e.g. length=1:100), got ${JSON.stringify(item)}`);
    const lo = parseNumberOption('bounds', range[0]);
    const hi = parseNumberOption('bounds', range[1]);
    const word = item.slice(0, eq).trim();
    for (const name of select(word, all, prior, '--bounds')) {
      if (!free.includes(name)) throw new UsageError(`--bounds ${word}: ${cliParameterName(name)} is not free (name it in --free)`);
      const h = all.find((x) => x.name === name)!;
      if (!(lo <= hi) || (h.scale === 'log' && !(lo > 0)))
        throw new UsageError(
          `--bounds ${word} must be LO:HI with LO ≤ HI${h.scale === 'log' ? ' and LO > 0' : ''}, got ${JSON.stringify(item.slice(eq + 1))}`,
        );
      out[name] = [lo, hi];
    }
  }
  return out;
}

/** The fitted prior for a file: an angle beyond ±360° (the file's range) reduced modulo 180° (the same ellipse). */
function fileReady(prior: PriorSpec): PriorSpec {
  return {
    ...prior,
    terms: prior.terms.map((t) => (t.angle !== undefined && Math.abs(t.angle) > 360 ? { ...t, angle: ((t.angle % 180) + 180) % 180 } : t)),
  };
}

export const fit: Command = {
  name: 'fit',
  summary: 'type-II maximum likelihood: the prior hyperparameters that maximise the evidence',
  usage: 'priorscope fit --problem P.json --prior Q.json --free LIST [--bounds NAME=LO:HI,…] [--prior-out F.json] [--out FILE]',
  details:
    'Maximises log N(d; G m0, G Cm Gᵀ + Cd) over the parameters in --free, from the prior file as start, everything\n' +
    'else held. LIST is a comma list of: variance, length, lengths, angle, nu (that parameter of every term that has it),\n' +
    'termK.NAME (one term, K from 0; NAME as before, or lengths[0] / lengths[1]) and nugget (needs a starting nugget > 0).\n' +
    'Lengths, variances, ν and the nugget are fitted on their logarithm, the angle (degrees) as is. Projected BFGS\n' +
    '(Nocedal & Wright 2006) with analytic derivatives in variances, nugget, lengths and angle (Rasmussen & Williams\n' +
    '2006, eq. 5.9; ν by central differences). With a free nugget the search stays where κ(Cm) ≤ 1e10 (a lower bound\n' +
    'on the nugget); a free ν stays within 0.05–50; --bounds adds or replaces box bounds in natural units (degrees for\n' +
    'an angle). The optimum is checked with the positive-definiteness diagnosis of `check`.\n' +
    'Prints {"prior": {a prior-file object}, "logEvidence", "startLogEvidence", "parameters": [{"name", "scale":\n' +
    '"log" | "linear", "value", "start", "standardError", "interval95": [lo, hi], "atBound": "low" | "high" | null}],\n' +
    '"converged", "route": "dense" | "fft" (the evidence computations: FFT for a stationary prior above 1024 cells),\n' +
    '"iterations", "evaluations", "conditioning": {"verdict", "positiveDefinite", "conditionNumber",\n' +
    '"usable", "nuggetAtFloor", "nuggetFloor"}, "note"?}. standardError is that of the fitted coordinate (of the\n' +
    'natural log for log-scale parameters: a relative error), from the curvature of the log evidence at the optimum\n' +
    '(Laplace approximation); null where the curvature is not negative definite or the parameter rests on a bound.',
  exitCodes:
    '3 here: not converged, or the optimum not proven positive definite with κ ≤ 1e10 (the result is still printed; "note" says why)',
  options: [
    PROBLEM,
    READ_FROM,
    PRIOR,
    { name: 'free', value: 'LIST', help: 'parameters to fit, e.g. variance,length,nugget or term0.lengths,term0.angle', required: true },
    { name: 'bounds', value: 'NAME=LO:HI,…', help: 'box bounds in natural units, NAME as in --free (e.g. length=1:100)' },
    { name: 'max-iterations', value: 'N', help: 'iteration limit (default 200)' },
    ROUTE,
    { name: 'prior-out', value: 'F.json', help: 'also write the fitted prior as a prior file' },
    OUT,
  ],
  run(args, io) {
    noPositionals(args);
    const route = routeOption(args);
    const maxText = optionString(args, 'max-iterations');
    const maxIterations =
      maxText === undefined ? undefined : parseNumberOption('max-iterations', maxText, { integer: true, ge: 1, le: 100000 });
    const problem = loadProblemOption(args, io, 'priorscope fit');
    const q = loadPrior(optionString(args, 'prior')!, problem.grid);
    reportWarnings(io, q.warnings);
    const start = q.prior;
    const { all, free } = freeParameters(optionString(args, 'free')!, start);
    const boundsText = optionString(args, 'bounds');
    const bounds = boundsText === undefined ? undefined : boundsOption(boundsText, start, all, free);
    const fixed = all.map((h) => h.name).filter((n) => !free.includes(n));
    progress(io, `fitting ${free.map(cliParameterName).join(', ')} …`);
    const r = maximiseEvidence(problem, start, {
      fixed,
      route,
      ...(bounds ? { bounds } : {}),
      ...(maxIterations !== undefined ? { maxIterations } : {}),
    });
    const prior = fileReady(r.prior);
    const priorOut = optionString(args, 'prior-out');
    if (priorOut !== undefined) writeOutputFile(priorOut, writePriorFile(prior, priorOut));
    emit(
      io,
      args,
      toJson({
        prior: priorObject(prior),
        logEvidence: r.logEvidence,
        startLogEvidence: r.startLogEvidence,
        parameters: r.parameters.map((p) => ({
          name: cliParameterName(p.name),
          scale: p.scale,
          value: p.value,
          start: p.start,
          standardError: p.standardError,
          interval95: p.interval95,
          atBound: p.atBound,
        })),
        converged: r.converged,
        route: route === 'auto' ? tuningRoute(problem, r.prior) : route,
        iterations: r.iterations,
        evaluations: r.evaluations,
        conditioning: r.conditioning,
        ...(r.note !== undefined ? { note: r.note } : {}),
      }),
    );
    if (!r.converged || !r.conditioning.usable) {
      io.stderr(`priorscope fit: ${!r.converged ? 'not converged' : 'the optimum is not usable'}: ${r.note ?? ''}`.trimEnd());
      return 3;
    }
    return 0;
  },
};
