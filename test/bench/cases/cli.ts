/**
 * The command line as a user runs it: whole processes of the built `priorscope` (dist-cli/, built
 * here first when a source is newer; src/cli/bin.mjs), timed from spawn to exit. Targets (issue
 * "command line for pipelines"): `priorscope --help` ≤ 0.25 s; `priorscope posterior` on the 64 × 64,
 * M = 400 benchmark problem of ./fft.ts ≤ 0.25 × the dense numpy/scipy script (test/bench/dense_posterior.py:
 * build Cm, factor, solve, standard deviations; its own python3 process per run, ./cli.py); a
 * 10⁶-entry sparse operator in a JSON problem file and in a Matrix Market file: `posterior` peak
 * RSS ≤ 1.5 GB (measured by /usr/bin/time -f %M; reported in the table's last column).
 * `node -e 0` is timed as the floor any Node.js command starts from.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writePriorFile } from '../../../src/core/io/priorFile.ts';
import { writeProblemFile } from '../../../src/core/io/problemFile.ts';
import { sparseFromCoordinates } from '../../../src/core/linalg/sparse.ts';
import { applyOperator } from '../../../src/core/linalg/operator.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import type { BenchCase } from '../types.ts';
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

/** Runs the built command; throws unless it exits 0 with nothing on stderr (so the bundle, not tsx, ran). */
function priorscope(args: readonly string[]): void {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: workDir, encoding: 'utf8', env: { ...process.env, PRIORSCOPE_CLI_SOURCE: '' }, maxBuffer: 1 << 28 });
  if (r.status !== 0 || r.stderr !== '') throw new Error(`bench cli: priorscope ${args.join(' ')} → exit ${r.status}: ${r.stderr}`);
}

/** Peak resident memory (MB) of one `priorscope` process, by /usr/bin/time. */
function peakRssMb(args: readonly string[]): number {
  if (!existsSync('/usr/bin/time')) throw new Error('bench cli: /usr/bin/time is needed for the memory figure (Debian package "time")');
  const r = spawnSync('/usr/bin/time', ['-f', 'peak-kb %M', process.execPath, bin, ...args], { cwd: workDir, encoding: 'utf8', maxBuffer: 1 << 28 });
  const m = /peak-kb (\d+)/.exec(r.stderr);
  if (r.status !== 0 || !m) throw new Error(`bench cli: priorscope ${args.join(' ')} → exit ${r.status}: ${r.stderr}`);
  return Number(m[1]) / 1024;
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
      const t = cells[k]!;
      cells[k] = cells[j]!;
      cells[j] = t;
      ri[i * perRow + k] = i;
      ci[i * perRow + k] = cells[k]!;
      v[i * perRow + k] = rng.nextDouble();
    }
  }
  const operator = { kind: 'sparse' as const, matrix: sparseFromCoordinates(m, n * n, ri, ci, v) };
  const truth = new Float64Array(n * n);
  for (let k = 0; k < n * n; k++) truth[k] = 0.2 + 0.05 * Math.sin((k % n) / 7) * Math.cos(Math.floor(k / n) / 11);
  const clean = applyOperator(operator, truth);
  const sigma = clean.map((x) => 0.01 * Math.abs(x) + 1e-6);
  const values = clean.map((x, k) => x + sigma[k]! * rng.nextNormal());
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

/** Peak RSS (MB) of each memory case, filled by its run; the harness reports it through `report`. */
const peaks = new Map<string, number[]>();
function memoryCase(form: 'inline' | 'mtx'): BenchCase {
  const name = `cli process: posterior, 10^6-entry sparse operator ${form === 'inline' ? 'inline in the JSON problem file' : 'in a Matrix Market file'} (128x128, M=500)`;
  return {
    name,
    params: { N: 128 * 128, M: 500, nnz: 1_000_000 },
    runs: 5,
    warmup: 0,
    setup: () => {
      ensureBundle();
      mkdirSync(workDir, { recursive: true });
      if (!existsSync(join(workDir, 'million-G.mtx'))) writeMillionEntryProblem();
      peaks.set(name, []);
      return () => peaks.get(name)!.push(peakRssMb(['posterior', '--problem', `million-${form}.json`, '--prior', 'million-prior.json', '--out', `million-${form}-posterior.json`]));
    },
    report: () => {
      const p = [...peaks.get(name)!].sort((a, b) => a - b);
      return { peak_rss_mb_median: p[p.length >> 1]!, peak_rss_mb_max: p[p.length - 1]! };
    },
  };
}

export const cases: BenchCase[] = [
  {
    name: 'cli process: node -e 0 (the floor of any Node.js command)',
    runs: 11,
    run: () => {
      const r = spawnSync(process.execPath, ['-e', '0']);
      if (r.status !== 0) throw new Error('bench cli: node -e 0 failed');
    },
  },
  {
    name: 'cli process: priorscope --help (target 0.25 s)',
    runs: 11,
    setup: () => {
      ensureBundle();
      mkdirSync(workDir, { recursive: true });
      return () => priorscope(['--help']);
    },
  },
  {
    name: 'cli process: priorscope posterior 64x64 M=400 (target ≤ 0.25 × the dense scipy script)',
    params: { N: 64 * 64, M: 400, grid: 64 },
    scipyOp: 'dense_posterior_process',
    runs: 7,
    setup: () => {
      ensureBundle();
      mkdirSync(workDir, { recursive: true });
      const problem = benchProblem(64);
      writeProblemForScipy(64, problem);
      writeFileSync(join(workDir, 'p64.json'), writeProblemFile(problem, 'inline').json);
      writeFileSync(join(workDir, 'q64.json'), writePriorFile(benchPrior(64), 'q64.json'));
      return () => priorscope(['posterior', '--problem', 'p64.json', '--prior', 'q64.json', '--out', 'posterior64.json']);
    },
  },
  memoryCase('inline'),
  memoryCase('mtx'),
];
