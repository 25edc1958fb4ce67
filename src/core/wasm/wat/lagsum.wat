;; The lag-table product kernel (assembled by test/tooling/wasm.ts into ../modules.ts).
;;
;; lagRow(tab, wts, offs, count, out, nx, ny, nz, sx, sxy): one row of Bᵀ by direct sums,
;;   out[ix + nx·(iy + ny·iz)] = Σ_e wts[e] · T[offs[e]/8 + ix + sx·iy + sxy·iz],
;; over the cells of an nx × ny × nz grid, where T (at byte address tab) is the covariance at every lag of the
;; grid (src/core/prior/lag.ts layout: lag (dx, dy, dz) at (dx + nx − 1) + sx·(dy + ny − 1) + sxy·(dz + nz − 1))
;; and offs[e] = 8·((nx − 1 − ax) + sx·(ny − 1 − ay) + sxy·(nz − 1 − az)) for the entry's cell (ax, ay, az).
;; Each output is summed from 0 one entry at a time, e ascending — an IEEE multiply then an add, no fused
;; multiply-add — exactly the loop of lagRowsInto in src/core/inverse/lagProducts.ts, bit for bit.
;; Register blocking: 16 x of a grid line in eight f64x2 accumulators while the entries stream past (loads need
;; no alignment). The x past the 16-blocks go four lines at a time (pairs of x in four f64x2 accumulators, then
;; the last x of odd lines in four f64 sums), so that four independent sums follow each entry instead of one
;; chain of dependent adds: at 20³ with 500 rays the rows take 28 ms instead of 32 ms. Lines past the last whole
;; group of four take their own pairs, then their odd last x.
;;
;; Memory (byte addresses as i32 arguments): weights at wts (f64 × count), byte offsets into T at offs
;; (i32 × count), the row at out (f64 × nx·ny·nz). sx, sxy in elements of T.
(module
  (import "env" "memory" (memory 1))
  (func $lagRow (export "lagRow")
      (param $tab i32) (param $wts i32) (param $offs i32) (param $count i32) (param $out i32)
      (param $nx i32) (param $ny i32) (param $nz i32) (param $sx i32) (param $sxy i32)
    ;; iy, iz: grid line; line: T address of the line's lag origin (tab + 8·(sx·iy + sxy·iz)); o: the output
    ;; line; x: byte offset along the line; bytes: bytes of a line; base: line + x; wp, op: the entry's weight
    ;; and offset; end: past the last offset; p: the entry's T address for this x; q: out address for this x.
    (local $iy i32) (local $iz i32) (local $line i32) (local $o i32) (local $x i32) (local $bytes i32)
    (local $base i32) (local $wp i32) (local $op i32) (local $end i32) (local $p i32) (local $q i32)
    (local $full i32) (local $lstep i32) (local $p1 i32) (local $p2 i32) (local $p3 i32) (local $o0 i32)
    (local $s1 f64) (local $s2 f64) (local $s3 f64)
    (local $w v128) (local $a0 v128) (local $a1 v128) (local $a2 v128) (local $a3 v128) (local $a4 v128) (local $a5 v128) (local $a6 v128) (local $a7 v128) (local $s f64)
    (local.set $bytes (i32.shl (local.get $nx) (i32.const 3)))
    (local.set $end (i32.add (local.get $offs) (i32.shl (local.get $count) (i32.const 2))))
    ;; Lines in whole groups of 4 (their x past the 16-blocks are summed four lines at a time) and the T stride of a line.
    (local.set $full (i32.and (local.get $ny) (i32.const -4)))
    (local.set $lstep (i32.shl (local.get $sx) (i32.const 3)))
    (local.set $o (local.get $out))
    (local.set $iz (i32.const 0))
    (loop $eachZ
      (local.set $iy (i32.const 0))
      (loop $eachY
        (local.set $line
          (i32.add (local.get $tab)
            (i32.shl
              (i32.add (i32.mul (local.get $sx) (local.get $iy)) (i32.mul (local.get $sxy) (local.get $iz)))
              (i32.const 3))))
        (local.set $x (i32.const 0))
        ;; 16 x at a time.
        (block $sixteensDone
          (loop $eachSixteen
            (br_if $sixteensDone (i32.gt_u (i32.add (local.get $x) (i32.const 128)) (local.get $bytes)))
            (local.set $base (i32.add (local.get $line) (local.get $x)))
            (local.set $a0 (f64x2.splat (f64.const 0)))
            (local.set $a1 (f64x2.splat (f64.const 0)))
            (local.set $a2 (f64x2.splat (f64.const 0)))
            (local.set $a3 (f64x2.splat (f64.const 0)))
            (local.set $a4 (f64x2.splat (f64.const 0)))
            (local.set $a5 (f64x2.splat (f64.const 0)))
            (local.set $a6 (f64x2.splat (f64.const 0)))
            (local.set $a7 (f64x2.splat (f64.const 0)))
            (local.set $wp (local.get $wts))
            (local.set $op (local.get $offs))
            (block $entriesDone
              (loop $eachEntry
                (br_if $entriesDone (i32.eq (local.get $op) (local.get $end)))
                (local.set $w (v128.load64_splat (local.get $wp)))
                (local.set $p (i32.add (local.get $base) (i32.load (local.get $op))))
                (local.set $a0 (f64x2.add (local.get $a0) (f64x2.mul (local.get $w) (v128.load offset=0 (local.get $p)))))
                (local.set $a1 (f64x2.add (local.get $a1) (f64x2.mul (local.get $w) (v128.load offset=16 (local.get $p)))))
                (local.set $a2 (f64x2.add (local.get $a2) (f64x2.mul (local.get $w) (v128.load offset=32 (local.get $p)))))
                (local.set $a3 (f64x2.add (local.get $a3) (f64x2.mul (local.get $w) (v128.load offset=48 (local.get $p)))))
                (local.set $a4 (f64x2.add (local.get $a4) (f64x2.mul (local.get $w) (v128.load offset=64 (local.get $p)))))
                (local.set $a5 (f64x2.add (local.get $a5) (f64x2.mul (local.get $w) (v128.load offset=80 (local.get $p)))))
                (local.set $a6 (f64x2.add (local.get $a6) (f64x2.mul (local.get $w) (v128.load offset=96 (local.get $p)))))
                (local.set $a7 (f64x2.add (local.get $a7) (f64x2.mul (local.get $w) (v128.load offset=112 (local.get $p)))))
                (local.set $wp (i32.add (local.get $wp) (i32.const 8)))
                (local.set $op (i32.add (local.get $op) (i32.const 4)))
                (br $eachEntry)))
            (local.set $q (i32.add (local.get $o) (local.get $x)))
            (v128.store offset=0 (local.get $q) (local.get $a0))
            (v128.store offset=16 (local.get $q) (local.get $a1))
            (v128.store offset=32 (local.get $q) (local.get $a2))
            (v128.store offset=48 (local.get $q) (local.get $a3))
            (v128.store offset=64 (local.get $q) (local.get $a4))
            (v128.store offset=80 (local.get $q) (local.get $a5))
            (v128.store offset=96 (local.get $q) (local.get $a6))
            (v128.store offset=112 (local.get $q) (local.get $a7))
            (local.set $x (i32.add (local.get $x) (i32.const 128)))
            (br $eachSixteen)))
        (if (i32.lt_u (local.get $iy) (local.get $full))
          (then
            ;; The x past the 16-blocks of the last four lines (iy − 3 … iy), once the fourth is reached: four lines'
            ;; sums per entry are independent, where one line's pair is a chain of dependent adds. Each output is
            ;; still summed one entry at a time, e ascending.
            (if (i32.eq (i32.and (local.get $iy) (i32.const 3)) (i32.const 3))
              (then
                (local.set $o0 (i32.sub (local.get $o) (i32.mul (local.get $bytes) (i32.const 3))))
                (block $groupPairsDone
                  (loop $eachGroupPair
                    (br_if $groupPairsDone (i32.gt_u (i32.add (local.get $x) (i32.const 16)) (local.get $bytes)))
                    (local.set $base (i32.add (i32.sub (local.get $line) (i32.mul (local.get $lstep) (i32.const 3))) (local.get $x)))
                    (local.set $a0 (f64x2.splat (f64.const 0)))
                    (local.set $a1 (f64x2.splat (f64.const 0)))
                    (local.set $a2 (f64x2.splat (f64.const 0)))
                    (local.set $a3 (f64x2.splat (f64.const 0)))
                    (local.set $wp (local.get $wts))
                    (local.set $op (local.get $offs))
                    (block $entriesDone4
                      (loop $eachEntry4
                        (br_if $entriesDone4 (i32.eq (local.get $op) (local.get $end)))
                        (local.set $w (v128.load64_splat (local.get $wp)))
                        (local.set $p (i32.add (local.get $base) (i32.load (local.get $op))))
                        (local.set $p1 (i32.add (local.get $p) (local.get $lstep)))
                        (local.set $p2 (i32.add (local.get $p1) (local.get $lstep)))
                        (local.set $p3 (i32.add (local.get $p2) (local.get $lstep)))
                        (local.set $a0 (f64x2.add (local.get $a0) (f64x2.mul (local.get $w) (v128.load (local.get $p)))))
                        (local.set $a1 (f64x2.add (local.get $a1) (f64x2.mul (local.get $w) (v128.load (local.get $p1)))))
                        (local.set $a2 (f64x2.add (local.get $a2) (f64x2.mul (local.get $w) (v128.load (local.get $p2)))))
                        (local.set $a3 (f64x2.add (local.get $a3) (f64x2.mul (local.get $w) (v128.load (local.get $p3)))))
                        (local.set $wp (i32.add (local.get $wp) (i32.const 8)))
                        (local.set $op (i32.add (local.get $op) (i32.const 4)))
                        (br $eachEntry4)))
                    (local.set $q (i32.add (local.get $o0) (local.get $x)))
                    (v128.store (local.get $q) (local.get $a0))
                    (local.set $q (i32.add (local.get $q) (local.get $bytes)))
                    (v128.store (local.get $q) (local.get $a1))
                    (local.set $q (i32.add (local.get $q) (local.get $bytes)))
                    (v128.store (local.get $q) (local.get $a2))
                    (local.set $q (i32.add (local.get $q) (local.get $bytes)))
                    (v128.store (local.get $q) (local.get $a3))
                    (local.set $x (i32.add (local.get $x) (i32.const 16)))
                    (br $eachGroupPair)))
                ;; The last x of odd lines, four lines at a time.
                (if (i32.lt_u (local.get $x) (local.get $bytes))
                  (then
                    (local.set $base (i32.add (i32.sub (local.get $line) (i32.mul (local.get $lstep) (i32.const 3))) (local.get $x)))
                    (local.set $s (f64.const 0))
                    (local.set $s1 (f64.const 0))
                    (local.set $s2 (f64.const 0))
                    (local.set $s3 (f64.const 0))
                    (local.set $wp (local.get $wts))
                    (local.set $op (local.get $offs))
                    (block $entriesDone4s
                      (loop $eachEntry4s
                        (br_if $entriesDone4s (i32.eq (local.get $op) (local.get $end)))
                        (local.set $p (i32.add (local.get $base) (i32.load (local.get $op))))
                        (local.set $p1 (i32.add (local.get $p) (local.get $lstep)))
                        (local.set $p2 (i32.add (local.get $p1) (local.get $lstep)))
                        (local.set $p3 (i32.add (local.get $p2) (local.get $lstep)))
                        (local.set $s (f64.add (local.get $s) (f64.mul (f64.load (local.get $wp)) (f64.load (local.get $p)))))
                        (local.set $s1 (f64.add (local.get $s1) (f64.mul (f64.load (local.get $wp)) (f64.load (local.get $p1)))))
                        (local.set $s2 (f64.add (local.get $s2) (f64.mul (f64.load (local.get $wp)) (f64.load (local.get $p2)))))
                        (local.set $s3 (f64.add (local.get $s3) (f64.mul (f64.load (local.get $wp)) (f64.load (local.get $p3)))))
                        (local.set $wp (i32.add (local.get $wp) (i32.const 8)))
                        (local.set $op (i32.add (local.get $op) (i32.const 4)))
                        (br $eachEntry4s)))
                    (local.set $q (i32.add (local.get $o0) (local.get $x)))
                    (f64.store (local.get $q) (local.get $s))
                    (local.set $q (i32.add (local.get $q) (local.get $bytes)))
                    (f64.store (local.get $q) (local.get $s1))
                    (local.set $q (i32.add (local.get $q) (local.get $bytes)))
                    (f64.store (local.get $q) (local.get $s2))
                    (local.set $q (i32.add (local.get $q) (local.get $bytes)))
                    (f64.store (local.get $q) (local.get $s3)))))))
          (else
            ;; A line past the last whole group of 4: its own pairs, then its odd last x.
            ;; Then two x at a time.
            (block $pairsDone
              (loop $eachPair
                (br_if $pairsDone (i32.gt_u (i32.add (local.get $x) (i32.const 16)) (local.get $bytes)))
                (local.set $base (i32.add (local.get $line) (local.get $x)))
                (local.set $a0 (f64x2.splat (f64.const 0)))
                (local.set $wp (local.get $wts))
                (local.set $op (local.get $offs))
                (block $entriesDone2
                  (loop $eachEntry2
                    (br_if $entriesDone2 (i32.eq (local.get $op) (local.get $end)))
                    (local.set $a0 (f64x2.add (local.get $a0)
                      (f64x2.mul (v128.load64_splat (local.get $wp))
                        (v128.load (i32.add (local.get $base) (i32.load (local.get $op)))))))
                    (local.set $wp (i32.add (local.get $wp) (i32.const 8)))
                    (local.set $op (i32.add (local.get $op) (i32.const 4)))
                    (br $eachEntry2)))
                (v128.store (i32.add (local.get $o) (local.get $x)) (local.get $a0))
                (local.set $x (i32.add (local.get $x) (i32.const 16)))
                (br $eachPair)))
            ;; The last x of an odd line.
            (if (i32.lt_u (local.get $x) (local.get $bytes))
              (then
                (local.set $base (i32.add (local.get $line) (local.get $x)))
                (local.set $s (f64.const 0))
                (local.set $wp (local.get $wts))
                (local.set $op (local.get $offs))
                (block $entriesDone1
                  (loop $eachEntry1
                    (br_if $entriesDone1 (i32.eq (local.get $op) (local.get $end)))
                    (local.set $s (f64.add (local.get $s)
                      (f64.mul (f64.load (local.get $wp)) (f64.load (i32.add (local.get $base) (i32.load (local.get $op)))))))
                    (local.set $wp (i32.add (local.get $wp) (i32.const 8)))
                    (local.set $op (i32.add (local.get $op) (i32.const 4)))
                    (br $eachEntry1)))
                (f64.store (i32.add (local.get $o) (local.get $x)) (local.get $s))))))
        (local.set $o (i32.add (local.get $o) (local.get $bytes)))
        (local.set $iy (i32.add (local.get $iy) (i32.const 1)))
        (br_if $eachY (i32.lt_u (local.get $iy) (local.get $ny))))
      (local.set $iz (i32.add (local.get $iz) (i32.const 1)))
      (br_if $eachZ (i32.lt_u (local.get $iz) (local.get $nz))))))
