/**
 * The command line as a user runs it: whole processes of the built `priorscope` (dist-cli/, built
 * here first; src/cli/bin.mjs), timed from spawn to exit. Targets (issue
 * "command line for pipelines"): `priorscope --help` ≤ 0.25 s; `priorscope posterior` on the 64 × 64,
 * M = 400 benchmark problem of ./fft.ts ≤ 0.25 × the dense numpy/scipy script (test/bench/dense_posterior.py:
 * build Cm, factor, solve, standard deviations; its own python3 process per run, ./cli.py); a
 * 10⁶-entry sparse operator in a JSON problem file and in a Matrix Market file: `posterior` peak
 * RSS ≤ 1.5 GB. Each child runs under /usr/bin/time: the "other" column gives its CPU time (user + system, less
 * sensitive to other load than the wall time) and peak RSS; a paired case alternates the posterior and the dense
 * script so that both see the same load.
 * `node -e 0` is timed as the floor any Node.js command starts from.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writePriorFile } from '../../../src/core/io/priorFile.ts';
import { writeProblemFile } from '../../../src/core/io/problemFile.ts';
import { sparseFromCoordinates } from '../../../src/core/linalg/sparse.ts';
import { applyOperator } from '../../../src/core/linalg/operator.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { BenchCase } from '../types.ts';
import { drawTruth } from '../../core/tuning/helpers.ts';
import { benchPrior, benchProblem, writeProblemForScipy } from './fft.ts';

const repoRoot = join(dirname(fileURLToPath(import.meta.url)), '..', '..', '..');
const bin = join(repoRoot, 'src', 'cli', 'bin.mjs');
const workDir = join(repoRoot, 'bench-results', 'cli');

/** Builds dist-cli/ once per run (always: a stale bundle would time the sources through tsx instead). */
let built = false;
function ensureBundle(): void {
  if (built) return;
  const r = spawnSync('npx', ['vite', 'build', '--config', 'vite.cli.config.ts'], { cwd: repoRoot, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`bench cli: building the command line failed: ${r.stderr}`);
  built = true;
}

/** One child's figures from /usr/bin/time: CPU seconds (user + system; less sensitive to other load than the wall time) and peak RSS. */
interface ChildUsage {
  readonly wallS: number;
  readonly cpuS: number;
  readonly peakMb: number;
}

/**
 * Runs `command args` under /usr/bin/time (its overhead, one fork and exec, is within the noise); throws
 * unless it exits 0 with nothing else on stderr (so for priorscope the bundle ran, not the sources through tsx).
 */
function timed(command: string, args: readonly string[], env: NodeJS.ProcessEnv = process.env): ChildUsage {
  if (!existsSync('/usr/bin/time')) throw new Error('bench cli: /usr/bin/time is needed (Debian package "time")');
  const t0 = performance.now();
  const r = spawnSync('/usr/bin/time', ['-f', 'usage %U %S %M', command, ...args], {
    cwd: workDir,
    encoding: 'utf8',
    env,
    maxBuffer: 1 << 28,
  });
  const wallS = (performance.now() - t0) / 1000;
  const lines = r.stderr.trimEnd().split('\n');
  const m = /^usage ([\d.]+) ([\d.]+) (\d+)$/.exec(lines[lines.length - 1] ?? '');
  if (r.status !== 0 || !m || lines.length !== 1)
    throw new Error(`bench cli: ${command} ${args.join(' ')} → exit ${r.status}: ${r.stderr}`);
  return { wallS, cpuS: Number(m[1]) + Number(m[2]), peakMb: Number(m[3]) / 1024 };
}

const priorscopeEnv = { ...process.env, PRIORSCOPE_CLI_SOURCE: '' };

/** Child figures per case, filled by its runs; the harness reads them through `report`. */
const usage = new Map<string, ChildUsage[]>();
function record(name: string, u: ChildUsage): void {
  if (!usage.has(name)) usage.set(name, []);
  usage.get(name)!.push(u);
}
function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const k = s.length >> 1;
  return s.length % 2 ? s[k] : (s[k - 1] + s[k]) / 2;
}
function usageReport(name: string, memory = false): Readonly<Record<string, number>> {
  const u = usage.get(name) ?? [];
  const cpu = { child_cpu_s_median: median(u.map((x) => x.cpuS)) };
  return memory
    ? { ...cpu, peak_rss_mb_median: median(u.map((x) => x.peakMb)), peak_rss_mb_max: Math.max(...u.map((x) => x.peakMb)) }
    : cpu;
}

