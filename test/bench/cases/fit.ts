/**
 * `priorscope fit` against scikit-learn's GaussianProcessRegressor as whole processes (issue "command line for
 * pipelines", type-II target: the fit ≤ 0.5 × the general-purpose library's fit with no restarts, reaching at
 * least its maximised log evidence). The problem: an invented 2-D field on a 40 × 40 grid of 1 m cells, 200 cells
 * observed directly (seeded choice) with σ = 0.1, drawn from a Matérn 3/2 prior (variance 1, length 6 m); both
 * fits start from variance 0.5, length 3 m with the variance and the length free. Ours: the built command line
 * (`priorscope fit`, 1600 cells: the FFT route); sklearn: test/bench/fit_sklearn.py (ConstantKernel × Matern
 * ν = 1.5, L-BFGS-B, tight tolerances, no restarts), its own python3 process per run. The two run in alternating
 * pairs under /usr/bin/time so both see the same load; the median of the per-pair CPU-time ratios is the figure.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { cellCoordinates, type Grid } from '../../../src/core/grid/grid.ts';
import { cholesky } from '../../../src/core/linalg/cholesky.ts';
import { covarianceMatrix } from '../../../src/core/prior/covariance.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import type { BenchCase } from '../types.ts';

const repoRoot = join(dirname(fileURLToPath(import.meta.url)), '..', '..', '..');
const bin = join(repoRoot, 'src', 'cli', 'bin.mjs');
const workDir = join(repoRoot, 'bench-results', 'fit');

export const FIT_GRID: Grid = { shape: [40, 40], spacing: [1, 1] };
const OBSERVED = 200;
const SIGMA = 0.1;
const TRUTH: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 6 }] };
export const FIT_START: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 0.5, length: 3 }] };

/** The observed cells, their coordinates and the data (seeded). */
export function fitBenchProblem(seed = 1414): { cells: number[]; X: number[][]; y: number[] } {
  const rng = new Random(seed);
  const n = FIT_GRID.shape[0] * (FIT_GRID.shape[1] ?? 1);
  const idx = Array.from({ length: n }, (_, i) => i);
  for (let i = 0; i < OBSERVED; i++) {
    const j = i + Math.floor(rng.nextDouble() * (n - i));
    [idx[i], idx[j]] = [idx[j], idx[i]];
  }
  const cells = idx.slice(0, OBSERVED).sort((a, b) => a - b);
  const c = covarianceMatrix(FIT_GRID, TRUTH);
  const f = cholesky(c);
  if (!f.ok) throw new Error('fit bench: the truth prior does not factor');
  const z = rng.fillNormal(new Float64Array(n));
  const truth = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let k = 0; k <= i; k++) s += f.factor.data[i * n + k] * z[k];
    truth[i] = s;
  }
  const { x, y: yc } = cellCoordinates(FIT_GRID);
  return { cells, X: cells.map((i) => [x[i], yc[i]]), y: cells.map((i) => truth[i] + SIGMA * rng.nextNormal()) };
}

/** Writes problem.json and prior.json (ours) and sklearn.json (the Python side's input) into dir. */
export function fitBenchFiles(dir: string): void {
  const { cells, X, y } = fitBenchProblem();
  const t = FIT_START.terms[0] as { variance: number; length: number };
  writeFileSync(
    join(dir, 'problem.json'),
    JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      grid: FIT_GRID,
      operator: { sparse: { rows: cells.map((_, i) => i), cols: cells, values: cells.map(() => 1) } },
      data: { values: y, sigma: cells.map(() => SIGMA) },
    }),
  );
  writeFileSync(join(dir, 'prior.json'), JSON.stringify({ kind: 'priorscope.prior', version: 1, mean: { constant: 0 }, terms: FIT_START.terms }));
  writeFileSync(join(dir, 'sklearn.json'), JSON.stringify({ X, y, alpha: y.map(() => SIGMA * SIGMA), nu: 1.5, variance: t.variance, length: t.length }));
}

interface Usage {
  readonly wallS: number;
  readonly cpuS: number;
}

/** `command args` under /usr/bin/time: wall and CPU (user + system) seconds; throws unless it exits 0. */
function timed(command: string, args: readonly string[], env: NodeJS.ProcessEnv): Usage {
  const t0 = performance.now();
  const r = spawnSync('/usr/bin/time', ['-f', 'usage %U %S', command, ...args], { cwd: workDir, encoding: 'utf8', env, maxBuffer: 1 << 26 });
  const wallS = (performance.now() - t0) / 1000;
  const lines = r.stderr.trimEnd().split('\n');
  const m = /^usage ([\d.]+) ([\d.]+)$/.exec(lines[lines.length - 1] ?? '');
  if (r.status !== 0 || !m) throw new Error(`bench fit: ${command} ${args.join(' ')} → exit ${r.status}: ${r.stderr}`);
  return { wallS, cpuS: Number(m[1]) + Number(m[2]) };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const k = s.length >> 1;
  return s.length % 2 ? s[k] : (s[k - 1] + s[k]) / 2;
}

let built = false;
function ensureBundle(): void {
  if (built) return;
  const r = spawnSync('npx', ['vite', 'build', '--config', 'vite.cli.config.ts'], { cwd: repoRoot, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`bench fit: building the command line failed: ${r.stderr}`);
  built = true;
}

function pairedFitCase(): BenchCase {
  const pairs: { ours: Usage; sk: Usage }[] = [];
  let oursLml = Number.NaN;
  let skLml = Number.NaN;
  return {
    name: 'cli process: fit 40x40 M=200 Matern 3/2 (variance, length) and sklearn GaussianProcessRegressor in alternating pairs',
    params: { N: 1600, M: OBSERVED },
    runs: 7,
    warmup: 1,
    setup: () => {
      ensureBundle();
      mkdirSync(workDir, { recursive: true });
      fitBenchFiles(workDir);
      const python = process.env.PRIORSCOPE_PYTHON ?? '/usr/bin/python3';
      const env = { ...process.env, PRIORSCOPE_CLI_SOURCE: '' };
      const pyEnv = { ...process.env };
      delete pyEnv.OPENBLAS_CORETYPE;
      delete pyEnv.OPENBLAS_L2_SIZE;
      pairs.length = 0;
      return () => {
        const ours = timed(process.execPath, [bin, 'fit', '--problem', 'problem.json', '--prior', 'prior.json', '--free', 'variance,length', '--out', 'fit-result.json'], env);
        const sk = timed(python, [join(repoRoot, 'test', 'bench', 'fit_sklearn.py'), 'sklearn.json', 'sklearn-out.json'], pyEnv);
        pairs.push({ ours, sk });
        oursLml = (JSON.parse(readFileSync(join(workDir, 'fit-result.json'), 'utf8')) as { logEvidence: number }).logEvidence;
        skLml = (JSON.parse(readFileSync(join(workDir, 'sklearn-out.json'), 'utf8')) as { lml_opt: number }).lml_opt;
      };
    },
    report: () => ({
      ours_cpu_s_median: median(pairs.map((p) => p.ours.cpuS)),
      sklearn_cpu_s_median: median(pairs.map((p) => p.sk.cpuS)),
      cpu_ratio_median_of_pairs: median(pairs.map((p) => p.ours.cpuS / p.sk.cpuS)),
      wall_ratio_median_of_pairs: median(pairs.map((p) => p.ours.wallS / p.sk.wallS)),
      ours_log_evidence: oursLml,
      sklearn_log_evidence: skLml,
      evidence_difference: oursLml - skLml,
    }),
  };
}

export const cases: BenchCase[] = [pairedFitCase()];
