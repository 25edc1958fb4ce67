// worker_threads entry of the thread pool (./node.ts) when running from the TypeScript sources:
// registers tsx's loader, then runs ./nodeWorkerMain.ts (the built command line starts its bundled
// twin, dist-cli/pool-worker.mjs, instead).
import { register } from 'tsx/esm/api';

register();
await import('./nodeWorkerMain.ts');
