/**
 * The WebAssembly module of the posterior-variance kernel, generated with ./emitter.ts.
 *
 * It computes, for row groups g = 0 … groups−1 (rows i0 = 4g … 4g+3) and column tiles of 4,
 * the forward substitution W = L⁻¹ X in place over X and the running sums out_j −= W_ij²
 * (Golub & Van Loan, Matrix Computations, §3.1, memory), in f64x2 lanes (two columns per lane pair):
 *
 *   W_i = (X_i − Σ_{p<i} L_ip W_p) · (1 / L_ii),   the sum taken one term at a time, p ascending;
 *   out_j ← out_j − W_ij², i ascending.
 *
 * Every column gets exactly the operations of the JS kernel structuredVarianceBlock
 * (src/core/inverse/structured.ts) in the same order — an IEEE multiply and a subtract per term, no
 * fused multiply-add — so the results are bit-identical to it and independent of the column split.
 *
 * Memory layout (byte addresses passed as i32 arguments; all 16-byte aligned):
 *   lt   group g holds L[4g+r, p] for p < 4g, r < 4, at lt + 8·(8g(g−1) + 4p + r)
 *        (the rows of the group interleaved by column, so one row of W meets four L values in a row);
 *   diag group g holds 16 doubles at diag + 128g: 1/L_ii for the 4 rows, then L[i0+1,i0],
 *        L[i0+2,i0], L[i0+2,i0+1], L[i0+3,i0], L[i0+3,i0+1], L[i0+3,i0+2] (the 4 × 4 triangle);
 *   x    the block X (rows × wp, row-major, wp a multiple of 4), overwritten by W;
 *   out  wp doubles, prior variances on entry.
 * Rows past the last full group of 4 are left to the caller (src/core/wasm/varianceBlock.ts).
 */
import { encodeModule, FunctionBuilder, ValType } from './emitter.ts';
import { MEMORY_IMPORT } from './runtime.ts';

/** Name of the exported kernel. */
export const VARIANCE_EXPORT = 'variance';

