;; Column scans of the display envelope (src/core/dsp/decimate.ts, m4Envelope) in WebAssembly
;; SIMD, for float64 data copied into this module's memory (src/core/dsp/scan-copy.ts).
;; Assembled by scripts/build-wasm.mjs into column-scan-wasm.ts: edit this file, then run
;; `npm run build:wasm` (a unit test fails when the two differ).
;;
;; Each scan finds, over n samples, the position of the earliest minimum and of the earliest
;; maximum (NaN never one; -0 and +0 equal), exactly as the JavaScript scan in decimate.ts:
;;   1. blocks of 1024 bytes: running f64x2.pmin / pmax over the block, four accumulators of each
;;      so that the loop is not bound by their latency; pmin(acc, x) = x < acc ? x : acc keeps
;;      acc when x is NaN, so NaN never enters (accumulators start at +inf / -inf). The block's
;;      extreme replaces the running one only when strictly better, and the block is noted: the
;;      earliest block holding the final extreme.
;;   2. the samples after the last whole block, one by one, with their positions.
;;   3. the position: in the tail when it improved there; otherwise the first sample of the noted
;;      block equal (f64.eq) to the extreme, two per compare. When no block improved on +inf
;;      (-inf), every sample is NaN (position -1) or the extreme is +inf (-inf) itself: the first
;;      equal sample of the whole column, or -1.
;; The scan returns the minimum's position (relative to the first sample, or -1); maxK() then
;; gives the maximum's. (A function result reaches JavaScript faster than an exported global's
;; value: 0.5 ms less over the 1000 columns of 1e7 samples.)
;;
;; scanReal(p, n): n consecutive float64 at byte address p.
;; scanPair(p, n, lane): one part of n complex samples stored as (re, im) pairs, sample k's pair
;;   at byte address p + 16k; lane 0 is the real part, lane 1 the imaginary part.

