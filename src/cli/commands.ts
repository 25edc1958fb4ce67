/**
 * The commands of `priorscope`: a thin layer that reads files through src/core/io, calls the core
 * and writes JSON (or CSV / .npy for samples). Each command returns its exit code:
 * 0 ok, 2 bad input, 3 `check` found the prior not positive definite.
 */
import { assertNever } from '../core/errors.ts';
import { dirname, resolve } from 'node:path';
import { KERNEL_NAMES, type KernelName } from '../core/kernels/spec.ts';
import { kernelDefinition, kernelsTaking, kernelTakes } from '../core/kernels/table.ts';
import { correlation } from '../core/kernels/correlation.ts';
import type { Matrix } from '../core/linalg/matrix.ts';
import { DENSE_DECISION_LIMIT, diagnosePriorAuto, STRUCTURED_DIAGNOSTICS_MIN_CELLS } from '../core/prior/structuredDiagnostics.ts';
import { diagnoseCovariance, type Diagnostics } from '../core/prior/diagnostics.ts';
import { structuredPosteriorDraws } from '../core/inverse/structuredDraws.ts';
import { priorRealisationsWithRoute } from '../core/sampling/realisations.ts';
import { posteriorRealisations, preparePosterior } from '../core/inverse/posterior.ts';
import { choosePosteriorPath, FFT_MIN_CELLS, PATH_REQUESTS, type PathRequest } from '../core/inverse/auto.ts';
import { prepareStructuredPosterior, structuredProblem } from '../core/inverse/structured.ts';
import type { BlockPool } from '../core/parallel/blocks.ts';
import { computePosterior, type PosteriorPool } from '../core/inverse/compute.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import { gridProblem, type Problem } from '../core/problems/spec.ts';
import { defaultThreads, nodeBlockPool } from '../core/parallel/node.ts';
import type { PosteriorSummary } from '../core/inverse/types.ts';
import { DEMOS } from '../core/problems/demos.ts';
import { LENGTH_AXES, type LengthAxis, type LogAxis } from '../core/tuning/evidenceMap.ts';
import type { FileWarning } from '../core/io/errors.ts';
import { writeCsv } from '../core/io/csv.ts';
import { formatJson } from '../core/io/json.ts';
import { writeNpyMatrix } from '../core/io/npy.ts';
import { writeVti } from '../core/io/vti.ts';
import { priorToJson, writePriorFile } from '../core/io/priorFile.ts';
import { problemKey, runShardable, SHARD } from './study/shard.ts';
import { combineTune, tuneRows, type TuneKey, type TunePartial } from './study/tuneShard.ts';
import { writeProblemFile } from '../core/io/problemFile.ts';
import { cellCount, type Geometry, type Grid, isCellList } from '../core/grid/grid.ts';
import {
  optionFlag,
  optionString,
  parseNumberListOption,
  parseNumberOption,
  UsageError,
  type OptionSpec,
  type ParsedArgs,
} from './args.ts';
import { loadPrior, loadProblem, loadSymmetricMatrix, MAX_CHECK_MATRIX, writeOutputFile } from './files.ts';

/** Where a command writes: stdout / stderr of the process, replaceable in tests. */
export interface Io {
  stdout(content: string | Uint8Array): void;
  stderr(line: string): void;
  /** True when stdout / stderr are terminals (progress lines and the binary-output guard). */
  readonly stdoutIsTTY: boolean;
  readonly stderrIsTTY: boolean;
}

export interface Command {
  readonly name: string;
  readonly summary: string;
  readonly usage: string;
  /** Longer description printed by `priorscope <command> --help`. */
  readonly details: string;
  readonly options: readonly OptionSpec[];
  /** Exit codes beyond the common 0 / 1 / 2 / 3 (printed by `--help` after them), e.g. check's 4. */
  readonly exitCodes?: string;
  run(args: ParsedArgs, io: Io): number | Promise<number>;
}

export const OUT: OptionSpec = { name: 'out', value: 'FILE', help: 'write the result to FILE instead of stdout' };
export const PROBLEM: OptionSpec = {
  name: 'problem',
  value: 'P.json',
  help: 'problem file (kind "priorscope.problem", version 1)',
  required: true,
};
export const READ_FROM: OptionSpec = {
  name: 'read-from',
  value: 'FOLDERS',
  help: "also read files named in the problem file (operator.file) from these folders (comma-separated); by default only from the problem file's folder",
};
export const PRIOR: OptionSpec = {
  name: 'prior',
  value: 'Q.json',
  help: 'prior file (kind "priorscope.prior", version 1)',
  required: true,
};

