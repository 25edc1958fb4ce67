/**
 * `priorscope fit` as a user meets it: --free words, bounds, exit codes and messages. The optimum
 * itself is checked against sklearn in test/reference/typeii_sklearn.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { runCommand, tempDir, writeFiles } from './run.ts';

const problem = {
  kind: 'priorscope.problem',
  version: 1,
  grid: { shape: [40], spacing: [1] },
  operator: { sparse: { rows: [0, 1, 2, 3, 4, 5, 6, 7], cols: [1, 6, 11, 15, 20, 26, 31, 37], values: [1, 1, 1, 1, 1, 1, 1, 1] } },
  data: { values: [0.3, 0.5, 0.1, -0.2, -0.4, 0.0, 0.2, 0.35], sigma: [0.05, 0.05, 0.05, 0.05, 0.05, 0.05, 0.05, 0.05] },
};
const prior = (terms: unknown[], nugget?: number) => ({
  kind: 'priorscope.prior',
  version: 1,
  mean: { constant: 0 },
  terms,
  ...(nugget === undefined ? {} : { nugget }),
});

type Fit = {
  prior: { kind: string; terms: { variance: number; length: number }[]; nugget?: number };
  logEvidence: number;
  startLogEvidence: number;
  parameters: { name: string; value: number; start: number; atBound: string | null; standardError: number | null }[];
  converged: boolean;
};

describe('fit', () => {
  const dir = tempDir();
  writeFiles(dir, {
    'p.json': problem,
    'q.json': prior([{ kernel: 'exponential', variance: 0.1, length: 5 }]),
    'qn.json': prior([{ kernel: 'exponential', variance: 0.1, length: 5 }], 1e-3),
  });

  it('fits the free parameters only; the fitted prior is a prior file that fit reads back at its own optimum', async () => {
    const r = await runCommand(
      ['fit', '--problem', 'p.json', '--prior', 'qn.json', '--free', 'term0.length', '--prior-out', 'fitted.json'],
      dir,
    );
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as Fit;
    expect(j.parameters.map((p) => p.name)).toEqual(['term0.length']);
    expect(j.prior.kind).toBe('priorscope.prior');
    expect(j.prior.terms[0].variance).toBe(0.1);
    expect(j.prior.nugget).toBe(1e-3);
    expect(j.logEvidence).toBeGreaterThan(j.startLogEvidence);
    // Started at its own optimum the fit stays there (gradient already below tolerance).
    const again = await runCommand(['fit', '--problem', 'p.json', '--prior', 'fitted.json', '--free', 'length'], dir);
    const k = JSON.parse(again.out) as Fit;
    expect(Math.abs(k.logEvidence - j.logEvidence)).toBeLessThan(1e-9);
    expect(k.startLogEvidence).toBeCloseTo(j.logEvidence, 9);
  });

  it('--bounds holds a parameter at the bound the evidence pushes against, without a standard error', async () => {
    const free = await runCommand(['fit', '--problem', 'p.json', '--prior', 'q.json', '--free', 'variance,length'], dir);
    const best = (JSON.parse(free.out) as Fit).parameters.find((p) => p.name === 'term0.length')!.value;
    const hi = best / 2;
    const r = await runCommand(
      ['fit', '--problem', 'p.json', '--prior', 'q.json', '--free', 'variance,length', '--bounds', `length=0.5:${hi}`],
      dir,
    );
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as Fit;
    const len = j.parameters.find((p) => p.name === 'term0.length')!;
    expect(len.value).toBeCloseTo(hi, 9);
    expect(len.atBound).toBe('high');
    expect(len.standardError).toBeNull();
    expect(j.parameters.find((p) => p.name === 'term0.variance')!.atBound).toBeNull();
    expect(j.logEvidence).toBeLessThan((JSON.parse(free.out) as Fit).logEvidence);
  });

  it.each([
    [['--free', 'range'], /--free items must be one of variance, length, lengths, angle, nu, nugget or termK\.NAME.*got "range"/],
    [['--free', 'nugget'], /--free nugget: the prior's nugget is 0; give a starting nugget > 0/],
    [['--free', 'nu'], /--free item "nu": no term of the prior has a nu \(only matern terms have a smoothness ν\)/],
    [['--free', 'term3.length'], /the prior has 1 term \(term0 … term0\)/],
    [['--free', 'lengths'], /only anisotropic 2-D terms have "lengths"/],
    [['--free', 'variance', '--bounds', 'length=1:2'], /--bounds length: term0\.length is not free/],
    [['--free', 'length', '--bounds', 'length=2:1'], /--bounds length must be LO:HI with LO ≤ HI and LO > 0/],
    [['--free', 'length', '--bounds', 'length'], /--bounds items must be NAME=LO:HI/],
  ])('usage error %j', async (extra, message) => {
    const r = await runCommand(['fit', '--problem', 'p.json', '--prior', 'q.json', ...extra], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(message);
    expect(r.out).toBe('');
  });

  it('not converged within --max-iterations: the result is printed, exit 3, stderr says why', async () => {
    const r = await runCommand(
      ['fit', '--problem', 'p.json', '--prior', 'q.json', '--free', 'variance,length', '--max-iterations', '1'],
      dir,
    );
    expect(r.code).toBe(3);
    expect((JSON.parse(r.out) as Fit).converged).toBe(false);
    expect(r.err).toMatch(/^priorscope fit: not converged: .*not converged after 1 iterations/m);
  });

  it.each([
    ['nugget', 'nugget', prior([{ kernel: 'exponential', variance: 0.1, length: 5 }], 1e-2)],
    ['term0.variance', 'term0.variance', prior([{ kernel: 'gaussian', variance: 0.1, length: 3 }], 1e-3)],
  ])(
    '--free %s: the fitted value is the top of the profile around it (profile computes each evidence on its own)',
    async (word, name, q) => {
      writeFiles(dir, { 'one.json': q });
      const r = await runCommand(['fit', '--problem', 'p.json', '--prior', 'one.json', '--free', word, '--prior-out', 'one-fit.json'], dir);
      expect([0, 3], r.err).toContain(r.code);
      const j = JSON.parse(r.out) as Fit;
      const v = j.parameters.find((p) => p.name === name)!.value;
      expect(j.parameters.find((p) => p.name === name)!.atBound).toBeNull();
      const values = [v * 0.97, v, v * 1.03];
      const prof = await runCommand(
        ['profile', '--problem', 'p.json', '--prior', 'one-fit.json', '--parameter', name, '--values', values.join(',')],
        dir,
      );
      expect(prof.code, prof.err).toBe(0);
      const e = (JSON.parse(prof.out) as { logEvidence: number[] }).logEvidence;
      expect(e[1]).toBeCloseTo(j.logEvidence, 9);
      // At a stationary point within the optimiser's gradient tolerance g (1e-6 in the log coordinate), a step δ = log 1.03
      // can raise the evidence by at most g·δ (less the curvature term): the fitted value is the top up to that.
      const slack = 1e-6 * Math.log(1.03);
      expect(e[1] - e[0]).toBeGreaterThan(-slack);
      expect(e[1] - e[2]).toBeGreaterThan(-slack);
    },
  );

  it('--help names the output fields and exit codes', async () => {
    const r = await runCommand(['fit', '--help'], dir);
    expect(r.code).toBe(0);
    for (const w of [
      '"prior"',
      '"logEvidence"',
      '"startLogEvidence"',
      '"standardError"',
      '"converged"',
      '3 here: not converged',
      '--bounds',
    ])
      expect(r.out).toContain(w);
  });
});
