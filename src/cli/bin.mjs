#!/usr/bin/env node
// The `priorscope` command (package.json "bin"). Runs the built command line, dist-cli/priorscope.mjs
// (vite.cli.config.ts; `npm install`, `npm ci` and `npm pack` build it through the "prepare" script), so
// no TypeScript is compiled at call time. In a checkout without that build, or where a source file
// is newer than it (dist-cli/sources.json lists them), it runs the sources through tsx's loader
// instead and says so on stderr. PRIORSCOPE_CLI_SOURCE=1 runs the sources without a word (the tests'
// runCli does, so they test the sources as edited). src/cli/main.ts holds the commands.
import { existsSync, readFileSync, statSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../../', import.meta.url));
const bundle = new URL('../../dist-cli/priorscope.mjs', import.meta.url);

/** Why the bundle cannot be used ('' when it can). Only a checkout (sources present) is checked for staleness. */
function bundleProblem() {
  if (!existsSync(bundle)) return 'no built command line (dist-cli/priorscope.mjs)';
  if (!existsSync(new URL('./main.ts', import.meta.url))) return '';
  const built = statSync(bundle).mtimeMs;
  let sources;
  try {
    sources = JSON.parse(readFileSync(new URL('../../dist-cli/sources.json', import.meta.url), 'utf8'));
  } catch {
    return 'dist-cli/sources.json is missing';
  }
  for (const f of sources) {
    let t;
    try {
      t = statSync(root + f).mtimeMs;
    } catch {
      return `${f} is gone since the build`;
    }
    if (t > built) return `${f} is newer than the built command line`;
  }
  return '';
}

const fromSource = process.env.PRIORSCOPE_CLI_SOURCE === '1';
const problem = fromSource ? 'PRIORSCOPE_CLI_SOURCE=1' : bundleProblem();
let main;
if (problem === '') {
  ({ main } = await import(bundle.href));
} else {
  if (!existsSync(new URL('./main.ts', import.meta.url))) {
    process.stderr.write(`priorscope: ${problem}, and no sources to run instead; reinstall the package\n`);
    process.exit(1);
  }
  if (!fromSource) {
    process.stderr.write(
      `priorscope: running the TypeScript sources through tsx (slower start): ${problem}; \`npm run build:cli\` builds it\n`,
    );
  }
  const { register } = await import('tsx/esm/api');
  register();
  ({ main } = await import('./main.ts'));
}
process.exitCode = await main(process.argv.slice(2));
