/**
 * A small WebAssembly binary emitter: enough of the format to write numeric kernels by hand in
 * TypeScript and compile them at run time, with no toolchain.
 *
 * Layout of a module (WebAssembly Core Specification 2.0, §5.5, memory): the magic `\0asm`, version
 * 1, then sections in id order, each `id byte, u32 byte length, contents`. We emit type (1), import
 * (2, one memory), function (3), export (7) and code (10). Instructions (§5.4) are one opcode byte,
 * or the prefix 0xFD followed by a u32-LEB128 sub-opcode for the 128-bit SIMD instructions (so
 * f64x2.add, sub-opcode 240, is the three bytes FD F0 01).
 */
import { float64Bytes, nameBytes, signedLeb128, unsignedLeb128, vectorBytes } from './encoding.ts';

/** Value types (spec §5.3.1). */
export const ValType = { i32: 0x7f, i64: 0x7e, f32: 0x7d, f64: 0x7c, v128: 0x7b } as const;
export type ValType = (typeof ValType)[keyof typeof ValType];

/** Section ids (spec §5.5.2). */
const Section = { type: 1, import: 2, function: 3, export: 7, code: 10 } as const;

/** One-byte opcodes used here (spec §5.4). */
export const Op = {
  block: 0x02,
  loop: 0x03,
  end: 0x0b,
  br: 0x0c,
  brIf: 0x0d,
  drop: 0x1a,
  localGet: 0x20,
  localSet: 0x21,
  localTee: 0x22,
  i32Load: 0x28,
  f64Load: 0x2b,
  f64Store: 0x39,
  i32Const: 0x41,
  f64Const: 0x44,
  i32Eqz: 0x45,
  i32Eq: 0x46,
  i32Ne: 0x47,
  i32LtU: 0x49,
  i32Add: 0x6a,
  i32Sub: 0x6b,
  i32Mul: 0x6c,
  i32Shl: 0x74,
  i32ShrU: 0x76,
  i32And: 0x71,
  i32Or: 0x72,
  select: 0x1b,
  f64Add: 0xa0,
  f64Sub: 0xa1,
  f64Mul: 0xa2,
} as const;

/** The SIMD prefix and the sub-opcodes used here (spec §5.4.8). */
export const SIMD_PREFIX = 0xfd;
export const SimdOp = {
  v128Load: 0x00,
  v128Load64Splat: 0x0a,
  v128Store: 0x0b,
  f64x2Splat: 0x14,
  f64x2Add: 0xf0,
  f64x2Sub: 0xf1,
  f64x2Mul: 0xf2,
  /** i8x16.shuffle: 16 lane-index immediates, each < 32 (lanes of the first operand, then the second). */
  i8x16Shuffle: 0x0d,
} as const;

/** Block type "no result" (spec §5.4.1). */
const BLOCK_EMPTY = 0x40;

/**
 * Builds one function body. Locals are numbered after the parameters; `local(type)` declares one.
 * Instruction methods append bytes and return `this`, so a body reads as a chain of stack operations.
 */
export class FunctionBuilder {
  readonly params: readonly ValType[];
  readonly results: readonly ValType[];
  readonly locals: ValType[] = [];
  private readonly code: number[] = [];
  private depth = 0;

  constructor(params: readonly ValType[], results: readonly ValType[] = []) {
    this.params = params;
    this.results = results;
  }

  /** Declares a new local of `type` and returns its index. */
  local(type: ValType): number {
    this.locals.push(type);
    return this.params.length + this.locals.length - 1;
  }

  private op(...bytes: number[]): this {
    for (const b of bytes) this.code.push(b);
    return this;
  }
  private simd(sub: number, ...imm: number[]): this {
    return this.op(SIMD_PREFIX, ...unsignedLeb128(sub), ...imm);
  }
  /** memarg: log2 of the alignment, then the byte offset (spec §5.4.6). */
  private memarg(alignLog2: number, offset: number): number[] {
    return [...unsignedLeb128(alignLog2), ...unsignedLeb128(offset)];
  }

  get(index: number): this { return this.op(Op.localGet, ...unsignedLeb128(index)); }
  set(index: number): this { return this.op(Op.localSet, ...unsignedLeb128(index)); }
  tee(index: number): this { return this.op(Op.localTee, ...unsignedLeb128(index)); }
  i32Const(value: number): this { return this.op(Op.i32Const, ...signedLeb128(value)); }
  f64Const(value: number): this { return this.op(Op.f64Const, ...float64Bytes(value)); }
  i32Add(): this { return this.op(Op.i32Add); }
  i32Sub(): this { return this.op(Op.i32Sub); }
  i32Mul(): this { return this.op(Op.i32Mul); }
  i32Shl(): this { return this.op(Op.i32Shl); }
  i32Eq(): this { return this.op(Op.i32Eq); }
  i32Ne(): this { return this.op(Op.i32Ne); }
  i32Eqz(): this { return this.op(Op.i32Eqz); }
  i32LtU(): this { return this.op(Op.i32LtU); }
  f64Add(): this { return this.op(Op.f64Add); }
  f64Sub(): this { return this.op(Op.f64Sub); }
  f64Mul(): this { return this.op(Op.f64Mul); }
  drop(): this { return this.op(Op.drop); }
  i32ShrU(): this { return this.op(Op.i32ShrU); }
  i32And(): this { return this.op(Op.i32And); }
  i32Or(): this { return this.op(Op.i32Or); }
  /** `select`: pops c, then b, then a; pushes c ≠ 0 ? a : b. */
  select(): this { return this.op(Op.select); }
  i32Load(offset = 0): this { return this.op(Op.i32Load, ...this.memarg(2, offset)); }
  f64Load(offset = 0): this { return this.op(Op.f64Load, ...this.memarg(3, offset)); }
  f64Store(offset = 0): this { return this.op(Op.f64Store, ...this.memarg(3, offset)); }