(module
  (import "env" "mem" (memory 0))
  (global $minK (mut i32) (i32.const -1))
  (global $maxK (mut i32) (i32.const -1))
  (func (export "maxK") (result i32) (global.get $maxK))

  (func $findReal (param $p i32) (param $n i32) (param $t f64) (result i32)
    (local $q i32) (local $end i32) (local $tv v128)
    (local.set $tv (f64x2.splat (local.get $t)))
    (local.set $q (local.get $p))
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $n) (i32.const 3))))
    (block $hit
      (loop $l
        (br_if $hit (i32.gt_u (i32.add (local.get $q) (i32.const 32)) (local.get $end)))
        (br_if $hit (v128.any_true (v128.or
          (f64x2.eq (v128.load (local.get $q)) (local.get $tv))
          (f64x2.eq (v128.load offset=16 (local.get $q)) (local.get $tv)))))
        (local.set $q (i32.add (local.get $q) (i32.const 32)))
        (br $l)))
    (block $none
      (loop $s
        (br_if $none (i32.ge_u (local.get $q) (local.get $end)))
        (if (f64.eq (f64.load (local.get $q)) (local.get $t))
          (then (return (i32.shr_u (i32.sub (local.get $q) (local.get $p)) (i32.const 3)))))
        (local.set $q (i32.add (local.get $q) (i32.const 8)))
        (br $s)))
    (i32.const -1))

  (func $findPair (param $p i32) (param $n i32) (param $t f64) (param $lane i32) (result i32)
    (local $q i32) (local $end i32) (local $tv v128) (local $mask v128)
    (local.set $tv (f64x2.splat (local.get $t)))
    (local.set $mask (i64x2.replace_lane 0
      (i64x2.splat (i64.extend_i32_s (i32.sub (i32.const 0) (local.get $lane))))
      (i64.extend_i32_s (i32.sub (local.get $lane) (i32.const 1)))))
    (local.set $q (local.get $p))
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $n) (i32.const 4))))
    (block $hit
      (loop $l
        (br_if $hit (i32.gt_u (i32.add (local.get $q) (i32.const 32)) (local.get $end)))
        (br_if $hit (v128.any_true (v128.and (local.get $mask) (v128.or
          (f64x2.eq (v128.load (local.get $q)) (local.get $tv))
          (f64x2.eq (v128.load offset=16 (local.get $q)) (local.get $tv))))))
        (local.set $q (i32.add (local.get $q) (i32.const 32)))
        (br $l)))
    (block $none
      (loop $s
        (br_if $none (i32.ge_u (local.get $q) (local.get $end)))
        (if (v128.any_true (v128.and (local.get $mask)
              (f64x2.eq (v128.load (local.get $q)) (local.get $tv))))
          (then (return (i32.shr_u (i32.sub (local.get $q) (local.get $p)) (i32.const 4)))))
        (local.set $q (i32.add (local.get $q) (i32.const 16)))
        (br $s)))
    (i32.const -1))

  (func $position (param $p i32) (param $n i32) (param $t f64) (param $at i32) (param $blk i32)
                  (param $shift i32) (param $lane i32) (result i32)
    (local $k i32)
    ;; found in the tail: its position
    (if (i32.ge_s (local.get $at) (i32.const 0))
      (then (return (i32.shr_u (i32.sub (local.get $at) (local.get $p)) (local.get $shift)))))
    ;; in a block: the first equal sample of that block
    (if (i32.ge_s (local.get $blk) (i32.const 0))
      (then
        (local.set $k (call $find (local.get $blk) (i32.shr_u (i32.const 1024) (local.get $shift))
                                  (local.get $t) (local.get $shift) (local.get $lane)))
        (return (i32.add (i32.shr_u (i32.sub (local.get $blk) (local.get $p)) (local.get $shift))
                         (local.get $k)))))
    ;; never improved on ±inf: all NaN (-1), or the extreme is ±inf itself (its first position)
    (call $find (local.get $p) (local.get $n) (local.get $t) (local.get $shift) (local.get $lane)))
  (func $find (param $p i32) (param $n i32) (param $t f64) (param $shift i32) (param $lane i32)
              (result i32)
    (if (result i32) (i32.eq (local.get $shift) (i32.const 3))
      (then (call $findReal (local.get $p) (local.get $n) (local.get $t)))
      (else (call $findPair (local.get $p) (local.get $n) (local.get $t) (local.get $lane)))))

  (func (export "scanReal") (param $p i32) (param $n i32) (result i32)
    (local $a0 v128) (local $a1 v128) (local $a2 v128) (local $a3 v128)
    (local $b0 v128) (local $b1 v128) (local $b2 v128) (local $b3 v128)
    (local $v v128) (local $pinf v128) (local $ninf v128)
    (local $q i32) (local $end i32) (local $bend i32)
    (local $blkMn i32) (local $blkMx i32) (local $atMn i32) (local $atMx i32)
    (local $mn f64) (local $mx f64) (local $u f64)
    (local.set $pinf (f64x2.splat (f64.const inf)))
    (local.set $ninf (f64x2.splat (f64.const -inf)))
    (local.set $mn (f64.const inf))
    (local.set $mx (f64.const -inf))
    (local.set $blkMn (i32.const -1))
    (local.set $blkMx (i32.const -1))
    (local.set $atMn (i32.const -1))
    (local.set $atMx (i32.const -1))
    (local.set $q (local.get $p))
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $n) (i32.const 3))))
    ;; whole blocks of 1024 bytes
    (block $blocksDone
      (loop $block
        (br_if $blocksDone (i32.gt_u (i32.add (local.get $q) (i32.const 1024)) (local.get $end)))
        (local.set $bend (i32.add (local.get $q) (i32.const 1024)))
        (local.set $a0 (local.get $pinf))
        (local.set $a1 (local.get $pinf))
        (local.set $a2 (local.get $pinf))
        (local.set $a3 (local.get $pinf))
        (local.set $b0 (local.get $ninf))
        (local.set $b1 (local.get $ninf))
        (local.set $b2 (local.get $ninf))
        (local.set $b3 (local.get $ninf))
        (loop $inner
          (local.set $v (v128.load offset=0 (local.get $q)))
          (local.set $a0 (f64x2.pmin (local.get $a0) (local.get $v)))
          (local.set $b0 (f64x2.pmax (local.get $b0) (local.get $v)))
          (local.set $v (v128.load offset=16 (local.get $q)))
          (local.set $a1 (f64x2.pmin (local.get $a1) (local.get $v)))
          (local.set $b1 (f64x2.pmax (local.get $b1) (local.get $v)))
          (local.set $v (v128.load offset=32 (local.get $q)))
          (local.set $a2 (f64x2.pmin (local.get $a2) (local.get $v)))
          (local.set $b2 (f64x2.pmax (local.get $b2) (local.get $v)))
          (local.set $v (v128.load offset=48 (local.get $q)))
          (local.set $a3 (f64x2.pmin (local.get $a3) (local.get $v)))
          (local.set $b3 (f64x2.pmax (local.get $b3) (local.get $v)))
          (local.set $q (i32.add (local.get $q) (i32.const 64)))
          (br_if $inner (i32.lt_u (local.get $q) (local.get $bend))))
        (local.set $a0 (f64x2.pmin (f64x2.pmin (local.get $a0) (local.get $a1))
                                   (f64x2.pmin (local.get $a2) (local.get $a3))))
        (local.set $b0 (f64x2.pmax (f64x2.pmax (local.get $b0) (local.get $b1))
                                   (f64x2.pmax (local.get $b2) (local.get $b3))))
        (local.set $u (f64.min (f64x2.extract_lane 0 (local.get $a0)) (f64x2.extract_lane 1 (local.get $a0))))
        (if (f64.lt (local.get $u) (local.get $mn))
          (then (local.set $mn (local.get $u))
                (local.set $blkMn (i32.sub (local.get $q) (i32.const 1024)))))
        (local.set $u (f64.max (f64x2.extract_lane 0 (local.get $b0)) (f64x2.extract_lane 1 (local.get $b0))))
        (if (f64.gt (local.get $u) (local.get $mx))
          (then (local.set $mx (local.get $u))
                (local.set $blkMx (i32.sub (local.get $q) (i32.const 1024)))))
        (br $block)))
    ;; the rest, sample by sample, positions kept
    (block $tailDone
      (loop $tail
        (br_if $tailDone (i32.ge_u (local.get $q) (local.get $end)))
        (local.set $u (f64.load (local.get $q)))
        (if (f64.lt (local.get $u) (local.get $mn))
          (then (local.set $mn (local.get $u)) (local.set $atMn (local.get $q))))
        (if (f64.gt (local.get $u) (local.get $mx))
          (then (local.set $mx (local.get $u)) (local.set $atMx (local.get $q))))
        (local.set $q (i32.add (local.get $q) (i32.const 8)))
        (br $tail)))
    (global.set $minK (call $position (local.get $p) (local.get $n) (local.get $mn)
                        (local.get $atMn) (local.get $blkMn) (i32.const 3) (i32.const 2)))
    (global.set $maxK (call $position (local.get $p) (local.get $n) (local.get $mx)
                        (local.get $atMx) (local.get $blkMx) (i32.const 3) (i32.const 2)))
    (global.get $minK))

  (func (export "scanPair") (param $p i32) (param $n i32) (param $lane i32) (result i32)
    (local $a0 v128) (local $a1 v128) (local $a2 v128) (local $a3 v128)
    (local $b0 v128) (local $b1 v128) (local $b2 v128) (local $b3 v128)
    (local $v v128) (local $pinf v128) (local $ninf v128)
    (local $q i32) (local $end i32) (local $bend i32)
    (local $blkMn i32) (local $blkMx i32) (local $atMn i32) (local $atMx i32)
    (local $mn f64) (local $mx f64) (local $u f64)
    (local.set $pinf (f64x2.splat (f64.const inf)))
    (local.set $ninf (f64x2.splat (f64.const -inf)))
    (local.set $mn (f64.const inf))
    (local.set $mx (f64.const -inf))
    (local.set $blkMn (i32.const -1))
    (local.set $blkMx (i32.const -1))
    (local.set $atMn (i32.const -1))
    (local.set $atMx (i32.const -1))
    (local.set $q (local.get $p))
    (local.set $end (i32.add (local.get $p) (i32.shl (local.get $n) (i32.const 4))))
    ;; whole blocks of 1024 bytes
    (block $blocksDone
      (loop $block
        (br_if $blocksDone (i32.gt_u (i32.add (local.get $q) (i32.const 1024)) (local.get $end)))
        (local.set $bend (i32.add (local.get $q) (i32.const 1024)))
        (local.set $a0 (local.get $pinf))
        (local.set $a1 (local.get $pinf))
        (local.set $a2 (local.get $pinf))
        (local.set $a3 (local.get $pinf))
        (local.set $b0 (local.get $ninf))
        (local.set $b1 (local.get $ninf))
        (local.set $b2 (local.get $ninf))
        (local.set $b3 (local.get $ninf))
        (loop $inner
          (local.set $v (v128.load offset=0 (local.get $q)))
          (local.set $a0 (f64x2.pmin (local.get $a0) (local.get $v)))
          (local.set $b0 (f64x2.pmax (local.get $b0) (local.get $v)))
          (local.set $v (v128.load offset=16 (local.get $q)))
          (local.set $a1 (f64x2.pmin (local.get $a1) (local.get $v)))
          (local.set $b1 (f64x2.pmax (local.get $b1) (local.get $v)))
          (local.set $v (v128.load offset=32 (local.get $q)))
          (local.set $a2 (f64x2.pmin (local.get $a2) (local.get $v)))
          (local.set $b2 (f64x2.pmax (local.get $b2) (local.get $v)))
          (local.set $v (v128.load offset=48 (local.get $q)))
          (local.set $a3 (f64x2.pmin (local.get $a3) (local.get $v)))
          (local.set $b3 (f64x2.pmax (local.get $b3) (local.get $v)))
          (local.set $q (i32.add (local.get $q) (i32.const 64)))
          (br_if $inner (i32.lt_u (local.get $q) (local.get $bend))))
        (local.set $a0 (f64x2.pmin (f64x2.pmin (local.get $a0) (local.get $a1))
                                   (f64x2.pmin (local.get $a2) (local.get $a3))))
        (local.set $b0 (f64x2.pmax (f64x2.pmax (local.get $b0) (local.get $b1))
                                   (f64x2.pmax (local.get $b2) (local.get $b3))))
        (local.set $u (select (f64x2.extract_lane 1 (local.get $a0)) (f64x2.extract_lane 0 (local.get $a0)) (local.get $lane)))
        (if (f64.lt (local.get $u) (local.get $mn))
          (then (local.set $mn (local.get $u))
                (local.set $blkMn (i32.sub (local.get $q) (i32.const 1024)))))
        (local.set $u (select (f64x2.extract_lane 1 (local.get $b0)) (f64x2.extract_lane 0 (local.get $b0)) (local.get $lane)))
        (if (f64.gt (local.get $u) (local.get $mx))
          (then (local.set $mx (local.get $u))
                (local.set $blkMx (i32.sub (local.get $q) (i32.const 1024)))))
        (br $block)))
    ;; the rest, sample by sample, positions kept
    (block $tailDone
      (loop $tail
        (br_if $tailDone (i32.ge_u (local.get $q) (local.get $end)))
        (local.set $u (f64.load (i32.add (local.get $q) (i32.shl (local.get $lane) (i32.const 3)))))
        (if (f64.lt (local.get $u) (local.get $mn))
          (then (local.set $mn (local.get $u)) (local.set $atMn (local.get $q))))
        (if (f64.gt (local.get $u) (local.get $mx))
          (then (local.set $mx (local.get $u)) (local.set $atMx (local.get $q))))
        (local.set $q (i32.add (local.get $q) (i32.const 16)))
        (br $tail)))
    (global.set $minK (call $position (local.get $p) (local.get $n) (local.get $mn)
                        (local.get $atMn) (local.get $blkMn) (i32.const 4) (local.get $lane)))
    (global.set $maxK (call $position (local.get $p) (local.get $n) (local.get $mx)
                        (local.get $atMx) (local.get $blkMx) (i32.const 4) (local.get $lane)))
    (global.get $minK))
)
