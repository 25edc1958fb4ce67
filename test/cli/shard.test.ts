/**
 * Batch work: `--shard K/N` writes partial results and `priorscope merge` combines them into exactly
 * the unsharded output (byte for byte). The calibration study runs its shards as separate processes
 * through GNU parallel (Debian's `parallel`, as a user would on one machine; test/run.mjs installs it).
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { shardRange } from '../../src/cli/study/shard.ts';
import { binPath, runCommand, tempDir, writeFiles } from './run.ts';

const problem = {
  kind: 'priorscope.problem',
  version: 1,
  grid: { shape: [24], spacing: [1] },
  operator: { sparse: { rows: [0, 1, 2, 3, 4, 5, 6, 7], cols: [1, 4, 7, 10, 13, 16, 19, 22], values: [1, 1, 1, 1, 1, 1, 1, 1] } },
  data: { values: [0.3, 0.5, 0.1, -0.2, -0.4, 0.0, 0.2, 0.35], sigma: [0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1] },
};
const prior = (length: number) => ({
  kind: 'priorscope.prior',
  version: 1,
  mean: { constant: 0 },
  terms: [{ kernel: 'exponential', variance: 0.1, length }],
  nugget: 1e-4,
});

describe('shards and merge', () => {
  const dir = tempDir();
  writeFiles(dir, { 'p.json': problem, 'a.json': prior(3), 'b.json': prior(8), 'c.json': prior(20) });
  const run = (args: string[]) => runCommand(args, dir);
  const text = (name: string) => readFileSync(join(dir, name), 'utf8');

  it('shard ranges cover every item exactly once, in order', () => {
    for (const total of [0, 1, 5, 17]) {
      for (const n of [1, 2, 3, 7, 20]) {
        const items = Array.from({ length: n }, (_, k) => shardRange(total, { index: k + 1, count: n })).flatMap(([a, b]) =>
          Array.from({ length: b - a }, (_, i) => a + i),
        );
        expect(items).toEqual(Array.from({ length: total }, (_, i) => i));
      }
    }
  });

  it('a calibration sharded 3 ways through GNU parallel, merged, equals the unsharded run byte for byte', async () => {
    const calib = ['calibrate', '--problem', 'p.json', '--prior', 'a.json', '--replicates', '10', '--seed', '42', '--draws', '9'];
    const whole = await run([...calib, '--out', 'whole.json']);
    expect(whole.code, whole.err).toBe(0);
    const par = spawnSync(
      'parallel',
      ['--will-cite', '-j', '2', process.execPath, binPath, ...calib, '--shard', '{}/3', '--out', 'part{}.json', ':::', '1', '2', '3'],
      { cwd: dir, encoding: 'utf8' },
    );
    expect(par.status, par.stderr).toBe(0);
    const parts = [1, 2, 3].map(
      (k) => JSON.parse(text(`part${k}.json`)) as { kind: string; shard: { index: number; count: number }; items: number[] },
    );
    expect(parts.map((p) => [p.kind, p.shard.index, p.shard.count, ...p.items])).toEqual([
      ['priorscope.partial', 1, 3, 0, 3],
      ['priorscope.partial', 2, 3, 3, 6],
      ['priorscope.partial', 3, 3, 6, 10],
    ]);
    const merged = await run(['merge', 'part3.json', 'part1.json', 'part2.json', '--out', 'merged.json']);
    expect(merged.code, merged.err).toBe(0);
    expect(text('merged.json')).toBe(text('whole.json'));
    const out = JSON.parse(text('whole.json')) as { results: { replicateCoverage68: number[]; rankHistogram: number[] }[] };
    expect(out.results[0].replicateCoverage68).toHaveLength(10);
    expect(out.results[0].rankHistogram.reduce((a, b) => a + b, 0)).toBe(10 * 24);
  }, 120_000);

  it('a calibration cross-table, a score of three priors, a profile and tune maps: sharded and merged equal the unsharded output', async () => {
    const cases: [string[], number][] = [
      [['calibrate', '--problem', 'p.json', '--prior', 'a.json', 'c.json', '--replicates', '5', '--seed', '9', '--draws', '4'], 2],
      [['score', '--problem', 'p.json', '--prior', 'a.json', 'b.json', 'c.json'], 2],
      [['score', '--problem', 'p.json', '--prior', 'a.json', 'b.json', 'c.json'], 5], // more shards than priors: empty shards
      [['profile', '--problem', 'p.json', '--prior', 'a.json', '--parameter', 'term0.length', '--range', '1:50:7'], 3],
      // Few variances: a Cholesky per cell; many: the eigen shortcut per length.
      [['tune', '--problem', 'p.json', '--prior', 'a.json', '--term', '0', '--lengths', '1:50:5', '--variances', '0.01:1:4'], 2],
      [['tune', '--problem', 'p.json', '--prior', 'a.json', '--term', '0', '--lengths', '1:50:5', '--variances', '0.01:1:30'], 3],
    ];
    for (const [k, [args, n]] of cases.entries()) {
      const whole = await run([...args, '--out', `w${k}.json`]);
      expect(whole.code, whole.err).toBe(0);
      const names: string[] = [];
      for (let s = n; s >= 1; s--) {
        const r = await run([...args, '--shard', `${s}/${n}`, '--out', `s${k}-${s}.json`]);
        expect(r.code, r.err).toBe(0);
        names.push(`s${k}-${s}.json`);
      }
      const m = await run(['merge', ...names]);
      expect(m.code, m.err).toBe(0);
      expect(m.out, args.join(' ')).toBe(text(`w${k}.json`));
    }
  }, 120_000);

  it('merge refuses missing, repeated and foreign parts, and files that are not partial results', async () => {
    const base = ['calibrate', '--problem', 'p.json', '--prior', 'b.json', '--replicates', '4', '--draws', '3'];
    for (const s of [1, 2, 3]) await run([...base, '--seed', '1', '--shard', `${s}/3`, '--out', `m${s}.json`]);
    await run([...base, '--seed', '2', '--shard', '3/3', '--out', 'other.json']);
    const missing = await run(['merge', 'm1.json', 'm3.json']);
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/shard 2 of 3 missing/);
    const twice = await run(['merge', 'm1.json', 'm2.json', 'm2.json', 'm3.json']);
    expect(twice.code).toBe(2);
    expect(twice.err).toMatch(/m2\.json: is shard 2 of 3 again/);
    const foreign = await run(['merge', 'm1.json', 'm2.json', 'other.json']);
    expect(foreign.code).toBe(2);
    expect(foreign.err).toMatch(/other\.json: comes from another run than m1\.json/);
    const notPartial = await run(['merge', 'm1.json', 'a.json']);
    expect(notPartial.code).toBe(2);
    expect(notPartial.err).toMatch(/a\.json: must be a partial result/);
    const none = await run(['merge']);
    expect(none.code).toBe(2);
  });

  it.each(['0/3', '4/3', '1/0', 'a/b', '2'])('--shard %s is a usage error', async (s) => {
    const r = await run(['score', '--problem', 'p.json', '--prior', 'a.json', '--shard', s]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--shard must be K\/N/);
  });
});