/** JSON text of a result (see formatJson: NaN and ±Infinity become null). */
export function toJson(value: unknown): string {
  return formatJson(value);
}

export function emit(io: Io, args: ParsedArgs, content: string | Uint8Array): void {
  const out = optionString(args, 'out');
  if (out !== undefined) writeOutputFile(out, content);
  else io.stdout(content);
}

export function reportWarnings(io: Io, warnings: readonly FileWarning[]): void {
  for (const w of warnings) io.stderr(`warning: ${w.message}`);
}

export function progress(io: Io, line: string): void {
  if (io.stderrIsTTY) io.stderr(`priorscope: ${line}`);
}

export function loadBoth(args: ParsedArgs, io: Io) {
  const problemPath = optionString(args, 'problem')!;
  const priorPath = optionString(args, 'prior')!;
  const readFrom = optionString(args, 'read-from');
  const p = loadProblem(problemPath, { readFrom: readFrom === undefined ? [] : readFrom.split(',').filter((d) => d !== '') });
  const q = loadPrior(priorPath, p.problem.grid);
  reportWarnings(io, p.warnings);
  reportWarnings(io, q.warnings);
  return { problem: p.problem, prior: q.prior };
}

export function noPositionals(args: ParsedArgs): void {
  if (args.positionals.length > 0) throw new UsageError(`unexpected argument ${JSON.stringify(args.positionals[0])}`);
}

/** Parses --path (default auto). */
function pathOption(args: ParsedArgs): PathRequest {
  const text = optionString(args, 'path') ?? 'auto';
  if (!(PATH_REQUESTS as readonly string[]).includes(text)) {
    throw new UsageError(`--path must be one of ${PATH_REQUESTS.join(', ')}, got ${JSON.stringify(text)}`);
  }
  return text as PathRequest;
}

/** Parses --threads: given, it is used as is; absent, every core when {@link CLI_MIN_SPLIT_FLOPS} says so. */
function threadsOption(args: ParsedArgs): { threads: number; forced: boolean } {
  const text = optionString(args, 'threads');
  return text === undefined
    ? { threads: defaultThreads(), forced: false }
    : { threads: parseNumberOption('threads', text, { integer: true, ge: 1, le: 64 }), forced: true };
}

/**
 * Below this many multiply-adds of the std solve (M²N/2) the one-shot CLI stays on one thread:
 * starting the pool costs more than the split saves. Measured when each thread still loaded the
 * sources through tsx (0.4–0.7 s per pool); the built command line's threads load the bundled
 * dist-cli/pool-worker.mjs instead, so the threshold is now on the safe side until re-measured. Measured `priorscope posterior` wall time on the 2-core project machine (quiet
 * moments; --threads 1 → 2, the 2-thread run splitting both the products and the std), crosshole
 * problems of test/bench/cases/fft.ts on 128²: M = 400 (1.3e9) 1.33–1.72 → 1.72–1.90 s; M = 800
 * (5.2e9) 2.01–2.03 → 1.98–2.09 s (even); M = 1600 (2.1e10) 6.33–6.47 → 5.32–5.88 s. The
 * threshold sits between the last two. (A long-lived pool, as in the browser engine, pays its
 * start once: there src/core/parallel/blocks.ts MIN_SPLIT_FLOPS applies.)
 */
export const CLI_MIN_SPLIT_FLOPS = 1e10;

/**
 * The posterior through src/core/inverse/compute.ts computePosterior, with a pool of `threads`
 * worker threads that starts only when the std solve is at least {@link CLI_MIN_SPLIT_FLOPS} (or
 * `forced`, an explicit --threads), and is closed afterwards. The result is bit-identical for every
 * thread count.
 */
export async function cliPosterior(
  problem: Problem<Geometry>,
  prior: PriorSpec,
  requested: PathRequest,
  threads: number,
  forced = false,
): Promise<{ summary: PosteriorSummary; reason: string; threadsUsed: number }> {
  let started: BlockPool | null = null;
  const pool: PosteriorPool = {
    get: () => started ?? (started = nodeBlockPool(threads)),
    threads,
    minSplitFlops: CLI_MIN_SPLIT_FLOPS,
    force: forced,
  };
  try {
    // One computation per process: keeping the data rows' spectra for a later call (the workbench's
    // cache) would only cost allocation and collection, about 0.2 s CPU of 1 s on the 64 × 64 bench.
    const g = problem.grid;
    const input = isCellList(g) ? problem : structuredProblem({ ...problem, grid: g }, { cacheBytes: 0 });
    const r = await computePosterior(input, prior, { path: requested, field: '--path', pool });
    return { summary: r.summary, reason: r.decision.reason, threadsUsed: r.threadsUsed };
  } finally {
    if (started !== null) await (started as BlockPool).close();
  }
}

