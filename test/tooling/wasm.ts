/**
 * Assembles the WebAssembly text of the kernels (src/core/wasm/wat/*.wat) with wabt's wat2wasm
 * (the npm package `wabt`, pinned, dev only) and writes their bytes into src/core/wasm/modules.ts,
 * a committed TypeScript module: the browser bundle, the workers, Node and the command line then
 * load the bytes with no assembler and no build step at call time. test/core/wasm/wat.test.ts
 * reassembles every source and fails when the committed bytes differ.
 *
 *   npm run wasm      rewrite src/core/wasm/modules.ts after editing a .wat file
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import wabt from 'wabt';

export const WAT_DIR = fileURLToPath(new URL('../../src/core/wasm/wat/', import.meta.url));
export const MODULES_FILE = fileURLToPath(new URL('../../src/core/wasm/modules.ts', import.meta.url));

/** Each source and the constant of src/core/wasm/modules.ts that holds its bytes. */
export const WAT_SOURCES = [
  { file: 'probe.wat', constant: 'SIMD_PROBE_WASM' },
  { file: 'variance.wat', constant: 'VARIANCE_WASM' },
  { file: 'gemm.wat', constant: 'GEMM_WASM' },
  { file: 'fft.wat', constant: 'FFT_WASM' },
  { file: 'lagsum.wat', constant: 'LAGSUM_WASM' },
  { file: 'reorth.wat', constant: 'REORTH_WASM' },
] as const;

let wabtModule: ReturnType<typeof wabt> | undefined;

/** The bytes of one .wat file of WAT_DIR, assembled and validated by wabt (SIMD enabled). */
export async function assemble(file: string): Promise<Uint8Array> {
  wabtModule ??= wabt();
  const w = await wabtModule;
  const module = w.parseWat(file, readFileSync(WAT_DIR + file, 'utf8'), { simd: true });
  try {
    module.validate();
    return module.toBinary({}).buffer.slice();
  } finally {
    module.destroy();
  }
}

const BYTES_PER_LINE = 64;

/** The text of src/core/wasm/modules.ts for these assembled sources. */
export function renderModules(modules: readonly { file: string; constant: string; bytes: Uint8Array }[]): string {
  const parts = [
    '/**',
    ' * The bytes of the WebAssembly kernels, assembled from ./wat/*.wat by `npm run wasm`',
    ' * (test/tooling/wasm.ts, wabt). Generated: do not edit; edit the .wat file and run `npm run wasm`.',
    ' * test/core/wasm/wat.test.ts reassembles every source and fails when these bytes differ.',
    ' */',
    '',
  ];
  for (const { file, constant, bytes } of modules) {
    const hex = Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
    const lines: string[] = [];
    for (let i = 0; i < hex.length; i += 2 * BYTES_PER_LINE) lines.push(`  '${hex.slice(i, i + 2 * BYTES_PER_LINE)}',`);
    parts.push(`/** ./wat/${file} (${bytes.length} bytes). */`, `export const ${constant} = bytes([`, ...lines, ']);', '');
  }
  parts.push(
    '/** Decodes hexadecimal text (two digits per byte). */',
    'function bytes(lines: readonly string[]): Uint8Array<ArrayBuffer> {',
    "  const hex = lines.join('');",
    '  const out = new Uint8Array(hex.length / 2);',
    '  for (let i = 0; i < out.length; i++) out[i] = Number.parseInt(hex.slice(2 * i, 2 * i + 2), 16);',
    '  return out;',
    '}',
    '',
  );
  return parts.join('\n');
}

/** Assembles every source and renders the module text. */
export async function buildModules(): Promise<string> {
  const modules = [];
  for (const s of WAT_SOURCES) modules.push({ ...s, bytes: await assemble(s.file) });
  return renderModules(modules);
}

if (process.argv[1] !== undefined && fileURLToPath(import.meta.url) === process.argv[1]) {
  writeFileSync(MODULES_FILE, await buildModules());
  console.log(`wrote ${MODULES_FILE}`);
}
