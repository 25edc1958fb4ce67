;; Classical Gram–Schmidt, twice, for Lanczos (assembled by test/tooling/wasm.ts into ../modules.ts).
;;
;; cgs2(q, k, stride, w, h, h2, n8, chunk): w ← w − Q (Qᵀ w), twice, for the k basis vectors q_p at q + p·stride
;; (bytes), w of n8/8 doubles; h and h2 (f64 × k) receive the two passes' Qᵀw. The columns run in chunks of
;; `chunk` bytes: pass 1's projections over all chunks, then per chunk pass 1's update and pass 2's projections (the
;; chunk of the basis is still in cache), then pass 2's update over all chunks. Exactly the loops of
;; reorthogonaliseTwice in src/core/linalg/eigen.ts, bit for bit:
;;   projections, four vectors at a time: two running sums per vector (even and odd columns of the chunk, f64x2
;;     lanes), the odd last column added to the even sum, then h[p] += even + odd;
;;   update, four vectors at a time: w[i] −= ((h0 q0[i] + h1 q1[i]) + h2 q2[i]) + h3 q3[i]; left-over vectors one
;;     at a time, w[i] −= h q[i].
;; IEEE multiplies and adds, no fused multiply-add. All addresses in bytes; chunk a multiple of 16.
(module
  (import "env" "memory" (memory 1))

  ;; h[p] += Σ_{i in [c0, c1)} q_p[i] w[i], p < k.
  (func $project
      (param $q i32) (param $k i32) (param $stride i32) (param $w i32) (param $h i32) (param $c0 i32) (param $c1 i32)
    ;; p: vector; q0 … q3: rows p … p+3; i: column (bytes); wv: w[i, i+1]; a0 … a3: the two sums of each row.
    (local $p i32) (local $q0 i32) (local $q1 i32) (local $q2 i32) (local $q3 i32) (local $i i32) (local $hp i32)
    (local $wv v128) (local $a0 v128) (local $a1 v128) (local $a2 v128) (local $a3 v128) (local $x f64)
    (local.set $p (i32.const 0))
    (block $fourDone
      (loop $eachFour
        (br_if $fourDone (i32.gt_u (i32.add (local.get $p) (i32.const 4)) (local.get $k)))
        (local.set $q0 (i32.add (local.get $q) (i32.mul (local.get $p) (local.get $stride))))
        (local.set $q1 (i32.add (local.get $q0) (local.get $stride)))
        (local.set $q2 (i32.add (local.get $q1) (local.get $stride)))
        (local.set $q3 (i32.add (local.get $q2) (local.get $stride)))
        (local.set $a0 (f64x2.splat (f64.const 0)))
        (local.set $a1 (f64x2.splat (f64.const 0)))
        (local.set $a2 (f64x2.splat (f64.const 0)))
        (local.set $a3 (f64x2.splat (f64.const 0)))
        (local.set $i (local.get $c0))
        (block $pairsDone
          (loop $eachPair
            (br_if $pairsDone (i32.gt_u (i32.add (local.get $i) (i32.const 16)) (local.get $c1)))
            (local.set $wv (v128.load (i32.add (local.get $w) (local.get $i))))
            (local.set $a0 (f64x2.add (local.get $a0) (f64x2.mul (v128.load (i32.add (local.get $q0) (local.get $i))) (local.get $wv))))
            (local.set $a1 (f64x2.add (local.get $a1) (f64x2.mul (v128.load (i32.add (local.get $q1) (local.get $i))) (local.get $wv))))
            (local.set $a2 (f64x2.add (local.get $a2) (f64x2.mul (v128.load (i32.add (local.get $q2) (local.get $i))) (local.get $wv))))
            (local.set $a3 (f64x2.add (local.get $a3) (f64x2.mul (v128.load (i32.add (local.get $q3) (local.get $i))) (local.get $wv))))
            (local.set $i (i32.add (local.get $i) (i32.const 16)))
            (br $eachPair)))
        ;; An odd last column goes into the even sums.
        (if (i32.lt_u (local.get $i) (local.get $c1))
          (then
            (local.set $x (f64.load (i32.add (local.get $w) (local.get $i))))
            (local.set $a0 (f64x2.replace_lane 0 (local.get $a0)
              (f64.add (f64x2.extract_lane 0 (local.get $a0)) (f64.mul (f64.load (i32.add (local.get $q0) (local.get $i))) (local.get $x)))))
            (local.set $a1 (f64x2.replace_lane 0 (local.get $a1)
              (f64.add (f64x2.extract_lane 0 (local.get $a1)) (f64.mul (f64.load (i32.add (local.get $q1) (local.get $i))) (local.get $x)))))
            (local.set $a2 (f64x2.replace_lane 0 (local.get $a2)
              (f64.add (f64x2.extract_lane 0 (local.get $a2)) (f64.mul (f64.load (i32.add (local.get $q2) (local.get $i))) (local.get $x)))))
            (local.set $a3 (f64x2.replace_lane 0 (local.get $a3)
              (f64.add (f64x2.extract_lane 0 (local.get $a3)) (f64.mul (f64.load (i32.add (local.get $q3) (local.get $i))) (local.get $x)))))))
        (local.set $hp (i32.add (local.get $h) (i32.shl (local.get $p) (i32.const 3))))
        (f64.store (local.get $hp) (f64.add (f64.load (local.get $hp))
          (f64.add (f64x2.extract_lane 0 (local.get $a0)) (f64x2.extract_lane 1 (local.get $a0)))))
        (f64.store offset=8 (local.get $hp) (f64.add (f64.load offset=8 (local.get $hp))
          (f64.add (f64x2.extract_lane 0 (local.get $a1)) (f64x2.extract_lane 1 (local.get $a1)))))
        (f64.store offset=16 (local.get $hp) (f64.add (f64.load offset=16 (local.get $hp))
          (f64.add (f64x2.extract_lane 0 (local.get $a2)) (f64x2.extract_lane 1 (local.get $a2)))))
        (f64.store offset=24 (local.get $hp) (f64.add (f64.load offset=24 (local.get $hp))
          (f64.add (f64x2.extract_lane 0 (local.get $a3)) (f64x2.extract_lane 1 (local.get $a3)))))
        (local.set $p (i32.add (local.get $p) (i32.const 4)))
        (br $eachFour)))
    ;; The left-over vectors one at a time.
    (block $oneDone
      (loop $eachOne
        (br_if $oneDone (i32.ge_u (local.get $p) (local.get $k)))
        (local.set $q0 (i32.add (local.get $q) (i32.mul (local.get $p) (local.get $stride))))
        (local.set $a0 (f64x2.splat (f64.const 0)))
        (local.set $i (local.get $c0))
        (block $pairsDone1
          (loop $eachPair1
            (br_if $pairsDone1 (i32.gt_u (i32.add (local.get $i) (i32.const 16)) (local.get $c1)))
            (local.set $a0 (f64x2.add (local.get $a0)
              (f64x2.mul (v128.load (i32.add (local.get $q0) (local.get $i))) (v128.load (i32.add (local.get $w) (local.get $i))))))
            (local.set $i (i32.add (local.get $i) (i32.const 16)))
            (br $eachPair1)))
        (if (i32.lt_u (local.get $i) (local.get $c1))
          (then
            (local.set $a0 (f64x2.replace_lane 0 (local.get $a0)
              (f64.add (f64x2.extract_lane 0 (local.get $a0))
                (f64.mul (f64.load (i32.add (local.get $q0) (local.get $i))) (f64.load (i32.add (local.get $w) (local.get $i)))))))))
        (local.set $hp (i32.add (local.get $h) (i32.shl (local.get $p) (i32.const 3))))
        (f64.store (local.get $hp) (f64.add (f64.load (local.get $hp))
          (f64.add (f64x2.extract_lane 0 (local.get $a0)) (f64x2.extract_lane 1 (local.get $a0)))))
        (local.set $p (i32.add (local.get $p) (i32.const 1)))
        (br $eachOne))))

  ;; w[i] −= Σ_p h[p] q_p[i], i in [c0, c1).
  (func $update
      (param $q i32) (param $k i32) (param $stride i32) (param $w i32) (param $h i32) (param $c0 i32) (param $c1 i32)
    (local $p i32) (local $q0 i32) (local $q1 i32) (local $q2 i32) (local $q3 i32) (local $i i32) (local $hp i32)
    (local $h0 v128) (local $h1 v128) (local $h2 v128) (local $h3 v128) (local $wp i32)
    (local.set $p (i32.const 0))
    (block $fourDone
      (loop $eachFour
        (br_if $fourDone (i32.gt_u (i32.add (local.get $p) (i32.const 4)) (local.get $k)))
        (local.set $q0 (i32.add (local.get $q) (i32.mul (local.get $p) (local.get $stride))))
        (local.set $q1 (i32.add (local.get $q0) (local.get $stride)))
        (local.set $q2 (i32.add (local.get $q1) (local.get $stride)))
        (local.set $q3 (i32.add (local.get $q2) (local.get $stride)))
        (local.set $hp (i32.add (local.get $h) (i32.shl (local.get $p) (i32.const 3))))
        (local.set $h0 (v128.load64_splat (local.get $hp)))
        (local.set $h1 (v128.load64_splat offset=8 (local.get $hp)))
        (local.set $h2 (v128.load64_splat offset=16 (local.get $hp)))
        (local.set $h3 (v128.load64_splat offset=24 (local.get $hp)))
        (local.set $i (local.get $c0))
        (block $pairsDone
          (loop $eachPair
            (br_if $pairsDone (i32.gt_u (i32.add (local.get $i) (i32.const 16)) (local.get $c1)))
            (local.set $wp (i32.add (local.get $w) (local.get $i)))
            (v128.store (local.get $wp) (f64x2.sub (v128.load (local.get $wp))
              (f64x2.add
                (f64x2.add
                  (f64x2.add
                    (f64x2.mul (local.get $h0) (v128.load (i32.add (local.get $q0) (local.get $i))))
                    (f64x2.mul (local.get $h1) (v128.load (i32.add (local.get $q1) (local.get $i)))))
                  (f64x2.mul (local.get $h2) (v128.load (i32.add (local.get $q2) (local.get $i)))))
                (f64x2.mul (local.get $h3) (v128.load (i32.add (local.get $q3) (local.get $i)))))))
            (local.set $i (i32.add (local.get $i) (i32.const 16)))
            (br $eachPair)))
        (if (i32.lt_u (local.get $i) (local.get $c1))
          (then
            (local.set $wp (i32.add (local.get $w) (local.get $i)))
            (f64.store (local.get $wp) (f64.sub (f64.load (local.get $wp))
              (f64.add
                (f64.add
                  (f64.add
                    (f64.mul (f64x2.extract_lane 0 (local.get $h0)) (f64.load (i32.add (local.get $q0) (local.get $i))))
                    (f64.mul (f64x2.extract_lane 0 (local.get $h1)) (f64.load (i32.add (local.get $q1) (local.get $i)))))
                  (f64.mul (f64x2.extract_lane 0 (local.get $h2)) (f64.load (i32.add (local.get $q2) (local.get $i)))))
                (f64.mul (f64x2.extract_lane 0 (local.get $h3)) (f64.load (i32.add (local.get $q3) (local.get $i)))))))))
        (local.set $p (i32.add (local.get $p) (i32.const 4)))
        (br $eachFour)))
    (block $oneDone
      (loop $eachOne
        (br_if $oneDone (i32.ge_u (local.get $p) (local.get $k)))
        (local.set $q0 (i32.add (local.get $q) (i32.mul (local.get $p) (local.get $stride))))
        (local.set $h0 (v128.load64_splat (i32.add (local.get $h) (i32.shl (local.get $p) (i32.const 3)))))
        (local.set $i (local.get $c0))
        (block $pairsDone1
          (loop $eachPair1
            (br_if $pairsDone1 (i32.gt_u (i32.add (local.get $i) (i32.const 16)) (local.get $c1)))
            (local.set $wp (i32.add (local.get $w) (local.get $i)))
            (v128.store (local.get $wp) (f64x2.sub (v128.load (local.get $wp))
              (f64x2.mul (local.get $h0) (v128.load (i32.add (local.get $q0) (local.get $i))))))
            (local.set $i (i32.add (local.get $i) (i32.const 16)))
            (br $eachPair1)))
        (if (i32.lt_u (local.get $i) (local.get $c1))
          (then
            (local.set $wp (i32.add (local.get $w) (local.get $i)))
            (f64.store (local.get $wp) (f64.sub (f64.load (local.get $wp))
              (f64.mul (f64x2.extract_lane 0 (local.get $h0)) (f64.load (i32.add (local.get $q0) (local.get $i))))))))
        (local.set $p (i32.add (local.get $p) (i32.const 1)))
        (br $eachOne))))

  (func $cgs2 (export "cgs2")
      (param $q i32) (param $k i32) (param $stride i32) (param $w i32) (param $h i32) (param $h2 i32)
      (param $n8 i32) (param $chunk i32)
    ;; c0, c1: the chunk's columns (bytes); e: end of h (bytes).
    (local $c0 i32) (local $c1 i32) (local $e i32)
    ;; h, h2 ← 0.
    (local.set $e (i32.shl (local.get $k) (i32.const 3)))
    (local.set $c0 (i32.const 0))
    (block $zeroed
      (loop $zero
        (br_if $zeroed (i32.ge_u (local.get $c0) (local.get $e)))
        (f64.store (i32.add (local.get $h) (local.get $c0)) (f64.const 0))
        (f64.store (i32.add (local.get $h2) (local.get $c0)) (f64.const 0))
        (local.set $c0 (i32.add (local.get $c0) (i32.const 8)))
        (br $zero)))
    ;; Pass 1's projections.
    (local.set $c0 (i32.const 0))
    (block $done1
      (loop $chunks1
        (br_if $done1 (i32.ge_u (local.get $c0) (local.get $n8)))
        (local.set $c1 (select (local.get $n8) (i32.add (local.get $c0) (local.get $chunk))
          (i32.gt_u (i32.add (local.get $c0) (local.get $chunk)) (local.get $n8))))
        (call $project (local.get $q) (local.get $k) (local.get $stride) (local.get $w) (local.get $h) (local.get $c0) (local.get $c1))
        (local.set $c0 (local.get $c1))
        (br $chunks1)))
    ;; Pass 1's update and pass 2's projections, chunk by chunk.
    (local.set $c0 (i32.const 0))
    (block $done2
      (loop $chunks2
        (br_if $done2 (i32.ge_u (local.get $c0) (local.get $n8)))
        (local.set $c1 (select (local.get $n8) (i32.add (local.get $c0) (local.get $chunk))
          (i32.gt_u (i32.add (local.get $c0) (local.get $chunk)) (local.get $n8))))
        (call $update (local.get $q) (local.get $k) (local.get $stride) (local.get $w) (local.get $h) (local.get $c0) (local.get $c1))
        (call $project (local.get $q) (local.get $k) (local.get $stride) (local.get $w) (local.get $h2) (local.get $c0) (local.get $c1))
        (local.set $c0 (local.get $c1))
        (br $chunks2)))
    ;; Pass 2's update.
    (local.set $c0 (i32.const 0))
    (block $done3
      (loop $chunks3
        (br_if $done3 (i32.ge_u (local.get $c0) (local.get $n8)))
        (local.set $c1 (select (local.get $n8) (i32.add (local.get $c0) (local.get $chunk))
          (i32.gt_u (i32.add (local.get $c0) (local.get $chunk)) (local.get $n8))))
        (call $update (local.get $q) (local.get $k) (local.get $stride) (local.get $w) (local.get $h2) (local.get $c0) (local.get $c1))
        (local.set $c0 (local.get $c1))
        (br $chunks3)))))
