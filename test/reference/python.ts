/**
 * Runs a Python reference script (Debian's python3 with numpy/scipy) with JSON on stdin and
 * returns its JSON stdout. `npm test` sets PRIORSCOPE_PYTHON after checking scipy is importable.
 */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import type { SparseMatrix } from '../../src/core/linalg/sparse.ts';
import type { Problem } from '../../src/core/problems/spec.ts';

export const referenceDir = dirname(fileURLToPath(import.meta.url));

export function pythonPath(): string {
  const p = process.env.PRIORSCOPE_PYTHON ?? (existsSync('/usr/bin/python3') ? '/usr/bin/python3' : 'python3');
  return p;
}

/** Run test/reference/<script> with `input` as JSON on stdin; parse its stdout as JSON. */
export function runPython<T = unknown>(script: string, input: unknown): T {
  const path = join(referenceDir, script);
  let out: string;
  try {
    out = execFileSync(pythonPath(), [path], {
      input: JSON.stringify(input),
      encoding: 'utf8',
      maxBuffer: 512 * 1024 * 1024,
      stdio: ['pipe', 'pipe', 'pipe'],
    });
  } catch (e) {
    const err = e as { stderr?: string; message: string };
    throw new Error(
      `reference script ${script} failed with ${pythonPath()} (needs Debian's python3-numpy python3-scipy; ` +
        `npm test installs them): ${err.stderr ?? err.message}`,
    );
  }
  return JSON.parse(out) as T;
}

/**
 * The dense scipy route of the benchmarks (test/bench/dense_route.py: Cm entry by entry, cho_factor,
 * solves; Matérn ν = 1.5, variance 1, isotropic `length`, mean 0) on a problem with a sparse G and
 * diagonal Cd: its posterior mean and standard deviations. OPENBLAS_CORETYPE is removed from the
 * child's environment, as the benchmarks do.
 */
export function denseScipyRoute(problem: Problem, length: number): { mean: number[]; std: number[] } {
  const csr = problem.operator.matrix as SparseMatrix;
  const env = { ...process.env };
  delete env.OPENBLAS_CORETYPE;
  const input = {
    problems: [
      {
        name: 'reference',
        grid: problem.grid,
        length,
        g: {
          rows: csr.rows,
          cols: csr.cols,
          rowPtr: Array.from(csr.rowPtr),
          colIdx: Array.from(csr.colIdx),
          values: Array.from(csr.values),
        },
        d: Array.from(problem.data.values),
        sigma: Array.from(problem.data.sigma!),
        runs: 1,
      },
    ],
  };
  const out = execFileSync(pythonPath(), [join(referenceDir, '..', 'bench', 'dense_route.py')], {
    input: JSON.stringify(input),
    encoding: 'utf8',
    env,
    maxBuffer: 1 << 28,
  });
  return (JSON.parse(out) as { problems: { mean: number[]; std: number[] }[] }).problems[0];
}
