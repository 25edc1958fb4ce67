/**
 * Smoke test of the benchmark plumbing (not a timed test): every linalg case names a scipy op that
 * test/bench/scipy_dense.py knows, runs on tiny sizes, and the Python side times tiny inputs.
 */
import { execFileSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { cases } from './cases/linalg.ts';
import { pythonPath } from '../reference/python.ts';

const here = dirname(fileURLToPath(import.meta.url));
const py = (input: unknown) =>
  JSON.parse(execFileSync(pythonPath(), [join(here, 'scipy_dense.py')], { input: JSON.stringify(input), encoding: 'utf8' }));

describe('benchmark harness', () => {
  it('linalg cases have unique names, positive flop counts and known scipy ops', () => {
    const ops = new Set((py({ list_ops: true }) as { ops: string[] }).ops);
    expect(new Set(cases.map((c) => c.name)).size).toBe(cases.length);
    for (const c of cases) {
      expect(c.flops ?? 0).toBeGreaterThan(0);
      expect(ops.has(c.scipyOp ?? '')).toBe(true);
      expect(c.runs ?? 5).toBeGreaterThanOrEqual(5);
    }
  });
  it('scipy_dense.py times each op on tiny sizes and reports the BLAS it loaded', () => {
    const tiny = [
      { name: 'c', op: 'cholesky', params: { n: 12 } },
      { name: 's', op: 'solve_lower', params: { n: 12, k: 3 } },
      { name: 'e', op: 'eigvalsh', params: { n: 12 } },
      { name: 'm', op: 'matmul_nt', params: { m: 5, k: 4, n: 3 } },
    ].map((c) => ({ ...c, runs: 5, warmup: 1 }));
    const out = py({ cases: tiny }) as { blas: Record<string, unknown>; results: { name: string; times_s: number[]; median_s: number }[] };
    expect(out.results.map((r) => r.name)).toEqual(['c', 's', 'e', 'm']);
    for (const r of out.results) {
      expect(r.times_s.length).toBe(5);
      expect(r.median_s).toBeGreaterThan(0);
    }
    expect(typeof out.blas.numpy).toBe('string');
  });
});
