/**
 * The command as a user installs it: `npm pack` in the checkout (its "prepare" script bundles the command
 * line into dist-cli/), `npm install -g --prefix TMP` of the tarball, then the installed `priorscope` run
 * from another folder: `--help`, and a posterior split over two worker threads (the bundle's
 * pool-worker.mjs entry), byte-identical to the same command run from the sources in this process.
 * Slow (packing and installing): the one test of its kind.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { repoRoot, runCommand, tempDir } from './run.ts';

describe('packed tarball installed into a temporary prefix', () => {
  it('packs with the bundle, installs, and runs --help and posterior from another folder', { timeout: 300_000 }, async () => {
    const work = tempDir();
    const packed = execFileSync('npm', ['pack', '--silent', '--pack-destination', work], { cwd: repoRoot, encoding: 'utf8' })
      .trim()
      .split('\n')
      .pop()!;
    const tarball = join(work, packed);
    expect(existsSync(tarball), packed).toBe(true);
    const listing = execFileSync('tar', ['-tzf', tarball], { encoding: 'utf8' }).split('\n');
    expect(listing).toContain('package/dist-cli/priorscope.mjs');
    expect(listing).toContain('package/dist-cli/pool-worker.mjs');
    // Only the bundle and the launcher: no TypeScript sources, no tests.
    expect(listing.filter((f) => f.endsWith('.ts'))).toEqual([]);

    const prefix = join(work, 'prefix');
    // --offline: the package has no dependencies (the command line is one bundle), so it installs without a registry.
    execFileSync(
      'npm',
      ['install', '-g', '--prefix', prefix, '--ignore-scripts', '--offline', '--no-audit', '--no-fund', '--silent', tarball],
      {
        cwd: work,
        encoding: 'utf8',
      },
    );
    const bin = join(prefix, 'bin', 'priorscope');
    const installed = join(prefix, 'lib', 'node_modules', 'priorscope');
    expect(existsSync(join(installed, 'node_modules'))).toBe(false);

    const elsewhere = tempDir();
    const env = { ...process.env, PRIORSCOPE_CLI_SOURCE: '', PRIORSCOPE_DEBUG: '' };
    const help = spawnSync(bin, ['--help'], { cwd: elsewhere, encoding: 'utf8', env });
    expect(help.status, help.stderr).toBe(0);
    expect(help.stderr).toBe(''); // no "running the TypeScript sources" note: the bundle ran
    for (const c of ['posterior', 'check', 'sample', 'tune', 'demo']) expect(help.stdout).toMatch(new RegExp(`^  ${c} `, 'm'));

    const demo = spawnSync(bin, ['demo', 'crosshole-tomography', '--out', 'p.json', '--prior', 'q.json'], {
      cwd: elsewhere,
      encoding: 'utf8',
      env,
    });
    expect(demo.status, demo.stderr).toBe(0);
    const args = ['posterior', '--problem', 'p.json', '--prior', 'q.json', '--threads', '2'];
    const post = spawnSync(bin, args, { cwd: elsewhere, env, maxBuffer: 1 << 26 });
    expect(post.status, post.stderr.toString()).toBe(0);
    const j = JSON.parse(post.stdout.toString('utf8')) as { path: string; mean: number[]; logEvidence: number };
    expect(j.path).toBe('fft');
    expect(Number.isFinite(j.logEvidence)).toBe(true);
    const fromSources = await runCommand(args, elsewhere);
    expect(fromSources.code, fromSources.err).toBe(0);
    expect(post.stdout.equals(fromSources.stdout)).toBe(true);
    expect(JSON.parse(readFileSync(join(elsewhere, 'p.json'), 'utf8')).kind).toBe('priorscope.problem');
  });
});
