/**
 * `priorscope check --covariance FILE` on matrices written by numpy (numpy.save), scipy.io.mmwrite
 * and numpy.savetxt, against numpy.linalg.eigvalsh / cond of the same matrices
 * (test/reference/check_covariance_reference.py): the three-outcome verdict, the extreme
 * eigenvalues and the condition number; bad matrices exit 2 naming the file and what was expected.
 */
import { describe, expect, it } from 'vitest';
import { runCommand, tempDir } from '../cli/run.ts';
import { runPython } from './python.ts';

type Ref = { min: number; max: number; cond: number | null; n: number };
const dir = tempDir();
const ref = runPython<Record<string, Ref>>('check_covariance_reference.py', { dir });
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('check --covariance', () => {
  it.each(['spd.npy', 'spd.mtx', 'spd.csv'])('%s: proven positive definite; eigenvalues and κ as numpy', async (file) => {
    const r = await runCommand(['check', '--covariance', file], dir);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.verdict).toBe('positive-definite');
    expect(j.decidedBy).toBe('cholesky');
    expect(j.eigenvalueMethod).toBe('exact');
    expect(rel(j.minEigenvalue, ref.spd!.min)).toBeLessThan(1e-10);
    expect(rel(j.maxEigenvalue, ref.spd!.max)).toBeLessThan(1e-10);
    expect(rel(j.conditionNumber, ref.spd!.cond!)).toBeLessThan(1e-9);
  });
  it('a matrix with a negative eigenvalue: proven not positive definite, exit 3, λmin as numpy', async () => {
    const r = await runCommand(['check', '--covariance', 'indefinite.npy'], dir);
    expect(r.code).toBe(3);
    const j = JSON.parse(r.out);
    expect(j.verdict).toBe('not-positive-definite');
    expect(j.positiveDefinite).toBe(false);
    expect(j.failedPivot).not.toBeNull();
    expect(ref.indefinite!.min).toBeLessThan(0);
    expect(rel(j.minEigenvalue, ref.indefinite!.min)).toBeLessThan(1e-9);
  });
  it.each([
    ['asymmetric.npy', /asymmetric\.npy: must hold a symmetric matrix, but entry \(8, 3\) is .* and \(3, 8\) is /],
    ['rectangular.npy', /rectangular\.npy: must hold a square matrix, got 4 × 5/],
    ['spd.txt', /--covariance must name a \.npy, \.mtx \(Matrix Market\) or \.csv file/],
  ])('%s: exit 2 with one line naming the file', async (file, line) => {
    const r = await runCommand(['check', '--covariance', file], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(line);
    expect(r.err.trim().split('\n')).toHaveLength(1);
  });
  it('either a covariance or a problem and prior, not both', async () => {
    const r = await runCommand(['check', '--covariance', 'spd.npy', '--prior', 'q.json'], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/either --covariance FILE or --problem and --prior/);
  });
});
