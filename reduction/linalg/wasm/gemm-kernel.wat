;; The 4×4 register-blocked micro-kernel of reduction/linalg/gemm.ts in WebAssembly 128-bit SIMD.
;;
;; tile[r][q] = Σ_p ap[4p + r] · bp[4p + q] for r, q in 0..3 and p in 0..kc−1, over the packed panels of
;; Goto & van de Geijn, "Anatomy of high-performance matrix multiplication", ACM TOMS 34(3), 2008.
;; Each tile row is two f64x2 accumulators; one packed row of B is two v128 loads, each entry of A one
;; load-and-splat. The sums are formed in the same order as the scalar kernel (a separate multiply, then
;; an add; no fused multiply-add), so both kernels give bit-identical results.
;;
;; Pointers are byte offsets into the exported memory. The JavaScript side (wasm-kernel.ts) lays out the
;; packed panels and the 16-double tile there. Assembled by `npm run build:wasm` (scripts/build-wasm.ts)
;; into gemm-kernel-binary.ts; a unit test checks that the committed bytes are this file's assembly.
(module
  (memory (export "memory") 1)
  (func (export "kernel4x4") (param $kc i32) (param $ap i32) (param $bp i32) (param $tile i32)
    (local $c0l v128) (local $c0h v128)
    (local $c1l v128) (local $c1h v128)
    (local $c2l v128) (local $c2h v128)
    (local $c3l v128) (local $c3h v128)
    (local $bl v128) (local $bh v128) (local $a v128)
    (block $done
      (br_if $done (i32.le_s (local.get $kc) (i32.const 0)))
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
        (br_if $step (local.tee $kc (i32.sub (local.get $kc) (i32.const 1))))))
    (v128.store offset=0 (local.get $tile) (local.get $c0l))
    (v128.store offset=16 (local.get $tile) (local.get $c0h))
    (v128.store offset=32 (local.get $tile) (local.get $c1l))
    (v128.store offset=48 (local.get $tile) (local.get $c1h))
    (v128.store offset=64 (local.get $tile) (local.get $c2l))
    (v128.store offset=80 (local.get $tile) (local.get $c2h))
    (v128.store offset=96 (local.get $tile) (local.get $c3l))
    (v128.store offset=112 (local.get $tile) (local.get $c3h))))