/** A case that runs one process per timed run and reports the children's CPU time (and peak RSS). */
function processCase(
  c: Omit<BenchCase, 'setup' | 'run' | 'report'> & { prepare?: () => void; command: () => [string, string[], NodeJS.ProcessEnv?] },
  memory = false,
): BenchCase {
  const { prepare, command, ...rest } = c;
  return {
    ...rest,
    setup: () => {
      mkdirSync(workDir, { recursive: true });
      prepare?.();
      usage.set(c.name, []);
      const [cmd, args, env] = command();
      return () => record(c.name, timed(cmd, args, env));
    },
    report: () => usageReport(c.name, memory),
  };
}

/**
 * An invented survey with a 10⁶-entry sparse operator: 128 × 128 cells of 1 m, M = 500 data, each
 * datum a weighted sum over 2000 distinct cells drawn by a seeded generator (weights uniform in
 * [0, 1)); data = G m + 1 % noise for a smooth invented field.
 */
export function millionEntryProblem(): Problem {
  const n = 128;
  const m = 500;
  const perRow = 2000;
  const rng = new Random(1_000_000);
  const ri = new Int32Array(m * perRow);
  const ci = new Int32Array(m * perRow);
  const v = new Float64Array(m * perRow);
  const cells = Int32Array.from({ length: n * n }, (_, k) => k);
  for (let i = 0; i < m; i++) {
    // Partial Fisher–Yates shuffle: the first perRow cells are a random subset.
    for (let k = 0; k < perRow; k++) {
      const j = k + Math.floor(rng.nextDouble() * (n * n - k));
      const t = cells[k];
      cells[k] = cells[j];
      cells[j] = t;
      ri[i * perRow + k] = i;
      ci[i * perRow + k] = cells[k];
      v[i * perRow + k] = rng.nextDouble();
    }
  }
  const operator = { kind: 'sparse' as const, matrix: sparseFromCoordinates(m, n * n, ri, ci, v) };
  const truth = new Float64Array(n * n);
  for (let k = 0; k < n * n; k++) truth[k] = 0.2 + 0.05 * Math.sin((k % n) / 7) * Math.cos(Math.floor(k / n) / 11);
  const clean = applyOperator(operator, truth);
  const sigma = clean.map((x) => 0.01 * Math.abs(x) + 1e-6);
  const values = clean.map((x, k) => x + sigma[k] * rng.nextNormal());
  return { grid: { shape: [n, n], spacing: [1, 1] }, operator, data: { values, sigma } };
}

/** Writes the 10⁶-entry problem twice (operator inline in JSON; in a sibling .mtx) and its prior. */
function writeMillionEntryProblem(): void {
  const problem = millionEntryProblem();
  const inline = writeProblemFile(problem, 'inline');
  writeFileSync(join(workDir, 'million-inline.json'), inline.json);
  const mtx = writeProblemFile(problem, { file: 'million-G.mtx' });
  writeFileSync(join(workDir, 'million-mtx.json'), mtx.json);
  writeFileSync(join(workDir, 'million-G.mtx'), mtx.operatorFile!.bytes);
  writeFileSync(join(workDir, 'million-prior.json'), writePriorFile(benchPrior(128), 'million-prior.json'));
}

function memoryCase(form: 'inline' | 'mtx'): BenchCase {
  return processCase(
    {
      name: `cli process: posterior, 10^6-entry sparse operator ${form === 'inline' ? 'inline in the JSON problem file' : 'in a Matrix Market file'} (128x128, M=500)`,
      params: { N: 128 * 128, M: 500, nnz: 1_000_000 },
      runs: 5,
      warmup: 0,
      prepare: () => {
        ensureBundle();
        if (!existsSync(join(workDir, 'million-G.mtx'))) writeMillionEntryProblem();
      },
      command: () => [
        process.execPath,
        [bin, 'posterior', '--problem', `million-${form}.json`, '--prior', 'million-prior.json', '--out', `million-${form}-posterior.json`],
        priorscopeEnv,
      ],
    },
    true,
  );
}

