/**
 * The emitter's instructions, run by the engine (V8 follows the WebAssembly Core Specification):
 * each SIMD op against the IEEE arithmetic of plain JS on the same numbers, the control flow
 * against a JS loop. A wrong opcode byte makes validation fail or the numbers differ.
 */
import { describe, expect, it } from 'vitest';
import { encodeModule, FunctionBuilder, ValType } from '../../../src/core/wasm/emitter.ts';

const { i32, f64 } = ValType;

function instantiate(functions: { name: string; fn: FunctionBuilder }[]) {
  const memory = new WebAssembly.Memory({ initial: 1 });
  const bytes = encodeModule({ memory: { module: 'env', name: 'memory', minPages: 1 }, functions });
  expect(WebAssembly.validate(bytes)).toBe(true);
  const inst = new WebAssembly.Instance(new WebAssembly.Module(bytes), { env: { memory } });
  return { memory, exports: inst.exports as Record<string, (...a: number[]) => number> };
}

describe('emitter', () => {
  it('f64x2 load / store / add / sub / mul / splat / load64_splat match JS arithmetic lane by lane', () => {
    const f = new FunctionBuilder([]);
    const x = f.local(ValType.v128);
    const y = f.local(ValType.v128);
    f.i32Const(0).v128Load(0).set(x);
    f.i32Const(0).v128Load(16).set(y);
    f.i32Const(32).get(x).get(y).f64x2Add().v128Store(0);
    f.i32Const(48).get(x).get(y).f64x2Sub().v128Store(0);
    f.i32Const(64).get(x).get(y).f64x2Mul().v128Store(0);
    f.i32Const(80).i32Const(8).v128Load64Splat(0).v128Store(0);
    f.i32Const(96).f64Const(-0.1).f64x2Splat().v128Store(0);
    const { memory, exports } = instantiate([{ name: 'run', fn: f }]);
    const m = new Float64Array(memory.buffer);
    const [a0, a1, b0, b1] = [Math.PI, -1e-300, Math.E, 3e7 / 7];
    m.set([a0, a1, b0, b1]);
    exports.run!();
    expect(Array.from(m.subarray(4, 14))).toEqual([a0 + b0, a1 + b1, a0 - b0, a1 - b1, a0 * b0, a1 * b1, a1, a1, -0.1, -0.1]);
  });

  it('block / loop / br_if, locals, f64 load and add: sum of n doubles equals a JS loop', () => {
    const f = new FunctionBuilder([i32, i32], [f64]); // (address, n) → Σ
    const s = f.local(f64);
    const end = f.local(i32);
    f.get(0).get(1).i32Const(3).i32Shl().i32Add().set(end);
    f.block((f) => {
      f.get(1).i32Eqz().brIf(0);
      f.loop((f) => {
        f.get(s).get(0).f64Load(0).f64Add().set(s);
        f.addTo(0, 8);
        f.get(0).get(end).i32LtU().brIf(0);
      });
    });
    f.get(s);
    const { memory, exports } = instantiate([{ name: 'sum', fn: f }]);
    const m = new Float64Array(memory.buffer);
    const v = Array.from({ length: 37 }, (_, i) => Math.sin(i) * 10 ** (i % 5));
    m.set(v, 2);
    let js = 0;
    for (const t of v) js += t;
    expect(exports.sum!(16, 37)).toBe(js);
    expect(exports.sum!(16, 0)).toBe(0);
  });

  it('refuses to encode an unclosed block', () => {
    const f = new FunctionBuilder([]);
    expect(() => f.block(() => f.encode())).toThrow(/unclosed/);
  });
});