/** Bytes of the kernel module: `variance(lt, diag, x, out, groups, wp)`, all i32, no result. */
export function varianceModuleBytes(): Uint8Array<ArrayBuffer> {
  const { i32, v128 } = ValType;
  const f = new FunctionBuilder([i32, i32, i32, i32, i32, i32]);
  const [pLt, pDiag, pX, pOut, pGroups, pWp] = [0, 1, 2, 3, 4, 5];
  const g = f.local(i32);
  const rs = f.local(i32); // row stride of X in bytes
  const rowBase = f.local(i32); // address of X[i0, 0]
  const ltg = f.local(i32); // start of group g in lt
  const ltEnd = f.local(i32); // end of group g in lt
  const dg = f.local(i32); // diag block of group g
  const tile = f.local(i32); // address of X[i0, j]
  const tileEnd = f.local(i32);
  const outp = f.local(i32);
  const lp = f.local(i32);
  const xp = f.local(i32);
  const rowAddr = [f.local(i32), f.local(i32), f.local(i32), f.local(i32)]; // X[i0+r, j]
  // a[r][c]: rows i0+r, columns j+2c, j+2c+1.
  const a = [0, 1, 2, 3].map(() => [f.local(v128), f.local(v128)]);
  const y = [f.local(v128), f.local(v128)];
  const lv = f.local(v128);

  /** a[r][c] ← a[r][c] − l · v (l and v already on the stack as locals). */
  const subProduct = (r: number, c: number, l: number, v: number) =>
    f.get(a[r]![c]!).get(l).get(v).f64x2Mul().f64x2Sub().set(a[r]![c]!);

  f.get(pWp).i32Const(3).i32Shl().set(rs);
  f.get(pX).set(rowBase);
  f.get(pLt).set(ltg);
  f.get(pDiag).set(dg);
  f.i32Const(0).set(g);
  f.block((f) => {
    f.get(pGroups).i32Eqz().brIf(0);
    f.loop((f) => {
      // Group g: its lt part is 4·4g doubles = 128g bytes.
      f.get(ltg).get(g).i32Const(7).i32Shl().i32Add().set(ltEnd);
      f.get(rowBase).set(tile);
      f.get(rowBase).get(rs).i32Add().set(tileEnd);
      f.get(pOut).set(outp);
      f.loop((f) => {
        // Load the 4 × 4 tile of X.
        for (let r = 0; r < 4; r++) {
          if (r === 0) f.get(tile).set(rowAddr[0]!);
          else f.get(rowAddr[r - 1]!).get(rs).i32Add().set(rowAddr[r]!);
          for (let c = 0; c < 2; c++) f.get(rowAddr[r]!).v128Load(16 * c).set(a[r]![c]!);
        }
        // X[tile] −= L[group, p] · W[p, tile] for p < i0, one p at a time.
        f.get(ltg).set(lp);
        f.get(tile).get(rowBase).i32Sub().get(pX).i32Add().set(xp); // X[0, j]
        f.block((f) => {
          f.get(lp).get(ltEnd).i32Eq().brIf(0);
          f.loop((f) => {
            f.get(xp).v128Load(0).set(y[0]!);
            f.get(xp).v128Load(16).set(y[1]!);
            for (let r = 0; r < 4; r++) {
              f.get(lp).v128Load64Splat(8 * r).set(lv);
              subProduct(r, 0, lv, y[0]!);
              subProduct(r, 1, lv, y[1]!);
            }
            f.addTo(lp, 32);
            f.get(xp).get(rs).i32Add().set(xp);
            f.get(lp).get(ltEnd).i32Ne().brIf(0);
          });
        });
        // The diagonal 4 × 4 triangle: subtract the finished rows above, then scale by 1/L_ii.
        const lower = [[], [4], [5, 6], [7, 8, 9]] as const; // diag slots of L[i0+r, i0+q], q < r
        for (let r = 0; r < 4; r++) {
          lower[r]!.forEach((slot, q) => {
            f.get(dg).v128Load64Splat(8 * slot).set(lv);
            subProduct(r, 0, lv, a[q]![0]!);
            subProduct(r, 1, lv, a[q]![1]!);
          });
          f.get(dg).v128Load64Splat(8 * r).set(lv);
          for (let c = 0; c < 2; c++) f.get(a[r]![c]!).get(lv).f64x2Mul().set(a[r]![c]!);
        }
        // Store W and update out −= W², rows in order.
        for (let r = 0; r < 4; r++) for (let c = 0; c < 2; c++) f.get(rowAddr[r]!).get(a[r]![c]!).v128Store(16 * c);
        for (let c = 0; c < 2; c++) {
          f.get(outp).v128Load(16 * c).set(y[c]!);
          for (let r = 0; r < 4; r++) subProduct4Out(f, y[c]!, a[r]![c]!);
          f.get(outp).get(y[c]!).v128Store(16 * c);
        }
        f.addTo(tile, 32);
        f.addTo(outp, 32);
        f.get(tile).get(tileEnd).i32Ne().brIf(0);
      });
      f.get(ltEnd).set(ltg);
      f.addTo(dg, 128);
      f.get(rowBase).get(rs).i32Const(2).i32Shl().i32Add().set(rowBase);
      f.addTo(g, 1);
      f.get(g).get(pGroups).i32Ne().brIf(0);
    });
  });
  return encodeModule({
    memory: { ...MEMORY_IMPORT, minPages: 1 },
    functions: [{ name: VARIANCE_EXPORT, fn: f }],
  });
}

/** o ← o − w · w. */
function subProduct4Out(f: FunctionBuilder, o: number, w: number): void {
  f.get(o).get(w).get(w).f64x2Mul().f64x2Sub().set(o);
}
