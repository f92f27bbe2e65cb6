;; The four-row band kernels of sum-band.ts in WebAssembly with 128-bit SIMD, two spectral
;; pixels per step in f64x2 lanes: plainGroup (fusedPlainGroup, no rejection), screenedGroup
;; (fusedGroup, the cleaner's first screen against the neighbouring rows) and plainAdd
;; (sum-rows.ts addPlainGroup, the background rows' sum). Every lane does the
;; JavaScript kernel's operations in the same order (IEEE double, no fused multiply-add), so the
;; sums are bit-identical to it; the tests compare the two paths exactly.
;;
;; Memory, laid out by band-groups.ts: eight row slots of L f32, then the f64 arrays background,
;; floorVariance, counts and variance, the f32 bin (a group's four-row sum per pixel), the i32
;; candidates and the u8 saturation flags. plainGroup reads four rows from `rows` on (stride
;; 4L bytes); screenedGroup takes a pointer per row. A pixel that is not summed (a NaN in a row,
;; or a row failing the screen) goes to candidates, ascending, and their count is returned.
;;
;; Rebuild band-groups-wasm.ts after an edit: npm run build:kernels (a unit test checks that the
;; two agree).
(module
  (memory (export "memory") 1)

  ;; One pixel, scalar: summed (returns n), or appended to candidates (returns n + 1).
  (func $pixel
    (param $p i32) (param $n i32) (param $rows i32) (param $stride i32)
    (param $bg i32) (param $fv i32) (param $counts i32) (param $var i32)
    (param $bin i32) (param $cand i32) (param $sat i32)
    (param $halfGain f64) (param $level f64) (result i32)
    (local $a i32) (local $o i32)
    (local $v0 f64) (local $v1 f64) (local $v2 f64) (local $v3 f64)
    (local $bp f64) (local $fp f64)
    (local $d0 f64) (local $d1 f64) (local $d2 f64) (local $d3 f64)
    (local $all f64)
    (local.set $a (i32.add (local.get $rows) (i32.shl (local.get $p) (i32.const 2))))
    (local.set $v0 (f64.promote_f32 (f32.load (local.get $a))))
    (local.set $v1 (f64.promote_f32 (f32.load (i32.add (local.get $a) (local.get $stride)))))
    (local.set $v2 (f64.promote_f32 (f32.load (i32.add (local.get $a) (i32.shl (local.get $stride) (i32.const 1))))))
    (local.set $v3 (f64.promote_f32 (f32.load (i32.add (local.get $a) (i32.mul (local.get $stride) (i32.const 3))))))
    (local.set $all (f64.add (f64.add (f64.add (local.get $v0) (local.get $v1)) (local.get $v2)) (local.get $v3)))
    (if (f64.ne (local.get $all) (local.get $all))
      (then
        (i32.store (i32.add (local.get $cand) (i32.shl (local.get $n) (i32.const 2))) (local.get $p))
        (return (i32.add (local.get $n) (i32.const 1)))))
    (local.set $o (i32.shl (local.get $p) (i32.const 3)))
    (local.set $bp (f64.load (i32.add (local.get $bg) (local.get $o))))
    (local.set $fp (f64.load (i32.add (local.get $fv) (local.get $o))))
    (local.set $d0 (f64.sub (local.get $v0) (local.get $bp)))
    (local.set $d1 (f64.sub (local.get $v1) (local.get $bp)))
    (local.set $d2 (f64.sub (local.get $v2) (local.get $bp)))
    (local.set $d3 (f64.sub (local.get $v3) (local.get $bp)))
    (f32.store (i32.add (local.get $bin) (i32.shl (local.get $p) (i32.const 2)))
      (f32.demote_f64 (f64.add (f64.add (f64.add (local.get $d0) (local.get $d1)) (local.get $d2)) (local.get $d3))))
    (f64.store (i32.add (local.get $counts) (local.get $o))
      (f64.add (f64.add (f64.add (f64.add
        (f64.load (i32.add (local.get $counts) (local.get $o)))
        (local.get $d0)) (local.get $d1)) (local.get $d2)) (local.get $d3)))
    (f64.store (i32.add (local.get $var) (local.get $o))
      (f64.add (f64.add (f64.add (f64.add
        (f64.load (i32.add (local.get $var) (local.get $o)))
        (f64.add (f64.mul (local.get $halfGain) (f64.add (local.get $d0) (f64.abs (local.get $d0)))) (local.get $fp)))
        (f64.add (f64.mul (local.get $halfGain) (f64.add (local.get $d1) (f64.abs (local.get $d1)))) (local.get $fp)))
        (f64.add (f64.mul (local.get $halfGain) (f64.add (local.get $d2) (f64.abs (local.get $d2)))) (local.get $fp)))
        (f64.add (f64.mul (local.get $halfGain) (f64.add (local.get $d3) (f64.abs (local.get $d3)))) (local.get $fp))))
    (if (i32.or (i32.or (f64.ge (local.get $v0) (local.get $level)) (f64.ge (local.get $v1) (local.get $level)))
                (i32.or (f64.ge (local.get $v2) (local.get $level)) (f64.ge (local.get $v3) (local.get $level))))
      (then (i32.store8 (i32.add (local.get $sat) (local.get $p)) (i32.const 1))))
    (local.get $n))

  (func (export "plainGroup")
    (param $L i32) (param $rows i32) (param $bg i32) (param $fv i32) (param $counts i32)
    (param $var i32) (param $bin i32) (param $cand i32) (param $sat i32)
    (param $halfGain f64) (param $level f64) (result i32)
    (local $p i32) (local $n i32) (local $stride i32) (local $a i32) (local $o i32)
    (local $hg v128) (local $lv v128) (local $fp v128) (local $bp v128) (local $m v128)
    (local $v0 v128) (local $v1 v128) (local $v2 v128) (local $v3 v128)
    (local $d0 v128) (local $d1 v128) (local $d2 v128) (local $d3 v128)
    (local.set $stride (i32.shl (local.get $L) (i32.const 2)))
    (local.set $hg (f64x2.splat (local.get $halfGain)))
    (local.set $lv (f64x2.splat (local.get $level)))
    (block $done
      (loop $pairs
        (br_if $done (i32.gt_u (i32.add (local.get $p) (i32.const 2)) (local.get $L)))
        (local.set $a (i32.add (local.get $rows) (i32.shl (local.get $p) (i32.const 2))))
        (local.set $v0 (f64x2.promote_low_f32x4 (v128.load64_zero (local.get $a))))
        (local.set $v1 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $a) (local.get $stride)))))
        (local.set $v2 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $a) (i32.shl (local.get $stride) (i32.const 1))))))
        (local.set $v3 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $a) (i32.mul (local.get $stride) (i32.const 3))))))
        (local.set $m (f64x2.add (f64x2.add (f64x2.add (local.get $v0) (local.get $v1)) (local.get $v2)) (local.get $v3)))
        (if (i64x2.all_true (f64x2.eq (local.get $m) (local.get $m)))
          (then
            (local.set $o (i32.shl (local.get $p) (i32.const 3)))
            (local.set $bp (v128.load (i32.add (local.get $bg) (local.get $o))))
            (local.set $fp (v128.load (i32.add (local.get $fv) (local.get $o))))
            (local.set $d0 (f64x2.sub (local.get $v0) (local.get $bp)))
            (local.set $d1 (f64x2.sub (local.get $v1) (local.get $bp)))
            (local.set $d2 (f64x2.sub (local.get $v2) (local.get $bp)))
            (local.set $d3 (f64x2.sub (local.get $v3) (local.get $bp)))
            (v128.store64_lane 0 (i32.add (local.get $bin) (i32.shl (local.get $p) (i32.const 2)))
              (f32x4.demote_f64x2_zero
                (f64x2.add (f64x2.add (f64x2.add (local.get $d0) (local.get $d1)) (local.get $d2)) (local.get $d3))))
            (v128.store (i32.add (local.get $counts) (local.get $o))
              (f64x2.add (f64x2.add (f64x2.add (f64x2.add
                (v128.load (i32.add (local.get $counts) (local.get $o)))
                (local.get $d0)) (local.get $d1)) (local.get $d2)) (local.get $d3)))
            (v128.store (i32.add (local.get $var) (local.get $o))
              (f64x2.add (f64x2.add (f64x2.add (f64x2.add
                (v128.load (i32.add (local.get $var) (local.get $o)))
                (f64x2.add (f64x2.mul (local.get $hg) (f64x2.add (local.get $d0) (f64x2.abs (local.get $d0)))) (local.get $fp)))
                (f64x2.add (f64x2.mul (local.get $hg) (f64x2.add (local.get $d1) (f64x2.abs (local.get $d1)))) (local.get $fp)))
                (f64x2.add (f64x2.mul (local.get $hg) (f64x2.add (local.get $d2) (f64x2.abs (local.get $d2)))) (local.get $fp)))
                (f64x2.add (f64x2.mul (local.get $hg) (f64x2.add (local.get $d3) (f64x2.abs (local.get $d3)))) (local.get $fp))))
            (local.set $m
              (v128.or
                (v128.or (f64x2.ge (local.get $v0) (local.get $lv)) (f64x2.ge (local.get $v1) (local.get $lv)))
                (v128.or (f64x2.ge (local.get $v2) (local.get $lv)) (f64x2.ge (local.get $v3) (local.get $lv)))))
            (if (v128.any_true (local.get $m))
              (then
                (if (i64.ne (i64x2.extract_lane 0 (local.get $m)) (i64.const 0))
                  (then (i32.store8 (i32.add (local.get $sat) (local.get $p)) (i32.const 1))))
                (if (i64.ne (i64x2.extract_lane 1 (local.get $m)) (i64.const 0))
                  (then (i32.store8 (i32.add (i32.add (local.get $sat) (local.get $p)) (i32.const 1)) (i32.const 1)))))))
          (else
            ;; A NaN in one of the two pixels: each on its own, in order, so candidates stay sorted.
            (local.set $n (call $pixel (local.get $p) (local.get $n) (local.get $rows) (local.get $stride)
              (local.get $bg) (local.get $fv) (local.get $counts) (local.get $var) (local.get $bin)
              (local.get $cand) (local.get $sat) (local.get $halfGain) (local.get $level)))
            (local.set $n (call $pixel (i32.add (local.get $p) (i32.const 1)) (local.get $n) (local.get $rows) (local.get $stride)
              (local.get $bg) (local.get $fv) (local.get $counts) (local.get $var) (local.get $bin)
              (local.get $cand) (local.get $sat) (local.get $halfGain) (local.get $level)))))
        (local.set $p (i32.add (local.get $p) (i32.const 2)))
        (br $pairs)))
    (if (i32.lt_u (local.get $p) (local.get $L))
      (then
        (local.set $n (call $pixel (local.get $p) (local.get $n) (local.get $rows) (local.get $stride)
          (local.get $bg) (local.get $fv) (local.get $counts) (local.get $var) (local.get $bin)
          (local.get $cand) (local.get $sat) (local.get $halfGain) (local.get $level)))))
    (local.get $n))

  ;; One pixel of a screened group, scalar: row s + j (value v_j, t_j = v_j − screen) passes when
  ;; t_j is at most each of rows s + j − 2, s + j − 1 and s + j + 1 (sum-band.ts fusedGroup);
  ;; four passing rows are summed (returns n), anything else is appended to candidates (n + 1).
  (func $screenedPixel
    (param $p i32) (param $n i32)
    (param $am i32) (param $bm i32) (param $r0 i32) (param $r1 i32) (param $r2 i32) (param $r3 i32) (param $r4 i32)
    (param $bg i32) (param $fv i32) (param $counts i32) (param $var i32)
    (param $bin i32) (param $cand i32) (param $sat i32)
    (param $screen f64) (param $halfGain f64) (param $level f64) (result i32)
    (local $f i32) (local $o i32)
    (local $v0 f64) (local $v1 f64) (local $v2 f64) (local $v3 f64) (local $va f64) (local $vb f64) (local $v4 f64)
    (local $t0 f64) (local $t1 f64) (local $t2 f64) (local $t3 f64)
    (local $bp f64) (local $fp f64)
    (local $d0 f64) (local $d1 f64) (local $d2 f64) (local $d3 f64)
    (local.set $f (i32.shl (local.get $p) (i32.const 2)))
    (local.set $va (f64.promote_f32 (f32.load (i32.add (local.get $am) (local.get $f)))))
    (local.set $vb (f64.promote_f32 (f32.load (i32.add (local.get $bm) (local.get $f)))))
    (local.set $v0 (f64.promote_f32 (f32.load (i32.add (local.get $r0) (local.get $f)))))
    (local.set $v1 (f64.promote_f32 (f32.load (i32.add (local.get $r1) (local.get $f)))))
    (local.set $v2 (f64.promote_f32 (f32.load (i32.add (local.get $r2) (local.get $f)))))
    (local.set $v3 (f64.promote_f32 (f32.load (i32.add (local.get $r3) (local.get $f)))))
    (local.set $v4 (f64.promote_f32 (f32.load (i32.add (local.get $r4) (local.get $f)))))
    (local.set $t0 (f64.sub (local.get $v0) (local.get $screen)))
    (local.set $t1 (f64.sub (local.get $v1) (local.get $screen)))
    (local.set $t2 (f64.sub (local.get $v2) (local.get $screen)))
    (local.set $t3 (f64.sub (local.get $v3) (local.get $screen)))
    (if (i32.eqz
          (i32.and
            (i32.and
              (i32.and (i32.and (f64.le (local.get $t0) (local.get $vb)) (f64.le (local.get $t0) (local.get $v1))) (i32.and (f64.le (local.get $t0) (local.get $va)) (f64.le (local.get $t1) (local.get $v0))))
              (i32.and (i32.and (f64.le (local.get $t1) (local.get $v2)) (f64.le (local.get $t1) (local.get $vb))) (i32.and (f64.le (local.get $t2) (local.get $v1)) (f64.le (local.get $t2) (local.get $v3)))))
            (i32.and (i32.and (f64.le (local.get $t2) (local.get $v0)) (f64.le (local.get $t3) (local.get $v2))) (i32.and (f64.le (local.get $t3) (local.get $v4)) (f64.le (local.get $t3) (local.get $v1))))))
      (then
        (i32.store (i32.add (local.get $cand) (i32.shl (local.get $n) (i32.const 2))) (local.get $p))
        (return (i32.add (local.get $n) (i32.const 1)))))
    (local.set $o (i32.shl (local.get $p) (i32.const 3)))
    (local.set $bp (f64.load (i32.add (local.get $bg) (local.get $o))))
    (local.set $fp (f64.load (i32.add (local.get $fv) (local.get $o))))
    (local.set $d0 (f64.sub (local.get $v0) (local.get $bp)))
    (local.set $d1 (f64.sub (local.get $v1) (local.get $bp)))
    (local.set $d2 (f64.sub (local.get $v2) (local.get $bp)))
    (local.set $d3 (f64.sub (local.get $v3) (local.get $bp)))
    (f32.store (i32.add (local.get $bin) (local.get $f))
      (f32.demote_f64 (f64.add (f64.add (f64.add (local.get $d0) (local.get $d1)) (local.get $d2)) (local.get $d3))))
    (f64.store (i32.add (local.get $counts) (local.get $o))
      (f64.add (f64.add (f64.add (f64.add
        (f64.load (i32.add (local.get $counts) (local.get $o)))
        (local.get $d0)) (local.get $d1)) (local.get $d2)) (local.get $d3)))
    (f64.store (i32.add (local.get $var) (local.get $o))
      (f64.add (f64.add (f64.add (f64.add
        (f64.load (i32.add (local.get $var) (local.get $o)))
        (f64.add (f64.mul (local.get $halfGain) (f64.add (local.get $d0) (f64.abs (local.get $d0)))) (local.get $fp)))
        (f64.add (f64.mul (local.get $halfGain) (f64.add (local.get $d1) (f64.abs (local.get $d1)))) (local.get $fp)))
        (f64.add (f64.mul (local.get $halfGain) (f64.add (local.get $d2) (f64.abs (local.get $d2)))) (local.get $fp)))
        (f64.add (f64.mul (local.get $halfGain) (f64.add (local.get $d3) (f64.abs (local.get $d3)))) (local.get $fp))))
    (if (i32.or (i32.or (f64.ge (local.get $v0) (local.get $level)) (f64.ge (local.get $v1) (local.get $level)))
                (i32.or (f64.ge (local.get $v2) (local.get $level)) (f64.ge (local.get $v3) (local.get $level))))
      (then (i32.store8 (i32.add (local.get $sat) (local.get $p)) (i32.const 1))))
    (local.get $n))

  (func (export "screenedGroup")
    (param $L i32) (param $am i32) (param $bm i32) (param $r0 i32) (param $r1 i32) (param $r2 i32) (param $r3 i32) (param $r4 i32)
    (param $bg i32) (param $fv i32) (param $counts i32) (param $var i32)
    (param $bin i32) (param $cand i32) (param $sat i32)
    (param $screen f64) (param $halfGain f64) (param $level f64) (result i32)
    (local $p i32) (local $n i32) (local $f i32) (local $o i32)
    (local $hg v128) (local $lv v128) (local $sv v128) (local $fp v128) (local $bp v128) (local $m v128)
    (local $v0 v128) (local $v1 v128) (local $v2 v128) (local $v3 v128) (local $va v128) (local $vb v128) (local $v4 v128)
    (local $t0 v128) (local $t1 v128) (local $t2 v128) (local $t3 v128)
    (local $d0 v128) (local $d1 v128) (local $d2 v128) (local $d3 v128)
    (local.set $hg (f64x2.splat (local.get $halfGain)))
    (local.set $lv (f64x2.splat (local.get $level)))
    (local.set $sv (f64x2.splat (local.get $screen)))
    (block $done
      (loop $pairs
        (br_if $done (i32.gt_u (i32.add (local.get $p) (i32.const 2)) (local.get $L)))
        (local.set $f (i32.shl (local.get $p) (i32.const 2)))
        (local.set $va (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $am) (local.get $f)))))
        (local.set $vb (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $bm) (local.get $f)))))
        (local.set $v0 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $r0) (local.get $f)))))
        (local.set $v1 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $r1) (local.get $f)))))
        (local.set $v2 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $r2) (local.get $f)))))
        (local.set $v3 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $r3) (local.get $f)))))
        (local.set $v4 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $r4) (local.get $f)))))
        (local.set $t0 (f64x2.sub (local.get $v0) (local.get $sv)))
        (local.set $t1 (f64x2.sub (local.get $v1) (local.get $sv)))
        (local.set $t2 (f64x2.sub (local.get $v2) (local.get $sv)))
        (local.set $t3 (f64x2.sub (local.get $v3) (local.get $sv)))
        (if (i64x2.all_true
              (v128.and
                (v128.and
                  (v128.and (v128.and (f64x2.le (local.get $t0) (local.get $vb)) (f64x2.le (local.get $t0) (local.get $v1))) (v128.and (f64x2.le (local.get $t0) (local.get $va)) (f64x2.le (local.get $t1) (local.get $v0))))
                  (v128.and (v128.and (f64x2.le (local.get $t1) (local.get $v2)) (f64x2.le (local.get $t1) (local.get $vb))) (v128.and (f64x2.le (local.get $t2) (local.get $v1)) (f64x2.le (local.get $t2) (local.get $v3)))))
                (v128.and (v128.and (f64x2.le (local.get $t2) (local.get $v0)) (f64x2.le (local.get $t3) (local.get $v2))) (v128.and (f64x2.le (local.get $t3) (local.get $v4)) (f64x2.le (local.get $t3) (local.get $v1))))))
          (then
            (local.set $o (i32.shl (local.get $p) (i32.const 3)))
            (local.set $bp (v128.load (i32.add (local.get $bg) (local.get $o))))
            (local.set $fp (v128.load (i32.add (local.get $fv) (local.get $o))))
            (local.set $d0 (f64x2.sub (local.get $v0) (local.get $bp)))
            (local.set $d1 (f64x2.sub (local.get $v1) (local.get $bp)))
            (local.set $d2 (f64x2.sub (local.get $v2) (local.get $bp)))
            (local.set $d3 (f64x2.sub (local.get $v3) (local.get $bp)))
            (v128.store64_lane 0 (i32.add (local.get $bin) (local.get $f))
              (f32x4.demote_f64x2_zero
                (f64x2.add (f64x2.add (f64x2.add (local.get $d0) (local.get $d1)) (local.get $d2)) (local.get $d3))))
            (v128.store (i32.add (local.get $counts) (local.get $o))
              (f64x2.add (f64x2.add (f64x2.add (f64x2.add
                (v128.load (i32.add (local.get $counts) (local.get $o)))
                (local.get $d0)) (local.get $d1)) (local.get $d2)) (local.get $d3)))
            (v128.store (i32.add (local.get $var) (local.get $o))
              (f64x2.add (f64x2.add (f64x2.add (f64x2.add
                (v128.load (i32.add (local.get $var) (local.get $o)))
                (f64x2.add (f64x2.mul (local.get $hg) (f64x2.add (local.get $d0) (f64x2.abs (local.get $d0)))) (local.get $fp)))
                (f64x2.add (f64x2.mul (local.get $hg) (f64x2.add (local.get $d1) (f64x2.abs (local.get $d1)))) (local.get $fp)))
                (f64x2.add (f64x2.mul (local.get $hg) (f64x2.add (local.get $d2) (f64x2.abs (local.get $d2)))) (local.get $fp)))
                (f64x2.add (f64x2.mul (local.get $hg) (f64x2.add (local.get $d3) (f64x2.abs (local.get $d3)))) (local.get $fp))))
            (local.set $m
              (v128.or
                (v128.or (f64x2.ge (local.get $v0) (local.get $lv)) (f64x2.ge (local.get $v1) (local.get $lv)))
                (v128.or (f64x2.ge (local.get $v2) (local.get $lv)) (f64x2.ge (local.get $v3) (local.get $lv)))))
            (if (v128.any_true (local.get $m))
              (then
                (if (i64.ne (i64x2.extract_lane 0 (local.get $m)) (i64.const 0))
                  (then (i32.store8 (i32.add (local.get $sat) (local.get $p)) (i32.const 1))))
                (if (i64.ne (i64x2.extract_lane 1 (local.get $m)) (i64.const 0))
                  (then (i32.store8 (i32.add (i32.add (local.get $sat) (local.get $p)) (i32.const 1)) (i32.const 1)))))))
          (else
            ;; A pixel of the two fails the screen: each on its own, in order, so candidates stay sorted.
            (local.set $n (call $screenedPixel (local.get $p) (local.get $n) (local.get $am) (local.get $bm) (local.get $r0) (local.get $r1) (local.get $r2) (local.get $r3) (local.get $r4) (local.get $bg) (local.get $fv) (local.get $counts) (local.get $var) (local.get $bin) (local.get $cand) (local.get $sat) (local.get $screen) (local.get $halfGain) (local.get $level)))
            (local.set $n (call $screenedPixel (i32.add (local.get $p) (i32.const 1)) (local.get $n) (local.get $am) (local.get $bm) (local.get $r0) (local.get $r1) (local.get $r2) (local.get $r3) (local.get $r4) (local.get $bg) (local.get $fv) (local.get $counts) (local.get $var) (local.get $bin) (local.get $cand) (local.get $sat) (local.get $screen) (local.get $halfGain) (local.get $level)))))
        (local.set $p (i32.add (local.get $p) (i32.const 2)))
        (br $pairs)))
    (if (i32.lt_u (local.get $p) (local.get $L))
      (then (local.set $n (call $screenedPixel (local.get $p) (local.get $n) (local.get $am) (local.get $bm) (local.get $r0) (local.get $r1) (local.get $r2) (local.get $r3) (local.get $r4) (local.get $bg) (local.get $fv) (local.get $counts) (local.get $var) (local.get $bin) (local.get $cand) (local.get $sat) (local.get $screen) (local.get $halfGain) (local.get $level)))))
    (local.get $n))

  ;; One pixel of plainAdd, scalar: added (returns n), or appended to candidates (returns n + 1).
  (func $addPixel (param $p i32) (param $n i32) (param $rows i32) (param $stride i32) (param $sum i32) (param $cand i32) (result i32)
    (local $a i32) (local $o i32) (local $v0 f64) (local $v1 f64) (local $v2 f64) (local $v3 f64) (local $all f64)
    (local.set $a (i32.add (local.get $rows) (i32.shl (local.get $p) (i32.const 2))))
    (local.set $v0 (f64.promote_f32 (f32.load (local.get $a))))
    (local.set $v1 (f64.promote_f32 (f32.load (i32.add (local.get $a) (local.get $stride)))))
    (local.set $v2 (f64.promote_f32 (f32.load (i32.add (local.get $a) (i32.shl (local.get $stride) (i32.const 1))))))
    (local.set $v3 (f64.promote_f32 (f32.load (i32.add (local.get $a) (i32.mul (local.get $stride) (i32.const 3))))))
    (local.set $all (f64.add (f64.add (f64.add (local.get $v0) (local.get $v1)) (local.get $v2)) (local.get $v3)))
    (if (f64.ne (local.get $all) (local.get $all))
      (then
        (i32.store (i32.add (local.get $cand) (i32.shl (local.get $n) (i32.const 2))) (local.get $p))
        (return (i32.add (local.get $n) (i32.const 1)))))
    (local.set $o (i32.add (local.get $sum) (i32.shl (local.get $p) (i32.const 3))))
    (f64.store (local.get $o)
      (f64.add (f64.add (f64.add (f64.add (f64.load (local.get $o)) (local.get $v0)) (local.get $v1)) (local.get $v2)) (local.get $v3)))
    (local.get $n))

  ;; sum-rows.ts addPlainGroup: four rows (from `rows` on, stride 4L bytes) added to the f64 `sum`
  ;; where none is NaN, rows in order; the other pixels go to candidates, their count returned.
  (func (export "plainAdd") (param $L i32) (param $rows i32) (param $sum i32) (param $cand i32) (result i32)
    (local $p i32) (local $n i32) (local $stride i32) (local $a i32) (local $o i32)
    (local $v0 v128) (local $v1 v128) (local $v2 v128) (local $v3 v128) (local $m v128)
    (local.set $stride (i32.shl (local.get $L) (i32.const 2)))
    (block $done
      (loop $pairs
        (br_if $done (i32.gt_u (i32.add (local.get $p) (i32.const 2)) (local.get $L)))
        (local.set $a (i32.add (local.get $rows) (i32.shl (local.get $p) (i32.const 2))))
        (local.set $v0 (f64x2.promote_low_f32x4 (v128.load64_zero (local.get $a))))
        (local.set $v1 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $a) (local.get $stride)))))
        (local.set $v2 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $a) (i32.shl (local.get $stride) (i32.const 1))))))
        (local.set $v3 (f64x2.promote_low_f32x4 (v128.load64_zero (i32.add (local.get $a) (i32.mul (local.get $stride) (i32.const 3))))))
        (local.set $m (f64x2.add (f64x2.add (f64x2.add (local.get $v0) (local.get $v1)) (local.get $v2)) (local.get $v3)))
        (if (i64x2.all_true (f64x2.eq (local.get $m) (local.get $m)))
          (then
            (local.set $o (i32.add (local.get $sum) (i32.shl (local.get $p) (i32.const 3))))
            (v128.store (local.get $o)
              (f64x2.add (f64x2.add (f64x2.add (f64x2.add (v128.load (local.get $o)) (local.get $v0)) (local.get $v1)) (local.get $v2)) (local.get $v3))))
          (else
            (local.set $n (call $addPixel (local.get $p) (local.get $n) (local.get $rows) (local.get $stride) (local.get $sum) (local.get $cand)))
            (local.set $n (call $addPixel (i32.add (local.get $p) (i32.const 1)) (local.get $n) (local.get $rows) (local.get $stride) (local.get $sum) (local.get $cand)))))
        (local.set $p (i32.add (local.get $p) (i32.const 2)))
        (br $pairs)))
    (if (i32.lt_u (local.get $p) (local.get $L))
      (then (local.set $n (call $addPixel (local.get $p) (local.get $n) (local.get $rows) (local.get $stride) (local.get $sum) (local.get $cand)))))
    (local.get $n))
)
