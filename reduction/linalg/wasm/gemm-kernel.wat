;; The packed-panel micro-kernel of reduction/linalg/gemm.ts in WebAssembly 128-bit SIMD.
;;
;; Goto & van de Geijn, "Anatomy of high-performance matrix multiplication", ACM TOMS 34(3), 2008: op(A)
;; is packed into 4-row panels (ap[4p + r]), op(B) into 4-column panels (bp[4p + q]), and a 4×4 register
;; tile of C is accumulated over the kc packed steps. Each tile row is two f64x2 accumulators; one packed
;; row of B is two v128 loads, each entry of A one load-and-splat. The sums are formed in the same order
;; as the scalar kernel (a separate multiply, then an add; no fused multiply-add), so both kernels give
;; bit-identical results.
;;
;; `block` runs the tile over a whole mc×nw block (both multiples of 4, the panels zero-padded) and
;; stores the block row-major with nw doubles per row, for the JavaScript side to add into C.
;; Pointers are byte offsets into the exported memory, laid out by packed-kernel.ts. Assembled by
;; `npm run build:wasm` (scripts/build-wasm.ts) into gemm-kernel-binary.ts; a unit test checks that the
;; committed bytes are this file's assembly.
(module
  (memory (export "memory") 1)

  ;; C[0..3][0..3] (rows ldc bytes apart, from cp) = Σ_p ap[4p + r] · bp[4p + q], p < kc (kc ≥ 1)
  (func $tile (param $kc i32) (param $ap i32) (param $bp i32) (param $cp i32) (param $ldc i32)
    (local $c0l v128) (local $c0h v128)
    (local $c1l v128) (local $c1h v128)
    (local $c2l v128) (local $c2h v128)
    (local $c3l v128) (local $c3h v128)
    (local $bl v128) (local $bh v128) (local $a v128)
    (loop $step
      (local.set $bl (v128.load (local.get $bp)))
      (local.set $bh (v128.load offset=16 (local.get $bp)))
        ;; row 0 of the tile: c0 += a[p,0] · b[p,0..3]
        (local.set $a (v128.load64_splat offset=0 (local.get $ap)))
        (local.set $c0l (f64x2.add (local.get $c0l) (f64x2.mul (local.get $a) (local.get $bl))))
        (local.set $c0h (f64x2.add (local.get $c0h) (f64x2.mul (local.get $a) (local.get $bh))))
        ;; row 1 of the tile: c1 += a[p,1] · b[p,0..3]
        (local.set $a (v128.load64_splat offset=8 (local.get $ap)))
        (local.set $c1l (f64x2.add (local.get $c1l) (f64x2.mul (local.get $a) (local.get $bl))))
        (local.set $c1h (f64x2.add (local.get $c1h) (f64x2.mul (local.get $a) (local.get $bh))))
        ;; row 2 of the tile: c2 += a[p,2] · b[p,0..3]
        (local.set $a (v128.load64_splat offset=16 (local.get $ap)))
        (local.set $c2l (f64x2.add (local.get $c2l) (f64x2.mul (local.get $a) (local.get $bl))))
        (local.set $c2h (f64x2.add (local.get $c2h) (f64x2.mul (local.get $a) (local.get $bh))))
        ;; row 3 of the tile: c3 += a[p,3] · b[p,0..3]
        (local.set $a (v128.load64_splat offset=24 (local.get $ap)))
        (local.set $c3l (f64x2.add (local.get $c3l) (f64x2.mul (local.get $a) (local.get $bl))))
        (local.set $c3h (f64x2.add (local.get $c3h) (f64x2.mul (local.get $a) (local.get $bh))))
      (local.set $ap (i32.add (local.get $ap) (i32.const 32)))
      (local.set $bp (i32.add (local.get $bp) (i32.const 32)))
      (br_if $step (local.tee $kc (i32.sub (local.get $kc) (i32.const 1)))))
    (v128.store (local.get $cp) (local.get $c0l))
    (v128.store offset=16 (local.get $cp) (local.get $c0h))
    (local.set $cp (i32.add (local.get $cp) (local.get $ldc)))
    (v128.store (local.get $cp) (local.get $c1l))
    (v128.store offset=16 (local.get $cp) (local.get $c1h))
    (local.set $cp (i32.add (local.get $cp) (local.get $ldc)))
    (v128.store (local.get $cp) (local.get $c2l))
    (v128.store offset=16 (local.get $cp) (local.get $c2h))
    (local.set $cp (i32.add (local.get $cp) (local.get $ldc)))
    (v128.store (local.get $cp) (local.get $c3l))
    (v128.store offset=16 (local.get $cp) (local.get $c3h)))

  ;; The mc×nw block of tiles: A panels kc·32 bytes apart from ap, B panels kc·32 bytes apart from bp,
  ;; the result row-major (nw doubles per row) from cp.
  (func (export "block") (param $kc i32) (param $mc i32) (param $nw i32) (param $ap i32) (param $bp i32) (param $cp i32)
    (local $panel i32) (local $ldc i32) (local $jp i32) (local $ip i32) (local $a i32) (local $c i32)
    (if (i32.le_s (local.get $kc) (i32.const 0)) (then (return)))
    (local.set $panel (i32.shl (local.get $kc) (i32.const 5)))
    (local.set $ldc (i32.shl (local.get $nw) (i32.const 3)))
    (block $columnsDone
      (loop $columns
        (br_if $columnsDone (i32.ge_s (local.get $jp) (local.get $nw)))
        (local.set $a (local.get $ap))
        (local.set $c (i32.add (local.get $cp) (i32.shl (local.get $jp) (i32.const 3))))
        (local.set $ip (i32.const 0))
        (block $rowsDone
          (loop $rows
            (br_if $rowsDone (i32.ge_s (local.get $ip) (local.get $mc)))
            (call $tile (local.get $kc) (local.get $a) (local.get $bp) (local.get $c) (local.get $ldc))
            (local.set $a (i32.add (local.get $a) (local.get $panel)))
            (local.set $c (i32.add (local.get $c) (i32.shl (local.get $ldc) (i32.const 2))))
            (local.set $ip (i32.add (local.get $ip) (i32.const 4)))
            (br $rows)))
        (local.set $bp (i32.add (local.get $bp) (local.get $panel)))
        (local.set $jp (i32.add (local.get $jp) (i32.const 4)))
        (br $columns)))))
