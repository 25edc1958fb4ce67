/**
 * The committed kernel bytes (src/core/wasm/modules.ts) against their WebAssembly text
 * (src/core/wasm/wat/*.wat): reassembled with wabt from npm (the generator's assembler) and, as an
 * outside check, with Debian's /usr/bin/wat2wasm (the wabt package, a separate build) when it is
 * installed. A .wat edited without `npm run wasm`, or a hand edit of modules.ts, fails here.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { FFT_WASM, GEMM_WASM, LAGSUM_WASM, REORTH_WASM, SIMD_PROBE_WASM, VARIANCE_WASM } from '../../../src/core/wasm/modules.ts';
import { assemble, buildModules, MODULES_FILE, WAT_DIR, WAT_SOURCES } from '../../tooling/wasm.ts';

const DEBIAN_WAT2WASM = '/usr/bin/wat2wasm';

const COMMITTED: Record<(typeof WAT_SOURCES)[number]['constant'], Uint8Array<ArrayBuffer>> = {
  SIMD_PROBE_WASM,
  VARIANCE_WASM,
  GEMM_WASM,
  FFT_WASM,
  LAGSUM_WASM,
  REORTH_WASM,
};

describe('WebAssembly text → committed bytes', () => {
  it.each(WAT_SOURCES)('$file reassembles (wabt, npm) to the committed $constant, which validates', async ({ file, constant }) => {
    const committed = COMMITTED[constant];
    expect(Array.from(await assemble(file))).toEqual(Array.from(committed));
    expect(WebAssembly.validate(committed)).toBe(true);
  });

  it('src/core/wasm/modules.ts is exactly what `npm run wasm` writes', async () => {
    expect(readFileSync(MODULES_FILE, 'utf8')).toBe(await buildModules());
  });

  it.skipIf(!existsSync(DEBIAN_WAT2WASM)).each(WAT_SOURCES)('$file: Debian wat2wasm gives the same bytes', ({ file, constant }) => {
    const out = join(mkdtempSync(join(tmpdir(), 'wat-')), 'out.wasm');
    const run = spawnSync(DEBIAN_WAT2WASM, [WAT_DIR + file, '-o', out], { encoding: 'utf8' });
    expect(run.status, run.stderr).toBe(0);
    expect(Array.from(readFileSync(out))).toEqual(Array.from(COMMITTED[constant]));
  });
});