const posterior: Command = {
  name: 'posterior',
  summary: 'posterior mean, standard deviation, residuals and log-evidence',
  usage: 'priorscope posterior --problem P.json --prior Q.json [--path auto|dense|fft] [--threads T] [--vti FILE] [--out FILE]',
  details:
    'Prints {"mean": [N], "std": [N], "priorStd": [N], "predicted": [M], "residuals": [M], "chi2", "chi2Expected",\n' +
    '"chi2Interval95": [lo, hi], "chi2TailProbability", "logEvidence",\n' +
    '"resolutionTrace", "dataCount", "parameterCount", "path": "dense" | "fft"}. residuals are normalised\n' +
    '((d − G m̃)/σ, or Ld⁻¹ (d − G m̃) for a full data covariance Cd = Ld Ldᵀ) and chi2 is their sum of squares.\n' +
    'Under the model chi2 is not χ²_M: it is a weighted sum of χ²₁ terms (weights: eigenvalues of L⁻¹ Cd L⁻ᵀ,\n' +
    'K = G Cm Gᵀ + Cd = L Lᵀ) with mean M − resolutionTrace. "chi2Expected" is that mean, "chi2Interval95" its\n' +
    'central 95% interval, "chi2TailProbability" P(χ² ≥ chi2) (Imhof 1961 numerical inversion).\n' +
    'logEvidence is the natural log of N(d; G m0, G Cm Gᵀ + Cd), including −(M/2) log 2π.\n' +
    '--path auto (default) takes the FFT path (circulant embedding, no N × N matrix) for a stationary prior on a\n' +
    `regular grid of at least ${FFT_MIN_CELLS} cells and the dense path otherwise; "path" in the output says which ran. Both\n` +
    'give the same numbers to round-off. --path fft on a problem the FFT path cannot take is an error (exit 2).\n' +
    "--threads T splits the FFT path's standard deviations and the mean's covariance products over T threads\n" +
    '(default: every core when the solve is large enough to gain over starting the threads, about 128² cells\n' +
    'with 1600 data; results are identical for every T).\n' +
    '--vti FILE also writes the fields as VTK XML image data for 3-D viewers: cell arrays "posterior mean",\n' +
    '"posterior std", "prior std" and "variance reduction" (1 − std²/prior std²), cells x fastest, the image\'s\n' +
    'points at the cell corners (origin − spacing/2); 1-D and 2-D grids are images one cell thick.',
  options: [
    PROBLEM,
    READ_FROM,
    PRIOR,
    { name: 'path', value: 'auto|dense|fft', help: 'which posterior path runs (default auto)' },
    { name: 'threads', value: 'T', help: 'worker threads for the FFT path (default: every core on large problems)' },
    { name: 'vti', value: 'FILE', help: 'also write mean, std, prior std and variance reduction as a .vti image' },
    OUT,
  ],
  async run(args, io) {
    noPositionals(args);
    const requested = pathOption(args);
    const { threads, forced } = threadsOption(args);
    const { problem, prior } = loadBoth(args, io);
    const vti = optionString(args, 'vti');
    const vtiGrid = vti === undefined ? null : imageGrid(problem.grid, '--vti');
    progress(io, `posterior for ${cellCount(problem.grid)} cells and ${problem.data.values.length} data …`);
    const { summary: s, reason, threadsUsed } = await cliPosterior(problem, prior, requested, threads, forced);
    progress(io, `${reason}; ${threadsUsed} thread${threadsUsed === 1 ? '' : 's'}`);
    if (vti !== undefined && vtiGrid !== null) {
      const reduction = s.std.map((v, i) => 1 - (v * v) / (s.priorStd[i]! * s.priorStd[i]!));
      writeOutputFile(
        vti,
        writeVti(vtiGrid, [
          { name: 'posterior mean', values: s.mean },
          { name: 'posterior std', values: s.std },
          { name: 'prior std', values: s.priorStd },
          { name: 'variance reduction', values: reduction },
        ]),
      );
    }
    emit(
      io,
      args,
      toJson({
        mean: s.mean,
        std: s.std,
        priorStd: s.priorStd,
        predicted: s.predicted,
        residuals: s.residuals,
        chi2: s.chi2,
        chi2Expected: s.fitReference?.expected ?? null,
        chi2Interval95: s.fitReference?.interval95 ?? null,
        chi2TailProbability: s.fitReference?.upperTail ?? null,
        logEvidence: s.logEvidence,
        resolutionTrace: s.resolutionTrace,
        dataCount: s.dataCount,
        parameterCount: s.parameterCount,
        path: s.path,
      }),
    );
    return 0;
  },
};

