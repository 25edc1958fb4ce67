/**
 * Benchmarks of the FFT path (not timed tests): transforms, one Bᵀ pair product on each FFT engine
 * (WebAssembly SIMD and its JavaScript twin), the structured posterior on 64² and
 * 128² grids with M = 400 straight-ray data (Matérn ν = 1.5), and one 512² realisation.
 *
 * Targets: 64² mean ≤ 150 ms, mean + std ≤ 400 ms; 128² mean + std ≤ 2 s with peak
 * memory ≤ 300 MB; 512² realisation ≤ 150 ms; ours / dense scipy ≤ 0.5 at 64², ≤ 0.1 at 128².
 *
 * Two ways to run:
 *   - the shared harness (`npm run bench`) picks up `cases` (BenchCase shape of test/bench/types.ts,
 *     declared locally); the cold "mean" and "mean + std" cases name the scipy ops of
 *     test/bench/cases/fft.py (the dense route of test/bench/dense_route.py on the same problem,
 *     which setup() writes to bench-results/fft-problem-<n>.json), so the table's ours/scipy column
 *     is the FFT / dense-route ratio. PRIORSCOPE_BENCH_SKIP_DENSE_128=1 leaves the 128² dense route
 *     out (the harness's scipy side runs it 5 times: minutes and about 4 GB);
 *   - `npx tsx test/bench/cases/fft.ts [--skip-dense-128] [--no-dense]` runs each case in a child
 *     process (median time and that process's peak RSS), then test/bench/dense_route.py (Debian's
 *     python3-scipy, OPENBLAS_CORETYPE / OPENBLAS_L2_SIZE removed from its environment only) on
 *     the same problems and numpy.fft on the same transform sizes, and prints JSON with the ratios.
 *     Dense scipy at 128² needs several GB (4.2 GB peak RSS measured here) and tens of seconds
 *     (2 runs): --skip-dense-128 leaves it out.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { CirculantProduct } from '../../../src/core/fft/covariance.ts';
import { Fft2 } from '../../../src/core/fft/fft2.ts';
import { javascriptFftEngine, wasmFftEngine } from '../../../src/core/fft/transform.ts';
import { circulantSampler } from '../../../src/core/fft/realisations.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { prepareStructuredPosterior, structuredPosteriorStd, structuredProblem } from '../../../src/core/inverse/structured.ts';
import { applyOperator } from '../../../src/core/linalg/operator.ts';
import type { SparseMatrix } from '../../../src/core/linalg/sparse.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { rayOperator } from '../../../src/core/problems/rays.ts';
import { Random } from '../../../src/core/sampling/random.ts';

export interface BenchCase {
  readonly name: string;
  readonly params?: Readonly<Record<string, number>>;
  readonly scipyOp?: string;
  readonly setup: () => () => unknown;
  readonly runs?: number;
  readonly warmup?: number;
}

const M = 400;

/** Matérn ν = 1.5 prior, variance 1, length n/8 cells, constant mean 0. */
export function benchPrior(n: number): PriorSpec {
  return { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: n / 8 }] };
}

/**
 * An invented crosshole survey on an n × n grid of 1 m cells: M straight rays, half from the left
 * to the right edge and half from the bottom to the top, end points from a seeded generator;
 * data = G m_true + 1 % noise with an invented smooth slowness field.
 */
export function benchProblem(n: number, m = M): Problem {
  const grid: Grid = { shape: [n, n], spacing: [1, 1] };
  const rng = new Random(20240 + n);
  const lo = -0.5;
  const hi = n - 0.5;
  const rays = Array.from({ length: m }, (_, k) => {
    const a = lo + (hi - lo) * rng.nextDouble();
    const b = lo + (hi - lo) * rng.nextDouble();
    return k % 2 === 0 ? { from: [lo, a] as const, to: [hi, b] as const } : { from: [a, lo] as const, to: [b, hi] as const };
  });
  const operator = rayOperator(grid, rays);
  const truth = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) truth[i] = 0.2 + 0.05 * Math.sin((i % n) / 7) * Math.cos(Math.floor(i / n) / 11);
  const clean = applyOperator(operator, truth);
  const sigma = clean.map((v) => 0.01 * Math.abs(v) + 1e-6);
  const values = clean.map((v, k) => v + sigma[k] * rng.nextNormal());
  return { grid, operator, data: { values, sigma } };
}

/** Writes the problem for test/bench/cases/fft.py (the harness's scipy side runs after ours). */
export function writeProblemForScipy(n: number, problem: Problem, stem = 'fft-problem'): void {
  const dir = join(dirname(fileURLToPath(import.meta.url)), '..', '..', '..', 'bench-results');
  mkdirSync(dir, { recursive: true });
  const p = {
    grid: problem.grid,
    length: n / 8,
    g: csrJson(problem.operator.matrix as SparseMatrix),
    d: Array.from(problem.data.values),
    sigma: Array.from(problem.data.sigma!),
  };
  writeFileSync(join(dir, `${stem}-${n}.json`), JSON.stringify(p));
}

