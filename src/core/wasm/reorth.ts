/**
 * The Lanczos basis and its reorthogonalisation in WebAssembly memory, with the SIMD kernel of ./wat/reorth.wat:
 * the same bits as reorthogonaliseTwice in src/core/linalg/eigen.ts (its JavaScript twin), which lanczosExtremes
 * runs instead when this returns null (WebAssembly or its 128-bit SIMD missing, a basis over 1 GB, or the
 * workspace already in use in this realm).
 *
 * The basis lives in the kernel's own memory so that no copy is made per step: q (steps × n) and w (n) are views
 * of it, valid until {@link ReorthWorkspace.release}. One kernel instance per JS realm, created on first use; its
 * memory keeps its largest size (64 MB after a verdict at 64³, the Lanczos storage limit).
 */
import { ensureBytes, instantiateKernel, simdSupported } from './runtime.ts';
import { REORTH_WASM } from './modules.ts';

type KernelFn = (q: number, k: number, stride: number, w: number, h: number, h2: number, n8: number, chunk: number) => void;

/** Columns per chunk (the JavaScript twin's REORTH_CHUNK in src/core/linalg/eigen.ts). */
export const REORTH_CHUNK = 2048;

const MAX_BYTES = 2 ** 30;

let kernel: { memory: WebAssembly.Memory; run: KernelFn } | null | undefined;
let busy = false;

export interface ReorthWorkspace {
  /** The basis, steps × n (row p at p·n). */
  readonly q: Float64Array;
  /** The vector being orthogonalised (n). */
  readonly w: Float64Array;
  /** w ← w − Q(Qᵀw), twice, against the first k rows of q. */
  reorthogonaliseTwice(k: number): void;
  /** Hands the workspace back (the views must not be used after). */
  release(): void;
}

/** A workspace for a basis of `steps` vectors of length n, or null (see the module comment). */
export function wasmReorthWorkspace(n: number, steps: number): ReorthWorkspace | null {
  if (busy || !simdSupported()) return null;
  const qBytes = 8 * n * steps;
  const wAt = (qBytes + 15) & ~15;
  const hAt = (wAt + 8 * n + 15) & ~15;
  const h2At = hAt + 8 * steps;
  const end = h2At + 8 * steps;
  if (end > MAX_BYTES) return null;
  if (kernel === undefined) kernel = instantiateKernel<KernelFn>(REORTH_WASM, 'cgs2');
  if (kernel === null) return null;
  const k = kernel;
  try {
    ensureBytes(k.memory, end);
  } catch {
    return null; // the runtime refused to grow the memory: the JavaScript twin runs instead
  }
  busy = true;
  return {
    q: new Float64Array(k.memory.buffer, 0, n * steps),
    w: new Float64Array(k.memory.buffer, wAt, n),
    reorthogonaliseTwice: (count) => k.run(0, count, 8 * n, wAt, hAt, h2At, 8 * n, 8 * REORTH_CHUNK),
    release: () => {
      busy = false;
    },
  };
}