/** The dense scipy script's environment: OpenBLAS left to choose its core and threads, as in the harness. */
function pythonEnv(): NodeJS.ProcessEnv {
  const env = { ...process.env };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  return env;
}

/**
 * `priorscope posterior` 64 × 64 and the dense scipy script run in alternation, one pair after another, so
 * both see the same load: the per-pair ratio's median is the figure to quote when the machine is shared
 * (the harness's own ours/scipy ratio compares runs made minutes apart).
 */
function pairedCase(): BenchCase {
  const pairs: { ours: ChildUsage; scipy: ChildUsage }[] = [];
  return {
    name: 'cli process: posterior 64x64 M=400 and the dense scipy script in alternating pairs',
    params: { N: 64 * 64, M: 400, grid: 64 },
    runs: 7,
    setup: () => {
      ensureBundle();
      mkdirSync(workDir, { recursive: true });
      const problem = benchProblem(64);
      writeProblemForScipy(64, problem);
      writeFileSync(join(workDir, 'p64.json'), writeProblemFile(problem, 'inline').json);
      writeFileSync(join(workDir, 'q64.json'), writePriorFile(benchPrior(64), 'q64.json'));
      const python = process.env.PRIORSCOPE_PYTHON ?? '/usr/bin/python3';
      const script = [
        join(repoRoot, 'test', 'bench', 'dense_posterior.py'),
        join(repoRoot, 'bench-results', 'fft-problem-64.json'),
        join(workDir, 'dense-posterior-64.json'),
      ];
      pairs.length = 0;
      return () => {
        const ours = timed(
          process.execPath,
          [bin, 'posterior', '--problem', 'p64.json', '--prior', 'q64.json', '--out', 'posterior64.json'],
          priorscopeEnv,
        );
        pairs.push({ ours, scipy: timed(python, script, pythonEnv()) });
      };
    },
    report: () => ({
      ours_wall_s_median: median(pairs.map((p) => p.ours.wallS)),
      scipy_wall_s_median: median(pairs.map((p) => p.scipy.wallS)),
      wall_ratio_median_of_pairs: median(pairs.map((p) => p.ours.wallS / p.scipy.wallS)),
      ours_cpu_s_median: median(pairs.map((p) => p.ours.cpuS)),
      scipy_cpu_s_median: median(pairs.map((p) => p.scipy.cpuS)),
    }),
  };
}

/**
 * `priorscope fit --free variance,length` against python3-sklearn's GaussianProcessRegressor (test/bench/sklearn_fit.py,
 * no restarts) on point data: a 40 × 40 grid, 200 observed cells, Matérn 3/2 truth (variance 1, length 6), σ = 0.1,
 * both started at variance 0.5, length 3; whole processes in alternating pairs. Target: ours ≤ 0.5 × sklearn's time,
 * reaching at least its maximised log evidence.
 */
