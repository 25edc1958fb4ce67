/**
 * src/cli/bin.mjs chooses between the built bundle and the TypeScript sources. Checked on a copy of the
 * launcher in a temporary package whose bundle and sources are stubs that say which one ran.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, rmSync, symlinkSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeEach, describe, expect, it } from 'vitest';
import { binPath, repoRoot, tempDir } from './run.ts';

let pkg: string;
const stub = (who: string) => `export async function main(argv) { process.stdout.write('${who} ' + argv.join(' ')); return 7; }\n`;

beforeEach(() => {
  pkg = tempDir();
  mkdirSync(join(pkg, 'src', 'cli'), { recursive: true });
  mkdirSync(join(pkg, 'dist-cli'));
  copyFileSync(binPath, join(pkg, 'src', 'cli', 'bin.mjs'));
  symlinkSync(join(repoRoot, 'node_modules'), join(pkg, 'node_modules'));
  writeFileSync(join(pkg, 'package.json'), JSON.stringify({ type: 'module' }));
  writeFileSync(join(pkg, 'src', 'cli', 'main.ts'), stub('sources'));
  writeFileSync(join(pkg, 'dist-cli', 'sources.json'), JSON.stringify(['src/cli/main.ts']));
  writeFileSync(join(pkg, 'dist-cli', 'priorscope.mjs'), stub('bundle'));
  // The bundle is newer than its sources.
  utimesSync(join(pkg, 'src', 'cli', 'main.ts'), 1_000_000, 1_000_000);
});

function run(env: Record<string, string> = {}) {
  const r = spawnSync(process.execPath, [join(pkg, 'src', 'cli', 'bin.mjs'), 'x', '--y'], {
    encoding: 'utf8',
    env: { ...process.env, PRIORSCOPE_CLI_SOURCE: '', ...env },
  });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe('the priorscope launcher (src/cli/bin.mjs)', () => {
  it('runs the bundle when it is newer than every source it lists, passing the arguments and the exit code', () => {
    expect(run()).toEqual({ code: 7, out: 'bundle x --y', err: '' });
  });
  it('runs the sources through tsx, with a note, when a listed source is newer than the bundle', () => {
    utimesSync(join(pkg, 'src', 'cli', 'main.ts'), new Date(), new Date(Date.now() + 60_000));
    const r = run();
    expect(r.out).toBe('sources x --y');
    expect(r.code).toBe(7);
    expect(r.err).toBe(
      'priorscope: running the TypeScript sources through tsx (slower start): src/cli/main.ts is newer than the built command line; `npm run build:cli` builds it\n',
    );
  });
  it('runs the sources with a note when there is no bundle, and silently with PRIORSCOPE_CLI_SOURCE=1', () => {
    rmSync(join(pkg, 'dist-cli'), { recursive: true });
    const r = run();
    expect(r.out).toBe('sources x --y');
    expect(r.err).toContain('no built command line (dist-cli/priorscope.mjs)');
    expect(run({ PRIORSCOPE_CLI_SOURCE: '1' })).toEqual({ code: 7, out: 'sources x --y', err: '' });
  });
  it('an installed package (no sources) without its bundle exits 1 with one line', () => {
    rmSync(join(pkg, 'dist-cli'), { recursive: true });
    rmSync(join(pkg, 'src', 'cli', 'main.ts'));
    const r = run();
    expect(r.code).toBe(1);
    expect(r.err).toBe(
      'priorscope: no built command line (dist-cli/priorscope.mjs), and no sources to run instead; reinstall the package\n',
    );
  });
});
