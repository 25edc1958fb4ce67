;; The complex FFT kernel (assembled by test/tooling/wasm.ts into ../modules.ts): batches of
;; power-of-two DFTs X(k) = Σ_j x(j) e^(∓2πi jk/n) on interleaved complex f64 data, one complex
;; number per v128 (f64x2 lanes re, im). Its JavaScript twin, with the same operations in the same
;; order, is src/core/fft/stockham.ts (the engine both serve: src/core/fft/engine.ts).
;;
;; Algorithm: Stockham autosort, radix-4 stages then one radix-2 stage when log2 n is odd (Van Loan,
;; Computational Frameworks for the Fast Fourier Transform, SIAM 1992, §1.7, memory; the loop
;; order of the radix-4 stage is the common one, no source). A stage of length L and stride s maps
;; the s interleaved sequences x[q + s·p] (q < s, p < L) of the previous stage to
;;   y[q + s(4p + 0)] =        (a + c) + (b + d)
;;   y[q + s(4p + 1)] = W^p  ((a − c) − J(b − d))
;;   y[q + s(4p + 2)] = W^2p ((a + c) − (b + d))
;;   y[q + s(4p + 3)] = W^3p ((a − c) + J(b − d))
;; with a, b, c, d = x[q + s(p + r L/4)], r = 0 … 3, W = e^(∓2πi/L), J = ±i (the forward sign,
;; upper); the next stage has length L/4 and stride 4s. The output is in natural order.
;;
;; Complex products in f64x2: v·w = v ⊙ (wr, wr) + swap(v) ⊙ (−wi, wi), swap by i8x16.shuffle
;; (bytes 8–15 then 0–7). J·v = swap(v) ⊙ (∓1, ±1). IEEE multiply then add, no fused multiply-add.
;;
;; fft(src, dst, tmp, tw, n, s, count, bstride, flags), byte addresses, 16-byte aligned:
;;   for b < count: the s sequences of length n at src + b·bstride (x[q + s p] at byte 16(q + s p))
;;   → their DFTs at dst + b·bstride (same layout). n ≥ 2, s ≥ 1, src ≠ dst; src is not written.
;;   tmp holds 16·n·s bytes (one batch item; the stages ping-pong between dst and tmp).
;;   flags bit 0: the inputs p ≥ n/2 are zero and not read (needs n ≥ 4);
;;   flags bit 1: the first stage writes dst (set when the number of stages is odd);
;;   flags bit 2: only outputs k < n/2 are wanted (the last stage writes no others; they are
;;   left stale). The last radix-4 stage (L = 4) has unit twiddles and skips the products.
;;   tw: the twiddle table of twiddleTable (src/core/fft/twiddles.ts) for n and the direction: J as (∓1, ±1), then
;;   per radix-4 stage and p < L/4 the entry (W^p, W^2p, W^3p), each as (wr, wr), (−wi, wi).
;; scaleComplex(dst, src, lam, count): dst[i] ← lam[i]·src[i] for i < count (complex dst, src — equal
;;   or disjoint —, real lam with 8-byte elements).
(module
  (import "env" "memory" (memory 1))
  (func $fft (export "fft")
      (param $src i32) (param $dst i32) (param $tmp i32) (param $tw i32) (param $n i32) (param $s i32)
      (param $count i32) (param $bstride i32) (param $flags i32)
    ;; b: batch item; srcB, dstB: its input and output; in, outBuf: the current stage reads in and
    ;; writes outBuf; len, str: stage length L and 16·stride (bytes between x[q + s p] and x[q + s (p + 1)]);
    ;; twp: this p's twiddle entry; halfZero, prune: flags bits 0 and 2 (halfZero only in the first stage);
    ;; quarter = L/4; qB = str·L/4, bytes between a and b; ia, oa: x[s p], y[4 s p]; k: 16q; ad, od:
    ;; addresses of the inputs and outputs of one butterfly; J: the ±i rotation; w1re … w3im: W^p, W^2p,
    ;; W^3p; va … vd: a, b, c, d; apc, amc, bpd, jb: a + c, a − c, b + d, J(b − d); t: one output before its twiddle.
    (local $b i32) (local $srcB i32) (local $dstB i32) (local $in i32) (local $outBuf i32) (local $len i32)
    (local $str i32) (local $twp i32) (local $halfZero i32) (local $prune i32) (local $quarter i32)
    (local $qB i32) (local $p i32) (local $ia i32) (local $oa i32) (local $k i32) (local $ad i32)
    (local $od i32) (local $J v128) (local $w1re v128) (local $w1im v128) (local $w2re v128)
    (local $w2im v128) (local $w3re v128) (local $w3im v128) (local $va v128) (local $vb v128)
    (local $vc v128) (local $vd v128) (local $apc v128) (local $amc v128) (local $bpd v128) (local $jb v128)
    (local $t v128)
    (local.set $srcB (local.get $src))
    (local.set $dstB (local.get $dst))
    (local.set $b (i32.const 0))
    (local.set $J (v128.load (local.get $tw)))
    (block $noItems
      (br_if $noItems (i32.eqz (local.get $count)))
      (loop $eachItem
        (local.set $in (local.get $srcB))
        (local.set $outBuf
          (select (local.get $dstB) (local.get $tmp) (i32.and (local.get $flags) (i32.const 2))))
        (local.set $len (local.get $n))
        (local.set $str (i32.shl (local.get $s) (i32.const 4)))
        (local.set $twp (i32.add (local.get $tw) (i32.const 16)))
        (local.set $halfZero (i32.and (local.get $flags) (i32.const 1)))
        (local.set $prune (i32.and (local.get $flags) (i32.const 4)))
        (block $radix4Done
          (loop $eachStage
            (br_if $radix4Done (i32.lt_u (local.get $len) (i32.const 4)))
            (local.set $quarter (i32.shr_u (local.get $len) (i32.const 2)))
            (local.set $qB (i32.mul (local.get $str) (local.get $quarter)))
            (local.set $p (i32.const 0))
            (local.set $ia (local.get $in))
            (local.set $oa (local.get $outBuf))
            (block $stageDone
              ;; The last radix-4 stage (L = 4, p = 0): every twiddle is 1. With the prune flag only
              ;; y0, y1 (outputs k < n/2) are written.
              (block $notLastRadix4
                (br_if $notLastRadix4 (i32.or (i32.ne (local.get $len) (i32.const 4)) (local.get $halfZero)))
                (local.set $k (i32.const 0))
                (loop $lastRadix4Each
                  (local.set $va (v128.load (local.tee $ad (i32.add (local.get $ia) (local.get $k)))))
                  (local.set $vb (v128.load (local.tee $ad (i32.add (local.get $ad) (local.get $qB)))))
                  (local.set $vc (v128.load (local.tee $ad (i32.add (local.get $ad) (local.get $qB)))))
                  (local.set $vd (v128.load (i32.add (local.get $ad) (local.get $qB))))
                  (local.set $apc (f64x2.add (local.get $va) (local.get $vc)))
                  (local.set $amc (f64x2.sub (local.get $va) (local.get $vc)))
                  (local.set $bpd (f64x2.add (local.get $vb) (local.get $vd)))
                  (local.set $jb (f64x2.sub (local.get $vb) (local.get $vd)))
                  (local.set $jb
                    (f64x2.mul
                      (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $jb) (local.get $jb))
                      (local.get $J)))
                  (v128.store
                    (local.tee $od (i32.add (local.get $oa) (local.get $k)))
                    (f64x2.add (local.get $apc) (local.get $bpd)))
                  (v128.store
                    (local.tee $od (i32.add (local.get $od) (local.get $str)))
                    (f64x2.sub (local.get $amc) (local.get $jb)))
                  (block $pruned
                    (br_if $pruned (local.get $prune))
                    (v128.store
                      (local.tee $od (i32.add (local.get $od) (local.get $str)))
                      (f64x2.sub (local.get $apc) (local.get $bpd)))
                    (v128.store
                      (i32.add (local.get $od) (local.get $str))
                      (f64x2.add (local.get $amc) (local.get $jb))))
                  (local.set $k (i32.add (local.get $k) (i32.const 16)))
                  (br_if $lastRadix4Each (i32.ne (local.get $k) (local.get $str))))
                (br $stageDone))
              ;; Every other radix-4 stage: one twiddle entry per p.
              (loop $eachP
                (local.set $w1re (v128.load (local.get $twp)))
                (local.set $w1im (v128.load offset=16 (local.get $twp)))
                (local.set $w2re (v128.load offset=32 (local.get $twp)))
                (local.set $w2im (v128.load offset=48 (local.get $twp)))
                (local.set $w3re (v128.load offset=64 (local.get $twp)))
                (local.set $w3im (v128.load offset=80 (local.get $twp)))
                (local.set $k (i32.const 0))
                (block $butterfliesDone
                  (block $notHalfZero
                    (br_if $notHalfZero (i32.eqz (local.get $halfZero)))
                    ;; Inputs c = d = 0: y0 = a + b, y1 = W(a − J b), y2 = W²(a − b), y3 = W³(a + J b).
                    (loop $halfZeroEach
                      (local.set $va (v128.load (local.tee $ad (i32.add (local.get $ia) (local.get $k)))))
                      (local.set $vb (v128.load (i32.add (local.get $ad) (local.get $qB))))
                      (local.set $jb
                        (f64x2.mul
                          (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7
                            (local.get $vb)
                            (local.get $vb))
                          (local.get $J)))
                      (v128.store
                        (local.tee $od (i32.add (local.get $oa) (local.get $k)))
                        (f64x2.add (local.get $va) (local.get $vb)))
                      (local.set $t (f64x2.sub (local.get $va) (local.get $jb)))
                      (v128.store
                        (local.tee $od (i32.add (local.get $od) (local.get $str)))
                        (f64x2.add
                          (f64x2.mul (local.get $t) (local.get $w1re))
                          (f64x2.mul
                            (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7
                              (local.get $t)
                              (local.get $t))
                            (local.get $w1im))))
                      (local.set $t (f64x2.sub (local.get $va) (local.get $vb)))
                      (v128.store
                        (local.tee $od (i32.add (local.get $od) (local.get $str)))
                        (f64x2.add
                          (f64x2.mul (local.get $t) (local.get $w2re))
                          (f64x2.mul
                            (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7
                              (local.get $t)
                              (local.get $t))
                            (local.get $w2im))))
                      (local.set $t (f64x2.add (local.get $va) (local.get $jb)))
                      (v128.store
                        (local.tee $od (i32.add (local.get $od) (local.get $str)))
                        (f64x2.add
                          (f64x2.mul (local.get $t) (local.get $w3re))
                          (f64x2.mul
                            (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7
                              (local.get $t)
                              (local.get $t))
                            (local.get $w3im))))
                      (local.set $k (i32.add (local.get $k) (i32.const 16)))
                      (br_if $halfZeroEach (i32.ne (local.get $k) (local.get $str))))
                    (br $butterfliesDone))
                  ;; The general butterfly.
                  (loop $fullEach
                    (local.set $va (v128.load (local.tee $ad (i32.add (local.get $ia) (local.get $k)))))
                    (local.set $vb (v128.load (local.tee $ad (i32.add (local.get $ad) (local.get $qB)))))
                    (local.set $vc (v128.load (local.tee $ad (i32.add (local.get $ad) (local.get $qB)))))
                    (local.set $vd (v128.load (i32.add (local.get $ad) (local.get $qB))))
                    (local.set $apc (f64x2.add (local.get $va) (local.get $vc)))
                    (local.set $amc (f64x2.sub (local.get $va) (local.get $vc)))
                    (local.set $bpd (f64x2.add (local.get $vb) (local.get $vd)))
                    (local.set $jb (f64x2.sub (local.get $vb) (local.get $vd)))
                    (local.set $jb
                      (f64x2.mul
                        (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $jb) (local.get $jb))
                        (local.get $J)))
                    (v128.store
                      (local.tee $od (i32.add (local.get $oa) (local.get $k)))
                      (f64x2.add (local.get $apc) (local.get $bpd)))
                    (local.set $t (f64x2.sub (local.get $amc) (local.get $jb)))
                    (v128.store
                      (local.tee $od (i32.add (local.get $od) (local.get $str)))
                      (f64x2.add
                        (f64x2.mul (local.get $t) (local.get $w1re))
                        (f64x2.mul
                          (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $t) (local.get $t))
                          (local.get $w1im))))
                    (local.set $t (f64x2.sub (local.get $apc) (local.get $bpd)))
                    (v128.store
                      (local.tee $od (i32.add (local.get $od) (local.get $str)))
                      (f64x2.add
                        (f64x2.mul (local.get $t) (local.get $w2re))
                        (f64x2.mul
                          (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $t) (local.get $t))
                          (local.get $w2im))))
                    (local.set $t (f64x2.add (local.get $amc) (local.get $jb)))
                    (v128.store
                      (local.tee $od (i32.add (local.get $od) (local.get $str)))
                      (f64x2.add
                        (f64x2.mul (local.get $t) (local.get $w3re))
                        (f64x2.mul
                          (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $t) (local.get $t))
                          (local.get $w3im))))
                    (local.set $k (i32.add (local.get $k) (i32.const 16)))
                    (br_if $fullEach (i32.ne (local.get $k) (local.get $str)))))
                (local.set $twp (i32.add (local.get $twp) (i32.const 96)))
                (local.set $ia (i32.add (local.get $ia) (local.get $str)))
                (local.set $oa (i32.add (local.get $oa) (i32.shl (local.get $str) (i32.const 2))))
                (local.set $p (i32.add (local.get $p) (i32.const 1)))
                (br_if $eachP (i32.ne (local.get $p) (local.get $quarter)))))
            ;; Next stage: L/4, stride 4s; it reads outBuf and writes the other of dst / tmp (ping-pong).
            (local.set $len (i32.shr_u (local.get $len) (i32.const 2)))
            (local.set $str (i32.shl (local.get $str) (i32.const 2)))
            (local.set $halfZero (i32.const 0))
            (local.set $in (local.get $outBuf))
            (local.set $outBuf
              (select (local.get $tmp) (local.get $dstB) (i32.eq (local.get $outBuf) (local.get $dstB))))
            (br $eachStage)))
        ;; Radix-2 stage of length 2 (no twiddles): y[q] = a + b, y[q + s] = a − b.
        (block $noRadix2
          (br_if $noRadix2 (i32.ne (local.get $len) (i32.const 2)))
          (local.set $k (i32.const 0))
          (loop $radix2Each
            (local.set $va (v128.load (local.tee $ad (i32.add (local.get $in) (local.get $k)))))
            (local.set $vb (v128.load (i32.add (local.get $ad) (local.get $str))))
            (v128.store
              (local.tee $od (i32.add (local.get $outBuf) (local.get $k)))
              (f64x2.add (local.get $va) (local.get $vb)))
            (block $pruned2
              (br_if $pruned2 (local.get $prune))
              (v128.store
                (i32.add (local.get $od) (local.get $str))
                (f64x2.sub (local.get $va) (local.get $vb))))
            (local.set $k (i32.add (local.get $k) (i32.const 16)))
            (br_if $radix2Each (i32.ne (local.get $k) (local.get $str)))))
        ;; Next batch item.
        (local.set $srcB (i32.add (local.get $srcB) (local.get $bstride)))
        (local.set $dstB (i32.add (local.get $dstB) (local.get $bstride)))
        (local.set $b (i32.add (local.get $b) (i32.const 1)))
        (br_if $eachItem (i32.ne (local.get $b) (local.get $count))))))
  (func $scaleComplex (export "scaleComplex")
      (param $dst i32) (param $src i32) (param $lam i32) (param $count i32)
    (local $end i32)
    (block $empty
      (br_if $empty (i32.eqz (local.get $count)))
      (local.set $end (i32.add (local.get $dst) (i32.shl (local.get $count) (i32.const 4))))
      (loop $each
        (v128.store
          (local.get $dst)
          (f64x2.mul (v128.load (local.get $src)) (v128.load64_splat (local.get $lam))))
        (local.set $dst (i32.add (local.get $dst) (i32.const 16)))
        (local.set $src (i32.add (local.get $src) (i32.const 16)))
        (local.set $lam (i32.add (local.get $lam) (i32.const 8)))
        (br_if $each (i32.ne (local.get $dst) (local.get $end)))))))