function fitPairedCase(): BenchCase {
  const pairs: { ours: ChildUsage; ref: ChildUsage }[] = [];
  const evidence = { ours: Number.NaN, sklearn: Number.NaN };
  return {
    name: 'cli process: fit 40x40, 200 point data, Matérn 3/2, free variance and length, against sklearn in alternating pairs (target ≤ 0.5)',
    params: { N: 1600, M: 200 },
    runs: 7,
    setup: () => {
      ensureBundle();
      mkdirSync(workDir, { recursive: true });
      const grid = { shape: [40, 40], spacing: [1, 1] };
      const rng = new Random(4040);
      const truthPrior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 6 }] };
      const truth = drawTruth(grid, truthPrior, rng);
      const idx = Array.from({ length: 1600 }, (_, i) => i);
      for (let i = 0; i < 200; i++) {
        const j = i + Math.floor(rng.nextDouble() * (1600 - i));
        [idx[i], idx[j]] = [idx[j] ?? 0, idx[i] ?? 0];
      }
      const cells = idx.slice(0, 200).sort((a, b) => a - b);
      const y = cells.map((c) => (truth[c] ?? 0) + 0.1 * rng.nextNormal());
      writeFileSync(
        join(workDir, 'fit-p.json'),
        JSON.stringify({
          kind: 'priorscope.problem',
          version: 1,
          grid,
          operator: { sparse: { rows: cells.map((_, i) => i), cols: cells, values: cells.map(() => 1) } },
          data: { values: y, sigma: cells.map(() => 0.1) },
        }),
      );
      writeFileSync(
        join(workDir, 'fit-q.json'),
        JSON.stringify({
          kind: 'priorscope.prior',
          version: 1,
          mean: { constant: 0 },
          terms: [{ kernel: 'matern', nu: 1.5, variance: 0.5, length: 3 }],
        }),
      );
      writeFileSync(
        join(workDir, 'fit-sk.json'),
        JSON.stringify({ X: cells.map((c) => [c % 40, Math.floor(c / 40)]), y, sigma: 0.1, variance: 0.5, length: 3 }),
      );
      const python = process.env.PRIORSCOPE_PYTHON ?? '/usr/bin/python3';
      pairs.length = 0;
      return () => {
        const ours = timed(
          process.execPath,
          [bin, 'fit', '--problem', 'fit-p.json', '--prior', 'fit-q.json', '--free', 'variance,length', '--out', 'fit-ours.json'],
          priorscopeEnv,
        );
        const ref = timed(python, [join(repoRoot, 'test', 'bench', 'sklearn_fit.py'), 'fit-sk.json', 'fit-sklearn.json'], pythonEnv());
        pairs.push({ ours, ref });
        evidence.ours = (JSON.parse(readFileSync(join(workDir, 'fit-ours.json'), 'utf8')) as { logEvidence: number }).logEvidence;
        evidence.sklearn = (JSON.parse(readFileSync(join(workDir, 'fit-sklearn.json'), 'utf8')) as { logEvidence: number }).logEvidence;
      };
    },
    report: () => ({
      ours_wall_s_median: median(pairs.map((p) => p.ours.wallS)),
      sklearn_wall_s_median: median(pairs.map((p) => p.ref.wallS)),
      wall_ratio_median_of_pairs: median(pairs.map((p) => p.ours.wallS / p.ref.wallS)),
      ours_cpu_s_median: median(pairs.map((p) => p.ours.cpuS)),
      sklearn_cpu_s_median: median(pairs.map((p) => p.ref.cpuS)),
      ours_log_evidence: evidence.ours,
      sklearn_log_evidence: evidence.sklearn,
    }),
  };
}

export const cases: BenchCase[] = [
  processCase({
    name: 'cli process: node -e 0 (the floor of any Node.js command)',
    runs: 11,
    command: () => [process.execPath, ['-e', '0']],
  }),
  processCase({
    name: 'cli process: priorscope --help (target 0.25 s)',
    runs: 11,
    prepare: ensureBundle,
    command: () => [process.execPath, [bin, '--help'], priorscopeEnv],
  }),
  processCase({
    name: 'cli process: priorscope posterior 64x64 M=400 (target ≤ 0.25 × the dense scipy script)',
    params: { N: 64 * 64, M: 400, grid: 64 },
    scipyOp: 'dense_posterior_process',
    runs: 7,
    prepare: () => {
      ensureBundle();
      const problem = benchProblem(64);
      writeProblemForScipy(64, problem);
      writeFileSync(join(workDir, 'p64.json'), writeProblemFile(problem, 'inline').json);
      writeFileSync(join(workDir, 'q64.json'), writePriorFile(benchPrior(64), 'q64.json'));
    },
    command: () => [
      process.execPath,
      [bin, 'posterior', '--problem', 'p64.json', '--prior', 'q64.json', '--out', 'posterior64.json'],
      priorscopeEnv,
    ],
  }),
  pairedCase(),
  fitPairedCase(),
  memoryCase('inline'),
  memoryCase('mtx'),
];
