/**
 * Benchmark harness (`npm run bench` = `tsx test/bench/run.ts`).
 *
 * Loads every test/bench/cases/*.ts (each exports `cases: BenchCase[]`), times ours (median of
 * ≥ 5 runs after warm-up), then times the scipy/numpy counterpart of each case in one child
 * process of Debian's python3 (test/bench/scipy_dense.py) started with OPENBLAS_CORETYPE and
 * OPENBLAS_L2_SIZE removed from its environment only. Writes bench-results/bench.json and prints a
 * table with ratio = ours / scipy (time; > 1 means slower than scipy).
 *
 *   npx tsx test/bench/run.ts [--file NAME] [--filter TEXT] [--no-scipy] [--out FILE]
 *
 * --file linalg loads only test/bench/cases/linalg.ts; --filter keeps cases whose name contains TEXT.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { BenchCase } from './types.ts';

const here = dirname(fileURLToPath(import.meta.url));
const repoRoot = resolve(here, '..', '..');

interface Timing {
  readonly median_s: number;
  readonly min_s: number;
  readonly times_s: number[];
  /** Median CPU time of this process per run (ours only): near the wall time on an idle machine. */
  readonly cpu_median_s?: number;
}

interface CaseResult {
  readonly name: string;
  readonly file: string;
  readonly params: Readonly<Record<string, number>> | null;
  readonly ours: Timing;
  readonly scipy: Timing | null;
  readonly ratio: number | null;
  readonly gflops_ours: number | null;
  readonly gflops_scipy: number | null;
  /** The case's own figures (BenchCase.report), or null. */
  readonly extra: Readonly<Record<string, number>> | null;
}

interface Args {
  readonly file: string | null;
  readonly filter: string | null;
  readonly scipy: boolean;
  readonly out: string;
}

function parseArgs(argv: string[]): Args {
  let file: string | null = null;
  let filter: string | null = null;
  let scipy = true;
  let out = join(repoRoot, 'bench-results', 'bench.json');
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--file') file = (argv[++i] ?? '').replace(/\.ts$/, '');
    else if (a === '--filter') filter = argv[++i] ?? '';
    else if (a === '--no-scipy') scipy = false;
    else if (a === '--out') out = resolve(argv[++i] ?? out);
    else throw new Error(`bench: unknown argument ${JSON.stringify(a)} (expected --file NAME, --filter TEXT, --no-scipy, --out FILE)`);
  }
  return { file, filter, scipy, out };
}

