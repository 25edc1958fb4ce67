/**
 * `priorscope tune` says when its maximum lies on the edge of the grid (the true maximum may lie
 * beyond it), and refuses a prior without terms with a plain message. The edge is checked against
 * the printed grid itself: the cell with the largest log evidence, found here independently.
 */
import { describe, expect, it } from 'vitest';
import { runCommand, tempDir, writeFiles } from './run.ts';

const problem = {
  kind: 'priorscope.problem',
  version: 1,
  grid: { shape: [40], spacing: [1] },
  operator: { sparse: { rows: [0, 1, 2, 3, 4, 5], cols: [2, 9, 15, 22, 30, 37], values: [1, 1, 1, 1, 1, 1] } },
  data: { values: [0.3, 0.5, 0.1, -0.2, -0.4, 0.0], sigma: [0.05, 0.05, 0.05, 0.05, 0.05, 0.05] },
};
const prior = (terms: unknown[]) => ({ kind: 'priorscope.prior', version: 1, mean: { constant: 0 }, terms, nugget: 1e-4 });

type Out = { lengths: number[]; variances: number[]; logEvidence: (number | null)[][]; best: { length: number; variance: number }; bestOnEdge: { length: string | null; variance: string | null }; warnings: string[] };

describe('tune: a maximum on the edge of the grid', () => {
  const dir = tempDir();
  writeFiles(dir, { 'p.json': problem, 'q.json': prior([{ kernel: 'exponential', variance: 0.1, length: 5 }]) });
  it.each([
    ['variances far too small: the maximum sits at the upper variance end', ['--lengths', '2:20:5', '--variances', '1e-6:1e-5:4'], { variance: 'high' }],
    ['variances far too large: the maximum sits at the lower variance end', ['--lengths', '2:20:5', '--variances', '1e3:1e4:4'], { variance: 'low' }],
  ])('%s', async (_n, axes, expected) => {
    const r = await runCommand(['tune', '--problem', 'p.json', '--prior', 'q.json', '--term', '0', ...axes], dir);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as Out;
    // The edge from the printed grid: index of the largest cell.
    let bi = -1;
    let bj = -1;
    let best = -Infinity;
    j.logEvidence.forEach((row, i) => row.forEach((v, k) => {
      if (v !== null && v > best) [best, bi, bj] = [v, i, k];
    }));
    const edge = (k: number, n: number) => (k === 0 ? 'low' : k === n - 1 ? 'high' : null);
    expect(j.bestOnEdge).toEqual({ length: edge(bi, j.lengths.length), variance: edge(bj, j.variances.length) });
    expect(j.bestOnEdge.variance).toBe(expected.variance);
    expect(j.warnings.length).toBeGreaterThan(0);
    expect(r.err).toMatch(/^priorscope tune: the maximum lies at the (lower|upper) end of the variance axis/m);
  });
  it('an interior maximum gives no warning', async () => {
    const r = await runCommand(['tune', '--problem', 'p.json', '--prior', 'q.json', '--term', '0', '--lengths', '0.5:200:12', '--variances', '1e-4:1e3:12'], dir);
    const j = JSON.parse(r.out) as Out;
    if (j.bestOnEdge.length === null && j.bestOnEdge.variance === null) {
      expect(j.warnings).toEqual([]);
      expect(r.err).not.toMatch(/maximum lies/);
    } else {
      expect(j.warnings.length).toBeGreaterThan(0);
    }
  });
  it('a prior without terms: nothing to tune', async () => {
    writeFiles(dir, { 'empty.json': prior([]) });
    const r = await runCommand(['tune', '--problem', 'p.json', '--prior', 'empty.json', '--term', '0', '--lengths', '1:2:2', '--variances', '1:2:2'], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/no covariance term to tune/);
  });
});
