/**
 * `score`, `profile` and `calibrate` against outside references:
 * - score's log evidence vs scipy.stats.multivariate_normal.logpdf, its predictive upper tail vs
 *   scipy.stats.chi2.sf, its leave-one-out contributions vs brute-force model-space refits with one datum
 *   removed, and the classical discrepancy scale vs χ² = M of the model-space posterior mean at that scale
 *   (all numpy/scipy in test/reference/tuning_reference.py, which builds Cm from the kernel formulas itself);
 * - profile's values vs the same logpdf with the parameter changed;
 * - calibrate's self-calibration: the coverage of an exact posterior is nominal (Cook, Gelman & Rubin 2006),
 *   checked on independent per-replicate coverages at 4 standard errors; the same seed gives the same bytes.
 */
import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/sampling/random.ts';
import { runPython } from '../reference/python.ts';
import { runCommand, tempDir, writeFiles } from './run.ts';

const n = 30;
const m = 12;
const rng = new Random(5150);
const G: number[][] = [];
for (let i = 0; i < m; i++) {
  const row = new Array<number>(n).fill(0);
  const s = Math.floor(rng.nextDouble() * (n - 3));
  for (let j = s; j < s + 3; j++) row[j] = 1 / 3;
  G.push(row);
}
const d = Array.from({ length: m }, () => 0.25 * Math.sin(rng.nextDouble() * 6) + 0.1 * rng.nextNormal());
const sigma = new Array<number>(m).fill(0.1);
const problem = {
  kind: 'priorscope.problem',
  version: 1,
  grid: { shape: [n], spacing: [1] },
  operator: { dense: G },
  data: { values: d, sigma },
};
const priors = {
  'exp.json': {
    kind: 'priorscope.prior',
    version: 1,
    mean: { constant: 0.1 },
    terms: [{ kernel: 'exponential', variance: 0.3, length: 4 }],
    nugget: 1e-3,
  },
  'm32.json': {
    kind: 'priorscope.prior',
    version: 1,
    mean: { constant: 0 },
    terms: [{ kernel: 'matern', nu: 1.5, variance: 0.5, length: 6 }],
  },
};
const pyCase = (mean: number, kernel: string, variance: number, length: number, nugget: number, scale?: number) => ({
  x: Array.from({ length: n }, (_, i) => i),
  G,
  d,
  sigma,
  m0: new Array<number>(n).fill(mean),
  terms: [{ kernel, variance, length }],
  nugget,
  ...(scale === undefined ? {} : { scale }),
});

interface Ref {
  logpdf: number;
  sf: number;
  loo: number[];
  chi2_scaled?: number;
}
type Score = {
  logEvidence: number;
  logEvidenceToBest: number;
  leaveOneOut: { logScore: number; contributions: number[] };
  discrepancy: { classical: { status: string; scale: number; chi2: number } };
  predictive: { pUpper: number };
  route: string;
};

const close = (a: number, b: number, rel: number) =>
  expect(Math.abs(a - b), `${a} vs ${b}`).toBeLessThanOrEqual(rel * Math.max(1, Math.abs(b)));

