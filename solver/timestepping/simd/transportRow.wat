;; The inner row loop of the transport step (solver/timestepping/transportKernel.ts) in WebAssembly SIMD,
;; two cells per iteration (f64x2). Every operation is the JavaScript loop's, in the same order and without
;; fused multiply-adds, so the results are the same to the last bit. Memory is the model's shared memory
;; (fields and scratch live in it); all pointers are byte addresses.
;;
;; row(previous, next, below, slopeY, fluxY, pairs, rowBytes,
;;     cxPlus, cxMinus, ax, dxn, cyPlus, cyMinus, ay, dyn, lower, inversePivot, slopeOfCell0, fluxWestFace)
;;   previous: address of cell (0, j, k) of the previous field; next: the same cell of the next field;
;;   below: the same cell one layer down in the next field (or in previous with lower = 0 in the ground layer);
;;   slopeY, fluxY: the slab's y slope and south-face flux buffers (index i);
;;   pairs: nx / 2; rowBytes: 8 * rowStride.
;;   Returns the flux through the east face of the last cell.
(module
  (import "env" "memory" (memory 1 65536 shared))
  (func (export "row")
    (param $previous i32) (param $next i32) (param $below i32) (param $slopeY i32) (param $fluxY i32)
    (param $pairs i32) (param $rowBytes i32)
    (param $cxPlus f64) (param $cxMinus f64) (param $ax f64) (param $dxn f64)
    (param $cyPlus f64) (param $cyMinus f64) (param $ay f64) (param $dyn f64)
    (param $lower f64) (param $inversePivot f64) (param $slope0 f64) (param $fluxWest f64)
    (result f64)
    (local $o i32) (local $end i32)
    (local $c0 v128) (local $cE v128) (local $cN v128)
    (local $dE v128) (local $dEE v128) (local $dN v128) (local $dNN v128)
    (local $absE v128) (local $absEE v128) (local $absN v128) (local $absNN v128)
    (local $sumX v128) (local $sumY v128) (local $inverse v128)
    (local $sE v128) (local $sN v128) (local $s0 v128)
    (local $fluxE v128) (local $fluxW v128) (local $fluxN v128) (local $explicit v128)
    (local $previousSlope v128) (local $previousFlux v128)
    (local $vcxPlus v128) (local $vcxMinus v128) (local $vax v128) (local $vdxn v128)
    (local $vcyPlus v128) (local $vcyMinus v128) (local $vay v128) (local $vdyn v128)
    (local $vlower v128) (local $vpivot v128) (local $floor v128) (local $one v128)
    (local.set $vcxPlus (f64x2.splat (local.get $cxPlus)))
    (local.set $vcxMinus (f64x2.splat (local.get $cxMinus)))
    (local.set $vax (f64x2.splat (local.get $ax)))
    (local.set $vdxn (f64x2.splat (local.get $dxn)))
    (local.set $vcyPlus (f64x2.splat (local.get $cyPlus)))
    (local.set $vcyMinus (f64x2.splat (local.get $cyMinus)))
    (local.set $vay (f64x2.splat (local.get $ay)))
    (local.set $vdyn (f64x2.splat (local.get $dyn)))
    (local.set $vlower (f64x2.splat (local.get $lower)))
    (local.set $vpivot (f64x2.splat (local.get $inversePivot)))
    (local.set $floor (f64x2.splat (f64.const 1e-150)))
    (local.set $one (f64x2.splat (f64.const 1)))
    (local.set $previousSlope (f64x2.splat (local.get $slope0)))
    (local.set $previousFlux (f64x2.splat (local.get $fluxWest)))
    (local.set $o (i32.const 0))
    (local.set $end (i32.shl (local.get $pairs) (i32.const 4)))
    (block $done
      (loop $pair
        (br_if $done (i32.ge_u (local.get $o) (local.get $end)))
        (local.set $c0 (v128.load align=8 (i32.add (local.get $previous) (local.get $o))))
        (local.set $cE (v128.load align=8 (i32.add (local.get $previous) (i32.add (local.get $o) (i32.const 8)))))
        (local.set $cN (v128.load align=8 (i32.add (i32.add (local.get $previous) (local.get $rowBytes)) (local.get $o))))
        (local.set $dE (f64x2.sub (local.get $cE) (local.get $c0)))
        (local.set $dEE (f64x2.sub
          (v128.load align=8 (i32.add (local.get $previous) (i32.add (local.get $o) (i32.const 16))))
          (local.get $cE)))
        (local.set $dN (f64x2.sub (local.get $cN) (local.get $c0)))
        (local.set $dNN (f64x2.sub
          (v128.load align=8 (i32.add (i32.add (local.get $previous) (i32.shl (local.get $rowBytes) (i32.const 1))) (local.get $o)))
          (local.get $cN)))
        (local.set $absE (f64x2.abs (local.get $dE)))
        (local.set $absEE (f64x2.abs (local.get $dEE)))
        (local.set $absN (f64x2.abs (local.get $dN)))
        (local.set $absNN (f64x2.abs (local.get $dNN)))
        (local.set $sumX (f64x2.add (f64x2.add (local.get $absE) (local.get $absEE)) (local.get $floor)))
        (local.set $sumY (f64x2.add (f64x2.add (local.get $absN) (local.get $absNN)) (local.get $floor)))
        (local.set $inverse (f64x2.div (local.get $one) (f64x2.mul (local.get $sumX) (local.get $sumY))))
        (local.set $sE (f64x2.mul (f64x2.mul
          (f64x2.add (f64x2.mul (local.get $dE) (local.get $absEE)) (f64x2.mul (local.get $absE) (local.get $dEE)))
          (local.get $sumY)) (local.get $inverse)))
        (local.set $sN (f64x2.mul (f64x2.mul
          (f64x2.add (f64x2.mul (local.get $dN) (local.get $absNN)) (f64x2.mul (local.get $absN) (local.get $dNN)))
          (local.get $sumX)) (local.get $inverse)))
        ;; slopes of cells i, i+1 = [previous pair's second, this pair's first]
        (local.set $s0 (i8x16.shuffle 8 9 10 11 12 13 14 15 16 17 18 19 20 21 22 23 (local.get $previousSlope) (local.get $sE)))
        (local.set $fluxE (f64x2.sub
          (f64x2.add
            (f64x2.mul (local.get $vcxPlus) (f64x2.add (local.get $c0) (f64x2.mul (local.get $vax) (local.get $s0))))
            (f64x2.mul (local.get $vcxMinus) (f64x2.sub (local.get $cE) (f64x2.mul (local.get $vax) (local.get $sE)))))
          (f64x2.mul (local.get $vdxn) (local.get $dE))))
        (local.set $fluxW (i8x16.shuffle 8 9 10 11 12 13 14 15 16 17 18 19 20 21 22 23 (local.get $previousFlux) (local.get $fluxE)))
        (local.set $fluxN (f64x2.sub
          (f64x2.add
            (f64x2.mul (local.get $vcyPlus) (f64x2.add (local.get $c0)
              (f64x2.mul (local.get $vay) (v128.load align=8 (i32.add (local.get $slopeY) (local.get $o))))))
            (f64x2.mul (local.get $vcyMinus) (f64x2.sub (local.get $cN) (f64x2.mul (local.get $vay) (local.get $sN)))))
          (f64x2.mul (local.get $vdyn) (local.get $dN))))
        (local.set $explicit (f64x2.sub
          (f64x2.sub (local.get $c0) (f64x2.sub (local.get $fluxE) (local.get $fluxW)))
          (f64x2.sub (local.get $fluxN) (v128.load align=8 (i32.add (local.get $fluxY) (local.get $o))))))
        (v128.store align=8 (i32.add (local.get $next) (local.get $o))
          (f64x2.mul
            (f64x2.add (local.get $explicit)
              (f64x2.mul (local.get $vlower) (v128.load align=8 (i32.add (local.get $below) (local.get $o)))))
            (local.get $vpivot)))
        (v128.store align=8 (i32.add (local.get $fluxY) (local.get $o)) (local.get $fluxN))
        (v128.store align=8 (i32.add (local.get $slopeY) (local.get $o)) (local.get $sN))
        (local.set $previousSlope (local.get $sE))
        (local.set $previousFlux (local.get $fluxE))
        (local.set $o (i32.add (local.get $o) (i32.const 16)))
        (br $pair)))
    (f64x2.extract_lane 1 (local.get $previousFlux)))
)
