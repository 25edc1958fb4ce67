#!/usr/bin/env node
// `npm test`: finds or installs what the suites need, then runs the linter, the type check, the Vitest suites
// (unit tests and the outside-reference checks against Debian's python3-scipy) and the Playwright
// suite in Chromium. Prints one closing line "N passed, N failed".
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync } from 'node:fs';
import { homedir } from 'node:os';
import { join } from 'node:path';

const env = { ...process.env };
const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
const hasAptGet = commandPath('apt-get') !== null;
let aptUpdated = false;

function commandPath(name) {
  const r = spawnSync('sh', ['-c', `command -v ${name}`], { encoding: 'utf8' });
  return r.status === 0 ? r.stdout.trim() : null;
}

function fail(line) {
  console.error(`\npriorscope test: ${line}`);
  console.log('0 passed, 1 failed');
  process.exit(1);
}

function aptInstall(packages) {
  if (!isRoot || !hasAptGet) return false;
  console.error(`priorscope test: installing ${packages.join(' ')} with apt-get …`);
  const opts = { stdio: ['ignore', 'ignore', 'inherit'], env: { ...env, DEBIAN_FRONTEND: 'noninteractive' } };
  if (!aptUpdated) {
    spawnSync('apt-get', ['update', '-qq'], opts);
    aptUpdated = true;
  }
  return spawnSync('apt-get', ['install', '-y', '-qq', ...packages], opts).status === 0;
}

function findChromium() {
  if (env.CHROMIUM_PATH && existsSync(env.CHROMIUM_PATH)) return env.CHROMIUM_PATH;
  for (const name of ['chromium', 'chromium-browser']) {
    const p = commandPath(name);
    if (p) return p;
  }
  const cache = join(homedir(), '.cache', 'ms-playwright');
  if (existsSync(cache)) {
    for (const dir of readdirSync(cache)
      .filter((d) => d.startsWith('chromium'))
      .sort()
      .reverse()) {
      for (const rel of ['chrome-linux/chrome', 'chrome-linux64/chrome']) {
        const p = join(cache, dir, rel);
        if (existsSync(p)) return p;
      }
    }
  }
  return null;
}

function pythonHasScipy(python) {
  return (
    spawnSync(python, ['-c', 'import numpy, scipy.special, scipy.linalg, scipy.stats, sklearn.gaussian_process'], { stdio: 'ignore' })
      .status === 0
  );
}

// Chromium for the Playwright suite.
let chromium = findChromium();
if (!chromium && aptInstall(['chromium'])) chromium = findChromium();
if (!chromium) fail("no Chromium found: install Debian's chromium (apt-get install -y chromium) or set CHROMIUM_PATH");
env.CHROMIUM_PATH = chromium;

// Debian's python3 with numpy and scipy for the outside-reference checks.
let python = env.PRIORSCOPE_PYTHON || (existsSync('/usr/bin/python3') ? '/usr/bin/python3' : commandPath('python3'));
if (!python || !pythonHasScipy(python)) {
  if (aptInstall(['python3', 'python3-numpy', 'python3-scipy', 'python3-sklearn'])) python = '/usr/bin/python3';
}
if (!python || !pythonHasScipy(python)) {
  fail(
    "python3 with numpy, scipy and sklearn not found: install Debian's python3-numpy python3-scipy python3-sklearn (or set PRIORSCOPE_PYTHON)",
  );
}
env.PRIORSCOPE_PYTHON = python;

// GNU parallel for the sharded-calibration test (test/cli/shard.test.ts runs shards through it).
if (!commandPath('parallel')) aptInstall(['parallel']);
if (!commandPath('parallel')) fail("GNU parallel not found: install Debian's parallel (apt-get install -y parallel)");
console.error(`priorscope test: Chromium ${chromium}, Python ${python}`);

const steps = [
  ['lint and format check (biome check, rules in biome.json)', 'npx', ['biome', 'check', '--error-on-warnings', '.']],
  ['type check (tsc --noEmit)', 'npx', ['tsc', '--noEmit', '-p', 'tsconfig.json']],
  ['unit and reference suites (vitest)', 'npx', ['vitest', 'run']],
  ['browser suite (playwright, chromium)', 'npx', ['playwright', 'test']],
];
let passed = 0;
let failed = 0;
for (const [title, cmd, args] of steps) {
  console.error(`\n=== ${title}`);
  const r = spawnSync(cmd, args, { stdio: 'inherit', env });
  if (r.status === 0) passed++;
  else {
    failed++;
    console.error(`priorscope test: step failed: ${title}`);
  }
}
console.log(`\nsteps: ${passed} passed, ${failed} failed`);
process.exit(failed === 0 ? 0 : 1);