function posteriorCases(n: number): BenchCase[] {
  const params = { N: n * n, M, grid: n };
  const dense = !(n === 128 && process.env.PRIORSCOPE_BENCH_SKIP_DENSE_128 === '1');
  // At 128² one dense run takes 10–25 s: no warm-up on either side.
  const warm = n >= 128 ? { warmup: 0 } : {};
  return [
    {
      name: `fft posterior ${n}x${n} M=${M}: mean (cold, spectra computed)`,
      params,
      ...(dense ? { scipyOp: 'dense_route_mean', ...warm } : {}),
      setup: () => {
        const problem = benchProblem(n);
        writeProblemForScipy(n, problem);
        const prior = benchPrior(n);
        return () => prepareStructuredPosterior(structuredProblem(problem), prior).mean;
      },
    },
    {
      name: `fft posterior ${n}x${n} M=${M}: mean after a prior change (cached spectra)`,
      params,
      setup: () => {
        const sp = structuredProblem(benchProblem(n));
        prepareStructuredPosterior(sp, benchPrior(n));
        let k = 0;
        return () =>
          prepareStructuredPosterior(sp, {
            ...benchPrior(n),
            terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: n / 8 + (k++ % 2) }],
          }).mean;
      },
    },
    {
      name: `fft posterior ${n}x${n} M=${M}: mean + std (cold)`,
      params,
      ...(dense ? { scipyOp: 'dense_route_mean_std', ...warm } : {}),
      setup: () => {
        const problem = benchProblem(n);
        writeProblemForScipy(n, problem);
        const prior = benchPrior(n);
        return () => structuredPosteriorStd(prepareStructuredPosterior(structuredProblem(problem), prior));
      },
    },
  ];
}

/** One 2-D transform, or 1000 1-D transforms (a single one is too short to time), on the realm's engine. */
function fftCase(px: number, py: number): BenchCase {
  const reps = py === 1 ? 1000 : 1;
  return {
    name: `Fft2 ${py === 1 ? `1-D ${px}` : `2-D ${px}x${py}`} complex${reps > 1 ? ` (x${reps} per run)` : ' (rows, then columns)'}`,
    params: { px, py, reps },
    runs: 9,
    setup: () => {
      const f = new Fft2(px, py);
      const rng = new Random(7);
      const buf = rng.fillNormal(new Float64Array(2 * px * py));
      return () => {
        for (let r = 0; r < reps; r++) f.transform(buf);
        return reps;
      };
    },
  };
}

/**
 * One pair product of the posterior's Bᵀ rows (Cm·g for two data rows at once: spectrum of the
 * padded pair, λ, back), 100 per run, on the WebAssembly SIMD engine or the JavaScript one.
 */
function pairCase(n: number, route: 'wasm' | 'js'): BenchCase {
  const reps = 100;
  return {
    name: `circulant pair product ${n}x${n} (${route === 'wasm' ? 'WebAssembly SIMD' : 'JavaScript'}, x${reps} per run)`,
    params: { grid: n, reps },
    setup: () => {
      const engine = route === 'wasm' ? wasmFftEngine() : javascriptFftEngine();
      if (engine === null) throw new Error('pair case: WebAssembly SIMD not available');
      const cp = new CirculantProduct({ shape: [n, n], spacing: [1, 1] }, benchPrior(n), undefined, engine);
      const rng = new Random(3);
      const a = rng.fillNormal(new Float64Array(n * n));
      const b = rng.fillNormal(new Float64Array(n * n));
      const spec = new Float64Array(cp.spectrumLength);
      const outA = new Float64Array(n * n);
      const outB = new Float64Array(n * n);
      return () => {
        for (let r = 0; r < reps; r++) cp.fromSpectrum(cp.spectrum(a, b, spec), outA, outB);
        return outA[0];
      };
    },
  };
}

const realisationPrior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 20 }] };
const grid512: Grid = { shape: [512, 512], spacing: [1, 1] };

export const cases: BenchCase[] = [
  fftCase(1024, 1),
  fftCase(1024, 1024),
  pairCase(64, 'wasm'),
  pairCase(64, 'js'),
  pairCase(128, 'wasm'),
  pairCase(128, 'js'),
  ...posteriorCases(64),
  ...posteriorCases(128),
  {
    name: 'fft realisation 512x512 Matérn 1.5: embedding + one draw',
    params: { N: 512 * 512 },
    setup: () => () => circulantSampler(grid512, realisationPrior).draw(1, 1),
  },
  {
    name: 'fft realisation 512x512 Matérn 1.5: one draw (embedding reused)',
    params: { N: 512 * 512 },
    setup: () => {
      const s = circulantSampler(grid512, realisationPrior);
      let seed = 1;
      return () => s.draw(1, seed++);
    },
  },
];

// ---- direct run: children per case, then the dense scipy route --------------------------------

