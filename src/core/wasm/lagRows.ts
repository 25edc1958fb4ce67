/**
 * Rows of Bᵀ by direct sums over a lag table with the WebAssembly SIMD kernel of ./wat/lagsum.wat: the same
 * contract, arguments and results (bit for bit) as lagRowsInto's JavaScript loop in
 * src/core/inverse/lagProducts.ts, which calls this first and runs its own loop when it returns false
 * (WebAssembly or its 128-bit SIMD missing).
 *
 * One kernel instance (module, instance, WebAssembly.Memory) per JS realm — each worker has its own — created on
 * first use. The table is copied in once and kept resident while the same table values are passed again; per
 * row, its weights and offsets are copied in and the row copied out.
 */
import { ensureBytes, instantiateKernel, simdSupported } from './runtime.ts';
import { LAGSUM_WASM } from './modules.ts';

type KernelFn = (
  tab: number,
  wts: number,
  offs: number,
  count: number,
  out: number,
  nx: number,
  ny: number,
  nz: number,
  sx: number,
  sxy: number,
) => void;

interface Kernel {
  readonly memory: WebAssembly.Memory;
  readonly run: KernelFn;
  /** The table values resident at offset 0, and their length. */
  residentFrom: Float64Array | null;
}

let kernel: Kernel | null | undefined; // undefined: not tried yet; null: unavailable

function getKernel(): Kernel | null {
  if (!simdSupported()) return null;
  if (kernel === undefined) {
    const k = instantiateKernel<KernelFn>(LAGSUM_WASM, 'lagRow');
    kernel = k === null ? null : { ...k, residentFrom: null };
  }
  return kernel;
}

/** The grid and table of {@link wasmLagRows}. */
export interface LagRowsGrid {
  readonly nx: number;
  readonly ny: number;
  readonly nz: number;
  /** The lag table (src/core/prior/lag.ts layout, (2nx − 1)(2ny − 1)(2nz − 1) values). */
  readonly table: Float64Array;
}

const align16 = (bytes: number) => (bytes + 15) & ~15;

/**
 * For each row r (0 … rowCount − 1), out row = Σ_e w[e] T[off[e] + lag of the cell], e over
 * entries start[r] … start[r + 1] − 1, written to bt at offset slotOffsets[r] (see lagRowsInto). False, and
 * nothing written, when the kernel is unavailable or its memory cannot grow to hold the table and a row.
 */
export function wasmLagRows(
  grid: LagRowsGrid,
  weights: Float64Array,
  offsets: Int32Array,
  start: Int32Array,
  rowCount: number,
  bt: Float64Array,
  slotOffsets: Int32Array,
): boolean {
  const k = getKernel();
  if (k === null) return false;
  const { nx, ny, nz, table } = grid;
  const n = nx * ny * nz;
  let longest = 0;
  for (let r = 0; r < rowCount; r++) longest = Math.max(longest, start[r + 1] - start[r]);
  const wts = align16(8 * table.length);
  const offs = align16(wts + 8 * longest);
  const out = align16(offs + 4 * longest);
  try {
    if (ensureBytes(k.memory, out + 8 * n)) k.residentFrom = null;
  } catch {
    return false; // the runtime refused to grow the memory: the JavaScript loop runs instead
  }
  const f = new Float64Array(k.memory.buffer);
  const ints = new Int32Array(k.memory.buffer);
  if (k.residentFrom !== table) {
    f.set(table, 0);
    k.residentFrom = table;
  }
  const sx = 2 * nx - 1;
  const sxy = sx * (2 * ny - 1);
  const out0 = out / 8;
  for (let r = 0; r < rowCount; r++) {
    const e0 = start[r];
    const count = start[r + 1] - e0;
    f.set(weights.subarray(e0, e0 + count), wts / 8);
    // The kernel takes byte offsets into the table.
    for (let i = 0, o = offs / 4; i < count; i++) ints[o + i] = 8 * offsets[e0 + i];
    k.run(0, wts, offs, count, out, nx, ny, nz, sx, sxy);
    bt.set(f.subarray(out0, out0 + n), slotOffsets[r]);
  }
  return true;
}
