/**
 * Dense LU factorisation with partial (row) pivoting on row-major Float64Array matrices,
 * and the matching forward/back substitution. Unitless: the caller's matrix units carry
 * through (the stiff integrator uses it for W = I/(hγ) − J, units 1/s).
 *
 * Algorithm: right-looking Doolittle elimination, textbook (Golub & Van Loan,
 * "Matrix Computations", §3.4 — common practice). No allocation after construction.
 */

export interface DenseLU {
  readonly n: number;
  /** Factor the n×n row-major matrix `a` in place of the internal buffer. Returns false if singular or non-finite. */
  factor(a: Float64Array): boolean;
  /** Factor shift·I + scale·A for the row-major n×n matrix `a` (e.g. W = I/(hγ) − J: shift 1/(hγ), scale −1). */
  factorShifted(a: Float64Array, shift: number, scale: number): boolean;
  /** Solve A x = b in place (b is overwritten with x), using the last successful factorisation. */
  solve(b: Float64Array): void;
}

/** Create a reusable dense LU workspace for n×n systems. */
export function createDenseLU(n: number): DenseLU {
  const lu = new Float64Array(n * n);
  const piv = new Int32Array(n);
  const invDiag = new Float64Array(n);

  function factor(a: Float64Array): boolean {
    lu.set(a.subarray(0, n * n));
    return eliminate();
  }

  function factorShifted(a: Float64Array, shift: number, scale: number): boolean {
    const nn = n * n;
    for (let q = 0; q < nn; q++) lu[q] = scale * a[q];
    for (let i = 0; i < n; i++) lu[i * n + i] += shift;
    return eliminate();
  }

  function eliminate(): boolean {
    for (let k = 0; k < n; k++) {
      // pivot search in column k
      let p = k;
      let maxv = Math.abs(lu[k * n + k]);
      for (let i = k + 1; i < n; i++) {
        const v = Math.abs(lu[i * n + k]);
        if (v > maxv) {
          maxv = v;
          p = i;
        }
      }
      if (!(maxv > 0) || !Number.isFinite(maxv)) return false;
      piv[k] = p;
      if (p !== k) {
        const rk = k * n;
        const rp = p * n;
        for (let j = 0; j < n; j++) {
          const tmp = lu[rk + j];
          lu[rk + j] = lu[rp + j];
          lu[rp + j] = tmp;
        }
      }
      const rk = k * n;
      const inv = 1 / lu[rk + k];
      invDiag[k] = inv;
      for (let i = k + 1; i < n; i++) {
        const ri = i * n;
        const l = lu[ri + k] * inv;
        if (l === 0) continue;
        lu[ri + k] = l;
        for (let j = k + 1; j < n; j++) lu[ri + j] -= l * lu[rk + j];
      }
    }
    return true;
  }

  function solve(b: Float64Array): void {
    // apply row permutation and forward substitution (unit lower)
    for (let k = 0; k < n; k++) {
      const p = piv[k];
      if (p !== k) {
        const t = b[k];
        b[k] = b[p];
        b[p] = t;
      }
    }
    for (let i = 1; i < n; i++) {
      const ri = i * n;
      let s = b[i];
      for (let j = 0; j < i; j++) s -= lu[ri + j] * b[j];
      b[i] = s;
    }
    for (let i = n - 1; i >= 0; i--) {
      const ri = i * n;
      let s = b[i];
      for (let j = i + 1; j < n; j++) s -= lu[ri + j] * b[j];
      b[i] = s * invDiag[i];
    }
  }

  return { n, factor, factorShifted, solve };
}