interface ChildResult {
  readonly name: string;
  readonly median_ms: number;
  readonly times_ms: number[];
  readonly peak_rss_mb: number;
  /** Median user + system CPU time of this process per run (less sensitive to other load). */
  readonly median_cpu_ms: number;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : (s[h - 1] + s[h]) / 2;
}

function runChild(index: number): ChildResult {
  const c = cases[index];
  const fn = c.setup();
  for (let i = 0; i < (c.warmup ?? 1); i++) fn();
  const times: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < Math.max(5, c.runs ?? 5); i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    const out = fn();
    times.push(performance.now() - t0);
    const du = process.cpuUsage(c0);
    cpu.push((du.user + du.system) / 1000);
    if (typeof out === 'number' && c.name.startsWith('Fft2')) {
      times[times.length - 1] /= out;
      cpu[cpu.length - 1] /= out;
    }
  }
  return {
    name: c.name,
    median_ms: median(times),
    times_ms: times,
    peak_rss_mb: process.resourceUsage().maxRSS / 1024,
    median_cpu_ms: median(cpu),
  };
}

function csrJson(s: SparseMatrix) {
  return { rows: s.rows, cols: s.cols, rowPtr: Array.from(s.rowPtr), colIdx: Array.from(s.colIdx), values: Array.from(s.values) };
}

function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
  return d;
}

function main(): void {
  const here = dirname(fileURLToPath(import.meta.url));
  const args = process.argv.slice(2);
  const childAt = args.indexOf('--child');
  if (childAt >= 0) {
    process.stdout.write(JSON.stringify(runChild(Number(args[childAt + 1]))));
    return;
  }
  const noDense = args.includes('--no-dense');
  const skip128 = args.includes('--skip-dense-128');
  const ours: ChildResult[] = cases.map((c, i) => {
    process.stderr.write(`fft bench: ${c.name} …\n`);
    const out = execFileSync(process.execPath, [...process.execArgv, fileURLToPath(import.meta.url), '--child', String(i)], {
      encoding: 'utf8',
      maxBuffer: 1 << 26,
    });
    return JSON.parse(out) as ChildResult;
  });
  const python = process.env.PRIORSCOPE_PYTHON ?? (existsSync('/usr/bin/python3') ? '/usr/bin/python3' : 'python3');
  const env = { ...process.env };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const callDense = (input: unknown) =>
    JSON.parse(
      execFileSync(python, [join(here, '..', 'dense_route.py')], {
        input: JSON.stringify(input),
        encoding: 'utf8',
        env,
        maxBuffer: 1 << 28,
      }),
    ) as {
      problems: {
        name: string;
        mean_s: number;
        mean_std_s: number;
        mean_min_s: number;
        mean_std_min_s: number;
        peak_rss_mb: number;
        mean: number[];
        std: number[];
      }[];
      fft: { kind: string; size: number[]; seconds: number }[];
    };
  const dense: Record<string, unknown>[] = [];
  let numpyFft: unknown = null;
  if (!noDense) {
    process.stderr.write('fft bench: numpy.fft …\n');
    numpyFft = callDense({ fft: { sizes1d: [1024], sizes2d: [1024] } }).fft;
    for (const n of [64, 128]) {
      if (n === 128 && skip128) continue;
      process.stderr.write(`fft bench: dense scipy route ${n}x${n} …\n`);
      const problem = benchProblem(n);
      const r = callDense({
        problems: [
          {
            name: `${n}x${n}`,
            grid: problem.grid,
            length: n / 8,
            g: csrJson(problem.operator.matrix as SparseMatrix),
            d: Array.from(problem.data.values),
            sigma: Array.from(problem.data.sigma!),
            runs: n === 64 ? 5 : 2,
          },
        ],
      }).problems[0];
      const st = prepareStructuredPosterior(problem, benchPrior(n));
      const std = structuredPosteriorStd(st);
      const find = (part: string) => ours.find((o) => o.name.startsWith(`fft posterior ${n}x${n}`) && o.name.includes(part))!;
      const mean = find(': mean (cold');
      const both = find('mean + std');
      dense.push({
        grid: `${n}x${n}`,
        dense_mean_ms: r.mean_s * 1000,
        dense_mean_std_ms: r.mean_std_s * 1000,
        dense_min_mean_ms: r.mean_min_s * 1000,
        dense_min_mean_std_ms: r.mean_std_min_s * 1000,
        dense_peak_rss_mb: r.peak_rss_mb,
        ratio_mean: mean.median_ms / (r.mean_s * 1000),
        ratio_mean_std: both.median_ms / (r.mean_std_s * 1000),
        max_abs_diff_mean: maxAbsDiff(st.mean, r.mean),
        max_abs_diff_std: maxAbsDiff(std, r.std),
      });
    }
  }
  console.log(JSON.stringify({ date: new Date().toISOString(), node: process.version, ours, dense, numpyFft }, null, 2));
}

if (process.argv[1] !== undefined && fileURLToPath(import.meta.url) === process.argv[1]) main();
