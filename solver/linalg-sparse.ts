/**
 * Sparse LU factorisation for large, sparse systems with a fixed pattern (the stiff
 * integrator's W = I/(hγ) − J for big mechanisms). Unitless: the caller's units carry through.
 *
 * Phases:
 *  1. Ordering, once: minimum-degree ordering on the symmetrised pattern A + Aᵀ
 *     (explicit elimination graph; Tinney–Walker scheme 2 / Rose 1972 — common practice).
 *  2. Symbolic factorisation, once: elimination tree (Liu 1986) and row patterns of L
 *     by tree traversal (Davis, "Direct Methods for Sparse Linear Systems", ch. 4 —
 *     algorithm described there, implemented here from the description). Because the
 *     symmetrised pattern is used, the pattern of U is the transpose of that of L.
 *  3. Numeric factorisation, every call: row-oriented (IKJ) Gaussian elimination with
 *     static diagonal pivots in the chosen order, reusing the pattern; no allocation.
 *     A pivot that is zero, tiny relative to its row or non-finite makes `factor` return
 *     false (the integrator then shrinks its step, which makes W diagonally dominant).
 */

export interface SparseLU {
  readonly n: number;
  /** Number of stored entries of L+U (including the diagonal). */
  readonly nnzLU: number;
  /** Factor the matrix whose CSR values (pattern given at creation) are `values`. */
  factor(values: Float64Array): boolean;
  /** Solve A x = b in place (b overwritten with x). */
  solve(b: Float64Array): void;
}

/** Minimum-degree ordering of a symmetric pattern given as adjacency lists (no self loops). */
export function minimumDegreeOrder(n: number, adj: Set<number>[]): Int32Array {
  const g = adj.map((s) => new Set(s));
  const eliminated = new Uint8Array(n);
  const order = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    let best = -1;
    let bestDeg = Infinity;
    for (let v = 0; v < n; v++) {
      if (eliminated[v]) continue;
      const d = g[v].size;
      if (d < bestDeg) {
        bestDeg = d;
        best = v;
        if (d === 0) break;
      }
    }
    order[k] = best;
    eliminated[best] = 1;
    const nb = Array.from(g[best]);
    for (const u of nb) g[u].delete(best);
    // neighbours become a clique (fill)
    for (let a = 0; a < nb.length; a++) {
      const ga = g[nb[a]];
      for (let b = 0; b < nb.length; b++) if (a !== b) ga.add(nb[b]);
    }
    g[best].clear();
  }
  return order;
}

/**
 * Build a sparse LU workspace for the n×n CSR pattern (rowPtr, colIdx).
 * The diagonal need not be present in the pattern; it is added internally.
 */
