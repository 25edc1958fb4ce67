/**
 * `priorscope posterior --path auto|dense|fft [--threads T]` and the route report of `sample`,
 * through the real binary. The two paths must agree to 1e-10 relative (the same data-space formulas,
 * Tarantola 2005 §3.2, only the products Cm·v differ); both are checked against the independent
 * model-space route of test/reference/cli_reference.py (numpy/scipy: covariance entry by entry,
 * cho_factor / cho_solve) to 1e-8 relative, as test/reference/cli_reference.test.ts does.
 */
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runPython } from '../reference/python.ts';
import { runCommand, tempDir, writeFiles, type RunResult } from './run.ts';

// An invented survey: 12 × 14 cells of 2 m × 1.5 m (N = 168 ≥ 128, so auto takes the FFT path),
// 11 data: point values and short row averages.
const NX = 12;
const NY = 14;
const rows: number[] = [];
const cols: number[] = [];
const vals: number[] = [];
for (let k = 0; k < 11; k++) {
  const i = (3 * k + 1) % NX;
  const j = (5 * k + 2) % NY;
  for (let q = 0; q < 1 + (k % 3); q++) {
    rows.push(k);
    cols.push(j * NX + ((i + q) % NX));
    vals.push(1 / (1 + (k % 3)));
  }
}
const PROBLEM = {
  kind: 'priorscope.problem',
  version: 1,
  title: 'invented point and average data',
  grid: { shape: [NX, NY], spacing: [2, 1.5], origin: [1, 0.75], unit: 'm' },
  operator: { sparse: { rows, cols, values: vals } },
  data: {
    values: Array.from({ length: 11 }, (_, k) => Math.sin(k) + 0.3),
    sigma: Array.from({ length: 11 }, (_, k) => 0.05 + 0.01 * (k % 4)),
  },
};
const PRIOR = {
  kind: 'priorscope.prior',
  version: 1,
  mean: { constant: 0.2 },
  terms: [
    { kernel: 'matern', nu: 1.5, variance: 0.8, lengths: [6, 3], angle: 30 },
    { kernel: 'exponential', variance: 0.1, length: 2 },
  ],
  nugget: 1e-3,
};

interface Out {
  mean: number[];
  std: number[];
  predicted: number[];
  residuals: number[];
  chi2: number;
  logEvidence: number;
  path: string;
}

let dir: string;
const run = (...extra: string[]) => runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json', ...extra], dir);
const parse = (r: RunResult): Out => {
  expect(r.code, r.err).toBe(0);
  return JSON.parse(r.out) as Out;
};

function maxRelDiff(a: number[], b: number[]): number {
  expect(a.length).toBe(b.length);
  const scale = Math.max(...b.map(Math.abs));
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
  return d / scale;
}

beforeAll(() => {
  dir = tempDir();
  writeFiles(dir, { 'p.json': PROBLEM, 'q.json': PRIOR });
});