/** The grid a VTK image is written on; a cell list has none (its centres are scattered), so `option` is refused. */
function imageGrid(g: Geometry, option: string): Grid {
  if (isCellList(g)) {
    throw new UsageError(
      `${option} writes VTK image data, which needs a regular grid; this problem gives a cell list (write JSON, CSV or .npy: values in the order of cells.centres)`,
    );
  }
  return g;
}

/** Exit code of a verdict (0 proven, 3 proven not, 4 not decided), with one line on stderr when not 0. */
function checkExit(io: Io, d: Diagnostics): number {
  switch (d.verdict) {
    case 'positive-definite':
      return 0;
    case 'not-positive-definite':
      io.stderr(`priorscope check: the prior covariance is not positive definite on this grid. ${d.basis}`);
      return 3;
    case 'not-decided':
      io.stderr(`priorscope check: positive definiteness not decided. ${d.nextStep ?? ''}`.trimEnd());
      return 4;
    default:
      return assertNever(d.verdict, 'verdict');
  }
}

const check: Command = {
  name: 'check',
  summary: 'is the prior covariance (or a covariance matrix you have) positive definite? (exit 3 if not)',
  usage: 'priorscope check --problem P.json --prior Q.json [--out FILE] | priorscope check --covariance C.npy|C.mtx|C.csv [--out FILE]',
  details:
    `--covariance FILE checks a symmetric matrix you already have (.npy, Matrix Market .mtx or numeric .csv; square,\n` +
    `at most ${MAX_CHECK_MATRIX} rows, symmetric to 1e-12 of its largest entry): the dense route below, same fields and exit codes.\n` +
    'Prints {"verdict", "positiveDefinite", "decidedBy", "basis", ["nextStep"], "failedPivot", "minEigenvalue",\n' +
    '"maxEigenvalue", "conditionNumber", "eigenvalueMethod", "suggestedJitter", "suggestedJitterRelative",\n' +
    '"warnings": [{"code", "message"}]}.\n' +
    'Three outcomes: "verdict" "positive-definite" (positiveDefinite true, exit 0), "not-positive-definite"\n' +
    '(false, exit 3: a failed Cholesky factorisation or a certified negative eigenvalue) and "not-decided"\n' +
    '(null, exit 4: no route could prove either sign; "nextStep" says what to do). "decidedBy" names the route:\n' +
    '"cholesky" (dense factorisation), "fft-bracket" (certified bound from the circulant embedding),\n' +
    '"lanczos-ritz" (a negative Rayleigh quotient) or "none"; "basis" says it in one sentence.\n' +
    'conditionNumber is null when it is infinite (λmin ≤ 0); suggestedJitter (variance units, to add to the\n' +
    'nugget) is null when none is needed.\n' +
    'eigenvalueMethod "exact" / "lanczos": the dense Cm was factored; "fft-bounds" (stationary priors on grids\n' +
    `of ${STRUCTURED_DIAGNOSTICS_MIN_CELLS} cells or more): no dense matrix, "positiveDefinite" means proven by a certified eigenvalue bracket\n` +
    'from the FFT embedding, given as "eigenvalueBounds": {"lower", "upper"} with "conditionUpperBound" and\n' +
    '"embeddingPadding"; min/max eigenvalue and conditionNumber are then Lanczos estimates inside it. When the\n' +
    `bracket cannot decide, grids of up to ${DENSE_DECISION_LIMIT} cells are decided by the dense Cholesky factorisation, larger\n` +
    'ones by an enlarged embedding where that proves it.',
  options: [
    { ...PROBLEM, required: false },
    READ_FROM,
    { ...PRIOR, required: false },
    { name: 'covariance', value: 'C.npy|C.mtx|C.csv', help: 'check this symmetric matrix instead of a prior (no --problem, --prior)' },
    OUT,
  ],
  exitCodes: '4 positive definiteness not decided (neither sign proven at this size; "nextStep" says what to do)',
  run(args, io) {
    noPositionals(args);
    const covariance = optionString(args, 'covariance');
    const hasProblem = optionString(args, 'problem') !== undefined;
    const hasPrior = optionString(args, 'prior') !== undefined;
    if (covariance !== undefined && (hasProblem || hasPrior))
      throw new UsageError('give either --covariance FILE or --problem and --prior, not both');
    if (covariance === undefined && !(hasProblem && hasPrior))
      throw new UsageError('option --problem P.json and --prior Q.json are required (or --covariance FILE)');
    let d: Diagnostics;
    if (covariance !== undefined) {
      const c = loadSymmetricMatrix(covariance);
      progress(io, `checking a ${c.rows} × ${c.rows} covariance matrix …`);
      d = diagnoseCovariance(c);
    } else {
      const { problem, prior } = loadBoth(args, io);
      progress(io, `checking the prior on ${cellCount(problem.grid)} cells …`);
      d = diagnosePriorAuto(problem.grid, prior);
    }
    emit(
      io,
      args,
      toJson({
        verdict: d.verdict,
        positiveDefinite: d.positiveDefinite,
        decidedBy: d.decidedBy,
        basis: d.basis,
        ...(d.nextStep === undefined ? {} : { nextStep: d.nextStep }),
        failedPivot: d.failedPivot,
        minEigenvalue: d.minEigenvalue,
        maxEigenvalue: d.maxEigenvalue,
        conditionNumber: Number.isFinite(d.conditionNumber) ? d.conditionNumber : null,
        eigenvalueMethod: d.eigenvalueMethod,
        suggestedJitter: d.suggestedJitter,
        suggestedJitterRelative: d.suggestedJitterRelative,
        ...(d.eigenvalueBounds === undefined
          ? {}
          : {
              eigenvalueBounds: d.eigenvalueBounds,
              conditionUpperBound: Number.isFinite(d.conditionUpperBound!) ? d.conditionUpperBound : null,
              embeddingPadding: d.embeddingPadding,
            }),
        warnings: d.warnings,
      }),
    );
    return checkExit(io, d);
  },
};

