/**
 * The WebAssembly module of the NT product kernel, generated with ./emitter.ts: for one KC-deep
 * pass, S[i][j] = Σ_{p<kk} A[i][p] B[j][p] over 4 × 4 tiles in f64x2 lanes (two columns of S per
 * lane pair), each sum taken from 0 one term at a time, p ascending — an IEEE multiply then an add,
 * no fused multiply-add — exactly the running sums of gemmNT's inner loop (src/core/linalg/kernels.ts),
 * so C += α S in the caller gives gemmNT's results bit for bit. Register and cache blocking: common
 * practice (Goto & van de Geijn 2008, ACM TOMS 34(3), memory).
 *
 * Memory layout (byte addresses passed as i32 arguments; 16-byte aligned):
 *   ap     row group g (rows 4g … 4g+3 of A) at ap + 32·kk·g: A[4g+r][p] at 32p + 8r (rows interleaved);
 *   bp     column tile t (rows 4t … 4t+3 of B) at bp + 32·kk·t: B[4t+q][p] at 32p + 8q;
 *   s      S row-major, row stride 32·tiles bytes;
 *   tcount one i32 per group: how many tiles (from t = 0) the group computes (lower-triangle cut).
 */
import { encodeModule, FunctionBuilder, ValType } from './emitter.ts';
import { MEMORY_IMPORT } from './runtime.ts';

/** Name of the exported kernel. */
export const GEMM_EXPORT = 'gemmPass';

/** Bytes of the kernel module: `gemmPass(ap, bp, s, tcount, groups, kk, tiles)`, all i32 (kk ≥ 1). */
export function gemmModuleBytes(): Uint8Array<ArrayBuffer> {
  const { i32, v128 } = ValType;
  const f = new FunctionBuilder([i32, i32, i32, i32, i32, i32, i32]);
  const [pAp, pBp, pS, pTcount, pGroups, pKk, pTiles] = [0, 1, 2, 3, 4, 5, 6];
  const g = f.local(i32);
  const t = f.local(i32);
  const nt = f.local(i32); // tiles of group g
  const panel = f.local(i32); // 32·kk: bytes of one packed group or tile
  const rs = f.local(i32); // row stride of S in bytes
  const agroup = f.local(i32); // ap + panel·g
  const lp = f.local(i32);
  const lend = f.local(i32);
  const bpp = f.local(i32);
  const sRow = f.local(i32); // address of S[4g][0]
  const sAddr = f.local(i32);
  const acc = [0, 1, 2, 3].map(() => [f.local(v128), f.local(v128)]);
  const y = [f.local(v128), f.local(v128)];
  const lv = f.local(v128);

  f.get(pKk).i32Const(5).i32Shl().set(panel);
  f.get(pTiles).i32Const(5).i32Shl().set(rs);
  f.get(pAp).set(agroup);
  f.get(pS).set(sRow);
  f.i32Const(0).set(g);
  f.block((f) => {
    f.get(pGroups).i32Eqz().brIf(0);
    f.loop((f) => {
      f.get(pTcount).get(g).i32Const(2).i32Shl().i32Add().i32Load(0).set(nt);
      f.block((f) => {
        f.get(nt).i32Eqz().brIf(0);
        f.i32Const(0).set(t);
        f.get(pBp).set(bpp);
        f.loop((f) => {
          for (const row of acc) for (const a of row) f.f64Const(0).f64x2Splat().set(a);
          f.get(agroup).tee(lp).get(panel).i32Add().set(lend);
          f.loop((f) => {
            f.get(bpp).v128Load(0).set(y[0]!);
            f.get(bpp).v128Load(16).set(y[1]!);
            for (let r = 0; r < 4; r++) {
              f.get(lp).v128Load64Splat(8 * r).set(lv);
              for (let c = 0; c < 2; c++) f.get(acc[r]![c]!).get(lv).get(y[c]!).f64x2Mul().f64x2Add().set(acc[r]![c]!);
            }
            f.addTo(lp, 32);
            f.addTo(bpp, 32);
            f.get(lp).get(lend).i32Ne().brIf(0);
          });
          // S[4g + r][4t … 4t+3] = acc[r]; bpp now points at the next tile.
          f.get(sRow).get(t).i32Const(5).i32Shl().i32Add().set(sAddr);
          for (let r = 0; r < 4; r++) {
            for (let c = 0; c < 2; c++) f.get(sAddr).get(acc[r]![c]!).v128Store(16 * c);
            if (r < 3) f.get(sAddr).get(rs).i32Add().set(sAddr);
          }
          f.addTo(t, 1);
          f.get(t).get(nt).i32Ne().brIf(0);
        });
      });
      f.get(agroup).get(panel).i32Add().set(agroup);
      f.get(sRow).get(rs).i32Const(2).i32Shl().i32Add().set(sRow);
      f.addTo(g, 1);
      f.get(g).get(pGroups).i32Ne().brIf(0);
    });
  });
  return encodeModule({ memory: { ...MEMORY_IMPORT, minPages: 1 }, functions: [{ name: GEMM_EXPORT, fn: f }] });
}
