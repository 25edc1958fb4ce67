/**
 * The built command line (`npm run build:cli`, run by `prepare`, so `npm install` / `npm ci` / `npm pack`
 * produce it): src/cli/main.ts and the thread pool's worker (src/core/parallel/nodeWorkerMain.ts) bundled
 * for Node into dist-cli/ (git-ignored), so `priorscope` starts without compiling TypeScript.
 * src/cli/bin.mjs runs dist-cli/priorscope.mjs; dist-cli/sources.json lists the source files in the
 * bundle, with which bin.mjs notices a bundle older than the sources in a checkout.
 */
import { relative } from 'node:path';
import { defineConfig, type Plugin } from 'vite';

/** Writes sources.json: the repository-relative paths of every module in the bundle. */
function sourceList(): Plugin {
  return {
    name: 'priorscope-cli-sources',
    generateBundle(_options, bundle) {
      const files = new Set<string>();
      for (const chunk of Object.values(bundle)) {
        if (chunk.type !== 'chunk') continue;
        for (const id of Object.keys(chunk.modules)) {
          if (id.startsWith(process.cwd()) && !id.includes('node_modules') && !id.includes('\0')) files.add(relative(process.cwd(), id));
        }
      }
      this.emitFile({ type: 'asset', fileName: 'sources.json', source: JSON.stringify([...files].sort(), null, 1) });
    },
  };
}

export default defineConfig({
  publicDir: false,
  logLevel: 'warn',
  define: { __PRIORSCOPE_CLI_BUNDLE__: 'true' },
  ssr: { noExternal: true, target: 'node' },
  plugins: [sourceList()],
  build: {
    ssr: true,
    target: 'node20',
    outDir: 'dist-cli',
    emptyOutDir: true,
    minify: false,
    copyPublicDir: false,
    rollupOptions: {
      input: { priorscope: 'src/cli/main.ts', 'pool-worker': 'src/core/parallel/nodeWorkerMain.ts' },
      output: { format: 'es', entryFileNames: '[name].mjs', chunkFileNames: 'shared-[hash].mjs' },
    },
  },
});