type SampleFormat = 'json' | 'csv' | 'npy' | 'vti';

/** Largest count × N written by `sample` (8 bytes each: 1 GiB of float64). */
export const MAX_SAMPLE_VALUES = 2 ** 27;

const sample: Command = {
  name: 'sample',
  summary: 'seeded prior (or posterior) realisations, one per row',
  usage: 'priorscope sample --problem P.json --prior Q.json --count K --seed S [--posterior] [--format json|csv|npy|vti] [--out FILE]',
  details:
    'Draws K realisations of the prior N(m0, Cm) on the problem grid, or of the posterior with --posterior.\n' +
    'The same seed gives byte-identical output. Formats: json (default) prints {"kind": "prior" | "posterior",\n' +
    '"seed", "count", "parameterCount", "realisations": [[N numbers], … K rows]}; csv prints K lines of N\n' +
    'numbers (no header); npy writes a K × N float64 array (binary: use --out, or redirect stdout); vti writes\n' +
    'VTK XML image data with one cell array per realisation ("realisation 1" …; cells x fastest, points at the\n' +
    'cell corners) for 3-D viewers. Without --format, an --out name ending in .csv, .npy or .vti chooses that format.',
  options: [
    PROBLEM,
    READ_FROM,
    PRIOR,
    { name: 'count', value: 'K', help: 'number of realisations (positive integer)', required: true },
    { name: 'seed', value: 'S', help: 'seed, an integer from 0 to 4294967295', required: true },
    { name: 'posterior', help: 'sample the posterior instead of the prior' },
    { name: 'format', value: 'json|csv|npy|vti', help: 'output format (default json)' },
    OUT,
  ],
  run(args, io) {
    noPositionals(args);
    const count = parseNumberOption('count', optionString(args, 'count')!, { integer: true, ge: 1 });
    const seed = parseNumberOption('seed', optionString(args, 'seed')!, { integer: true, ge: 0, le: 0xffffffff });
    const out = optionString(args, 'out');
    const formatText =
      optionString(args, 'format') ??
      (['npy', 'csv', 'vti'].find((f) => out?.toLowerCase().endsWith(`.${f}`)) as SampleFormat | undefined) ??
      'json';
    if (formatText !== 'json' && formatText !== 'csv' && formatText !== 'npy' && formatText !== 'vti') {
      throw new UsageError(`--format must be one of json, csv, npy, vti, got ${JSON.stringify(formatText)}`);
    }
    const format: SampleFormat = formatText;
    if (format === 'npy' && out === undefined && io.stdoutIsTTY) {
      throw new UsageError('--format npy writes binary data: give --out FILE or redirect stdout to a file');
    }
    const { problem, prior } = loadBoth(args, io);
    if (format === 'vti') imageGrid(problem.grid, '--format vti');
    const n = cellCount(problem.grid);
    if (count * n > MAX_SAMPLE_VALUES) {
      throw new UsageError(
        `--count must be at most ${Math.floor(MAX_SAMPLE_VALUES / n)} for ${n} cells (${MAX_SAMPLE_VALUES} values in all), got ${count}`,
      );
    }
    const post = optionFlag(args, 'posterior');
    progress(io, `drawing ${count} ${post ? 'posterior' : 'prior'} realisations on ${n} cells …`);
    let m: Matrix;
    if (post) {
      // Same path rule as `posterior` (src/core/inverse/auto.ts).
      const g = problem.grid;
      if (!isCellList(g) && choosePosteriorPath(problem, prior).path === 'fft') {
        const r = structuredPosteriorDraws(prepareStructuredPosterior({ ...problem, grid: g }, prior), count, seed);
        m = r.realisations;
        io.stderr(
          `priorscope sample: route fft (posterior realisations by the perturbation update, prior draws ${
            r.priorRoute === 'fft' ? `by circulant embedding ${r.padding.join(' × ')}` : 'by dense Cholesky'
          }${r.clipped ? `, negative eigenvalues clipped: relative trace ${r.clippedRelativeTrace.toExponential(2)}` : ', exact'})`,
        );
      } else {
        m = posteriorRealisations(preparePosterior(problem, prior), count, seed);
        io.stderr('priorscope sample: route dense (posterior realisations on the dense path)');
      }
    } else {
      const r = priorRealisationsWithRoute(problem.grid, prior, count, seed);
      m = r.realisations;
      io.stderr(
        r.route === 'fft'
          ? `priorscope sample: route fft (circulant embedding ${r.padding.join(' × ')}${r.clipped ? `, negative eigenvalues clipped: relative trace ${r.clippedRelativeTrace.toExponential(2)}` : ', exact'})`
          : `priorscope sample: route dense (Cholesky of Cm, ${n} cells)`,
      );
    }
    switch (format) {
      case 'json': {
        const rows = Array.from({ length: m.rows }, (_, i) => m.data.subarray(i * m.cols, (i + 1) * m.cols));
        emit(io, args, toJson({ kind: post ? 'posterior' : 'prior', seed, count, parameterCount: m.cols, realisations: rows }));
        break;
      }
      case 'csv':
        emit(io, args, writeCsv(m));
        break;
      case 'npy':
        emit(io, args, writeNpyMatrix(m));
        break;
      case 'vti':
        emit(
          io,
          args,
          writeVti(
            imageGrid(problem.grid, '--format vti'),
            Array.from({ length: m.rows }, (_, k) => ({
              name: `realisation ${k + 1}`,
              values: m.data.subarray(k * m.cols, (k + 1) * m.cols),
            })),
          ),
        );
        break;
      default:
        assertNever(format);
    }
    return 0;
  },
};

