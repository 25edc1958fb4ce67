/**
 * The WebAssembly text kernels give byte for byte the modules of the run-time emitter they replace.
 */
import { describe, expect, it } from 'vitest';
import { fftModuleBytes } from '../../../src/core/wasm/fftModule.ts';
import { gemmModuleBytes } from '../../../src/core/wasm/gemmModule.ts';
import { FFT_WASM, GEMM_WASM, SIMD_PROBE_WASM, VARIANCE_WASM } from '../../../src/core/wasm/modules.ts';
import { simdProbeBytes } from '../../../src/core/wasm/runtime.ts';
import { varianceModuleBytes } from '../../../src/core/wasm/varianceModule.ts';

describe('.wat kernels vs the emitter', () => {
  it.each([
    ['probe', SIMD_PROBE_WASM, simdProbeBytes],
    ['variance', VARIANCE_WASM, varianceModuleBytes],
    ['gemm', GEMM_WASM, gemmModuleBytes],
    ['fft', FFT_WASM, fftModuleBytes],
  ] as const)('%s: identical bytes', (_, wat, emitted) => {
    expect(Array.from(wat)).toEqual(Array.from(emitted()));
  });
});
