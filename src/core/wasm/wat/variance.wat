;; The posterior-variance kernel (assembled by test/tooling/wasm.ts into ../modules.ts).
;;
;; variance(lt, diag, x, out, groups, wp, rows): for row groups g = 0 … groups−1 (rows i0 = 4g … 4g+3) and
;; column tiles of 4, the forward substitution W = L⁻¹ X in place over X and the running sums
;; out_j −= W_ij² (Golub & Van Loan, Matrix Computations, §3.1, memory), in f64x2 lanes (two
;; columns per lane pair):
;;
;;   W_i = (X_i − Σ_{p<i} L_ip W_p) · (1 / L_ii),   the sum taken one term at a time, p ascending;
;;   out_j ← out_j − W_ij², i ascending.
;;
;; Every column gets exactly the operations of the JS kernel structuredVarianceBlock
;; (src/core/inverse/varianceBlock.ts) in the same order — an IEEE multiply and a subtract per term,
;; no fused multiply-add — so the results are bit-identical to it and independent of the column split.
;;
;; Memory layout (byte addresses passed as i32 arguments; all 16-byte aligned):
;;   lt   group g holds L[4g+r, p] for p < 4g, r < 4, at lt + 8·(8g(g−1) + 4p + r)
;;        (the rows of the group interleaved by column, so one row of W meets four L values in a row);
;;   diag group g holds 16 doubles at diag + 128g: 1/L_ii for the 4 rows, then L[i0+1,i0],
;;        L[i0+2,i0], L[i0+2,i0+1], L[i0+3,i0], L[i0+3,i0+1], L[i0+3,i0+2] (the 4 × 4 triangle);
;;   x    the block X (rows × wp, wp a multiple of 4) in column tiles of 4, overwritten by W: tile t (columns
;;        4t … 4t+3) holds its rows one after another, X[r, 4t + c] at x + 8·(4·rows·t + 4r + c). The sum over
;;        earlier rows then reads one tile's strip in order (two rows per cache line) instead of a new line per
;;        row at the row stride, and the strip and the group's L panel (16 KB each at 500 rows) fit the 32 KB
;;        first-level cache together. Measured at M = 500, N = 8,000 (one thread): 108 ms → 96–98 ms;
;;   out  wp doubles, prior variances on entry.
;; Rows past the last full group of 4 are left to the caller (src/core/wasm/varianceBlock.ts).
;;
;; Names: $aRC holds rows i0+R, columns j+2C, j+2C+1 of the current 4 × 4 tile; $rowR the address
;; of X[i0+R, j]; $lv one L value in both lanes.
(module
  (import "env" "memory" (memory 1))
  (func $variance (export "variance")
      (param $lt i32) (param $diag i32) (param $x i32) (param $out i32) (param $groups i32) (param $wp i32) (param $rows i32)
    ;; g: group; rs: row stride of X in bytes (within a tile, 32); ts: tile stride (32·rows); rowBase: X[i0, 0]; ltg … ltEnd: group g in lt;
    ;; dg: diag block of group g; tile … tileEnd: X[i0, j] over the tiles; outp: out[j]; lp, xp: the
    ;; L value and the row of W met in the sum over earlier rows.
    (local $g i32) (local $rs i32) (local $rowBase i32) (local $ltg i32) (local $ltEnd i32) (local $dg i32)
    (local $tile i32) (local $tileEnd i32) (local $outp i32) (local $lp i32) (local $xp i32) (local $row0 i32)
    (local $row1 i32) (local $row2 i32) (local $row3 i32) (local $ts i32) (local $a00 v128) (local $a01 v128)
    (local $a10 v128) (local $a11 v128) (local $a20 v128) (local $a21 v128) (local $a30 v128)
    (local $a31 v128) (local $y0 v128) (local $y1 v128) (local $lv v128)
    (local.set $rs (i32.const 32))
    (local.set $ts (i32.shl (local.get $rows) (i32.const 5)))
    (local.set $rowBase (local.get $x))
    (local.set $ltg (local.get $lt))
    (local.set $dg (local.get $diag))
    (local.set $g (i32.const 0))
    (block $noGroups
      (br_if $noGroups (i32.eqz (local.get $groups)))
      (loop $eachGroup
        ;; Group g: its part of lt is 4·4g doubles = 128g bytes.
        (local.set $ltEnd (i32.add (local.get $ltg) (i32.shl (local.get $g) (i32.const 7))))
        (local.set $tile (local.get $rowBase))
        (local.set $tileEnd (i32.add (local.get $rowBase) (i32.mul (i32.shr_u (local.get $wp) (i32.const 2)) (local.get $ts))))
        (local.set $outp (local.get $out))
        (loop $eachTile
          ;; Load the 4 × 4 tile of X.
          (local.set $row0 (local.get $tile))
          (local.set $a00 (v128.load (local.get $row0)))
          (local.set $a01 (v128.load offset=16 (local.get $row0)))
          (local.set $row1 (i32.add (local.get $row0) (local.get $rs)))
          (local.set $a10 (v128.load (local.get $row1)))
          (local.set $a11 (v128.load offset=16 (local.get $row1)))
          (local.set $row2 (i32.add (local.get $row1) (local.get $rs)))
          (local.set $a20 (v128.load (local.get $row2)))
          (local.set $a21 (v128.load offset=16 (local.get $row2)))
          (local.set $row3 (i32.add (local.get $row2) (local.get $rs)))
          (local.set $a30 (v128.load (local.get $row3)))
          (local.set $a31 (v128.load offset=16 (local.get $row3)))
          ;; X[tile] −= L[group, p] · W[p, tile] for p < i0, one p at a time ($xp: W[p, j]).
          (local.set $lp (local.get $ltg))
          (local.set $xp (i32.add (i32.sub (local.get $tile) (local.get $rowBase)) (local.get $x)))
          (block $firstGroup
            (br_if $firstGroup (i32.eq (local.get $lp) (local.get $ltEnd)))
            (loop $eachEarlierRow
              (local.set $y0 (v128.load (local.get $xp)))
              (local.set $y1 (v128.load offset=16 (local.get $xp)))
              (local.set $lv (v128.load64_splat (local.get $lp)))
              (local.set $a00 (f64x2.sub (local.get $a00) (f64x2.mul (local.get $lv) (local.get $y0))))
              (local.set $a01 (f64x2.sub (local.get $a01) (f64x2.mul (local.get $lv) (local.get $y1))))
              (local.set $lv (v128.load64_splat offset=8 (local.get $lp)))
              (local.set $a10 (f64x2.sub (local.get $a10) (f64x2.mul (local.get $lv) (local.get $y0))))
              (local.set $a11 (f64x2.sub (local.get $a11) (f64x2.mul (local.get $lv) (local.get $y1))))
              (local.set $lv (v128.load64_splat offset=16 (local.get $lp)))
              (local.set $a20 (f64x2.sub (local.get $a20) (f64x2.mul (local.get $lv) (local.get $y0))))
              (local.set $a21 (f64x2.sub (local.get $a21) (f64x2.mul (local.get $lv) (local.get $y1))))
              (local.set $lv (v128.load64_splat offset=24 (local.get $lp)))
              (local.set $a30 (f64x2.sub (local.get $a30) (f64x2.mul (local.get $lv) (local.get $y0))))
              (local.set $a31 (f64x2.sub (local.get $a31) (f64x2.mul (local.get $lv) (local.get $y1))))
              (local.set $lp (i32.add (local.get $lp) (i32.const 32)))
              (local.set $xp (i32.add (local.get $xp) (local.get $rs)))
              (br_if $eachEarlierRow (i32.ne (local.get $lp) (local.get $ltEnd)))))
          ;; The diagonal 4 × 4 triangle: subtract the finished rows above, then scale by 1/L_ii.
          (local.set $lv (v128.load64_splat (local.get $dg)))
          (local.set $a00 (f64x2.mul (local.get $a00) (local.get $lv)))
          (local.set $a01 (f64x2.mul (local.get $a01) (local.get $lv)))
          (local.set $lv (v128.load64_splat offset=32 (local.get $dg)))
          (local.set $a10 (f64x2.sub (local.get $a10) (f64x2.mul (local.get $lv) (local.get $a00))))
          (local.set $a11 (f64x2.sub (local.get $a11) (f64x2.mul (local.get $lv) (local.get $a01))))
          (local.set $lv (v128.load64_splat offset=8 (local.get $dg)))
          (local.set $a10 (f64x2.mul (local.get $a10) (local.get $lv)))
          (local.set $a11 (f64x2.mul (local.get $a11) (local.get $lv)))
          (local.set $lv (v128.load64_splat offset=40 (local.get $dg)))
          (local.set $a20 (f64x2.sub (local.get $a20) (f64x2.mul (local.get $lv) (local.get $a00))))
          (local.set $a21 (f64x2.sub (local.get $a21) (f64x2.mul (local.get $lv) (local.get $a01))))
          (local.set $lv (v128.load64_splat offset=48 (local.get $dg)))
          (local.set $a20 (f64x2.sub (local.get $a20) (f64x2.mul (local.get $lv) (local.get $a10))))
          (local.set $a21 (f64x2.sub (local.get $a21) (f64x2.mul (local.get $lv) (local.get $a11))))
          (local.set $lv (v128.load64_splat offset=16 (local.get $dg)))
          (local.set $a20 (f64x2.mul (local.get $a20) (local.get $lv)))
          (local.set $a21 (f64x2.mul (local.get $a21) (local.get $lv)))
          (local.set $lv (v128.load64_splat offset=56 (local.get $dg)))
          (local.set $a30 (f64x2.sub (local.get $a30) (f64x2.mul (local.get $lv) (local.get $a00))))
          (local.set $a31 (f64x2.sub (local.get $a31) (f64x2.mul (local.get $lv) (local.get $a01))))
          (local.set $lv (v128.load64_splat offset=64 (local.get $dg)))
          (local.set $a30 (f64x2.sub (local.get $a30) (f64x2.mul (local.get $lv) (local.get $a10))))
          (local.set $a31 (f64x2.sub (local.get $a31) (f64x2.mul (local.get $lv) (local.get $a11))))
          (local.set $lv (v128.load64_splat offset=72 (local.get $dg)))
          (local.set $a30 (f64x2.sub (local.get $a30) (f64x2.mul (local.get $lv) (local.get $a20))))
          (local.set $a31 (f64x2.sub (local.get $a31) (f64x2.mul (local.get $lv) (local.get $a21))))
          (local.set $lv (v128.load64_splat offset=24 (local.get $dg)))
          (local.set $a30 (f64x2.mul (local.get $a30) (local.get $lv)))
          (local.set $a31 (f64x2.mul (local.get $a31) (local.get $lv)))
          ;; Store W, then out −= W², rows in order.
          (v128.store (local.get $row0) (local.get $a00))
          (v128.store offset=16 (local.get $row0) (local.get $a01))
          (v128.store (local.get $row1) (local.get $a10))
          (v128.store offset=16 (local.get $row1) (local.get $a11))
          (v128.store (local.get $row2) (local.get $a20))
          (v128.store offset=16 (local.get $row2) (local.get $a21))
          (v128.store (local.get $row3) (local.get $a30))
          (v128.store offset=16 (local.get $row3) (local.get $a31))
          (local.set $y0 (v128.load (local.get $outp)))
          (local.set $y0 (f64x2.sub (local.get $y0) (f64x2.mul (local.get $a00) (local.get $a00))))
          (local.set $y0 (f64x2.sub (local.get $y0) (f64x2.mul (local.get $a10) (local.get $a10))))
          (local.set $y0 (f64x2.sub (local.get $y0) (f64x2.mul (local.get $a20) (local.get $a20))))
          (local.set $y0 (f64x2.sub (local.get $y0) (f64x2.mul (local.get $a30) (local.get $a30))))
          (v128.store (local.get $outp) (local.get $y0))
          (local.set $y1 (v128.load offset=16 (local.get $outp)))
          (local.set $y1 (f64x2.sub (local.get $y1) (f64x2.mul (local.get $a01) (local.get $a01))))
          (local.set $y1 (f64x2.sub (local.get $y1) (f64x2.mul (local.get $a11) (local.get $a11))))
          (local.set $y1 (f64x2.sub (local.get $y1) (f64x2.mul (local.get $a21) (local.get $a21))))
          (local.set $y1 (f64x2.sub (local.get $y1) (f64x2.mul (local.get $a31) (local.get $a31))))
          (v128.store offset=16 (local.get $outp) (local.get $y1))
          (local.set $tile (i32.add (local.get $tile) (local.get $ts)))
          (local.set $outp (i32.add (local.get $outp) (i32.const 32)))
          (br_if $eachTile (i32.ne (local.get $tile) (local.get $tileEnd))))
        ;; Next group: lt, diag and X move on by one group of 4 rows.
        (local.set $ltg (local.get $ltEnd))
        (local.set $dg (i32.add (local.get $dg) (i32.const 128)))
        (local.set $rowBase (i32.add (local.get $rowBase) (i32.shl (local.get $rs) (i32.const 2))))
        (local.set $g (i32.add (local.get $g) (i32.const 1)))
        (br_if $eachGroup (i32.ne (local.get $g) (local.get $groups)))))))