async function loadCases(only: string | null): Promise<{ file: string; c: BenchCase }[]> {
  const dir = join(here, 'cases');
  const files = readdirSync(dir)
    .filter((f) => f.endsWith('.ts') && (only === null || f === `${only}.ts`))
    .sort();
  if (files.length === 0) throw new Error(`bench: no case file test/bench/cases/${only ?? '*'}.ts`);
  const all: { file: string; c: BenchCase }[] = [];
  const seen = new Set<string>();
  for (const f of files) {
    const mod = (await import(pathToFileURL(join(dir, f)).href)) as { cases?: unknown };
    if (!Array.isArray(mod.cases)) throw new Error(`bench: test/bench/cases/${f} must export cases: BenchCase[]`);
    for (const c of mod.cases as BenchCase[]) {
      if (typeof c.name !== 'string' || (typeof c.setup !== 'function' && typeof c.run !== 'function')) {
        throw new Error(`bench: test/bench/cases/${f} has a case without a name, or without setup() or run()`);
      }
      if (seen.has(c.name)) throw new Error(`bench: case name ${JSON.stringify(c.name)} appears twice (in ${f})`);
      seen.add(c.name);
      all.push({ file: f, c });
    }
  }
  return all;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Times a case; a run that returns a promise (the thread-pool cases) is awaited inside the timing. */
async function timeOurs(c: BenchCase): Promise<Timing> {
  const fn = c.setup ? c.setup() : c.run!;
  for (let i = 0; i < (c.warmup ?? 1); i++) await fn();
  const times: number[] = [];
  const cpu: number[] = [];
  const runs = Math.max(5, c.runs ?? 5);
  for (let i = 0; i < runs; i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    await fn();
    times.push((performance.now() - t0) / 1000);
    const dc = process.cpuUsage(c0);
    cpu.push((dc.user + dc.system) / 1e6);
  }
  return { median_s: median(times), min_s: Math.min(...times), times_s: times, cpu_median_s: median(cpu) };
}

function pythonPath(): string {
  return process.env.PRIORSCOPE_PYTHON ?? (existsSync('/usr/bin/python3') ? '/usr/bin/python3' : 'python3');
}

function timeScipy(list: { c: BenchCase }[]): { blas: unknown; results: Map<string, Timing> } {
  const cases = list
    .filter(({ c }) => c.scipyOp !== undefined)
    .map(({ c }) => ({ name: c.name, op: c.scipyOp, params: c.params ?? {}, runs: Math.max(5, c.runs ?? 5), warmup: c.warmup ?? 1 }));
  if (cases.length === 0) return { blas: null, results: new Map() };
  const env = { ...process.env };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const out = execFileSync(pythonPath(), [join(here, 'scipy_dense.py')], {
    input: JSON.stringify({ cases }),
    encoding: 'utf8',
    env,
    maxBuffer: 64 * 1024 * 1024,
    stdio: ['pipe', 'pipe', 'inherit'],
  });
  const parsed = JSON.parse(out) as { blas: unknown; results: (Timing & { name: string })[] };
  return { blas: parsed.blas, results: new Map(parsed.results.map((r) => [r.name, r])) };
}

function fmt(x: number | null, digits: number): string {
  return x === null || !Number.isFinite(x) ? '—' : x.toFixed(digits);
}

function printTable(rows: CaseResult[]): void {
  const header = ['case', 'ours ms', 'ours cpu ms', 'scipy ms', 'ours/scipy', 'GFLOP/s ours', 'GFLOP/s scipy', 'other'];
  const body = rows.map((r) => [
    r.name,
    fmt(r.ours.median_s * 1000, 1),
    fmt((r.ours.cpu_median_s ?? Number.NaN) * 1000, 1),
    fmt(r.scipy ? r.scipy.median_s * 1000 : null, 1),
    fmt(r.ratio, 2),
    fmt(r.gflops_ours, 2),
    fmt(r.gflops_scipy, 2),
    r.extra
      ? Object.entries(r.extra)
          .map(([k, v]) => `${k} ${Number.isInteger(v) ? v : v.toPrecision(4)}`)
          .join(', ')
      : '',
  ]);
  const widths = header.map((h, k) => Math.max(h.length, ...body.map((b) => b[k].length)));
  const line = (cells: string[]) =>
    cells.map((c, k) => (k === 0 || k === cells.length - 1 ? c.padEnd(widths[k]) : c.padStart(widths[k]))).join('  ');
  console.log(line(header));
  console.log(widths.map((w) => '-'.repeat(w)).join('  '));
  for (const b of body) console.log(line(b));
}

async function main(): Promise<void> {
  const args = parseArgs(process.argv.slice(2));
  let list = await loadCases(args.file);
  if (args.filter !== null) list = list.filter(({ c }) => c.name.includes(args.filter!));
  if (list.length === 0) throw new Error(`bench: no case matches ${JSON.stringify(args.filter)}`);
  const loadBefore = loadavg();
  const ours = new Map<string, Timing>();
  const extras = new Map<string, Readonly<Record<string, number>>>();
  for (const { c } of list) {
    process.stderr.write(`bench: ${c.name} …\n`);
    ours.set(c.name, await timeOurs(c));
    if (c.report) extras.set(c.name, c.report());
  }
  let blas: unknown = null;
  let scipyResults = new Map<string, Timing>();
  if (args.scipy) {
    process.stderr.write('bench: scipy/numpy side …\n');
    try {
      ({ blas, results: scipyResults } = timeScipy(list));
    } catch (e) {
      // Ours are still worth reporting; the scipy columns stay empty and the reason is recorded.
      const why = e instanceof Error ? e.message : String(e);
      process.stderr.write(`bench: scipy side failed (${why}); reporting ours only\n`);
      blas = { error: why };
    }
  }
  const rows: CaseResult[] = list.map(({ file, c }) => {
    const o = ours.get(c.name)!;
    const s = scipyResults.get(c.name) ?? null;
    return {
      name: c.name,
      file: `test/bench/cases/${file}`,
      params: c.params ?? null,
      ours: o,
      scipy: s,
      ratio: s ? o.median_s / s.median_s : null,
      gflops_ours: c.flops ? c.flops / o.median_s / 1e9 : null,
      gflops_scipy: c.flops && s ? c.flops / s.median_s / 1e9 : null,
      extra: extras.get(c.name) ?? null,
    };
  });
  const report = {
    date: new Date().toISOString(),
    node: process.version,
    platform: `${process.platform} ${process.arch}`,
    cpu: cpus()[0]?.model ?? 'unknown',
    cores: cpus().length,
    // 1-minute load averages before and after: above ~1 other processes competed for the 2 cores.
    load_average: { before: loadBefore[0], after: loadavg()[0] },
    blas,
    cases: rows,
  };
  mkdirSync(dirname(args.out), { recursive: true });
  writeFileSync(args.out, JSON.stringify(report, null, 2) + '\n');
  printTable(rows);
  console.log(`\nwritten ${args.out}; load average ${report.load_average.before.toFixed(2)} → ${report.load_average.after.toFixed(2)}`);
  const ob = (blas as { openblas?: { core?: string; threads?: number } } | null)?.openblas;
  if (ob) console.log(`scipy side: OpenBLAS core ${ob.core}, ${ob.threads} thread(s)`);
}

main().catch((e: unknown) => {
  console.error(e instanceof Error ? e.message : e);
  process.exit(1);
});
