/**
 * Runs a Python reference script (Debian's python3 with numpy/scipy) with JSON on stdin and
 * returns its JSON stdout. `npm test` sets PRIORSCOPE_PYTHON after checking scipy is importable.
 */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

export const referenceDir = dirname(fileURLToPath(import.meta.url));

export function pythonPath(): string {
  const p = process.env.PRIORSCOPE_PYTHON ?? (existsSync('/usr/bin/python3') ? '/usr/bin/python3' : 'python3');
  return p;
}

/** Run test/reference/<script> with `input` as JSON on stdin; parse its stdout as JSON. */
export function runPython<T = unknown>(script: string, input: unknown): T {
  const path = join(referenceDir, script);
  let out: string;
  try {
    out = execFileSync(pythonPath(), [path], {
      input: JSON.stringify(input),
      encoding: 'utf8',
      maxBuffer: 512 * 1024 * 1024,
      stdio: ['pipe', 'pipe', 'pipe'],
    });
  } catch (e) {
    const err = e as { stderr?: string; message: string };
    throw new Error(
      `reference script ${script} failed with ${pythonPath()} (needs Debian's python3-numpy python3-scipy; ` +
        `npm test installs them): ${err.stderr ?? err.message}`,
    );
  }
  return JSON.parse(out) as T;
}
