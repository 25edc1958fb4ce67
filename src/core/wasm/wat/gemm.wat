;; The NT product kernel (assembled by test/tooling/wasm.ts into ../modules.ts).
;;
;; gemmPass(ap, bp, s, tcount, groups, kk, tiles), kk ≥ 1: for one KC-deep pass,
;; S[i][j] = Σ_{p<kk} A[i][p] B[j][p] over 4 × 4 tiles in f64x2 lanes (two columns of S per lane
;; pair), each sum taken from 0 one term at a time, p ascending — an IEEE multiply then an add, no
;; fused multiply-add — exactly the running sums of gemmNT's inner loop (src/core/linalg/kernels.ts),
;; so C += α S in the caller gives gemmNT's results bit for bit. Register and cache blocking: common
;; practice (Goto & van de Geijn 2008, ACM TOMS 34(3), memory).
;;
;; Memory layout (byte addresses passed as i32 arguments; 16-byte aligned):
;;   ap     row group g (rows 4g … 4g+3 of A) at ap + 32·kk·g: A[4g+r][p] at 32p + 8r (rows interleaved);
;;   bp     column tile t (rows 4t … 4t+3 of B) at bp + 32·kk·t: B[4t+q][p] at 32p + 8q;
;;   s      S row-major, row stride 32·tiles bytes;
;;   tcount one i32 per group: how many tiles (from t = 0) the group computes (lower-triangle cut).
;;
;; Names: $accRC sums rows 4g+R, columns 4t+2C, 4t+2C+1; $y0, $y1 the four B values of one p;
;; $lv one A value in both lanes.
(module
  (import "env" "memory" (memory 1))
  (func $gemmPass (export "gemmPass")
      (param $ap i32) (param $bp i32) (param $s i32) (param $tcount i32)
      (param $groups i32) (param $kk i32) (param $tiles i32)
    ;; g, t: group and tile; nt: tiles of group g; panel = 32·kk, the bytes of one packed group
    ;; or tile; rs: row stride of S in bytes; agroup = ap + panel·g; lp … lend: A values of group g;
    ;; bpp: B values of tile t; sRow: S[4g][0]; sAddr: S[4g + r][4t].
    (local $g i32) (local $t i32) (local $nt i32) (local $panel i32) (local $rs i32) (local $agroup i32)
    (local $lp i32) (local $lend i32) (local $bpp i32) (local $sRow i32) (local $sAddr i32)
    (local $acc00 v128) (local $acc01 v128) (local $acc10 v128) (local $acc11 v128) (local $acc20 v128)
    (local $acc21 v128) (local $acc30 v128) (local $acc31 v128) (local $y0 v128) (local $y1 v128)
    (local $lv v128)
    (local.set $panel (i32.shl (local.get $kk) (i32.const 5)))
    (local.set $rs (i32.shl (local.get $tiles) (i32.const 5)))
    (local.set $agroup (local.get $ap))
    (local.set $sRow (local.get $s))
    (local.set $g (i32.const 0))
    (block $noGroups
      (br_if $noGroups (i32.eqz (local.get $groups)))
      (loop $eachGroup
        (local.set $nt (i32.load (i32.add (local.get $tcount) (i32.shl (local.get $g) (i32.const 2)))))
        (block $noTiles
          (br_if $noTiles (i32.eqz (local.get $nt)))
          (local.set $t (i32.const 0))
          (local.set $bpp (local.get $bp))
          (loop $eachTile
            (local.set $acc00 (f64x2.splat (f64.const 0x0p+0 (;=0;))))
            (local.set $acc01 (f64x2.splat (f64.const 0x0p+0 (;=0;))))
            (local.set $acc10 (f64x2.splat (f64.const 0x0p+0 (;=0;))))
            (local.set $acc11 (f64x2.splat (f64.const 0x0p+0 (;=0;))))
            (local.set $acc20 (f64x2.splat (f64.const 0x0p+0 (;=0;))))
            (local.set $acc21 (f64x2.splat (f64.const 0x0p+0 (;=0;))))
            (local.set $acc30 (f64x2.splat (f64.const 0x0p+0 (;=0;))))
            (local.set $acc31 (f64x2.splat (f64.const 0x0p+0 (;=0;))))
            (local.set $lend (i32.add (local.tee $lp (local.get $agroup)) (local.get $panel)))
            ;; acc += A[group, p] ⊗ B[tile, p], p ascending.
            (loop $eachP
              (local.set $y0 (v128.load (local.get $bpp)))
              (local.set $y1 (v128.load offset=16 (local.get $bpp)))
              (local.set $lv (v128.load64_splat (local.get $lp)))
              (local.set $acc00 (f64x2.add (local.get $acc00) (f64x2.mul (local.get $lv) (local.get $y0))))
              (local.set $acc01 (f64x2.add (local.get $acc01) (f64x2.mul (local.get $lv) (local.get $y1))))
              (local.set $lv (v128.load64_splat offset=8 (local.get $lp)))
              (local.set $acc10 (f64x2.add (local.get $acc10) (f64x2.mul (local.get $lv) (local.get $y0))))
              (local.set $acc11 (f64x2.add (local.get $acc11) (f64x2.mul (local.get $lv) (local.get $y1))))
              (local.set $lv (v128.load64_splat offset=16 (local.get $lp)))
              (local.set $acc20 (f64x2.add (local.get $acc20) (f64x2.mul (local.get $lv) (local.get $y0))))
              (local.set $acc21 (f64x2.add (local.get $acc21) (f64x2.mul (local.get $lv) (local.get $y1))))
              (local.set $lv (v128.load64_splat offset=24 (local.get $lp)))
              (local.set $acc30 (f64x2.add (local.get $acc30) (f64x2.mul (local.get $lv) (local.get $y0))))
              (local.set $acc31 (f64x2.add (local.get $acc31) (f64x2.mul (local.get $lv) (local.get $y1))))
              (local.set $lp (i32.add (local.get $lp) (i32.const 32)))
              (local.set $bpp (i32.add (local.get $bpp) (i32.const 32)))
              (br_if $eachP (i32.ne (local.get $lp) (local.get $lend))))
            ;; S[4g + r][4t … 4t+3] = acc[r]; $bpp now points at the next tile.
            (local.set $sAddr (i32.add (local.get $sRow) (i32.shl (local.get $t) (i32.const 5))))
            (v128.store (local.get $sAddr) (local.get $acc00))
            (v128.store offset=16 (local.get $sAddr) (local.get $acc01))
            ;; S[4g + r][4t … 4t+3] = acc[r]; $bpp now points at the next tile.
            (local.set $sAddr (i32.add (local.get $sAddr) (local.get $rs)))
            (v128.store (local.get $sAddr) (local.get $acc10))
            (v128.store offset=16 (local.get $sAddr) (local.get $acc11))
            ;; S[4g + r][4t … 4t+3] = acc[r]; $bpp now points at the next tile.
            (local.set $sAddr (i32.add (local.get $sAddr) (local.get $rs)))
            (v128.store (local.get $sAddr) (local.get $acc20))
            (v128.store offset=16 (local.get $sAddr) (local.get $acc21))
            ;; S[4g + r][4t … 4t+3] = acc[r]; $bpp now points at the next tile.
            (local.set $sAddr (i32.add (local.get $sAddr) (local.get $rs)))
            (v128.store (local.get $sAddr) (local.get $acc30))
            (v128.store offset=16 (local.get $sAddr) (local.get $acc31))
            (local.set $t (i32.add (local.get $t) (i32.const 1)))
            (br_if $eachTile (i32.ne (local.get $t) (local.get $nt)))))
        (local.set $agroup (i32.add (local.get $agroup) (local.get $panel)))
        (local.set $sRow (i32.add (local.get $sRow) (i32.shl (local.get $rs) (i32.const 2))))
        (local.set $g (i32.add (local.get $g) (i32.const 1)))
        (br_if $eachGroup (i32.ne (local.get $g) (local.get $groups)))))))