const correlationCommand: Command = {
  name: 'correlation',
  summary: 'a kernel’s correlation at given scaled distances',
  usage: `priorscope correlation --kernel ${KERNEL_NAMES.join('|')} [--nu V] --lags 0,0.5,1 [--out FILE]`,
  details:
    `Prints {"kernel", "nu" (${kernelsTaking('nu').join(', ')} only), "lags": [...], "values": [...]}: the correlation ρ(h) at\n` +
    `scaled distance h = r / length, with smoothness --nu (required for ${kernelsTaking('nu').join(', ')}):\n` +
    KERNEL_NAMES.map((k) => `  ${k.padEnd(12)} ${kernelDefinition(k).formula}   (${kernelDefinition(k).source})`).join('\n'),
  options: [
    { name: 'kernel', value: 'NAME', help: KERNEL_NAMES.join(', '), required: true },
    { name: 'nu', value: 'V', help: 'Matérn smoothness ν > 0 (matern only)' },
    { name: 'lags', value: 'H1,H2,…', help: 'scaled distances h ≥ 0, comma-separated', required: true },
    OUT,
  ],
  run(args, io) {
    noPositionals(args);
    const kernelText = optionString(args, 'kernel')!;
    if (!(KERNEL_NAMES as readonly string[]).includes(kernelText)) {
      throw new UsageError(`--kernel must be one of ${KERNEL_NAMES.join(', ')}, got ${JSON.stringify(kernelText)}`);
    }
    const kernel = kernelText as KernelName;
    const nuText = optionString(args, 'nu');
    let nu: number | undefined;
    if (kernelTakes(kernel, 'nu')) {
      if (nuText === undefined) throw new UsageError(`--nu V is required for the ${kernel} kernel (smoothness ν > 0)`);
      nu = parseNumberOption('nu', nuText, { gt: 0 });
    } else if (nuText !== undefined) {
      io.stderr(`warning: --nu is ignored for the ${kernel} kernel (only ${kernelsTaking('nu').join(', ')} has a smoothness)`);
    }
    const lags = parseNumberListOption('lags', optionString(args, 'lags')!, { ge: 0 });
    const values = lags.map((h) => correlation(kernel, h, nu));
    emit(io, args, toJson(nu === undefined ? { kernel, lags, values } : { kernel, nu, lags, values }));
    return 0;
  },
};

