/**
 * Shared plumbing of the WebAssembly kernels: the SIMD probe, compiling a kernel module (its bytes
 * from ./modules.ts, assembled from ./wat/*.wat) against its own WebAssembly.Memory, and growing that
 * memory. One instance per kernel per JS realm (each worker has its own), created on first use.
 */
import { SIMD_PROBE_WASM } from './modules.ts';

/** Every kernel module imports its memory as `env.memory`. */
export const MEMORY_IMPORT = { module: 'env', name: 'memory' } as const;

const PAGE = 65536;

/** A compiled kernel: its memory and its exported function. */
export interface KernelInstance<F> {
  readonly memory: WebAssembly.Memory;
  readonly run: F;
}

let forcedOff = false;
let simd: boolean | undefined;

/** Whether this realm has WebAssembly with 128-bit SIMD. */
export function simdSupported(): boolean {
  if (forcedOff) return false;
  if (simd === undefined) {
    try {
      simd = typeof WebAssembly === 'object' && WebAssembly.validate(SIMD_PROBE_WASM);
    } catch {
      simd = false;
    }
  }
  return simd;
}

/** Test hook: pretend WebAssembly is missing (true), or probe again (false). */
export function forceWasmOffForTesting(off: boolean): void {
  forcedOff = off;
  simd = undefined;
}

/**
 * Compiles `bytes` (synchronously: small modules only) against a fresh one-page memory; null when
 * SIMD is missing or compilation is refused (e.g. a page CSP without 'wasm-unsafe-eval').
 */
export function instantiateKernel<F>(bytes: Uint8Array<ArrayBuffer>, exportName: string): KernelInstance<F> | null {
  if (!simdSupported()) return null;
  try {
    const memory = new WebAssembly.Memory({ initial: 1 });
    const instance = new WebAssembly.Instance(new WebAssembly.Module(bytes), {
      [MEMORY_IMPORT.module]: { [MEMORY_IMPORT.name]: memory },
    });
    return { memory, run: instance.exports[exportName] as F };
  } catch {
    return null;
  }
}

/** Grows `memory` to hold at least `bytes`; true when it grew (old typed-array views are then stale). */
export function ensureBytes(memory: WebAssembly.Memory, bytes: number): boolean {
  const need = Math.ceil(bytes / PAGE);
  const have = memory.buffer.byteLength / PAGE;
  if (need <= have) return false;
  memory.grow(need - have);
  return true;
}
