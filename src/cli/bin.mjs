#!/usr/bin/env node
// The `priorscope` command (package.json "bin"). Runs the TypeScript sources directly through
// tsx's ESM loader, so there is no build step; see src/cli/main.ts for the commands.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('./main.ts');
process.exitCode = await main(process.argv.slice(2));
