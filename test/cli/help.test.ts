/**
 * Every command (as listed by `priorscope --help`, so commands added later are covered too) has a
 * `--help` that gives its usage, documents its output and states the exit codes; and the exit codes
 * hold: 0 ok, 1 internal error (here: a stdout that fails), 2 bad input in one line, 3 a negative verdict
 * (here: a covariance proven not positive definite, for check and sample).
 */
import { describe, expect, it } from 'vitest';
import type { Io } from '../../src/cli/commands.ts';
import { main } from '../../src/cli/main.ts';
import { runCommand, tempDir, writeFiles } from './run.ts';

const dir = tempDir();
const problem = {
  kind: 'priorscope.problem',
  version: 1,
  grid: { shape: [120], spacing: [1] },
  operator: { sparse: { rows: [0, 1, 2], cols: [10, 60, 110], values: [1, 1, 1] } },
  data: { values: [0.3, -0.1, 0.2], sigma: [0.1, 0.1, 0.1] },
};
const prior = (terms: unknown[], nugget: number) => ({ kind: 'priorscope.prior', version: 1, mean: { constant: 0 }, terms, nugget });
writeFiles(dir, {
  'p.json': problem,
  'q.json': prior([{ kernel: 'exponential', variance: 0.1, length: 5 }], 1e-4),
  // A Gaussian kernel of length 40 on 120 cells of spacing 1 without nugget: Cm is numerically singular.
  'bad.json': prior([{ kernel: 'gaussian', variance: 1, length: 40 }], 0),
});

async function commandNames(): Promise<string[]> {
  const r = await runCommand(['--help'], dir);
  const block = r.out.split('Commands:\n')[1].split('\n\n')[0];
  return block.split('\n').map((l) => l.trim().split(/\s+/)[0]);
}

describe('every command: --help, documented output, exit codes', async () => {
  const names = await commandNames();
  it('the list holds the core commands', () => {
    for (const c of ['posterior', 'check', 'sample', 'correlation', 'tune', 'demo']) expect(names).toContain(c);
  });
  it.each(names)('%s --help: usage, the output it prints or writes, the exit codes', async (name) => {
    const r = await runCommand([name, '--help'], dir);
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    expect(r.out).toContain(`Usage: priorscope ${name}`);
    expect(r.out).toMatch(/\b(Prints|prints|Writes|writes)\b/);
    expect(r.out).toMatch(/^Exit codes: 0 ok, 1 internal error [\s\S]*, 2 bad input [\s\S]*, 3 a negative verdict/m);
  });
  it.each(names)('%s with an unknown option: exit 2, one line naming it', async (name) => {
    const r = await runCommand([name, '--no-such-option'], dir);
    expect(r.code).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toBe(`priorscope ${name}: unknown option --no-such-option (see priorscope ${name} --help)\n`);
  });
});

describe('exit codes 0, 1 and 3', () => {
  it.each([
    ['posterior', ['posterior', '--problem', 'p.json', '--prior', 'q.json']],
    ['check', ['check', '--problem', 'p.json', '--prior', 'q.json']],
    ['sample', ['sample', '--problem', 'p.json', '--prior', 'q.json', '--count', '2', '--seed', '1']],
    ['correlation', ['correlation', '--kernel', 'exponential', '--lags', '0,1']],
    ['tune', ['tune', '--problem', 'p.json', '--prior', 'q.json', '--term', '0', '--lengths', '1:10:3', '--variances', '0.01:1:3']],
    ['demo', ['demo', '--list']],
  ])('%s: 0 on good input; 1 with "internal error" when writing the result fails', async (_name, args) => {
    const ok = await runCommand(args, dir);
    expect(ok.code, ok.err).toBe(0);
    expect(() => JSON.parse(ok.out)).not.toThrow();
    const err: string[] = [];
    const failing: Io = {
      stdout: () => {
        throw new Error('EPIPE: broken pipe, write');
      },
      stderr: (line) => err.push(line),
      stdoutIsTTY: false,
      stderrIsTTY: false,
    };
    const previous = process.cwd();
    process.chdir(dir);
    try {
      expect(await main(args, failing)).toBe(1);
    } finally {
      process.chdir(previous);
    }
    expect(err.join('\n')).toMatch(new RegExp(`^priorscope ${args[0]}: internal error: EPIPE: broken pipe, write`, 'm'));
  });
  it('3: check and sample on a covariance proven not positive definite', async () => {
    const c = await runCommand(['check', '--problem', 'p.json', '--prior', 'bad.json'], dir);
    expect(c.code).toBe(3);
    const s = await runCommand(['sample', '--problem', 'p.json', '--prior', 'bad.json', '--count', '1', '--seed', '0'], dir);
    expect(s.code).toBe(3);
    expect(s.err).toMatch(/^priorscope sample: .*not positive definite/);
  });
});
