/**
 * Runs `priorscope` for the command-line tests, two ways with one result shape: `runCommand` calls
 * main() in this process through an injected Io (fast: no process start, no tsx load; most tests), and
 * `runCli` spawns the real binary (node src/cli/bin.mjs, on the sources) for the few tests that check the process
 * itself (the bin entry, exit codes and bytes on the real stdout/stderr).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Io } from '../../src/cli/commands.ts';
import { main } from '../../src/cli/main.ts';

export const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const binPath = join(repoRoot, 'src/cli/bin.mjs');

export interface RunResult {
  readonly code: number | null;
  readonly stdout: Buffer;
  readonly out: string;
  readonly err: string;
}

/** The binary on the TypeScript sources (PRIORSCOPE_CLI_SOURCE=1: never a stale dist-cli bundle); test/cli/install.test.ts runs the built one. */
export function runCli(args: readonly string[], cwd: string): RunResult {
  const r = spawnSync(process.execPath, [binPath, ...args], {
    cwd,
    maxBuffer: 256 * 1024 * 1024,
    env: { ...process.env, PRIORSCOPE_DEBUG: '', PRIORSCOPE_CLI_SOURCE: '1' },
  });
  return { code: r.status, stdout: r.stdout, out: r.stdout.toString('utf8'), err: r.stderr.toString('utf8') };
}

/**
 * main(args) in this process, in directory `cwd` (relative paths resolve as they would for the binary;
 * the previous directory is restored afterwards), with stdout and stderr collected as the binary's
 * would be: stderr lines end in a newline, as processIo() writes them. Neither stream is a terminal.
 */
export async function runCommand(args: readonly string[], cwd: string): Promise<RunResult> {
  const out: Buffer[] = [];
  const err: string[] = [];
  const io: Io = {
    stdout: (content) => {
      out.push(typeof content === 'string' ? Buffer.from(content, 'utf8') : Buffer.from(content));
    },
    stderr: (line) => {
      err.push(line.endsWith('\n') ? line : line + '\n');
    },
    stdoutIsTTY: false,
    stderrIsTTY: false,
  };
  const previous = process.cwd();
  process.chdir(cwd);
  let code: number;
  try {
    code = await main(args, io);
  } finally {
    process.chdir(previous);
  }
  const stdout = Buffer.concat(out);
  return { code, stdout, out: stdout.toString('utf8'), err: err.join('') };
}

export function tempDir(): string {
  return mkdtempSync(join(tmpdir(), 'priorscope-cli-'));
}

/** Write files (JSON objects are stringified) into `dir`. */
export function writeFiles(dir: string, files: Record<string, unknown>): void {
  for (const [name, content] of Object.entries(files)) {
    const data = typeof content === 'string' || content instanceof Uint8Array ? content : JSON.stringify(content);
    writeFileSync(join(dir, name), data);
  }
}