/** Largest evidence map `tune` computes (lengths × variances), decided before loading anything. */
export const MAX_MAP_CELLS = 1_000_000;

/** "lo:hi:n" → a log-spaced axis (0 < lo ≤ hi, 1 ≤ n ≤ 10000). */
function parseAxis(name: string, text: string): LogAxis {
  const parts = text.split(':');
  const bad = () =>
    new UsageError(`--${name} must be lo:hi:n with 0 < lo ≤ hi and n an integer from 1 to 10000, got ${JSON.stringify(text)}`);
  if (parts.length !== 3) throw bad();
  let axis: LogAxis;
  try {
    axis = {
      min: parseNumberOption(name, parts[0], { gt: 0 }),
      max: parseNumberOption(name, parts[1], { gt: 0 }),
      count: parseNumberOption(name, parts[2], { integer: true, ge: 1, le: 10000 }),
    };
  } catch {
    throw bad();
  }
  if (axis.max < axis.min) throw bad();
  return axis;
}

const tune: Command = {
  name: 'tune',
  summary: 'log-evidence grid over one term’s length and variance, and its maximum',
  usage:
    'priorscope tune --problem P.json --prior Q.json --term 0 --lengths lo:hi:n --variances lo:hi:n [--axis both|l1|l2] [--shard K/N] [--out FILE]',
  details:
    'Evaluates log N(d; G m0, G Cm Gᵀ + Cd) on n log-spaced lengths × n log-spaced variances of term K,\n' +
    'everything else in the prior fixed. For an anisotropic term (lengths [l1, l2]) --axis says what the length\n' +
    'axis sets: both (default) l1 with l2 scaled in proportion, l1 or l2 that length alone (the other and the\n' +
    'angle kept); run it once per axis to tune l1 and l2 separately. Prints {"term", "axis", "lengths": [...],\n' +
    '"variances": [...], "logEvidence": [[one row per length]], "best": {"length", "variance", "logEvidence",\n' +
    '"lengths": [l1, l2] (anisotropic terms: both lengths at the maximum)} | null, "bestOnEdge": {"length", "variance"},\n' +
    '"warnings": [...], "method": "eigen" | "cholesky"}; cells where the covariance did not factor are null.\n' +
    'bestOnEdge says, per axis, "low" or "high" when the maximum lies on that end of the grid (the true maximum\n' +
    'may lie beyond it: widen that axis), else null; the same warning goes to stderr.\n' +
    'With --shard K/N only lengths ⌊(K−1)n/N⌋ … ⌊Kn/N⌋ − 1 (rows) are computed into a partial result; `priorscope merge`\n' +
    'combines the N parts into exactly this output.',
  options: [
    PROBLEM,
    READ_FROM,
    PRIOR,
    { name: 'term', value: 'K', help: 'zero-based index of the term in the prior file', required: true },
    { name: 'lengths', value: 'lo:hi:n', help: 'log-spaced length axis', required: true },
    { name: 'variances', value: 'lo:hi:n', help: 'log-spaced variance axis', required: true },
    { name: 'axis', value: 'both|l1|l2', help: 'anisotropic term: which length the length axis sets (default both: l1, l2 in proportion)' },
    SHARD,
    OUT,
  ],
  run(args, io) {
    noPositionals(args);
    const axisText = optionString(args, 'axis') ?? 'both';
    if (!(LENGTH_AXES as readonly string[]).includes(axisText))
      throw new UsageError(`--axis must be one of ${LENGTH_AXES.join(', ')}, got ${JSON.stringify(axisText)}`);
    const axis = axisText as LengthAxis;
    const lengths = parseAxis('lengths', optionString(args, 'lengths')!);
    const variances = parseAxis('variances', optionString(args, 'variances')!);
    if (lengths.count * variances.count > MAX_MAP_CELLS) {
      throw new UsageError(
        `the evidence map would have ${lengths.count} × ${variances.count} = ${lengths.count * variances.count} cells, more than the limit of ${MAX_MAP_CELLS}; use fewer points on --lengths or --variances`,
      );
    }
    const termText = optionString(args, 'term')!;
    const both = loadBoth(args, io);
    const problem = gridProblem(both.problem, 'priorscope tune');
    const prior = both.prior;
    const term = parseNumberOption('term', termText, { integer: true, ge: 0 });
    if (prior.terms.length === 0) throw new UsageError('the prior has no covariance term to tune (its "terms" list is empty)');
    if (term >= prior.terms.length) {
      throw new UsageError(
        `--term must be an integer from 0 to ${prior.terms.length - 1} (the prior has ${prior.terms.length} term${prior.terms.length === 1 ? '' : 's'}), got ${JSON.stringify(termText)}`,
      );
    }
    const tuned = prior.terms[term];
    if (axis !== 'both' && tuned.lengths === undefined) {
      throw new UsageError(`--axis ${axis} needs an anisotropic term ("lengths": [l1, l2]); term ${term} has one length: leave --axis out`);
    }
    progress(io, `evidence on ${lengths.count} × ${variances.count} cells …`);
    const key: TuneKey = {
      problem: problemKey(problem),
      prior: priorToJson(prior),
      term,
      axis,
      lengths,
      variances,
      tuned: (priorToJson(prior).terms as TuneKey['tuned'][])[term],
    };
    const out = runShardable<TunePartial>((t) => emit(io, args, t), args, {
      command: 'tune',
      total: lengths.count,
      key,
      compute: (first, end) => tuneRows(problem, prior, key, first, end),
      combine: (k, parts) => combineTune(k, parts).output,
    });
    for (const w of (out as { warnings?: string[] } | null)?.warnings ?? []) io.stderr(`priorscope tune: ${w}`);
    return 0;
  },
};

