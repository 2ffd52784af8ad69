;; Matrix–vector product y = M·x (row-major M) in WebAssembly 128-bit SIMD, for the solvers' chains of
;; products (reduction/simulate/parallel-matvec.ts), and the dot product of the stiff solver's triangular
;; solves (reduction/simulate/iteration-matrix.ts).
;;
;; Rows go four at a time; each row's sum is kept in one f64x2 accumulator whose two lanes add up the
;; even and the odd columns, and is finished as (even + odd) + the last term when the column count is odd.
;; The scalar loops `matVecRows` (reduction/simulate/linear-system.ts) and `dotEvenOdd` form the same sums
;; in the same order (a separate multiply, then an add), so both give bit-identical results.
;;
;; The memory is imported, shared, so that two threads can split the rows of one product. Pointers are
;; byte offsets. Assembled by `npm run build:wasm` (scripts/build-wasm.ts) into matvec-kernel-binary.ts;
;; a unit test checks that the committed bytes are this file's assembly.
(module
  (import "env" "memory" (memory 1 65536 shared))

  ;; y[r] = Σ_j M[r·cols + j]·x[j] for r0 ≤ r < r1
  (func (export "matvec") (param $r0 i32) (param $r1 i32) (param $cols i32) (param $m i32) (param $x i32) (param $y i32)
    (local $r i32) (local $j i32) (local $pairs i32) (local $odd i32) (local $rowBytes i32)
    (local $p0 i32) (local $p1 i32) (local $p2 i32) (local $p3 i32) (local $px i32) (local $yr i32)
    (local $a0 v128) (local $a1 v128) (local $a2 v128) (local $a3 v128) (local $xv v128) (local $s f64)
    (local.set $rowBytes (i32.shl (local.get $cols) (i32.const 3)))
    (local.set $pairs (i32.shr_u (local.get $cols) (i32.const 1)))
    (local.set $odd (i32.and (local.get $cols) (i32.const 1)))
    (local.set $r (local.get $r0))
    ;; four rows at a time
    (block $fourDone
      (loop $four
        (br_if $fourDone (i32.gt_s (i32.add (local.get $r) (i32.const 4)) (local.get $r1)))
        (local.set $p0 (i32.add (local.get $m) (i32.mul (local.get $r) (local.get $rowBytes))))
        (local.set $p1 (i32.add (local.get $p0) (local.get $rowBytes)))
        (local.set $p2 (i32.add (local.get $p1) (local.get $rowBytes)))
        (local.set $p3 (i32.add (local.get $p2) (local.get $rowBytes)))
        (local.set $a0 (v128.const f64x2 0 0))
        (local.set $a1 (v128.const f64x2 0 0))
        (local.set $a2 (v128.const f64x2 0 0))
        (local.set $a3 (v128.const f64x2 0 0))
        (local.set $px (local.get $x))
        (local.set $j (local.get $pairs))
        (block $pairsDone
          (loop $pair
            (br_if $pairsDone (i32.eqz (local.get $j)))
            (local.set $xv (v128.load (local.get $px)))
            (local.set $a0 (f64x2.add (local.get $a0) (f64x2.mul (v128.load (local.get $p0)) (local.get $xv))))
            (local.set $a1 (f64x2.add (local.get $a1) (f64x2.mul (v128.load (local.get $p1)) (local.get $xv))))
            (local.set $a2 (f64x2.add (local.get $a2) (f64x2.mul (v128.load (local.get $p2)) (local.get $xv))))
            (local.set $a3 (f64x2.add (local.get $a3) (f64x2.mul (v128.load (local.get $p3)) (local.get $xv))))
            (local.set $p0 (i32.add (local.get $p0) (i32.const 16)))
            (local.set $p1 (i32.add (local.get $p1) (i32.const 16)))
            (local.set $p2 (i32.add (local.get $p2) (i32.const 16)))
            (local.set $p3 (i32.add (local.get $p3) (i32.const 16)))
            (local.set $px (i32.add (local.get $px) (i32.const 16)))
            (local.set $j (i32.sub (local.get $j) (i32.const 1)))
            (br $pair)))
        (local.set $yr (i32.add (local.get $y) (i32.shl (local.get $r) (i32.const 3))))
        (local.set $s (f64.add (f64x2.extract_lane 0 (local.get $a0)) (f64x2.extract_lane 1 (local.get $a0))))
        (if (local.get $odd) (then (local.set $s (f64.add (local.get $s) (f64.mul (f64.load (local.get $p0)) (f64.load (local.get $px)))))))
        (f64.store offset=0 (local.get $yr) (local.get $s))
        (local.set $s (f64.add (f64x2.extract_lane 0 (local.get $a1)) (f64x2.extract_lane 1 (local.get $a1))))
        (if (local.get $odd) (then (local.set $s (f64.add (local.get $s) (f64.mul (f64.load (local.get $p1)) (f64.load (local.get $px)))))))
        (f64.store offset=8 (local.get $yr) (local.get $s))
        (local.set $s (f64.add (f64x2.extract_lane 0 (local.get $a2)) (f64x2.extract_lane 1 (local.get $a2))))
        (if (local.get $odd) (then (local.set $s (f64.add (local.get $s) (f64.mul (f64.load (local.get $p2)) (f64.load (local.get $px)))))))
        (f64.store offset=16 (local.get $yr) (local.get $s))
        (local.set $s (f64.add (f64x2.extract_lane 0 (local.get $a3)) (f64x2.extract_lane 1 (local.get $a3))))
        (if (local.get $odd) (then (local.set $s (f64.add (local.get $s) (f64.mul (f64.load (local.get $p3)) (f64.load (local.get $px)))))))
        (f64.store offset=24 (local.get $yr) (local.get $s))
        (local.set $r (i32.add (local.get $r) (i32.const 4)))
        (br $four)))
    ;; the last rows one at a time, in the same order
    (block $oneDone
      (loop $one
        (br_if $oneDone (i32.ge_s (local.get $r) (local.get $r1)))
        (local.set $p0 (i32.add (local.get $m) (i32.mul (local.get $r) (local.get $rowBytes))))
        (local.set $a0 (v128.const f64x2 0 0))
        (local.set $px (local.get $x))
        (local.set $j (local.get $pairs))
        (block $pairsDone1
          (loop $pair1
            (br_if $pairsDone1 (i32.eqz (local.get $j)))
            (local.set $a0 (f64x2.add (local.get $a0) (f64x2.mul (v128.load (local.get $p0)) (v128.load (local.get $px)))))
            (local.set $p0 (i32.add (local.get $p0) (i32.const 16)))
            (local.set $px (i32.add (local.get $px) (i32.const 16)))
            (local.set $j (i32.sub (local.get $j) (i32.const 1)))
            (br $pair1)))
        (local.set $s (f64.add (f64x2.extract_lane 0 (local.get $a0)) (f64x2.extract_lane 1 (local.get $a0))))
        (if (local.get $odd) (then (local.set $s (f64.add (local.get $s) (f64.mul (f64.load (local.get $p0)) (f64.load (local.get $px)))))))
        (f64.store (i32.add (local.get $y) (i32.shl (local.get $r) (i32.const 3))) (local.get $s))
        (local.set $r (i32.add (local.get $r) (i32.const 1)))
        (br $one))))
  ;; Σ_j a[j]·b[j], j < len: (Σ even j + Σ odd j) + the last term when len is odd
  (func (export "dot") (param $len i32) (param $a i32) (param $b i32) (result f64)
    (local $j i32) (local $acc v128) (local $s f64)
    (local.set $j (i32.shr_u (local.get $len) (i32.const 1)))
    (block $done
      (loop $pair
        (br_if $done (i32.eqz (local.get $j)))
        (local.set $acc (f64x2.add (local.get $acc) (f64x2.mul (v128.load (local.get $a)) (v128.load (local.get $b)))))
        (local.set $a (i32.add (local.get $a) (i32.const 16)))
        (local.set $b (i32.add (local.get $b) (i32.const 16)))
        (local.set $j (i32.sub (local.get $j) (i32.const 1)))
        (br $pair)))
    (local.set $s (f64.add (f64x2.extract_lane 0 (local.get $acc)) (f64x2.extract_lane 1 (local.get $acc))))
    (if (i32.and (local.get $len) (i32.const 1))
      (then (local.set $s (f64.add (local.get $s) (f64.mul (f64.load (local.get $a)) (f64.load (local.get $b)))))))
    (local.get $s)))