describe('score, profile and calibrate against numpy/scipy', () => {
  const dir = tempDir();
  writeFiles(dir, { 'p.json': problem, ...priors });

  it('score: two priors side by side', async () => {
    const r = await runCommand(['score', '--problem', 'p.json', '--prior', 'exp.json', 'm32.json'], dir);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as { priors: string[]; scores: Score[]; bestByEvidence: number };
    expect(j.priors).toEqual(['exp.json', 'm32.json']);
    const [a, b] = j.scores as [Score, Score];
    const refs = runPython<{ results: Ref[] }>('tuning_reference.py', {
      cases: [
        pyCase(0.1, 'exponential', 0.3, 4, 1e-3, a.discrepancy.classical.scale),
        pyCase(0, 'matern32', 0.5, 6, 0, b.discrepancy.classical.scale),
      ],
    }).results;
    [a, b].forEach((s, k) => {
      const ref = refs[k];
      close(s.logEvidence, ref.logpdf, 1e-9);
      close(s.predictive.pUpper, ref.sf, 1e-8);
      s.leaveOneOut.contributions.forEach((c, i) => close(c, ref.loo[i], 1e-8));
      close(
        s.leaveOneOut.logScore,
        ref.loo.reduce((x, y) => x + y, 0),
        1e-8,
      );
      expect(s.discrepancy.classical.status).toBe('found');
      expect(s.route).toBe('dense');
      close(ref.chi2_scaled!, m, 1e-6);
    });
    const best = a.logEvidence >= b.logEvidence ? 0 : 1;
    expect(j.bestByEvidence).toBe(best);
    expect(j.scores[best].logEvidenceToBest).toBe(0);
    expect(j.scores[1 - best].logEvidenceToBest).toBeCloseTo(j.scores[1 - best].logEvidence - j.scores[best].logEvidence, 12);
  });

  it('score: data implausible under every prior (four times as large): exit 3, scores still printed', async () => {
    writeFiles(dir, { 'far.json': { ...problem, data: { values: d.map((v) => 4 * v), sigma } } });
    const r = await runCommand(['score', '--problem', 'far.json', '--prior', 'exp.json', 'm32.json'], dir);
    expect(r.code).toBe(3);
    const j = JSON.parse(r.out) as { plausibleCount: number; scores: { predictive: { plausible: boolean; pUpper: number } }[] };
    expect(j.plausibleCount).toBe(0);
    for (const s of j.scores) expect(s.predictive.pUpper).toBeLessThan(0.025);
    expect(r.err).toMatch(/^priorscope score: no prior passes the prior predictive check/);
  });

  it('profile along a length and along the nugget', async () => {
    const lengths = [1.5, 4, 9];
    const r = await runCommand(
      ['profile', '--problem', 'p.json', '--prior', 'exp.json', '--parameter', 'term0.length', '--values', lengths.join(',')],
      dir,
    );
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as { parameter: string; logEvidence: number[]; best: { index: number } };
    const nuggets = [0, 0.01, 0.1];
    const rn = await runCommand(
      ['profile', '--problem', 'p.json', '--prior', 'exp.json', '--parameter', 'nugget', '--values', nuggets.join(',')],
      dir,
    );
    const jn = JSON.parse(rn.out) as { logEvidence: number[] };
    const refs = runPython<{ results: Ref[] }>('tuning_reference.py', {
      cases: [
        ...lengths.map((l) => pyCase(0.1, 'exponential', 0.3, l, 1e-3)),
        ...nuggets.map((g) => pyCase(0.1, 'exponential', 0.3, 4, g)),
      ],
    }).results;
    expect(j.parameter).toBe('term0.length');
    j.logEvidence.forEach((v, k) => close(v, refs[k].logpdf, 1e-9));
    jn.logEvidence.forEach((v, k) => close(v, refs[3 + k].logpdf, 1e-9));
    const top = Math.max(...j.logEvidence);
    expect(j.logEvidence[j.best.index]).toBe(top);
  });

  it('profile: a bare word naming several parameters, and bad values, are usage errors', async () => {
    writeFiles(dir, {
      'two.json': { ...priors['exp.json'], terms: [...priors['exp.json'].terms, { kernel: 'gaussian', variance: 0.1, length: 2 }] },
    });
    const r = await runCommand(['profile', '--problem', 'p.json', '--prior', 'two.json', '--parameter', 'length', '--values', '1,2'], dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--parameter must name one parameter; "length" names 2 \(term0\.length, term1\.length\): write termK\.NAME/);
    const bad = await runCommand(
      ['profile', '--problem', 'p.json', '--prior', 'exp.json', '--parameter', 'term0.variance', '--values', '1,-2'],
      dir,
    );
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/value 2 of term0\.variance must be > 0, got -2/);
  });

  it.each([
    [
      ['calibrate', '--problem', 'p.json', '--prior', 'exp.json', '--replicates', '0', '--seed', '1'],
      /^priorscope calibrate: --replicates must be an integer from 1 to 1000000, got "0"/,
    ],
    [
      ['calibrate', '--problem', 'p.json', '--replicates', '3', '--seed', '1'],
      /^priorscope calibrate: give a prior file: --prior Q\.json, or several prior files as arguments/,
    ],
    [
      ['calibrate', '--problem', 'p.json', '--prior', 'exp.json', '--replicates', '3', '--seed', '1', '--draws', '0'],
      /--draws must be an integer from 1 to 65534/,
    ],
    [
      ['calibrate', '--problem', 'p.json', '--prior', ...new Array<string>(9).fill('exp.json'), '--replicates', '1', '--seed', '1'],
      /give at most 8 prior files for a cross-table, got 9/,
    ],
    [['profile', '--problem', 'p.json', '--prior', 'exp.json', '--parameter', 'nugget'], /give either --values V1,V2,… or --range lo:hi:n/],
    [
      ['profile', '--problem', 'p.json', '--prior', 'exp.json', '--parameter', 'term0.angle', '--values', '1'],
      /--parameter item "term0\.angle": term 0 has no angle \(only anisotropic 2-D terms/,
    ],
    [
      ['profile', '--problem', 'p.json', '--prior', 'exp.json', '--parameter', 'term0.length', '--range', '5:1:3'],
      /--range must have lo ≤ hi/,
    ],
    [['score', '--problem', 'p.json', '--prior', 'missing.json'], /^missing\.json: cannot be read: no such file/],
    [['merge', '.'], /^\.: cannot be read: it is a directory, not a file/],
  ])('bad input %j: exit 2, one line', async (args, message) => {
    const r = await runCommand(args, dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(message);
    expect(r.err.trim().split('\n')).toHaveLength(1);
    expect(r.out).toBe('');
  });

  it('calibrate: self-calibration is nominal within 4 standard errors; the same seed gives the same bytes', async () => {
    const args = ['calibrate', '--problem', 'p.json', '--prior', 'exp.json', '--replicates', '120', '--seed', '2024', '--draws', '9'];
    const r = await runCommand(args, dir);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as {
      nominal: { coverage68: number; coverage95: number };
      results: {
        coverage68: number;
        coverage95: number;
        coverage68StdError: number;
        coverage95StdError: number;
        rankHistogram: number[];
      }[];
    };
    const c = j.results[0];
    expect(Math.abs(c.coverage68 - j.nominal.coverage68)).toBeLessThan(4 * c.coverage68StdError);
    expect(Math.abs(c.coverage95 - j.nominal.coverage95)).toBeLessThan(4 * c.coverage95StdError);
    expect(c.rankHistogram).toHaveLength(10);
    expect(c.rankHistogram.reduce((a, b) => a + b, 0)).toBe(120 * n);
    const again = await runCommand(args, dir);
    expect(again.out).toBe(r.out);
    const other = await runCommand([...args.slice(0, -4), '--seed', '2025', '--draws', '9'], dir);
    expect(other.out).not.toBe(r.out);
  }, 60_000);

  it('calibrate: a cross-table of two priors has one result per (truth, inversion) pair', async () => {
    const r = await runCommand(
      ['calibrate', '--problem', 'p.json', '--prior', 'exp.json', 'm32.json', '--replicates', '8', '--seed', '3', '--draws', '4'],
      dir,
    );
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as { results: { truth: number; inversion: number; coverage68: number }[]; coverage68Table: number[][] };
    expect(j.results.map((x) => [x.truth, x.inversion])).toEqual([
      [0, 0],
      [0, 1],
      [1, 0],
      [1, 1],
    ]);
    expect(j.coverage68Table).toEqual([
      [j.results[0].coverage68, j.results[1].coverage68],
      [j.results[2].coverage68, j.results[3].coverage68],
    ]);
  }, 60_000);
});
