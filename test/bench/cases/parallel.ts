/**
 * Benchmarks of the thread split of the FFT-path posterior (not timed tests): the Bᵀ = G Cm
 * products (src/core/parallel/products.ts) and the std columns (src/core/parallel/blocks.ts) over a
 * 2-thread worker_threads pool, against one thread, on the crosshole problems of ./fft.ts (64² and
 * 128², M = 400 straight rays, Matérn ν = 1.5). Cases: mean cold, mean after a prior change
 * (cached spectra where the budget allows), mean + std; and for the products the variants "all
 * shares to the pool" (caller idle) and "rows transferred back" (no SharedArrayBuffer, the browser
 * fallback).
 *
 * The split operations are async. Run this file directly for correct timings (it awaits each run):
 *   npx tsx test/bench/cases/parallel.ts [--filter TEXT] [--runs K]
 * prints JSON {cases: [{name, median_ms, min_ms, times_ms}], poolStartMs, load}; the runs are interleaved
 * (each round runs every selected case once) so other load falls on all variants alike. The shared harness
 * (test/bench/run.ts) picks up `cases` too and awaits each run, but runs the cases one after the other.
 * The pool (one per process, started on first use) does not keep the process alive when idle.
 */
import { loadavg } from 'node:os';
import { fileURLToPath } from 'node:url';
import { prepareStructuredPosterior, structuredPosteriorStd, structuredProblem } from '../../../src/core/inverse/structured.ts';
import type { BlockPool } from '../../../src/core/parallel/blocks.ts';
import { parallelPosteriorStd } from '../../../src/core/parallel/blocks.ts';
import { nodeBlockPool } from '../../../src/core/parallel/node.ts';
import { prepareStructuredPosteriorParallel, type ParallelProductsOptions } from '../../../src/core/parallel/products.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { benchPrior, benchProblem } from './fft.ts';

export interface BenchCase {
  readonly name: string;
  readonly params?: Readonly<Record<string, number>>;
  readonly setup: () => () => unknown;
  readonly runs?: number;
  readonly warmup?: number;
}

const M = 400;
const THREADS = 2;
let shared: BlockPool | null = null;
const pool = (): BlockPool => (shared ??= nodeBlockPool(THREADS));

/** The prior with the length alternating between n/8 and n/8 + 1 (a prior change per run). */
function changed(n: number, k: number): PriorSpec {
  return { ...benchPrior(n), terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: n / 8 + (k % 2) }] };
}

/** All cases on n × n with M data; `full` false: only the single / split pairs the threshold needs. */
function gridCases(n: number, m = M, full = true): BenchCase[] {
  const params = { N: n * n, M: m, grid: n, threads: THREADS };
  const tag = `${n}x${n} M=${m}`;
  const cold = (label: string, fn: (sp: ReturnType<typeof structuredProblem>, prior: PriorSpec) => unknown): BenchCase => ({
    name: `parallel ${tag}: ${label}`,
    params,
    setup: () => {
      const problem = benchProblem(n, m);
      const prior = benchPrior(n);
      pool();
      return () => fn(structuredProblem(problem), prior);
    },
  });
  const warm = (label: string, fn: (sp: ReturnType<typeof structuredProblem>, prior: PriorSpec) => unknown): BenchCase => ({
    name: `parallel ${tag}: ${label}`,
    params,
    setup: () => {
      const sp = structuredProblem(benchProblem(n, m));
      let k = 0;
      pool();
      return () => fn(sp, changed(n, k++));
    },
  });
  const split =
    (opts: ParallelProductsOptions = {}) =>
    (sp: ReturnType<typeof structuredProblem>, prior: PriorSpec) =>
      prepareStructuredPosteriorParallel(sp, prior, pool(), opts).then((s) => s.mean);
  const threshold = [
    cold('mean cold, 1 thread', (sp, prior) => prepareStructuredPosterior(sp, prior).mean),
    cold('mean cold, split (caller + 1 worker, shared Bᵀ)', split()),
    warm('mean after a prior change, 1 thread', (sp, prior) => prepareStructuredPosterior(sp, prior).mean),
    warm('mean after a prior change, split (caller + 1 worker, shared Bᵀ)', split()),
  ];
  if (!full) return threshold;
  return [
    ...threshold,
    cold('mean cold, split (2 workers, caller idle)', split({ callerShare: false })),
    cold('mean cold, split (caller + 1 worker, rows transferred)', split({ shared: false })),
    warm('mean after a prior change, split (caller + 1 worker, rows transferred)', split({ shared: false })),
    cold('mean + std cold, 1 thread', (sp, prior) => structuredPosteriorStd(prepareStructuredPosterior(sp, prior))),
    cold('mean + std cold, split products + split std', async (sp, prior) =>
      parallelPosteriorStd(await prepareStructuredPosteriorParallel(sp, prior, pool()), pool()),
    ),
  ];
}

/** 64² and 128² with M = 400 in full; smaller work (32² M = 400, 64² M = 100) for the split threshold. */
export const cases: BenchCase[] = [...gridCases(64), ...gridCases(128), ...gridCases(32, 400, false), ...gridCases(64, 100, false)];

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h] : (s[h - 1] + s[h]) / 2;
}

async function main(): Promise<void> {
  const args = process.argv.slice(2);
  const at = args.indexOf('--filter');
  const filter = at >= 0 ? args[at + 1] : '';
  const r = args.indexOf('--runs');
  const runs = r >= 0 ? Number(args[r + 1]) : 7;
  const load0 = loadavg()[0];
  // Pool start: worker threads up and tsx's loader registered, measured by a first tiny task.
  const t0 = performance.now();
  const p = pool();
  const tiny = benchProblem(8, 4);
  await prepareStructuredPosteriorParallel(tiny, benchPrior(8), p, { callerShare: false });
  const poolStartMs = performance.now() - t0;
  // Interleaved: every round runs each selected case once, so load from other processes on the
  // shared machine falls on all variants alike.
  const chosen = cases.filter((c) => c.name.includes(filter));
  const fns: (() => unknown)[] = [];
  for (const c of chosen) {
    process.stderr.write(`parallel bench: setup + warm-up ${c.name} …\n`);
    const fn = c.setup();
    for (let i = 0; i < (c.warmup ?? 1); i++) await fn();
    fns.push(fn);
  }
  const times: number[][] = chosen.map(() => []);
  for (let i = 0; i < Math.max(5, runs); i++) {
    for (let k = 0; k < chosen.length; k++) {
      const ts = performance.now();
      await fns[k]();
      times[k].push(performance.now() - ts);
    }
  }
  const out = chosen.map((c, k) => ({
    name: c.name,
    median_ms: median(times[k]),
    min_ms: Math.min(...times[k]),
    times_ms: times[k].map((t) => Math.round(t * 10) / 10),
  }));
  await p.close();
  console.log(
    JSON.stringify(
      { date: new Date().toISOString(), node: process.version, poolStartMs, load: [load0, loadavg()[0]], cases: out },
      null,
      2,
    ),
  );
}

if (process.argv[1] !== undefined && fileURLToPath(import.meta.url) === process.argv[1]) void main();