  v128Load(offset = 0): this { return this.simd(SimdOp.v128Load, ...this.memarg(4, offset)); }
  v128Store(offset = 0): this { return this.simd(SimdOp.v128Store, ...this.memarg(4, offset)); }
  /** Loads one f64 and copies it into both lanes. */
  v128Load64Splat(offset = 0): this { return this.simd(SimdOp.v128Load64Splat, ...this.memarg(3, offset)); }
  f64x2Splat(): this { return this.simd(SimdOp.f64x2Splat); }
  f64x2Add(): this { return this.simd(SimdOp.f64x2Add); }
  f64x2Sub(): this { return this.simd(SimdOp.f64x2Sub); }
  f64x2Mul(): this { return this.simd(SimdOp.f64x2Mul); }
  /** i8x16.shuffle of the two v128 operands by byte lanes (0–15 first operand, 16–31 second). */
  i8x16Shuffle(lanes: readonly number[]): this {
    if (lanes.length !== 16 || lanes.some((l) => !Number.isInteger(l) || l < 0 || l > 31)) {
      throw new RangeError(`i8x16Shuffle: lanes must be 16 integers in [0, 32), got [${lanes.join(', ')}]`);
    }
    return this.simd(SimdOp.i8x16Shuffle, ...lanes);
  }
  /**
   * Pushes the v128 local `index` with its two f64 lanes swapped, (x0, x1) → (x1, x0): an
   * i8x16.shuffle of the local with itself taking bytes 8–15 then 0–7.
   */
  swappedLanes(index: number): this {
    return this.get(index).get(index).i8x16Shuffle([8, 9, 10, 11, 12, 13, 14, 15, 0, 1, 2, 3, 4, 5, 6, 7]);
  }

  /** `block … end`: `br`/`brIf` with depth 0 inside jumps to its end. */
  block(body: (f: this) => void): this {
    this.op(Op.block, BLOCK_EMPTY);
    this.depth++;
    body(this);
    this.depth--;
    return this.op(Op.end);
  }
  /** `loop … end`: `br`/`brIf` with depth 0 inside jumps back to its start. */
  loop(body: (f: this) => void): this {
    this.op(Op.loop, BLOCK_EMPTY);
    this.depth++;
    body(this);
    this.depth--;
    return this.op(Op.end);
  }
  br(depth: number): this { return this.op(Op.br, ...unsignedLeb128(depth)); }
  brIf(depth: number): this { return this.op(Op.brIf, ...unsignedLeb128(depth)); }

  /** Adds a constant to an i32 local: local += delta. */
  addTo(index: number, delta: number): this {
    return this.get(index).i32Const(delta).i32Add().set(index);
  }

  /** The body as it goes in the code section: size, local declarations, instructions, `end`. */
  encode(): number[] {
    if (this.depth !== 0) throw new Error('FunctionBuilder: unclosed block or loop');
    // Locals are declared as runs of (count, type) (spec §5.5.13).
    const runs: number[][] = [];
    for (let i = 0; i < this.locals.length; ) {
      let k = i;
      while (k < this.locals.length && this.locals[k] === this.locals[i]) k++;
      runs.push([...unsignedLeb128(k - i), this.locals[i]!]);
      i = k;
    }
    const body = [...vectorBytes(runs), ...this.code, Op.end];
    return [...unsignedLeb128(body.length), ...body];
  }
}

/** An exported function of a module. */
export interface ExportedFunction {
  readonly name: string;
  readonly fn: FunctionBuilder;
}

/** What a module holds: optionally an imported memory `module.name` (min pages), and its functions. */
export interface ModuleDefinition {
  readonly memory?: { readonly module: string; readonly name: string; readonly minPages: number };
  readonly functions: readonly ExportedFunction[];
}

function section(id: number, contents: number[]): number[] {
  return [id, ...unsignedLeb128(contents.length), ...contents];
}

/** Encodes a module: one function type per function (duplicates are allowed by the format). */
export function encodeModule(def: ModuleDefinition): Uint8Array<ArrayBuffer> {
  const out: number[] = [0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00];
  const types = def.functions.map(({ fn }) => [0x60, ...vectorBytes(fn.params.map((t) => [t])), ...vectorBytes(fn.results.map((t) => [t]))]);
  out.push(...section(Section.type, vectorBytes(types)));
  if (def.memory) {
    const { module, name, minPages } = def.memory;
    // import: module name, field name, kind 0x02 = memory, limits 0x00 = min only.
    const entry = [...nameBytes(module), ...nameBytes(name), 0x02, 0x00, ...unsignedLeb128(minPages)];
    out.push(...section(Section.import, vectorBytes([entry])));
  }
  out.push(...section(Section.function, vectorBytes(def.functions.map((_, i) => unsignedLeb128(i)))));
  // export: name, kind 0x00 = function, function index (no imported functions, so indices start at 0).
  const exports = def.functions.map(({ name }, i) => [...nameBytes(name), 0x00, ...unsignedLeb128(i)]);
  out.push(...section(Section.export, vectorBytes(exports)));
  out.push(...section(Section.code, vectorBytes(def.functions.map(({ fn }) => fn.encode()))));
  return new Uint8Array(out);
}