const demo: Command = {
  name: 'demo',
  summary: 'list the built-in problems, or write one as a problem file',
  usage:
    'priorscope demo --list | priorscope demo NAME [--out P.json] [--prior Q.json] [--truth-prior T.json] [--operator-file G.npy|G.mtx|G.csv]',
  details:
    '--list prints [{"id", "title", "description"}]. demo NAME writes the problem file (to --out or stdout);\n' +
    '--prior also writes the suggested starting prior, --truth-prior the prior the synthetic truth was drawn\n' +
    'from; --operator-file stores the operator in a sibling file (named relative to the problem file) instead\n' +
    'of inline.',
  options: [
    { name: 'list', help: 'list the built-in problems' },
    OUT,
    { name: 'prior', value: 'Q.json', help: 'also write the starting prior file' },
    { name: 'truth-prior', value: 'T.json', help: 'also write the prior of the synthetic truth' },
    { name: 'operator-file', value: 'NAME', help: 'store the operator in this sibling file (.npy, .mtx or .csv)' },
  ],
  run(args, io) {
    if (optionFlag(args, 'list')) {
      if (args.positionals.length > 0) throw new UsageError('--list takes no demo name');
      emit(io, args, toJson(DEMOS.map((d) => ({ id: d.id, title: d.title, description: d.description }))));
      return 0;
    }
    if (args.positionals.length !== 1) {
      throw new UsageError(`give one demo name (${DEMOS.map((d) => d.id).join(', ')}) or --list`);
    }
    const name = args.positionals[0];
    const d = DEMOS.find((x) => x.id === name);
    if (!d) throw new UsageError(`demo name must be one of ${DEMOS.map((x) => x.id).join(', ')}, got ${JSON.stringify(name)}`);
    const opFile = optionString(args, 'operator-file');
    if (opFile !== undefined && !/\.(npy|mtx|csv)$/i.test(opFile)) {
      throw new UsageError(`--operator-file must end in .npy, .mtx or .csv, got ${JSON.stringify(opFile)}`);
    }
    const out = optionString(args, 'out');
    if (opFile !== undefined && out === undefined)
      throw new UsageError('--operator-file needs --out (the operator file is written next to it)');
    const built = d.build();
    const written = writeProblemFile(built.problem, opFile === undefined ? 'inline' : { file: opFile });
    if (written.operatorFile && out !== undefined) {
      writeOutputFile(resolve(dirname(resolve(out)), written.operatorFile.name), written.operatorFile.bytes);
    }
    emit(io, args, written.json);
    const priorOut = optionString(args, 'prior');
    if (priorOut !== undefined) writeOutputFile(priorOut, writePriorFile(built.startPrior, priorOut));
    const truthOut = optionString(args, 'truth-prior');
    if (truthOut !== undefined) writeOutputFile(truthOut, writePriorFile(built.truthPrior, truthOut));
    return 0;
  },
};

export const COMMANDS: readonly Command[] = [posterior, check, sample, correlationCommand, tune, demo];
