/**
 * Files only where the user put them: sibling files named in a
 * problem file are read only inside its folder (symbolic links resolved) unless --read-from allows
 * another; FIFOs and devices are refused without hanging; a file's contents are never echoed.
 * Runs in process through the injectable Io (test/cli/run.ts).
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readInputFile } from '../../src/cli/files.ts';
import { runCommand, tempDir } from './run.ts';

const PRIOR = { kind: 'priorscope.prior', version: 1, mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 2 }] };

function setup(operatorFile: string): { dir: string; outside: string } {
  const root = tempDir();
  const dir = join(root, 'case');
  const outside = join(root, 'elsewhere');
  mkdirSync(dir);
  mkdirSync(outside);
  const problem = {
    kind: 'priorscope.problem',
    version: 1,
    grid: { shape: [3], spacing: [1] },
    operator: { file: operatorFile },
    data: { values: [1, 2], sigma: [0.1, 0.1] },
  };
  writeFileSync(join(dir, 'p.json'), JSON.stringify(problem));
  writeFileSync(join(dir, 'q.json'), JSON.stringify(PRIOR));
  const secret = 'SECRET-ROW-1,SECRET-ROW-2,SECRET-ROW-3\n1,0,0\n0,1,0\n';
  writeFileSync(join(outside, 'G.csv'), secret);
  writeFileSync(join(dir, 'G.csv'), '1.5,0,0\n0,1,0\n');
  return { dir, outside };
}

const check = (dir: string, extra: string[] = []) => runCommand(['check', '--problem', 'p.json', '--prior', 'q.json', ...extra], dir);

describe('sibling files stay inside the problem folder', () => {
  it('reads a sibling in the folder', async () => {
    const { dir } = setup('G.csv');
    const r = await check(dir);
    expect(r.code).toBe(0);
  });

  it.each([
    ['../elsewhere/G.csv', 'relative path out of the folder'],
    ['ABS', 'absolute path'],
    ['link.csv', 'symbolic link to a file outside'],
  ])('refuses %s (%s), without echoing the file', async (name, _what) => {
    const { dir, outside } = setup('PLACEHOLDER');
    const target = join(outside, 'G.csv');
    const operatorFile = name === 'ABS' ? target : name;
    if (name === 'link.csv') symlinkSync(target, join(dir, 'link.csv'));
    const problem = JSON.parse(readFileSync(join(dir, 'p.json'), 'utf8'));
    problem.operator.file = operatorFile;
    writeFileSync(join(dir, 'p.json'), JSON.stringify(problem));
    const r = await check(dir);
    expect(r.code).toBe(2);
    expect(r.err).toContain("lies outside the problem file's folder");
    expect(r.err).toContain('--read-from');
    expect(r.err).not.toContain('SECRET');
    expect(r.err.trim().split('\n')).toHaveLength(1);
    // The explicit option allows it (its first row is then reported as a header).
    const allowed = await check(dir, ['--read-from', outside]);
    expect(allowed.code).toBe(0);
    expect(allowed.err).toContain('read as a header');
  });

  it('a symbolic link to /etc/passwd is refused without reading it', async () => {
    const { dir } = setup('pw.csv');
    symlinkSync('/etc/passwd', join(dir, 'pw.csv'));
    const r = await check(dir);
    expect(r.code).toBe(2);
    expect(r.err).toContain('(it resolves to /etc/passwd)');
    expect(r.err).not.toContain('root:');
  });
});

describe('only regular files, size limit enforced while reading', () => {
  it('a FIFO is refused at once (no hang), a device too', async () => {
    const { dir } = setup('fifo.csv');
    execFileSync('mkfifo', [join(dir, 'fifo.csv')]);
    const r = await check(dir);
    expect(r.code).toBe(2);
    expect(r.err).toContain('is not a regular file');
    expect(() => readInputFile('/dev/zero')).toThrow('/dev/zero: cannot be read: it is not a regular file (a pipe, device or socket)');
    expect(() => readInputFile(join(dir, 'fifo.csv'), 'f.csv')).toThrow('f.csv: cannot be read: it is not a regular file');
  });

  it('the problem file itself may not be a FIFO either', async () => {
    const dir = tempDir();
    execFileSync('mkfifo', [join(dir, 'p.json')]);
    writeFileSync(join(dir, 'q.json'), JSON.stringify(PRIOR));
    const r = await check(dir);
    expect(r.code).toBe(2);
    expect(r.err).toContain('p.json: cannot be read: it is not a regular file');
  });
});

describe('cost decided before computing', () => {
  it('--path dense on 100,000 cells says the dense route cannot hold it and which route can (exit 2, no internal error)', async () => {
    const dir = tempDir();
    // 1000 × 100 cells, one datum reading cell 0 (sparse, so the file stays small).
    const problem = {
      kind: 'priorscope.problem',
      version: 1,
      grid: { shape: [1000, 100], spacing: [1, 1] },
      operator: { sparse: { rows: [0], cols: [0], values: [1] } },
      data: { values: [1], sigma: [0.1] },
    };
    writeFileSync(join(dir, 'p.json'), JSON.stringify(problem));
    writeFileSync(join(dir, 'q.json'), JSON.stringify(PRIOR));
    const r = await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json', '--path', 'dense'], dir);
    expect(r.code).toBe(2);
    expect(r.err.trim()).toBe(
      'priorscope posterior: --path must be "fft" or "auto" (the FFT route holds no N × N matrix) for 100000 cells: the dense route holds Cm as an N × N matrix (75 GiB here) and is limited to 16384 cells, got "dense"',
    );
  });
});

describe('data × cells and map size limits', () => {
  it('1,000 data on 10⁶ cells is refused before computing, with the limit (exit 2)', async () => {
    const dir = tempDir();
    const m = 1000;
    const problem = {
      kind: 'priorscope.problem',
      version: 1,
      grid: { shape: [1000, 1000], spacing: [1, 1] },
      operator: {
        sparse: {
          rows: Array.from({ length: m }, (_, i) => i),
          cols: Array.from({ length: m }, (_, i) => i * 7),
          values: Array(m).fill(1),
        },
      },
      data: { values: Array(m).fill(1), sigma: Array(m).fill(0.1) },
    };
    writeFileSync(join(dir, 'p.json'), JSON.stringify(problem));
    writeFileSync(join(dir, 'q.json'), JSON.stringify(PRIOR));
    const r = await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json'], dir);
    expect(r.code).toBe(2);
    expect(r.err.trim()).toBe(
      'priorscope posterior: data must be at most 268435456 data × cells (G Cm is held as M × N doubles, 2 GiB at the limit; here 1000 data × 1000000 cells, 7.5 GiB; use fewer data or a coarser grid), got 1000000000',
    );
  });

  it('tune refuses a map beyond 10⁶ cells before loading the files', async () => {
    const dir = tempDir();
    const r = await runCommand(
      ['tune', '--problem', 'missing.json', '--prior', 'q.json', '--term', '0', '--lengths', '1:10:2000', '--variances', '1:10:1000'],
      dir,
    );
    expect(r.code).toBe(2);
    expect(r.err).toContain('the evidence map would have 2000 × 1000 = 2000000 cells, more than the limit of 1000000');
  });
});
