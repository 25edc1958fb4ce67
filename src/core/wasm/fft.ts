/**
 * The WebAssembly SIMD implementation of the FFT kernel (src/core/fft/engine.ts FftKernel): the
 * module ./wat/fft.wat compiled against its own WebAssembly.Memory. Its JavaScript twin is
 * src/core/fft/stockham.ts; src/core/fft/transform.ts picks one per realm.
 */
import type { FftKernel } from '../fft/engine.ts';
import { FFT_WASM } from './modules.ts';
import { ensureBytes, MEMORY_IMPORT, simdSupported } from './runtime.ts';

type FftFn = FftKernel['fft'];
type ScaleFn = FftKernel['scaleComplex'];

/** A new instance of the kernel, or null when WebAssembly SIMD is missing or compilation is refused. */
export function wasmFftKernel(): FftKernel | null {
  if (!simdSupported()) return null;
  try {
    const memory = new WebAssembly.Memory({ initial: 1 });
    const instance = new WebAssembly.Instance(new WebAssembly.Module(FFT_WASM), {
      [MEMORY_IMPORT.module]: { [MEMORY_IMPORT.name]: memory },
    });
    return {
      implementation: 'webassembly',
      buffer: () => memory.buffer,
      ensure: (bytes) => {
        ensureBytes(memory, bytes);
      },
      fft: instance.exports.fft as FftFn,
      scaleComplex: instance.exports.scaleComplex as ScaleFn,
    };
  } catch {
    return null;
  }
}
