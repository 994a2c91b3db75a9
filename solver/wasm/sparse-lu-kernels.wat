;; Numeric kernels of the sparse LU (solver/linalg-sparse.ts), in WebAssembly text format.
;; Assembled into solver/wasm/sparse-lu-kernels.ts by `npm run gen:wasm` (scripts/gen-wasm.ts).
;;
;; Every array lives in the one imported memory; arguments are byte addresses (f64 arrays are
;; 8-byte aligned, i32 arrays 4-byte aligned) and element counts. The arithmetic is the same, in
;; the same order, as the reference loops described in linalg-sparse.ts, so results are
;; bit-identical to them (WebAssembly MVP has no fused multiply-add). Unitless.
(module
  (import "env" "memory" (memory 1))

  ;; val ← 0; val[aMap[q]] += scale·values[q]; val[diag[i]] += shift (if shift ≠ 0);
  ;; rowMax[r] ← largest |entry| of permuted row r of the input (for the pivot test).
  (func (export "load")
    (param $n i32) (param $nnz i32) (param $nnzA i32) (param $shift f64) (param $scale f64)
    (param $val i32) (param $values i32) (param $aMap i32) (param $aRow i32) (param $diag i32)
    (param $rowMax i32)
    (local $q i32) (local $i i32) (local $addr i32) (local $a f64) (local $r i32)
    (memory.fill (local.get $val) (i32.const 0) (i32.shl (local.get $nnz) (i32.const 3)))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $q) (local.get $nnzA)))
        (local.set $addr
          (i32.add (local.get $val)
            (i32.shl (i32.load (i32.add (local.get $aMap) (i32.shl (local.get $q) (i32.const 2)))) (i32.const 3))))
        (f64.store (local.get $addr)
          (f64.add (f64.load (local.get $addr))
            (f64.mul (local.get $scale)
              (f64.load (i32.add (local.get $values) (i32.shl (local.get $q) (i32.const 3)))))))
        (local.set $q (i32.add (local.get $q) (i32.const 1)))
        (br $next)))
    (if (f64.ne (local.get $shift) (f64.const 0))
      (then
        (local.set $i (i32.const 0))
        (block $done
          (loop $next
            (br_if $done (i32.ge_u (local.get $i) (local.get $n)))
            (local.set $addr
              (i32.add (local.get $val)
                (i32.shl (i32.load (i32.add (local.get $diag) (i32.shl (local.get $i) (i32.const 2)))) (i32.const 3))))
            (f64.store (local.get $addr) (f64.add (f64.load (local.get $addr)) (local.get $shift)))
            (local.set $i (i32.add (local.get $i) (i32.const 1)))
            (br $next)))))
    (memory.fill (local.get $rowMax) (i32.const 0) (i32.shl (local.get $n) (i32.const 3)))
    (local.set $q (i32.const 0))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $q) (local.get $nnzA)))
        (local.set $a
          (f64.abs (f64.load
            (i32.add (local.get $val)
              (i32.shl (i32.load (i32.add (local.get $aMap) (i32.shl (local.get $q) (i32.const 2)))) (i32.const 3))))))
        (local.set $addr
          (i32.add (local.get $rowMax)
            (i32.shl (i32.load (i32.add (local.get $aRow) (i32.shl (local.get $q) (i32.const 2)))) (i32.const 3))))
        (if (f64.gt (local.get $a) (f64.load (local.get $addr)))
          (then (f64.store (local.get $addr) (local.get $a))))
        (local.set $q (i32.add (local.get $q) (i32.const 1)))
        (br $next)))
    (local.set $i (i32.const 0))
    (block $done
      (loop $next
        (br_if $done (i32.ge_u (local.get $i) (local.get $n)))
        (local.set $a
          (f64.abs (f64.load
            (i32.add (local.get $val)
              (i32.shl (i32.load (i32.add (local.get $diag) (i32.shl (local.get $i) (i32.const 2)))) (i32.const 3))))))
        (local.set $addr (i32.add (local.get $rowMax) (i32.shl (local.get $i) (i32.const 3))))
        (if (f64.gt (local.get $a) (f64.load (local.get $addr)))
          (then (f64.store (local.get $addr) (local.get $a))))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $next))))

  ;; Pivot test shared by both eliminations: 1 if piv is finite, non-zero and larger than
  ;; 1e-14 times the row's largest input entry, else 0.
  (func $pivotOk (param $piv f64) (param $rowMax f64) (result i32)
    (i32.and
      (i32.and
        (f64.eq (f64.sub (local.get $piv) (local.get $piv)) (f64.const 0))
        (f64.ne (local.get $piv) (f64.const 0)))
      (f64.gt (f64.abs (local.get $piv)) (f64.mul (f64.const 1e-14) (local.get $rowMax)))))

  ;; Row-by-row elimination with the static schedule: for each L entry p = (i, k),
  ;; l_ik = val[p]/u_kk, then val[sched[m]] −= l_ik·val[q] over the U part of row k
  ;; (m from schedPtr[p]), two updates per pass. Returns 1, or 0 at a failed pivot.
  (func (export "eliminateScheduled")
    (param $n i32) (param $val i32) (param $luPtr i32) (param $luCol i32) (param $diag i32)
    (param $invDiag i32) (param $rowMax i32) (param $sched i32) (param $schedPtr i32) (result i32)
    (local $i i32) (local $p i32) (local $d i32) (local $k i32) (local $lik f64) (local $m i32)
    (local $qa i32) (local $qEnd i32) (local $t i32) (local $piv f64) (local $pa i32)
    (block $rows
      (loop $row
        (br_if $rows (i32.ge_u (local.get $i) (local.get $n)))
        (local.set $p (i32.load (i32.add (local.get $luPtr) (i32.shl (local.get $i) (i32.const 2)))))
        (local.set $d (i32.load (i32.add (local.get $diag) (i32.shl (local.get $i) (i32.const 2)))))
        (block $lower
          (loop $entry
            (br_if $lower (i32.ge_s (local.get $p) (local.get $d)))
            (local.set $k (i32.load (i32.add (local.get $luCol) (i32.shl (local.get $p) (i32.const 2)))))
            (local.set $pa (i32.add (local.get $val) (i32.shl (local.get $p) (i32.const 3))))
            (local.set $lik
              (f64.mul (f64.load (local.get $pa))
                (f64.load (i32.add (local.get $invDiag) (i32.shl (local.get $k) (i32.const 3))))))
            (f64.store (local.get $pa) (local.get $lik))
            (if (f64.ne (local.get $lik) (f64.const 0))
              (then
                (local.set $m
                  (i32.add (local.get $sched)
                    (i32.shl (i32.load (i32.add (local.get $schedPtr) (i32.shl (local.get $p) (i32.const 2)))) (i32.const 2))))
                (local.set $qa
                  (i32.add (local.get $val)
                    (i32.shl
                      (i32.add (i32.load (i32.add (local.get $diag) (i32.shl (local.get $k) (i32.const 2)))) (i32.const 1))
                      (i32.const 3))))
                (local.set $qEnd
                  (i32.add (local.get $val)
                    (i32.shl
                      (i32.load (i32.add (local.get $luPtr) (i32.shl (i32.add (local.get $k) (i32.const 1)) (i32.const 2))))
                      (i32.const 3))))
                (block $pairs
                  (loop $pair
                    (br_if $pairs (i32.ge_s (i32.add (local.get $qa) (i32.const 8)) (local.get $qEnd)))
                    (local.set $t (i32.add (local.get $val) (i32.shl (i32.load (local.get $m)) (i32.const 3))))
                    (f64.store (local.get $t)
                      (f64.sub (f64.load (local.get $t)) (f64.mul (local.get $lik) (f64.load (local.get $qa)))))
                    (local.set $t (i32.add (local.get $val) (i32.shl (i32.load offset=4 (local.get $m)) (i32.const 3))))
                    (f64.store (local.get $t)
                      (f64.sub (f64.load (local.get $t)) (f64.mul (local.get $lik) (f64.load offset=8 (local.get $qa)))))
                    (local.set $qa (i32.add (local.get $qa) (i32.const 16)))
                    (local.set $m (i32.add (local.get $m) (i32.const 8)))
                    (br $pair)))
                (if (i32.lt_s (local.get $qa) (local.get $qEnd))
                  (then
                    (local.set $t (i32.add (local.get $val) (i32.shl (i32.load (local.get $m)) (i32.const 3))))
                    (f64.store (local.get $t)
                      (f64.sub (f64.load (local.get $t)) (f64.mul (local.get $lik) (f64.load (local.get $qa)))))))))
            (local.set $p (i32.add (local.get $p) (i32.const 1)))
            (br $entry)))
        (local.set $piv (f64.load (i32.add (local.get $val) (i32.shl (local.get $d) (i32.const 3)))))
        (if (i32.eqz
              (call $pivotOk (local.get $piv)
                (f64.load (i32.add (local.get $rowMax) (i32.shl (local.get $i) (i32.const 3))))))
          (then (return (i32.const 0))))
        (f64.store (i32.add (local.get $invDiag) (i32.shl (local.get $i) (i32.const 3)))
          (f64.div (f64.const 1) (local.get $piv)))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $row)))
    (i32.const 1))

  ;; Row-by-row elimination through the scatter map `where` (position in row i of each column,
  ;; −1 elsewhere; all −1 on entry and on return), for operation counts too large for a schedule.
  ;; The pivot test uses the row's largest entry before elimination. Returns 1, or 0 at a failed pivot.
  (func (export "eliminateScatter")
    (param $n i32) (param $val i32) (param $luPtr i32) (param $luCol i32) (param $diag i32)
    (param $invDiag i32) (param $where i32) (result i32)
    (local $i i32) (local $start i32) (local $end i32) (local $d i32) (local $p i32) (local $k i32)
    (local $lik f64) (local $q i32) (local $kEnd i32) (local $t i32) (local $a f64) (local $rowMax f64)
    (local $piv f64) (local $pa i32)
    (block $rows
      (loop $row
        (br_if $rows (i32.ge_u (local.get $i) (local.get $n)))
        (local.set $start (i32.load (i32.add (local.get $luPtr) (i32.shl (local.get $i) (i32.const 2)))))
        (local.set $end (i32.load (i32.add (local.get $luPtr) (i32.shl (i32.add (local.get $i) (i32.const 1)) (i32.const 2)))))
        (local.set $d (i32.load (i32.add (local.get $diag) (i32.shl (local.get $i) (i32.const 2)))))
        (local.set $rowMax (f64.const 0))
        (local.set $p (local.get $start))
        (block $done
          (loop $next
            (br_if $done (i32.ge_s (local.get $p) (local.get $end)))
            (i32.store
              (i32.add (local.get $where)
                (i32.shl (i32.load (i32.add (local.get $luCol) (i32.shl (local.get $p) (i32.const 2)))) (i32.const 2)))
              (local.get $p))
            (local.set $a (f64.abs (f64.load (i32.add (local.get $val) (i32.shl (local.get $p) (i32.const 3))))))
            (if (f64.gt (local.get $a) (local.get $rowMax)) (then (local.set $rowMax (local.get $a))))
            (local.set $p (i32.add (local.get $p) (i32.const 1)))
            (br $next)))
        (local.set $p (local.get $start))
        (block $lower
          (loop $entry
            (br_if $lower (i32.ge_s (local.get $p) (local.get $d)))
            (local.set $k (i32.load (i32.add (local.get $luCol) (i32.shl (local.get $p) (i32.const 2)))))
            (local.set $pa (i32.add (local.get $val) (i32.shl (local.get $p) (i32.const 3))))
            (local.set $lik
              (f64.mul (f64.load (local.get $pa))
                (f64.load (i32.add (local.get $invDiag) (i32.shl (local.get $k) (i32.const 3))))))
            (f64.store (local.get $pa) (local.get $lik))
            (if (f64.ne (local.get $lik) (f64.const 0))
              (then
                (local.set $q (i32.add (i32.load (i32.add (local.get $diag) (i32.shl (local.get $k) (i32.const 2)))) (i32.const 1)))
                (local.set $kEnd (i32.load (i32.add (local.get $luPtr) (i32.shl (i32.add (local.get $k) (i32.const 1)) (i32.const 2)))))
                (block $done
                  (loop $next
                    (br_if $done (i32.ge_s (local.get $q) (local.get $kEnd)))
                    (local.set $t
                      (i32.add (local.get $val)
                        (i32.shl
                          (i32.load (i32.add (local.get $where)
                            (i32.shl (i32.load (i32.add (local.get $luCol) (i32.shl (local.get $q) (i32.const 2)))) (i32.const 2))))
                          (i32.const 3))))
                    (f64.store (local.get $t)
                      (f64.sub (f64.load (local.get $t))
                        (f64.mul (local.get $lik) (f64.load (i32.add (local.get $val) (i32.shl (local.get $q) (i32.const 3)))))))
                    (local.set $q (i32.add (local.get $q) (i32.const 1)))
                    (br $next)))))
            (local.set $p (i32.add (local.get $p) (i32.const 1)))
            (br $entry)))
        (local.set $p (local.get $start))
        (block $done
          (loop $next
            (br_if $done (i32.ge_s (local.get $p) (local.get $end)))
            (i32.store
              (i32.add (local.get $where)
                (i32.shl (i32.load (i32.add (local.get $luCol) (i32.shl (local.get $p) (i32.const 2)))) (i32.const 2)))
              (i32.const -1))
            (local.set $p (i32.add (local.get $p) (i32.const 1)))
            (br $next)))
        (local.set $piv (f64.load (i32.add (local.get $val) (i32.shl (local.get $d) (i32.const 3)))))
        (if (i32.eqz (call $pivotOk (local.get $piv) (local.get $rowMax)))
          (then (return (i32.const 0))))
        (f64.store (i32.add (local.get $invDiag) (i32.shl (local.get $i) (i32.const 3)))
          (f64.div (f64.const 1) (local.get $piv)))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $row)))
    (i32.const 1))

  ;; Forward and backward substitution in place on b (original numbering): row i of the
  ;; permuted factors is original row perm[i]; colOrig holds original column numbers.
  ;; Two partial sums per row, as in the reference loop.
  (func (export "solve")
    (param $n i32) (param $val i32) (param $luPtr i32) (param $colOrig i32) (param $diag i32)
    (param $perm i32) (param $invDiag i32) (param $b i32)
    (local $i i32) (local $ob i32) (local $s0 f64) (local $s1 f64) (local $pa i32) (local $ca i32)
    (local $endA i32)
    ;; forward: L has a unit diagonal
    (block $rows
      (loop $row
        (br_if $rows (i32.ge_s (local.get $i) (local.get $n)))
        (local.set $ob
          (i32.add (local.get $b)
            (i32.shl (i32.load (i32.add (local.get $perm) (i32.shl (local.get $i) (i32.const 2)))) (i32.const 3))))
        (local.set $s0 (f64.load (local.get $ob)))
        (local.set $s1 (f64.const 0))
        (local.set $pa (i32.load (i32.add (local.get $luPtr) (i32.shl (local.get $i) (i32.const 2)))))
        (local.set $ca (i32.add (local.get $colOrig) (i32.shl (local.get $pa) (i32.const 2))))
        (local.set $pa (i32.add (local.get $val) (i32.shl (local.get $pa) (i32.const 3))))
        (local.set $endA
          (i32.add (local.get $val)
            (i32.shl (i32.load (i32.add (local.get $diag) (i32.shl (local.get $i) (i32.const 2)))) (i32.const 3))))
        (block $pairs
          (loop $pair
            (br_if $pairs (i32.ge_s (i32.add (local.get $pa) (i32.const 8)) (local.get $endA)))
            (local.set $s0
              (f64.sub (local.get $s0)
                (f64.mul (f64.load (local.get $pa))
                  (f64.load (i32.add (local.get $b) (i32.shl (i32.load (local.get $ca)) (i32.const 3)))))))
            (local.set $s1
              (f64.sub (local.get $s1)
                (f64.mul (f64.load offset=8 (local.get $pa))
                  (f64.load (i32.add (local.get $b) (i32.shl (i32.load offset=4 (local.get $ca)) (i32.const 3)))))))
            (local.set $pa (i32.add (local.get $pa) (i32.const 16)))
            (local.set $ca (i32.add (local.get $ca) (i32.const 8)))
            (br $pair)))
        (if (i32.lt_s (local.get $pa) (local.get $endA))
          (then
            (local.set $s0
              (f64.sub (local.get $s0)
                (f64.mul (f64.load (local.get $pa))
                  (f64.load (i32.add (local.get $b) (i32.shl (i32.load (local.get $ca)) (i32.const 3)))))))))
        (f64.store (local.get $ob) (f64.add (local.get $s0) (local.get $s1)))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $row)))
    ;; backward: U's diagonal is applied through invDiag
    (local.set $i (i32.sub (local.get $n) (i32.const 1)))
    (block $rows
      (loop $row
        (br_if $rows (i32.lt_s (local.get $i) (i32.const 0)))
        (local.set $ob
          (i32.add (local.get $b)
            (i32.shl (i32.load (i32.add (local.get $perm) (i32.shl (local.get $i) (i32.const 2)))) (i32.const 3))))
        (local.set $s0 (f64.load (local.get $ob)))
        (local.set $s1 (f64.const 0))
        (local.set $pa (i32.add (i32.load (i32.add (local.get $diag) (i32.shl (local.get $i) (i32.const 2)))) (i32.const 1)))
        (local.set $ca (i32.add (local.get $colOrig) (i32.shl (local.get $pa) (i32.const 2))))
        (local.set $pa (i32.add (local.get $val) (i32.shl (local.get $pa) (i32.const 3))))
        (local.set $endA
          (i32.add (local.get $val)
            (i32.shl
              (i32.load (i32.add (local.get $luPtr) (i32.shl (i32.add (local.get $i) (i32.const 1)) (i32.const 2))))
              (i32.const 3))))
        (block $pairs
          (loop $pair
            (br_if $pairs (i32.ge_s (i32.add (local.get $pa) (i32.const 8)) (local.get $endA)))
            (local.set $s0
              (f64.sub (local.get $s0)
                (f64.mul (f64.load (local.get $pa))
                  (f64.load (i32.add (local.get $b) (i32.shl (i32.load (local.get $ca)) (i32.const 3)))))))
            (local.set $s1
              (f64.sub (local.get $s1)
                (f64.mul (f64.load offset=8 (local.get $pa))
                  (f64.load (i32.add (local.get $b) (i32.shl (i32.load offset=4 (local.get $ca)) (i32.const 3)))))))
            (local.set $pa (i32.add (local.get $pa) (i32.const 16)))
            (local.set $ca (i32.add (local.get $ca) (i32.const 8)))
            (br $pair)))
        (if (i32.lt_s (local.get $pa) (local.get $endA))
          (then
            (local.set $s0
              (f64.sub (local.get $s0)
                (f64.mul (f64.load (local.get $pa))
                  (f64.load (i32.add (local.get $b) (i32.shl (i32.load (local.get $ca)) (i32.const 3)))))))))
        (f64.store (local.get $ob)
          (f64.mul (f64.add (local.get $s0) (local.get $s1))
            (f64.load (i32.add (local.get $invDiag) (i32.shl (local.get $i) (i32.const 3))))))
        (local.set $i (i32.sub (local.get $i) (i32.const 1)))
        (br $row))))
)