export function createSparseLU(n: number, rowPtr: Int32Array, colIdx: Int32Array): SparseLU {
  // 1. symmetrised adjacency and ordering
  const adj: Set<number>[] = [];
  for (let i = 0; i < n; i++) adj.push(new Set());
  for (let i = 0; i < n; i++) {
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      const j = colIdx[p];
      if (j !== i) {
        adj[i].add(j);
        adj[j].add(i);
      }
    }
  }
  const perm = minimumDegreeOrder(n, adj); // perm[newIndex] = old index
  const iperm = new Int32Array(n);
  for (let k = 0; k < n; k++) iperm[perm[k]] = k;

  // permuted symmetric adjacency, lower part per row
  const lowerRows: number[][] = [];
  for (let i = 0; i < n; i++) lowerRows.push([]);
  for (let oi = 0; oi < n; oi++) {
    const i = iperm[oi];
    for (const oj of adj[oi]) {
      const j = iperm[oj];
      if (j < i) lowerRows[i].push(j);
    }
  }

  // 2. elimination tree
  const parent = new Int32Array(n).fill(-1);
  const ancestor = new Int32Array(n).fill(-1);
  for (let i = 0; i < n; i++) {
    for (const k of lowerRows[i]) {
      let j = k;
      while (ancestor[j] !== -1 && ancestor[j] !== i) {
        const next = ancestor[j];
        ancestor[j] = i;
        j = next;
      }
      if (ancestor[j] === -1) {
        ancestor[j] = i;
        parent[j] = i;
      }
    }
  }
  // row patterns of L (strictly lower)
  const mark = new Int32Array(n).fill(-1);
  const lRows: number[][] = [];
  for (let i = 0; i < n; i++) {
    mark[i] = i;
    const row: number[] = [];
    for (const k of lowerRows[i]) {
      let j = k;
      while (j !== -1 && mark[j] !== i) {
        row.push(j);
        mark[j] = i;
        j = parent[j];
      }
    }
    row.sort((a, b) => a - b);
    lRows.push(row);
  }
  // U rows = transpose of L pattern
  const uRows: number[][] = [];
  for (let i = 0; i < n; i++) uRows.push([]);
  for (let i = 0; i < n; i++) for (const j of lRows[i]) uRows[j].push(i);
  // combined row storage: L part, diagonal, U part (sorted ascending)
  const luPtr = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) luPtr[i + 1] = luPtr[i] + lRows[i].length + 1 + uRows[i].length;
  const nnz = luPtr[n];
  const luCol = new Int32Array(nnz);
  const diag = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    let p = luPtr[i];
    for (const j of lRows[i]) luCol[p++] = j;
    diag[i] = p;
    luCol[p++] = i;
    for (const j of uRows[i]) luCol[p++] = j; // already ascending (i loops ascending)
  }
  // map from input CSR value index to LU position
  const where = new Int32Array(n).fill(-1);
  const aMap = new Int32Array(rowPtr[n]);
  for (let oi = 0; oi < n; oi++) {
    const i = iperm[oi];
    for (let p = luPtr[i]; p < luPtr[i + 1]; p++) where[luCol[p]] = p;
    for (let q = rowPtr[oi]; q < rowPtr[oi + 1]; q++) aMap[q] = where[iperm[colIdx[q]]];
    for (let p = luPtr[i]; p < luPtr[i + 1]; p++) where[luCol[p]] = -1;
  }

  const val = new Float64Array(nnz);
  const x = new Float64Array(n);
  const nnzA = rowPtr[n];

  function factor(values: Float64Array): boolean {
    val.fill(0);
    for (let q = 0; q < nnzA; q++) val[aMap[q]] += values[q];
    for (let i = 0; i < n; i++) {
      const start = luPtr[i];
      const end = luPtr[i + 1];
      let rowMax = 0;
      for (let p = start; p < end; p++) {
        where[luCol[p]] = p;
        const a = Math.abs(val[p]);
        if (a > rowMax) rowMax = a;
      }
      const d = diag[i];
      for (let p = start; p < d; p++) {
        const k = luCol[p];
        const lik = val[p] / val[diag[k]];
        val[p] = lik;
        if (lik === 0) continue;
        const kEnd = luPtr[k + 1];
        for (let q = diag[k] + 1; q < kEnd; q++) val[where[luCol[q]]] -= lik * val[q];
      }
      for (let p = start; p < end; p++) where[luCol[p]] = -1;
      const piv = val[d];
      if (!Number.isFinite(piv) || Math.abs(piv) <= 1e-14 * rowMax || piv === 0) return false;
    }
    return true;
  }

  function solve(b: Float64Array): void {
    for (let i = 0; i < n; i++) x[i] = b[perm[i]];
    for (let i = 0; i < n; i++) {
      let s = x[i];
      const d = diag[i];
      for (let p = luPtr[i]; p < d; p++) s -= val[p] * x[luCol[p]];
      x[i] = s;
    }
    for (let i = n - 1; i >= 0; i--) {
      let s = x[i];
      const d = diag[i];
      const end = luPtr[i + 1];
      for (let p = d + 1; p < end; p++) s -= val[p] * x[luCol[p]];
      x[i] = s / val[d];
    }
    for (let i = 0; i < n; i++) b[perm[i]] = x[i];
  }

  return { n, nnzLU: nnz, factor, solve };
}
