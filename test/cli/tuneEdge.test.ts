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

type Out = {
  lengths: number[];
  variances: number[];
  logEvidence: (number | null)[][];
  best: { length: number; variance: number };
  bestOnEdge: { length: string | null; variance: string | null };
  warnings: string[];
};

describe('tune: a maximum on the edge of the grid', () => {
  const dir = tempDir();
  writeFiles(dir, { 'p.json': problem, 'q.json': prior([{ kernel: 'exponential', variance: 0.1, length: 5 }]) });
  it.each([
    [
      'variances far too small: the maximum sits at the upper variance end',
      ['--lengths', '2:20:5', '--variances', '1e-6:1e-5:4'],
      { variance: 'high' },
    ],
    [
      'variances far too large: the maximum sits at the lower variance end',
      ['--lengths', '2:20:5', '--variances', '1e3:1e4:4'],
      { variance: 'low' },
    ],
  ])('%s', async (_n, axes, expected) => {
    const r = await runCommand(['tune', '--problem', 'p.json', '--prior', 'q.json', '--term', '0', ...axes], dir);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as Out;
    // The edge from the printed grid: index of the largest cell.
    let bi = -1;
    let bj = -1;
    let best = -Infinity;
    j.logEvidence.forEach((row, i) =>
      row.forEach((v, k) => {
        if (v !== null && v > best) [best, bi, bj] = [v, i, k];
      }),
    );
    const edge = (k: number, n: number) => (k === 0 ? 'low' : k === n - 1 ? 'high' : null);
    expect(j.bestOnEdge).toEqual({ length: edge(bi, j.lengths.length), variance: edge(bj, j.variances.length) });
    expect(j.bestOnEdge.variance).toBe(expected.variance);
    expect(j.warnings.length).toBeGreaterThan(0);
    expect(r.err).toMatch(/^priorscope tune: the maximum lies at the (lower|upper) end of the variance axis/m);
  });
  it('an interior maximum gives no warning', async () => {
    const r = await runCommand(
      ['tune', '--problem', 'p.json', '--prior', 'q.json', '--term', '0', '--lengths', '0.5:200:12', '--variances', '1e-4:1e3:12'],
      dir,
    );
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
    const r = await runCommand(
      ['tune', '--problem', 'p.json', '--prior', 'empty.json', '--term', '0', '--lengths', '1:2:2', '--variances', '1:2:2'],
      dir,
    );
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/no covariance term to tune/);
  });
});

describe('tune --axis: one length of an anisotropic term at a time', () => {
  const dir = tempDir();
  // An invented 2-D survey: 12 × 10 cells of 1 m, 30 point data at seeded-looking fixed cells.
  const cells = Array.from({ length: 30 }, (_, k) => (k * 37 + 11) % 120);
  const values = cells.map((c) => Math.sin((c % 12) / 3) + 0.3 * Math.cos(Math.floor(c / 12) / 1.5));
  writeFiles(dir, {
    'p2.json': {
      kind: 'priorscope.problem',
      version: 1,
      grid: { shape: [12, 10], spacing: [1, 1] },
      operator: { sparse: { rows: cells.map((_, k) => k), cols: cells, values: cells.map(() => 1) } },
      data: { values, sigma: cells.map(() => 0.1) },
    },
    'aniso.json': prior([{ kernel: 'matern', nu: 1.5, variance: 0.5, lengths: [4, 1.5], angle: 20 }]),
  });
  const tune = (extra: string[]) =>
    runCommand(['tune', '--problem', 'p2.json', '--prior', 'aniso.json', '--term', '0', '--variances', '0.05:5:5', ...extra], dir);
  type AxisOut = Out & { axis: string; best: { length: number; variance: number; logEvidence: number; lengths: [number, number] } };

  it.each([
    ['l1', (len: number) => [len, 1.5]],
    ['l2', (len: number) => [4, len]],
    ['both', (len: number) => [len, (1.5 * len) / 4]],
  ] as const)(
    '--axis %s: the best cell is the prior with those lengths, and `posterior` gives it the same log evidence',
    async (axis, lengthsAt) => {
      const r = await tune(['--lengths', '0.5:12:6', '--axis', axis]);
      expect(r.code, r.err).toBe(0);
      const j = JSON.parse(r.out) as AxisOut;
      expect(j.axis).toBe(axis);
      const expected = lengthsAt(j.best.length);
      j.best.lengths.forEach((l, k) => expect(l).toBeCloseTo(expected[k], 12));
      writeFiles(dir, {
        [`best-${axis}.json`]: prior([{ kernel: 'matern', nu: 1.5, variance: j.best.variance, lengths: j.best.lengths, angle: 20 }]),
      });
      const p = await runCommand(['posterior', '--problem', 'p2.json', '--prior', `best-${axis}.json`], dir);
      expect(p.code, p.err).toBe(0);
      const logEvidence = (JSON.parse(p.out) as { logEvidence: number }).logEvidence;
      expect(Math.abs(logEvidence - j.best.logEvidence)).toBeLessThanOrEqual(1e-8 * Math.max(1, Math.abs(logEvidence)));
    },
  );
  it('l1 and l2 maps differ (each moves its own length)', async () => {
    const a = JSON.parse((await tune(['--lengths', '0.5:12:6', '--axis', 'l1'])).out) as AxisOut;
    const b = JSON.parse((await tune(['--lengths', '0.5:12:6', '--axis', 'l2'])).out) as AxisOut;
    const diff = a.logEvidence.flatMap((row, i) => row.map((v, k) => Math.abs(v! - b.logEvidence[i]![k]!)));
    expect(Math.max(...diff)).toBeGreaterThan(1e-3);
  });
  it('a maximum on the edge of the l2 axis is named as such (two lengths: the maximum is on one end)', async () => {
    const r = await tune(['--lengths', '0.5:12:2', '--axis', 'l2']);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as AxisOut;
    expect(j.bestOnEdge.length).toBe(j.best.length === j.lengths[0] ? 'low' : 'high');
    expect(j.warnings[0]).toMatch(
      /^the maximum lies at the (lower|upper) end of the l2 axis: the true maximum may lie beyond it; widen --lengths$/,
    );
    expect(r.err).toContain(`priorscope tune: ${j.warnings[0]}`);
  });
  it('refuses --axis l1 on an isotropic term and an unknown axis, in one line (exit 2)', async () => {
    writeFiles(dir, { 'iso.json': prior([{ kernel: 'exponential', variance: 0.1, length: 5 }]) });
    const r = await runCommand(
      ['tune', '--problem', 'p2.json', '--prior', 'iso.json', '--term', '0', '--lengths', '1:2:2', '--variances', '1:2:2', '--axis', 'l1'],
      dir,
    );
    expect(r.code).toBe(2);
    expect(r.err).toBe(
      'priorscope tune: --axis l1 needs an anisotropic term ("lengths": [l1, l2]); term 0 has one length: leave --axis out (see priorscope tune --help)\n',
    );
    const u = await tune(['--lengths', '1:2:2', '--axis', 'l3']);
    expect(u.code).toBe(2);
    expect(u.err).toBe('priorscope tune: --axis must be one of both, l1, l2, got "l3" (see priorscope tune --help)\n');
  });
});
