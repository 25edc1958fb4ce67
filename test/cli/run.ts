/** Spawns the real `priorscope` binary (node src/cli/bin.mjs) in a directory and collects its output. */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const binPath = join(repoRoot, 'src/cli/bin.mjs');

export interface RunResult {
  readonly code: number | null;
  readonly stdout: Buffer;
  readonly out: string;
  readonly err: string;
}

export function runCli(args: readonly string[], cwd: string): RunResult {
  const r = spawnSync(process.execPath, [binPath, ...args], { cwd, maxBuffer: 256 * 1024 * 1024, env: { ...process.env, PRIORSCOPE_DEBUG: '' } });
  return { code: r.status, stdout: r.stdout, out: r.stdout.toString('utf8'), err: r.stderr.toString('utf8') };
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
