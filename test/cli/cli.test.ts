/**
 * Tests of the command line: each command, each bad-input case (exit code 2, one line on stderr
 * naming file + field + expectation, no stack trace), `check` exit 3, warnings, and byte-identical
 * seeded samples. Most run main() in this process (runCommand, test/cli/run.ts); the "real binary"
 * block spawns `node src/cli/bin.mjs` and checks that the process gives the same bytes and exit codes.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync, truncateSync } from 'node:fs';
import { MAX_FILE_BYTES } from '../../src/core/io/errors.ts';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseCsv } from '../../src/core/io/csv.ts';
import { parseNpy } from '../../src/core/io/npy.ts';
import { COMMANDS } from '../../src/cli/main.ts';
import { repoRoot, runCli, runCommand, tempDir, writeFiles, type RunResult } from './run.ts';

// An invented problem: 3 averaging data over a 6-cell line, spacing 1 m.
const PROBLEM = {
  kind: 'priorscope.problem',
  version: 1,
  title: 'invented averaging line',
  grid: { shape: [6], spacing: [1], unit: 'm' },
  operator: {
    dense: [
      [0.5, 0.5, 0, 0, 0, 0],
      [0, 0, 0.5, 0.5, 0, 0],
      [0, 0, 0, 0, 0.5, 0.5],
    ],
  },
  data: { values: [1.2, 0.4, -0.3], sigma: [0.1, 0.1, 0.2] },
};
const PRIOR = {
  kind: 'priorscope.prior',
  version: 1,
  mean: { constant: 0 },
  terms: [{ kernel: 'exponential', variance: 1, length: 2 }],
  nugget: 0.001,
};
const with_ = (base: object, patch: Record<string, unknown>) => ({ ...base, ...patch });

let dir: string;
beforeAll(() => {
  dir = tempDir();
  writeFiles(dir, { 'p.json': PROBLEM, 'q.json': PRIOR });
});

/** Exit 2 and exactly one stderr line, without a stack trace. */
function expectBadInput(r: RunResult, line: string): void {
  expect(r.code, r.err).toBe(2);
  expect(r.err).toBe(line + '\n');
  expect(r.err).not.toMatch(/\n\s+at /);
  expect(r.out).toBe('');
}

describe('help', () => {
  it('npx priorscope --help lists every command (through package.json "bin")', () => {
    const out = execFileSync('npx', ['--no-install', 'priorscope', '--help'], {
      cwd: repoRoot,
      encoding: 'utf8',
      env: { ...process.env, PRIORSCOPE_CLI_SOURCE: '1' },
    });
    for (const c of ['posterior', 'check', 'sample', 'correlation', 'tune', 'demo']) expect(out).toMatch(new RegExp(`^  ${c} `, 'm'));
  });
  it.each(['posterior', 'check', 'sample', 'correlation', 'tune', 'demo'])('%s --help describes its usage and options', async (c) => {
    const r = await runCommand([c, '--help'], dir);
    expect(r.code).toBe(0);
    expect(r.out).toContain(`Usage: priorscope ${c}`);
    expect(r.out).toContain('--help');
  });
  it('no command: help on stderr, exit 2; unknown command: exit 2', async () => {
    const r = await runCommand([], dir);
    expect(r.code).toBe(2);
    expect(r.err).toContain('Usage: priorscope <command>');
    const names = COMMANDS.map((c) => c.name);
    expect(names.slice(0, 3)).toEqual(['posterior', 'check', 'sample']);
    expectBadInput(
      await runCommand(['posterier'], dir),
      `priorscope: unknown command "posterier"; commands: ${names.join(', ')} (see priorscope --help)`,
    );
  });
});