describe('posterior --path', () => {
  it('auto takes the FFT path here, dense the dense one, and they agree to 1e-10; both match scipy to 1e-8', async () => {
    const auto = parse(await run());
    const fft = parse(await run('--path', 'fft'));
    const dense = parse(await run('--path', 'dense'));
    expect(auto.path).toBe('fft');
    expect(fft.path).toBe('fft');
    expect(dense.path).toBe('dense');
    expect(auto.mean).toEqual(fft.mean);
    for (const k of ['mean', 'std', 'predicted', 'residuals'] as const) expect(maxRelDiff(fft[k], dense[k]), k).toBeLessThanOrEqual(1e-10);
    expect(Math.abs(fft.logEvidence - dense.logEvidence)).toBeLessThanOrEqual(1e-10 * Math.abs(dense.logEvidence));
    expect(Math.abs(fft.chi2 - dense.chi2)).toBeLessThanOrEqual(1e-10 * dense.chi2);
    // Outside check: numpy/scipy model-space route on the same files (test/reference/cli_reference.py).
    const ref = runPython<Out>('cli_reference.py', { problem: join(dir, 'p.json'), prior: join(dir, 'q.json') });
    for (const k of ['mean', 'std', 'predicted'] as const) expect(maxRelDiff(fft[k], ref[k]), k).toBeLessThanOrEqual(1e-8);
    expect(Math.abs(fft.logEvidence - ref.logEvidence)).toBeLessThanOrEqual(1e-8 * Math.abs(ref.logEvidence));
  });

  it('auto takes the dense path below 128 cells', async () => {
    const d = tempDir();
    writeFiles(d, {
      'p.json': {
        ...PROBLEM,
        grid: { shape: [8, 8], spacing: [1, 1] },
        operator: { dense: [[1, ...Array(62).fill(0), 1]] },
        data: { values: [1], sigma: [0.1] },
      },
      'q.json': PRIOR,
    });
    const r = await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json'], d);
    expect(r.code, r.err).toBe(0);
    expect((JSON.parse(r.out) as Out).path).toBe('dense');
  });

  it('--threads 1 and --threads 2 give byte-identical output on a problem large enough to split', async () => {
    // 40 × 40 cells and 200 data; an explicit --threads 2 splits whatever the size (src/cli/commands.ts cliPosterior).
    const d = tempDir();
    const n = 40;
    const m = 200;
    const r: number[] = [];
    const c: number[] = [];
    const v: number[] = [];
    for (let k = 0; k < m; k++)
      for (let q = 0; q < 5; q++) {
        r.push(k);
        c.push((k * 37 + q * 211) % (n * n));
        v.push(0.2);
      }
    writeFiles(d, {
      'p.json': {
        ...PROBLEM,
        grid: { shape: [n, n], spacing: [1, 1] },
        operator: { sparse: { rows: r, cols: c, values: v } },
        data: { values: Array.from({ length: m }, (_, k) => Math.cos(k)), sigma: Array(m).fill(0.1) },
      },
      'q.json': PRIOR,
    });
    const one = await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json', '--threads', '1'], d);
    const two = await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json', '--threads', '2'], d);
    expect(one.code, one.err).toBe(0);
    expect(two.code, two.err).toBe(0);
    expect(two.stdout.equals(one.stdout)).toBe(true);
    expect((JSON.parse(one.out) as Out).path).toBe('fft');
  });

  it.each([
    [['--path', 'fast'], 'priorscope posterior: --path must be one of auto, dense, fft, got "fast" (see priorscope posterior --help)'],
    [['--threads', '0'], 'priorscope posterior: --threads must be an integer from 1 to 64, got "0" (see priorscope posterior --help)'],
  ])('bad option %j: exit 2, one line', async (args, line) => {
    const r = await run(...args);
    expect(r.code).toBe(2);
    expect(r.err).toBe(line + '\n');
    expect(r.out).toBe('');
  });
  // Every valid problem file today is a 1-D or 2-D regular grid with stationary terms, which the
  // FFT path takes; the refusal of --path fft is tested on a 3-axis grid in test/core/inverse/auto.test.ts.
});

describe('sample reports its route on stderr', () => {
  it('dense up to DENSE_REALISATION_LIMIT cells, circulant embedding above', async () => {
    const small = await runCommand(['sample', '--problem', 'p.json', '--prior', 'q.json', '--count', '2', '--seed', '3'], dir);
    expect(small.code, small.err).toBe(0);
    expect(small.err).toBe(`priorscope sample: route dense (Cholesky of Cm, ${NX * NY} cells)\n`);
    const d = tempDir();
    writeFiles(d, {
      'p.json': {
        ...PROBLEM,
        grid: { shape: [65, 64], spacing: [1, 1] },
        operator: { dense: [[1, ...Array(65 * 64 - 1).fill(0)]] },
        data: { values: [1], sigma: [0.1] },
      },
      'q.json': PRIOR,
    });
    const big = await runCommand(
      ['sample', '--problem', 'p.json', '--prior', 'q.json', '--count', '2', '--seed', '3', '--format', 'csv'],
      d,
    );
    expect(big.code, big.err).toBe(0);
    expect(big.err).toMatch(
      /^priorscope sample: route fft \(circulant embedding \d+ × \d+, (exact|negative eigenvalues clipped: relative trace .*)\)\n$/,
    );
    expect(big.out.trim().split('\n')).toHaveLength(2);
  });
});