describe('correlation', () => {
  // Closed forms: exponential e^(−h), Gaussian e^(−h²/2), spherical 1 − 1.5h + 0.5h³;
  // Matérn ν = 3/2: (1 + √3 h) e^(−√3 h), ν = 1/2: e^(−h) (Rasmussen & Williams 2006, eq. 4.17).
  const lags = [0, 0.25, 0.5, 1, 2, 3.5];
  it.each([
    ['exponential', [], (h: number) => Math.exp(-h)],
    ['gaussian', [], (h: number) => Math.exp(-0.5 * h * h)],
    ['spherical', [], (h: number) => (h < 1 ? 1 - 1.5 * h + 0.5 * h ** 3 : 0)],
    ['matern', ['--nu', '1.5'], (h: number) => (1 + Math.sqrt(3) * h) * Math.exp(-Math.sqrt(3) * h)],
    ['matern', ['--nu', '0.5'], (h: number) => Math.exp(-h)],
  ] as const)('%s %s', async (kernel, extra, rho) => {
    const r = await runCommand(['correlation', '--kernel', kernel, ...extra, '--lags', lags.join(',')], dir);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as { lags: number[]; values: number[]; kernel: string };
    expect(j.kernel).toBe(kernel);
    expect(j.lags).toEqual(lags);
    j.values.forEach((v, k) => expect(Math.abs(v - rho(lags[k]))).toBeLessThanOrEqual(1e-14));
  });
  it('matern ν = 3/2 at h = 1 is 0.483358 (REFERENCES.md, derived from eq. 4.17)', async () => {
    const j = JSON.parse((await runCommand(['correlation', '--kernel=matern', '--nu=1.5', '--lags=1'], dir)).out) as { values: number[] };
    expect(j.values[0]).toBeCloseTo(0.483358, 6);
  });
  it.each([
    [
      ['--kernel', 'cubic', '--lags', '1'],
      'priorscope correlation: --kernel must be one of exponential, gaussian, matern, spherical, got "cubic" (see priorscope correlation --help)',
    ],
    [
      ['--kernel', 'matern', '--lags', '1'],
      'priorscope correlation: --nu V is required for the matern kernel (smoothness ν > 0) (see priorscope correlation --help)',
    ],
    [
      ['--kernel', 'matern', '--nu', '0', '--lags', '1'],
      'priorscope correlation: --nu must be a finite number > 0, got "0" (see priorscope correlation --help)',
    ],
    [
      ['--kernel', 'matern', '--nu', '-1', '--lags', '1'],
      'priorscope correlation: --nu must be a finite number > 0, got "-1" (see priorscope correlation --help)',
    ],
    [
      ['--kernel', 'gaussian', '--lags', '0,-1'],
      'priorscope correlation: --lags item 2 must be a finite number ≥ 0, got "-1" (see priorscope correlation --help)',
    ],
    [
      ['--kernel', 'gaussian', '--lags', '0,NaN'],
      'priorscope correlation: --lags item 2 must be a finite number ≥ 0, got "NaN" (see priorscope correlation --help)',
    ],
    [['--kernel', 'gaussian'], 'priorscope correlation: option --lags H1,H2,… is required (see priorscope correlation --help)'],
    [
      ['--kernel', 'gaussian', '--lags', '1', '--bogus'],
      'priorscope correlation: unknown option --bogus (see priorscope correlation --help)',
    ],
  ])('bad input %j', async (args, line) => {
    expectBadInput(await runCommand(['correlation', ...args], dir), line);
  });
});

describe('posterior and check', () => {
  it('posterior prints the documented fields, consistent with each other', async () => {
    const r = await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json'], dir);
    expect(r.code, r.err).toBe(0);
    expect(r.err).toBe('');
    const j = JSON.parse(r.out) as Record<string, unknown>;
    for (const k of ['mean', 'std', 'predicted', 'residuals', 'chi2', 'logEvidence', 'dataCount', 'parameterCount', 'path'])
      expect(j).toHaveProperty(k);
    expect(j.dataCount).toBe(3);
    expect(j.parameterCount).toBe(6);
    expect((j.mean as number[]).length).toBe(6);
    const res = j.residuals as number[];
    // residuals are (d − G m̃)/σ and chi2 their sum of squares.
    const pred = j.predicted as number[];
    res.forEach((v, i) => expect(v).toBeCloseTo((PROBLEM.data.values[i] - pred[i]) / PROBLEM.data.sigma[i], 12));
    expect(j.chi2 as number).toBeCloseTo(
      res.reduce((a, b) => a + b * b, 0),
      12,
    );
  });
  it('--out writes the same JSON to a file and nothing to stdout', async () => {
    const r = await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json', '--out', 'post.json'], dir);
    expect(r.code).toBe(0);
    expect(r.out).toBe('');
    expect(readFileSync(join(dir, 'post.json'), 'utf8')).toBe(
      (await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json'], dir)).out,
    );
  });
  it('check: positive definite → exit 0', async () => {
    const r = await runCommand(['check', '--problem', 'p.json', '--prior', 'q.json'], dir);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as { positiveDefinite: boolean; minEigenvalue: number; maxEigenvalue: number; conditionNumber: number };
    expect(j.positiveDefinite).toBe(true);
    expect(j.minEigenvalue).toBeGreaterThan(0);
    expect(j.conditionNumber).toBeCloseTo(j.maxEigenvalue / j.minEigenvalue, 6);
  });
  it('check: a Gaussian kernel much longer than a fine grid, no nugget → not positive definite, exit 3', async () => {
    // Ababou et al. (1994): the Gaussian kernel's covariance matrix is the worst conditioned; with
    // length 40 on 120 cells of spacing 1 its eigenvalues fall far below round-off.
    const d = tempDir();
    writeFiles(d, {
      'p.json': with_(PROBLEM, {
        grid: { shape: [120], spacing: [1] },
        operator: { sparse: { rows: [0, 1, 2], cols: [10, 60, 110], values: [1, 1, 1] } },
      }),
      'q.json': with_(PRIOR, { terms: [{ kernel: 'gaussian', variance: 1, length: 40 }], nugget: 0 }),
    });
    const r = await runCommand(['check', '--problem', 'p.json', '--prior', 'q.json'], d);
    expect(r.code, r.err).toBe(3);
    const j = JSON.parse(r.out) as { positiveDefinite: boolean; suggestedJitter: number | null };
    expect(j.positiveDefinite).toBe(false);
    expect(r.err).toContain('not positive definite');
    // Prior sampling needs the Cholesky factor of Cm itself: exit 3 and one line, no output.
    const s = await runCommand(['sample', '--problem', 'p.json', '--prior', 'q.json', '--count', '1', '--seed', '0'], d);
    expect(s.code).toBe(3);
    expect(s.out).toBe('');
    expect(s.err.trim().split('\n')).toHaveLength(1);
    expect(s.err).toMatch(/^priorscope sample: .*not positive definite/);
  });
  it('unknown fields give warnings on stderr, not errors', async () => {
    const d = tempDir();
    writeFiles(d, { 'p.json': with_(PROBLEM, { colour: 'blue' }), 'q.json': with_(PRIOR, { author: 'me' }) });
    const r = await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json'], d);
    expect(r.code).toBe(0);
    expect(r.err.split('\n').filter(Boolean)).toEqual([
      'warning: p.json: unknown field colour ignored (known here: kind, version, title, grid, cells, operator, data, truth, quantity)',
      'warning: q.json: unknown field author ignored (known here: kind, version, mean, terms, nugget, stdProfile)',
    ]);
    expect(JSON.parse(r.out)).toEqual(JSON.parse((await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json'], dir)).out));
  });
});

describe('bad input files: exit 2, one line naming file, field and expectation', () => {
  const P = PROBLEM;
  const cases: [string, Record<string, unknown>, string][] = [
    [
      'not JSON',
      { 'p.json': '{"kind": "priorscope.problem", ' },
      'p.json: is not valid JSON: line 1, column 32: expected a double-quoted field name, got the end of the file',
    ],
    [
      'wrong kind',
      { 'p.json': with_(P, { kind: 'priorscope.prior' }) },
      'p.json: kind must be "priorscope.problem" (this is a prior file), got "priorscope.prior"',
    ],
    ['wrong version', { 'p.json': with_(P, { version: 3 }) }, 'p.json: version must be 1 (the version this program reads), got 3'],
    ['missing field', { 'p.json': with_(P, { grid: undefined }) }, 'p.json: grid must be an object with shape and spacing, got nothing'],
    [
      'G against grid',
      { 'p.json': with_(P, { grid: { shape: [5], spacing: [1] } }) },
      'p.json: operator.dense[0] must be an array of 5 numbers (one per grid cell), got an array of length 6',
    ],
    [
      'G against data',
      { 'p.json': with_(P, { data: { values: [1, 2], sigma: [1, 1] } }) },
      'p.json: operator.dense must be an array of 2 rows (one per datum in data.values), got an array of length 3',
    ],
    [
      'NaN',
      { 'p.json': JSON.stringify(P).replace('-0.3', 'NaN') },
      `p.json: is not valid JSON: line 1, column ${JSON.stringify(P).indexOf('-0.3') + 1}: NaN and Infinity are not JSON numbers; every number must be finite`,
    ],
    [
      'Infinity',
      { 'p.json': JSON.stringify(P).replace('0.4', 'Infinity') },
      `p.json: is not valid JSON: line 1, column ${JSON.stringify(P).indexOf('0.4,') + 1}: NaN and Infinity are not JSON numbers; every number must be finite`,
    ],
    [
      'string number',
      { 'p.json': with_(P, { data: { values: [1, '2', 3], sigma: [1, 1, 1] } }) },
      'p.json: data.values[1] must be a finite number, got "2"',
    ],
    [
      'negative sigma',
      { 'p.json': with_(P, { data: { values: [1, 2, 3], sigma: [1, 1, -1] } }) },
      'p.json: data.sigma[2] must be > 0, got -1',
    ],
    [
      'non-PD data covariance',
      {
        'p.json': with_(P, {
          data: {
            values: [1, 2, 3],
            covariance: [
              [1, 0, 0],
              [0, 1, 1.5],
              [0, 1.5, 1],
            ],
          },
        }),
      },
      'p.json: data.covariance must be positive definite, got a matrix whose Cholesky factorisation fails at row 2 (pivot -1.25)',
    ],
    [
      'missing referenced file',
      { 'p.json': with_(P, { operator: { file: 'G.npy' } }) },
      `p.json: operator.file "G.npy" could not be read: no such file (${'DIR'}/G.npy)`,
    ],
    [
      'unreadable referenced file',
      { 'p.json': with_(P, { operator: { file: 'G.npy' } }), 'G.npy': 'this is text' },
      'G.npy: is not a NumPy .npy file (it does not start with the bytes "\\x93NUMPY")',
    ],
    [
      'bad referenced CSV',
      { 'p.json': with_(P, { operator: { file: 'G.csv' } }), 'G.csv': '1,2,3,4,5,6\n1,2,3,4,5\n' },
      'G.csv: line 2 has 5 columns, expected 6 (as in line 1)',
    ],
    [
      'negative variance',
      { 'q.json': with_(PRIOR, { terms: [{ kernel: 'gaussian', variance: -2, length: 1 }] }) },
      'q.json: terms[0].variance must be > 0, got -2',
    ],
    [
      'unknown kernel',
      { 'q.json': with_(PRIOR, { terms: [{ kernel: 'hole', variance: 1, length: 1 }] }) },
      'q.json: terms[0].kernel must be one of "exponential", "gaussian", "matern", "spherical", got "hole"',
    ],
    [
      'ν ≤ 0',
      { 'q.json': with_(PRIOR, { terms: [{ kernel: 'matern', variance: 1, length: 1, nu: 0 }] }) },
      'q.json: terms[0].nu must be > 0, got 0',
    ],
    [
      'prior mean length',
      { 'q.json': with_(PRIOR, { mean: { values: [1, 2] } }) },
      'q.json: mean.values must be an array of 6 numbers (one per grid cell), got an array of length 2',
    ],
    [
      'prior not JSON',
      { 'q.json': 'mean: 0' },
      'q.json: is not valid JSON: line 1, column 1: expected a value (number, string, array, object, true, false or null), got "mean: 0"',
    ],
  ];
  it.each(cases)('%s', async (_name, files, line) => {
    const d = tempDir();
    writeFiles(d, { 'p.json': PROBLEM, 'q.json': PRIOR, ...files });
    for (const command of [['posterior'], ['check'], ['sample', '--count', '1', '--seed', '0']]) {
      const r = await runCommand([...command, '--problem', 'p.json', '--prior', 'q.json'], d);
      expectBadInput(r, line.replace('DIR', d));
    }
  });
  it('a file over the 512 MiB limit is refused before it is read', async () => {
    // A sparse file: truncateSync extends it without writing (or storing) the bytes.
    const d = tempDir();
    writeFiles(d, { 'q.json': PRIOR, 'big.json': '{}' });
    truncateSync(join(d, 'big.json'), MAX_FILE_BYTES + 1);
    expectBadInput(
      await runCommand(['posterior', '--problem', 'big.json', '--prior', 'q.json'], d),
      'big.json: file is 512.0 MiB, larger than the limit of 512 MiB',
    );
  });
  it('a missing problem file, a directory, and a missing option', async () => {
    expectBadInput(
      await runCommand(['posterior', '--problem', 'none.json', '--prior', 'q.json'], dir),
      'none.json: cannot be read: no such file',
    );
    expectBadInput(
      await runCommand(['posterior', '--problem', '.', '--prior', 'q.json'], dir),
      '.: cannot be read: it is a directory, not a file',
    );
    expectBadInput(
      await runCommand(['posterior', '--problem', 'p.json'], dir),
      'priorscope posterior: option --prior Q.json is required (see priorscope posterior --help)',
    );
  });
});

describe('sample', () => {
  const base = ['sample', '--problem', 'p.json', '--prior', 'q.json', '--count', '4', '--seed', '12345'];
  it('json: K rows of N numbers; the same seed gives byte-identical output, another seed different numbers', async () => {
    const a = await runCommand(base, dir);
    expect(a.code, a.err).toBe(0);
    const j = JSON.parse(a.out) as { kind: string; seed: number; count: number; realisations: number[][] };
    expect(j.kind).toBe('prior');
    expect(j.realisations).toHaveLength(4);
    j.realisations.forEach((row) => expect(row).toHaveLength(6));
    expect((await runCommand(base, dir)).stdout.equals(a.stdout)).toBe(true);
    const b = JSON.parse((await runCommand([...base.slice(0, -1), '12346'], dir)).out) as { realisations: number[][] };
    expect(b.realisations[0]).not.toEqual(j.realisations[0]);
  });
  it('csv and npy carry the same numbers as json, and are byte-identical across runs', async () => {
    const j = JSON.parse((await runCommand(base, dir)).out) as { realisations: number[][] };
    const csv = await runCommand([...base, '--format', 'csv'], dir);
    expect(csv.code).toBe(0);
    expect(Array.from(parseCsv('s.csv', csv.out).matrix.data)).toEqual(j.realisations.flat());
    const npy = await runCommand([...base, '--format', 'npy'], dir);
    expect(npy.code).toBe(0);
    const a = parseNpy('s.npy', new Uint8Array(npy.stdout));
    expect(a.shape).toEqual([4, 6]);
    expect(Array.from(a.data)).toEqual(j.realisations.flat());
    expect((await runCommand([...base, '--format', 'npy'], dir)).stdout.equals(npy.stdout)).toBe(true);
    // --out with a .npy name chooses the format.
    expect((await runCommand([...base, '--out', 's.npy'], dir)).code).toBe(0);
    expect(readFileSync(join(dir, 's.npy')).equals(npy.stdout)).toBe(true);
  });
  it('--posterior samples the posterior (different from the prior draws with the same seed)', async () => {
    const prior = JSON.parse((await runCommand(base, dir)).out) as { realisations: number[][] };
    const r = await runCommand([...base, '--posterior'], dir);
    expect(r.code, r.err).toBe(0);
    const post = JSON.parse(r.out) as { kind: string; realisations: number[][] };
    expect(post.kind).toBe('posterior');
    expect(post.realisations).toHaveLength(4);
    expect(post.realisations[0]).not.toEqual(prior.realisations[0]);
    expect((await runCommand([...base, '--posterior'], dir)).stdout.equals(r.stdout)).toBe(true);
  });
  it.each([
    [['--count', '0', '--seed', '1'], 'priorscope sample: --count must be an integer ≥ 1, got "0" (see priorscope sample --help)'],
    [['--count', '2.5', '--seed', '1'], 'priorscope sample: --count must be an integer ≥ 1, got "2.5" (see priorscope sample --help)'],
    [
      ['--count', '2', '--seed', '-1'],
      'priorscope sample: --seed must be an integer from 0 to 4294967295, got "-1" (see priorscope sample --help)',
    ],
    [
      ['--count', '2', '--seed', '1', '--format', 'xml'],
      'priorscope sample: --format must be one of json, csv, npy, vti, got "xml" (see priorscope sample --help)',
    ],
    [['--count', '2'], 'priorscope sample: option --seed S is required (see priorscope sample --help)'],
  ])('bad options %j', async (args, line) => {
    expectBadInput(await runCommand(['sample', '--problem', 'p.json', '--prior', 'q.json', ...args], dir), line);
  });
});

describe('tune and demo', () => {
  it('tune prints the evidence grid and its maximum', async () => {
    const r = await runCommand(
      ['tune', '--problem', 'p.json', '--prior', 'q.json', '--term', '0', '--lengths', '0.5:8:4', '--variances', '0.1:10:3'],
      dir,
    );
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as { lengths: number[]; variances: number[]; logEvidence: number[][]; best: { logEvidence: number } };
    expect(j.lengths).toHaveLength(4);
    expect(j.variances).toHaveLength(3);
    expect(j.logEvidence.map((row) => row.length)).toEqual([3, 3, 3, 3]);
    expect(j.best.logEvidence).toBe(Math.max(...j.logEvidence.flat()));
  });
  it.each([
    [
      ['--term', '1', '--lengths', '1:2:2', '--variances', '1:2:2'],
      'priorscope tune: --term must be an integer from 0 to 0 (the prior has 1 term), got "1" (see priorscope tune --help)',
    ],
    [
      ['--term', '0', '--lengths', '2:1:2', '--variances', '1:2:2'],
      'priorscope tune: --lengths must be lo:hi:n with 0 < lo ≤ hi and n an integer from 1 to 10000, got "2:1:2" (see priorscope tune --help)',
    ],
    [
      ['--term', '0', '--lengths', '1:2', '--variances', '1:2:2'],
      'priorscope tune: --lengths must be lo:hi:n with 0 < lo ≤ hi and n an integer from 1 to 10000, got "1:2" (see priorscope tune --help)',
    ],
    [
      ['--term', '0', '--lengths', '1:2:2', '--variances', '0:2:2'],
      'priorscope tune: --variances must be lo:hi:n with 0 < lo ≤ hi and n an integer from 1 to 10000, got "0:2:2" (see priorscope tune --help)',
    ],
  ])('tune bad options %j', async (args, line) => {
    expectBadInput(await runCommand(['tune', '--problem', 'p.json', '--prior', 'q.json', ...args], dir), line);
  });
  it('demo --list lists the built-in problems', async () => {
    const r = await runCommand(['demo', '--list'], dir);
    expect(r.code).toBe(0);
    const list = JSON.parse(r.out) as { id: string; title: string; description: string }[];
    expect(list.map((d) => d.id)).toEqual(['borehole-log', 'crosshole-tomography', 'potential-field', 'three-boreholes']);
    list.forEach((d) => expect(d.title.length).toBeGreaterThan(0));
  });
  it('demo NAME writes files that the other commands read; a sibling operator file gives the same posterior', async () => {
    const d = tempDir();
    expect((await runCommand(['demo', 'borehole-log', '--out', 'b.json', '--prior', 'bq.json', '--truth-prior', 'bt.json'], d)).code).toBe(
      0,
    );
    expect((await runCommand(['demo', 'borehole-log', '--out', 'b2.json', '--operator-file', 'G.mtx'], d)).code).toBe(0);
    const a = await runCommand(['posterior', '--problem', 'b.json', '--prior', 'bq.json'], d);
    const b = await runCommand(['posterior', '--problem', 'b2.json', '--prior', 'bq.json'], d);
    expect(a.code, a.err).toBe(0);
    expect(b.code, b.err).toBe(0);
    // The Matrix Market sibling holds the same sparse operator, so the output is the same text.
    expect(b.out).toBe(a.out);
    expect((await runCommand(['check', '--problem', 'b.json', '--prior', 'bt.json'], d)).code).toBe(0);
    expect((await runCommand(['demo', 'borehole-log'], d)).out).toBe(readFileSync(join(d, 'b.json'), 'utf8'));
  });
  it('demo with an unknown name is bad input', async () => {
    expectBadInput(
      await runCommand(['demo', 'volcano'], dir),
      'priorscope demo: demo name must be one of borehole-log, crosshole-tomography, potential-field, three-boreholes, got "volcano" (see priorscope demo --help)',
    );
  });
});

describe('the real binary gives the same exit codes and bytes as main() in process', () => {
  it('posterior: same JSON on stdout, nothing on stderr, exit 0', async () => {
    const args = ['posterior', '--problem', 'p.json', '--prior', 'q.json'];
    const bin = runCli(args, dir);
    expect(bin.code, bin.err).toBe(0);
    expect(bin.err).toBe('');
    expect(bin.out).toBe((await runCommand(args, dir)).out);
    expect(JSON.parse(bin.out)).toHaveProperty('logEvidence');
  });
  it('sample --format npy: the same bytes on the process stdout', async () => {
    const args = ['sample', '--problem', 'p.json', '--prior', 'q.json', '--count', '3', '--seed', '7', '--format', 'npy'];
    const bin = runCli(args, dir);
    expect(bin.code, bin.err).toBe(0);
    expect(bin.stdout.equals((await runCommand(args, dir)).stdout)).toBe(true);
    expect(parseNpy('s.npy', new Uint8Array(bin.stdout)).shape).toEqual([3, 6]);
  });
  it('bad input: exit 2 and one line on stderr, no stack trace', () => {
    expectBadInput(runCli(['posterior', '--problem', 'none.json', '--prior', 'q.json'], dir), 'none.json: cannot be read: no such file');
  });
  it('check on a prior that is not positive definite: exit 3', () => {
    const d = tempDir();
    writeFiles(d, {
      'p.json': with_(PROBLEM, {
        grid: { shape: [120], spacing: [1] },
        operator: { sparse: { rows: [0, 1, 2], cols: [10, 60, 110], values: [1, 1, 1] } },
      }),
      'q.json': with_(PRIOR, { terms: [{ kernel: 'gaussian', variance: 1, length: 40 }], nugget: 0 }),
    });
    const r = runCli(['check', '--problem', 'p.json', '--prior', 'q.json'], d);
    expect(r.code, r.err).toBe(3);
    expect((JSON.parse(r.out) as { positiveDefinite: boolean }).positiveDefinite).toBe(false);
  });
});
